package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"html/template"
	"io"
	"maps"
	"math"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"time"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/runfolder"
)

// Caution is the statement every report carries.
const Caution = "The results are conceptual-design estimates from simplified models. " +
	"They are not fit for certification, flight or airworthiness decisions; " +
	"for those the applicable regulations and licensed engineering practice govern."

// Options complete a report.
type Options struct {
	// Title heads the page; default "Study report: NAME".
	Title string
	// Script is the study's source text, shown in full with its SHA-256.
	Script string
	// ToolVersion is the version of the program that ran the study.
	ToolVersion string
	// Evaluations are the run's evaluations (from the store), used for the
	// standard plots: history, parallel coordinates and, for two or more
	// objectives, the Pareto front.
	Evaluations []*mdo.Evaluation
	// ScatterMatrix adds the scatter matrix to the standard plots (for a
	// design of experiments).
	ScatterMatrix bool
	// NoStandardPlots leaves the standard plots out.
	NoStandardPlots bool
	// Figures are further plots (a study's own figures, the DSM, ...),
	// shown after the standard ones; a figure that cannot be drawn
	// (plot.LeftOut, or one that fails as it is drawn) has the reason written
	// in its place. The figures are drawn concurrently with each other.
	Figures []*plot.Figure
	// Notes are extra lines of text.
	Notes []string
	// Generated is the time stamped on the report; default now.
	Generated time.Time
	// Record, if not nil, is the result's record (summary.json): the
	// report shows its optimiser settings and coupling solvers.
	Record *Record

	// drawn, if not nil, are the standard figures followed by Figures,
	// drawn already, in order (WriteRun, which saves them too, passes
	// them all as Figures with NoStandardPlots).
	drawn []rendered
}

// view is what the template shows.
type view struct {
	Title, Caution string
	Provenance     []kv
	Settings       *settingsView
	Best           *bestView
	Front          *frontView
	Sensitivity    *sensView
	// Surrogates say which numbers come from surrogate models.
	Surrogates       []string
	SurrogateCaution string
	Figures          []figView
	Notes            []string
	Script           string
}

type kv struct{ Key, Value string }

// settingsView is the settings of the run: the optimiser's and the
// coupling solvers, or a note saying why there are none.
type settingsView struct {
	Optimizer             string
	OptimizerSettings     []kv
	Solvers               []CouplingSolver
	NoSettings, NoSolvers string
}

type bestView struct {
	ID          int
	Feasible    bool
	Violation   string
	Err         string
	Design      []designRow
	Objectives  []objectiveRow
	Constraints []constraintRow
}

type designRow struct{ Name, Value, Unit, Lower, Upper, Position string }

type objectiveRow struct{ Name, Sense, Value, Unit string }

type constraintRow struct{ Relation, Value, Unit, Margin, State, Class string }

type frontView struct {
	Head []string
	Rows [][]string
}

type figView struct {
	ID, Caption string
	SVG         template.HTML
	// LeftOut, if not empty, says why the figure could not be drawn; it
	// stands in the figure's place.
	LeftOut string
}

// num formats a number for a table.
func num(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(x, 'g', 7, 64)
}

// unitOf finds a name's unit (mdo.Result.Unit), or "-".
func unitOf(r *mdo.Result, name string) string { return orDash(r.Unit(name)) }

// orDash returns u or "-".
func orDash(u string) string {
	if u == "" {
		return "-"
	}
	return u
}

// Write writes the HTML report of a run.
func Write(w io.Writer, r *mdo.Result, opt Options) error {
	if r == nil {
		return fmt.Errorf("report: the result is nil")
	}
	v, err := build(r, opt)
	if err != nil {
		return err
	}
	t, err := template.New("report").Parse(page)
	if err != nil {
		return fmt.Errorf("report: template: %w", err)
	}
	var b bytes.Buffer
	if err := t.Execute(&b, v); err != nil {
		return fmt.Errorf("report: rendering: %w", err)
	}
	if _, err := w.Write(b.Bytes()); err != nil {
		return fmt.Errorf("report: writing: %w", err)
	}
	return nil
}

