package store

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"time"

	"couplet/mdo"
	"couplet/mdo/runfolder"
)

// Summary is the content of a run's summary.json. Apart from Timestamps,
// two runs of the same script and seed give identical summaries.
type Summary struct {
	Study       string `json:"study"`
	Seed        uint64 `json:"seed"`
	Optimizer   string `json:"optimizer"`
	Formulation string `json:"formulation"`
	// Evaluations counts the evaluations (see mdo.EvalCounters), one row
	// each in results.db: Analyses + PickedUp. Repeats were answered
	// from the cache and are not evaluations.
	Evaluations int    `json:"evaluations"`
	Analyses    int    `json:"analyses"`
	PickedUp    int    `json:"picked_up"`
	Repeats     int    `json:"repeats"`
	Failed      int    `json:"failed"`
	Stop        string `json:"stop"`
	// StopDetail is mdo.Result.StopDetail (absent when empty).
	StopDetail string `json:"stop_detail,omitempty"`
	// Best is the best point of a single-objective study; a study with
	// several objectives gives Front instead.
	Best         *SummaryPoint  `json:"best,omitempty"`
	Front        []SummaryPoint `json:"front,omitempty"`
	ScriptSHA256 string         `json:"script_sha256,omitempty"`
	// Cells and Note describe a run whose script handed over no result
	// (NoResultSummary): the cells it ran and what to do about it.
	Cells int    `json:"cells,omitempty"`
	Note  string `json:"note,omitempty"`
	// Notes are the study's provenance notes (mdo.Study.Notes).
	Notes []string `json:"notes,omitempty"`
	// Surrogates are the surrogate models of the study's system and the
	// numbers that come from them (mdo.Result.Surrogates); absent when
	// every number is the true analysis's.
	Surrogates []SummarySurrogate `json:"surrogates,omitempty"`
	// Sensitivity is the post-optimality sensitivity of the best point
	// (mdo.Result.Sensitivity), when the optimiser gave one.
	Sensitivity *SummarySensitivity `json:"sensitivity,omitempty"`
	ToolVersion string              `json:"tool_version,omitempty"`
	Timestamps  Timestamps          `json:"timestamps"`
}

// SummarySurrogate is a surrogate model of a summary's study
// (mdo.SurrogateUse): the outputs it estimates and the objectives and
// constraints whose values depend on them.
type SummarySurrogate struct {
	Discipline string   `json:"discipline"`
	Model      string   `json:"model"`
	Outputs    []string `json:"outputs"`
	Affects    []string `json:"affects,omitempty"`
	Caution    string   `json:"caution"`
}

// SummaryPoint is one design point of a summary.
type SummaryPoint struct {
	ID int `json:"id"`
	// Objective is the first objective as declared.
	Objective   Number            `json:"objective"`
	Objectives  map[string]Number `json:"objectives"`
	Design      map[string]Number `json:"design"`
	Feasible    bool              `json:"feasible"`
	Violation   Number            `json:"violation"`
	Constraints map[string]Number `json:"constraints"`
	Margins     map[string]Number `json:"margins"`
	Error       string            `json:"error,omitempty"`
}

// Timestamps are the times of a run, the only part of a summary that
// changes between two runs of the same script and seed.
type Timestamps struct {
	Started        string  `json:"started"`
	Finished       string  `json:"finished"`
	ElapsedSeconds float64 `json:"elapsed_seconds"`
}

// Number is a float64 that encodes NaN and ±Inf as JSON null.
type Number float64

// MarshalJSON encodes finite numbers in the shortest exact form.
func (n Number) MarshalJSON() ([]byte, error) {
	x := float64(n)
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, x, 'g', -1, 64), nil
}

// UnmarshalJSON decodes a number or null (as NaN).
func (n *Number) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Number(math.NaN())
		return nil
	}
	x, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		return fmt.Errorf("store: summary number %s: %w", b, err)
	}
	*n = Number(x)
	return nil
}

// SummaryOptions add provenance to a summary.
type SummaryOptions struct {
	// Script is the study's source; its SHA-256 goes into the summary.
	Script      string
	ToolVersion string
	// Finished is the end time; zero means Started + Elapsed.
	Finished time.Time
}

