package repl

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"time"

	"couplet/mdo"
)

// Summary is the content of summary.json, written by `couplet run`.
type Summary struct {
	Study       string         `json:"study"`
	Script      string         `json:"script"`
	Tool        string         `json:"tool"`
	Seed        *uint64        `json:"seed"`
	Optimizer   string         `json:"optimizer,omitempty"`
	Formulation string         `json:"formulation,omitempty"`
	Stop        string         `json:"stop,omitempty"`
	Evaluations int            `json:"evaluations"`
	Analyses    int            `json:"analyses"`
	Failed      int            `json:"failed"`
	Best        *SummaryPoint  `json:"best,omitempty"`
	Front       []SummaryPoint `json:"front,omitempty"`
	Cells       int            `json:"cells"`
	// Started and ElapsedSeconds are the only fields that change from one
	// run of the same script and seed to the next.
	Started        string  `json:"started"`
	ElapsedSeconds float64 `json:"elapsed_seconds"`
}

// SummaryPoint is one design point of a summary.
type SummaryPoint struct {
	Objective   *float64            `json:"objective,omitempty"`
	Objectives  map[string]*float64 `json:"objectives,omitempty"`
	Design      map[string]*float64 `json:"design"`
	Feasible    bool                `json:"feasible"`
	Violation   *float64            `json:"violation,omitempty"`
	Constraints map[string]*float64 `json:"constraints"`
	Error       string              `json:"error,omitempty"`
}

// num maps a float to JSON (null for NaN and infinities).
func num(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

// point summarises an evaluation of result r.
func point(r *mdo.Result, e *mdo.Evaluation, single bool) SummaryPoint {
	p := SummaryPoint{Design: map[string]*float64{}, Constraints: map[string]*float64{}, Feasible: e.Feasible, Error: e.Err}
	for k, d := range r.Design {
		if k < len(e.Design) {
			p.Design[d.Name] = num(e.Design[k])
		}
	}
	for k, c := range r.Constraints {
		if k < len(e.Constraints) {
			name := c.Name
			if _, dup := p.Constraints[name]; dup {
				name = fmt.Sprintf("%s#%d", c.Name, k+1)
			}
			p.Constraints[name] = num(e.Constraints[k])
		}
	}
	if !e.Feasible {
		p.Violation = num(e.Violation)
	}
	if single {
		if len(e.Objectives) > 0 {
			p.Objective = num(e.Objectives[0])
		}
	} else {
		p.Objectives = map[string]*float64{}
		for k, o := range r.Objectives {
			if k < len(e.Objectives) {
				p.Objectives[o.Name] = num(e.Objectives[k])
			}
		}
	}
	return p
}

// NewSummary summarises a run's result (r may be nil when the script
// published none).
func NewSummary(script string, r *mdo.Result, seed *uint64, cells int, started time.Time, elapsed time.Duration) *Summary {
	s := &Summary{Script: filepath.Base(script), Tool: "couplet " + Version, Seed: seed, Cells: cells,
		Started: started.UTC().Format(time.RFC3339), ElapsedSeconds: math.Round(elapsed.Seconds()*1000) / 1000}
	if r == nil {
		return s
	}
	s.Study = r.Study
	seedv := r.Seed
	s.Seed = &seedv
	s.Optimizer = r.Optimizer
	s.Formulation = r.Formulation.String()
	s.Stop = r.Stop
	s.Evaluations = r.Evaluations
	s.Analyses = r.Analyses
	s.Failed = r.Failed
	if len(r.Objectives) > 1 {
		s.Front = []SummaryPoint{}
		for _, e := range r.Front {
			s.Front = append(s.Front, point(r, e, false))
		}
		return s
	}
	if r.Best != nil {
		p := point(r, r.Best, true)
		s.Best = &p
	}
	return s
}

// WriteJSON writes the summary as DIR/summary.json.
func (s *Summary) WriteJSON(dir string) error {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("repl: encoding summary: %w", err)
	}
	if err := os.WriteFile(filepath.Join(dir, "summary.json"), append(b, '\n'), 0o644); err != nil {
		return fmt.Errorf("repl: writing summary: %w", err)
	}
	return nil
}