// WriteFile writes the HTML report of a run to path (report.html in the
// run's output folder), atomically and never through a symbolic
// link.
func WriteFile(path string, r *mdo.Result, opt Options) error {
	var b bytes.Buffer
	if err := Write(&b, r, opt); err != nil {
		return err
	}
	if err := runfolder.WriteFile(path, b.Bytes()); err != nil {
		return fmt.Errorf("report: writing %s: %w", filepath.Base(path), err)
	}
	return nil
}

// build assembles the view.
func build(r *mdo.Result, opt Options) (*view, error) {
	v := &view{Title: opt.Title, Caution: Caution, Notes: opt.Notes, Script: opt.Script}
	if v.Title == "" {
		v.Title = "Study report: " + r.Study
	}
	gen := opt.Generated
	if gen.IsZero() {
		gen = time.Now()
	}
	prov := []kv{
		{"study", r.Study},
		{"optimiser", r.Optimizer},
		{"formulation", r.Formulation.String()},
		{"seed", strconv.FormatUint(r.Seed, 10)},
		{"stopped", stoppedText(r)},
		{"evaluations", r.EvalCounters.String()},
		{"work", fmt.Sprintf("%d discipline calls, %d coupling iterations", r.DisciplineCalls, r.CouplingIterations)},
		{"started", r.Started.UTC().Format(time.RFC3339)},
		{"elapsed", r.Elapsed.Round(time.Millisecond).String()},
	}
	if opt.Script != "" {
		prov = append(prov, kv{"script SHA-256", scriptHash(opt.Script)})
	}
	if opt.ToolVersion != "" {
		prov = append(prov, kv{"tool version", opt.ToolVersion})
	}
	prov = append(prov, kv{"Go version", runtime.Version()}, kv{"report generated", gen.UTC().Format(time.RFC3339)})
	v.Provenance = prov
	if rec := opt.Record; rec != nil {
		sv := &settingsView{Optimizer: r.Optimizer, Solvers: rec.CouplingSolvers, NoSolvers: rec.SolverNote}
		for _, k := range slices.Sorted(maps.Keys(rec.OptimizerSettings)) {
			sv.OptimizerSettings = append(sv.OptimizerSettings, kv{k, rec.OptimizerSettings[k]})
		}
		if len(sv.OptimizerSettings) == 0 {
			sv.NoSettings = "not recorded: the run had no case store, or its optimiser recorded no settings"
		}
		v.Settings = sv
	}
	if r.Best != nil {
		v.Best = bestOf(r)
		v.Sensitivity = sensitivityOf(r)
	}
	for _, u := range r.Surrogates {
		v.Surrogates = append(v.Surrogates, u.String())
		v.SurrogateCaution = strings.ToUpper(mdo.SurrogateCaution[:1]) + mdo.SurrogateCaution[1:]
	}
	if len(r.Objectives) >= 2 && len(r.Front) > 0 {
		v.Front = frontOf(r)
	}
	figs := append(standardFigures(r, opt), opt.Figures...)
	if opt.drawn != nil {
		v.Figures = figureViews(figs, opt.drawn)
	} else {
		v.Figures = figureViews(figs, renderFigures(figs, nil))
	}
	return v, nil
}

// figureViews numbers the figures for a page and puts each inline from
// its drawing (done, in the order of figs); a figure that cannot be drawn
// has the reason in its place.
func figureViews(figs []*plot.Figure, done []rendered) []figView {
	var out []figView
	for i, f := range figs {
		if f == nil {
			continue
		}
		n := len(out) + 1
		fv := figView{ID: fmt.Sprintf("%d-%s", i+1, f.Name), Caption: fmt.Sprintf("Figure %d. %s", n, f.Title)}
		if svg, err := done[i].inline(); err != nil {
			// the reason in the figure's place; the page is still written
			fv.LeftOut = fmt.Sprintf("Figure %d (%s) could not be drawn: %v", n, f.Name, err)
		} else {
			fv.SVG = template.HTML(svg)
		}
		out = append(out, fv)
	}
	return out
}