// NewSummary builds the summary of a result.
func NewSummary(r *mdo.Result, opt SummaryOptions) Summary {
	s := Summary{
		Study: r.Study, Seed: r.Seed, Optimizer: r.Optimizer, Formulation: r.Formulation.String(),
		Evaluations: r.Evaluations, Analyses: r.Analyses, PickedUp: r.PickedUp, Repeats: r.Repeats, Failed: r.Failed, Stop: r.Stop.String(), StopDetail: r.StopDetail, ToolVersion: opt.ToolVersion,
		Notes: append([]string(nil), r.Notes...), Sensitivity: summarySensitivity(r.Sensitivity),
	}
	for _, u := range r.Surrogates {
		s.Surrogates = append(s.Surrogates, SummarySurrogate{Discipline: u.Discipline, Model: u.Model,
			Outputs: append([]string(nil), u.Outputs...), Affects: append([]string(nil), u.Affects...), Caution: mdo.SurrogateCaution})
	}
	if opt.Script != "" {
		s.ScriptSHA256 = ScriptHash(opt.Script)
	}
	if len(r.Objectives) >= 2 {
		s.Front = make([]SummaryPoint, 0, len(r.Front))
		for _, p := range r.Front {
			s.Front = append(s.Front, summaryPoint(r, p))
		}
	} else if r.Best != nil {
		p := summaryPoint(r, r.Best)
		s.Best = &p
	}
	fin := opt.Finished
	if fin.IsZero() {
		fin = r.Started.Add(r.Elapsed)
	}
	s.Timestamps = Timestamps{Started: r.Started.UTC().Format(time.RFC3339Nano), Finished: fin.UTC().Format(time.RFC3339Nano), ElapsedSeconds: r.Elapsed.Seconds()}
	return s
}

// NoResultSummary is the summary of a run whose script handed over no
// result: the study's name, the seed it used (0 if it attached no study),
// no evaluation and no best point, the number of cells run and a note.
func NoResultSummary(study string, seed uint64, cells int, started time.Time, opt SummaryOptions) Summary {
	s := Summary{Study: study, Seed: seed, Cells: cells, ToolVersion: opt.ToolVersion,
		Note: "the script handed over no result: call cell.Publish(result)"}
	if opt.Script != "" {
		s.ScriptSHA256 = ScriptHash(opt.Script)
	}
	fin := opt.Finished
	if fin.IsZero() {
		fin = started
	}
	s.Timestamps = Timestamps{Started: started.UTC().Format(time.RFC3339Nano), Finished: fin.UTC().Format(time.RFC3339Nano), ElapsedSeconds: fin.Sub(started).Seconds()}
	return s
}

// summaryPoint describes one evaluation by name.
func summaryPoint(r *mdo.Result, e *mdo.Evaluation) SummaryPoint {
	p := SummaryPoint{ID: e.ID, Objective: Number(math.NaN()), Objectives: map[string]Number{}, Design: map[string]Number{},
		Feasible: e.Feasible, Violation: Number(e.Violation), Constraints: map[string]Number{}, Margins: map[string]Number{}, Error: e.Err}
	if len(e.Objectives) > 0 {
		p.Objective = Number(e.Objectives[0])
	}
	for k, o := range r.Objectives {
		if k < len(e.Objectives) {
			p.Objectives[o.Name] = Number(e.Objectives[k])
		}
	}
	for k, d := range r.Design {
		if k < len(e.Design) {
			p.Design[d.Name] = Number(e.Design[k])
		}
	}
	for k, c := range r.Constraints {
		if k < len(e.Constraints) {
			p.Constraints[c.Name] = Number(e.Constraints[k])
			p.Margins[c.Name] = Number(e.Margins[k])
		}
	}
	return p
}

// WriteSummary writes a summary to path (summary.json in the run's
// output folder), atomically and never through a symbolic link: a
// temporary file renamed into place.
func WriteSummary(path string, s Summary) error {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("store: encoding the summary: %w", err)
	}
	if err := runfolder.WriteFile(path, append(b, '\n')); err != nil {
		return fmt.Errorf("store: %w", err)
	}
	return nil
}

// ReadSummary reads a summary.json.
func ReadSummary(path string) (Summary, error) {
	var s Summary
	b, err := os.ReadFile(path)
	if err != nil {
		return s, fmt.Errorf("store: reading %s: %w", path, err)
	}
	if err := json.Unmarshal(b, &s); err != nil {
		return s, fmt.Errorf("store: %s is not a summary: %w", path, err)
	}
	return s, nil
}