// standardFigures draws the plots every run gets; a plot that cannot be
// drawn is its stand-in with the reason (plot.LeftOut).
func standardFigures(r *mdo.Result, opt Options) []*plot.Figure {
	if opt.NoStandardPlots || len(opt.Evaluations) == 0 {
		return nil
	}
	evs := opt.Evaluations
	figs := []*plot.Figure{drawn("history", "optimisation history", func() (*plot.Figure, error) { return plot.History(r, evs) })}
	if len(r.Objectives) >= 2 {
		figs = append(figs, drawn("pareto", "Pareto front", func() (*plot.Figure, error) { return plot.Pareto(r, evs) }))
	}
	figs = append(figs, drawn("parallel_coordinates", "parallel coordinates", func() (*plot.Figure, error) { return plot.ParallelCoordinates(r, evs) }))
	if opt.ScatterMatrix {
		figs = append(figs, drawn("scatter_matrix", "scatter matrix", func() (*plot.Figure, error) { return plot.ScatterMatrix(r, evs) }))
	}
	return figs
}

// bestOf tabulates the best design.
func bestOf(r *mdo.Result) *bestView {
	e := r.Best
	b := &bestView{ID: e.ID, Feasible: e.Feasible, Violation: num(e.Violation), Err: e.Err}
	for k, d := range r.Design {
		x := e.Design[k]
		pos := (x - d.Lower) / (d.Upper - d.Lower)
		p := fmt.Sprintf("%.0f %%", 100*pos)
		switch {
		case pos <= 1e-9:
			p += " (at lower bound)"
		case pos >= 1-1e-9:
			p += " (at upper bound)"
		}
		b.Design = append(b.Design, designRow{Name: d.Name, Value: num(x), Unit: orDash(d.Unit), Lower: num(d.Lower), Upper: num(d.Upper), Position: p})
	}
	for k, o := range r.Objectives {
		sense := "minimise"
		if o.Maximize {
			sense = "maximise"
		}
		b.Objectives = append(b.Objectives, objectiveRow{Name: o.Name, Sense: sense, Value: num(e.Objectives[k]), Unit: unitOf(r, o.Name)})
	}
	active := map[string]bool{}
	for _, n := range r.Active(1e-3) {
		active[n] = true
	}
	for k, c := range r.Constraints {
		row := constraintRow{Relation: c.String(), Value: num(e.Constraints[k]), Unit: unitOf(r, c.Name), Margin: num(e.Margins[k]), State: "ok", Class: "ok"}
		switch {
		case !(e.Margins[k] >= 0):
			row.State, row.Class = "VIOLATED", "violated"
		case active[c.Name]:
			row.State, row.Class = "active", "active"
		}
		b.Constraints = append(b.Constraints, row)
	}
	return b
}

// frontOf tabulates the Pareto front.
func frontOf(r *mdo.Result) *frontView {
	f := &frontView{Head: []string{"#"}}
	for _, o := range r.Objectives {
		f.Head = append(f.Head, fmt.Sprintf("%s [%s]", o, unitOf(r, o.Name)))
	}
	for _, d := range r.Design {
		f.Head = append(f.Head, fmt.Sprintf("%s [%s]", d.Name, orDash(d.Unit)))
	}
	for _, p := range r.Front {
		row := []string{strconv.Itoa(p.ID)}
		for _, x := range p.Objectives {
			row = append(row, num(x))
		}
		for _, x := range p.Design {
			row = append(row, num(x))
		}
		f.Rows = append(f.Rows, row)
	}
	return f
}

// scriptHash is the hex SHA-256 of the script (as the case store keeps it).
func scriptHash(s string) string {
	h := sha256.Sum256([]byte(s))
	return hex.EncodeToString(h[:])
}

// stoppedText is the stop reason with the optimiser's detail, if any.
func stoppedText(r *mdo.Result) string {
	if r.StopDetail == "" {
		return r.Stop.String()
	}
	return r.Stop.String() + ": " + r.StopDetail
}
