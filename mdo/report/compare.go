package report

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strconv"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/store"
)

// Flag is one row of an application's checklist of a design (rules of
// thumb a result is read against): flags, not constraints.
type Flag struct {
	// Rule names what is checked.
	Rule string
	// Value is the design's value, in Unit.
	Value float64
	Unit  string
	// Band is the rule's band as text.
	Band string
	// Pass is true when Value lies within the band.
	Pass bool
}

// FlagSource gives the checklist flags of a result's best design, nil
// when the application has no checklist for it. It is the hook through
// which an application's own checklist enters a comparison, unknown to
// this package.
type FlagSource func(r *mdo.Result) []Flag

// OverlaySource draws figures that overlay the compared results (those
// whose Result is known; the others are left out, with a note). A
// figure that cannot be drawn is plot.LeftOut with the reason. It is the
// hook through which an application adds its own overlays (pictures of
// the designs, say), unknown to this package.
type OverlaySource func(ctx context.Context, results []Compared) (figs []*plot.Figure, notes []string)

// CompareOptions complete a comparison.
type CompareOptions struct {
	// Flags, if not nil, gives each result's checklist flags.
	Flags FlagSource
	// Overlays are the sources of further overlay figures, drawn after
	// the optimisation histories and the Pareto fronts.
	Overlays []OverlaySource
}

// Comparison is a side-by-side table of two or more results (their
// runs, design variables, objectives, constraints, margins and
// checklist flags) with overlay figures. Values come from the results'
// summaries; a name one result has and another lacks is shown as absent
// for the latter.
type Comparison struct {
	// Results are the compared results, one column each.
	Results []Compared
	// Sections are the table's parts, in order.
	Sections []CompareSection
	// Figures are the overlays: the histories, the fronts (with several
	// objectives) and the OverlaySources' figures.
	Figures []*plot.Figure
	// Notes say what was left out and why.
	Notes []string
	// Page is the page WriteComparison wrote last ("" before); the text
	// ends by naming it.
	Page string
}

// CompareSection is one part of a comparison's table.
type CompareSection struct {
	Title string
	Rows  []CompareRow
}

// CompareRow is one line of a comparison's table: a name, its unit and
// one cell per result.
type CompareRow struct {
	Name, Unit string
	Cells      []CompareCell
}

// CompareCell is one result's entry in a row.
type CompareCell struct {
	// Text is what the table shows ("absent" when the result has no such
	// name).
	Text string
	// Absent is true when the result has no such name.
	Absent bool
	// Value is the number shown, NaN for text.
	Value float64
	// State marks a margin or a flag: "ok", "active", "violated",
	// "flagged", or "".
	State string
}

// Absent is the text of a cell whose result lacks the row's name.
const Absent = "absent"

// Compare compares two or more results: the table's sections are the
// runs (study, optimiser, formulation, seed, evaluations, failed
// analyses, stop reason, feasibility), the design variables, the
// objectives, the constraints' values and their margins (with states:
// ok, active within 0.1 % of the bound, VIOLATED), and, when opt.Flags
// gives any, the checklist flags; for a result with a Pareto front the
// cells give the range over the front. The figures overlay the
// optimisation histories, the Pareto fronts and the opt.Overlays'.
func Compare(ctx context.Context, results []Compared, opt CompareOptions) (*Comparison, error) {
	if len(results) < 2 {
		return nil, fmt.Errorf("report: a comparison needs two or more results, got %d", len(results))
	}
	c := &Comparison{Results: results}
	c.Sections = append(c.Sections, c.runSection())
	for _, part := range []struct {
		title string
		vals  func(p store.SummaryPoint) map[string]store.Number
	}{
		{"design variables", func(p store.SummaryPoint) map[string]store.Number { return p.Design }},
		{"objectives", func(p store.SummaryPoint) map[string]store.Number { return p.Objectives }},
		{"constraints", func(p store.SummaryPoint) map[string]store.Number { return p.Constraints }},
	} {
		if s := c.valueSection(part.title, part.vals); len(s.Rows) > 0 {
			c.Sections = append(c.Sections, s)
		}
	}
	if s := c.marginSection(); len(s.Rows) > 0 {
		c.Sections = append(c.Sections, s)
	}
	if opt.Flags != nil {
		if s := c.flagSection(opt.Flags); len(s.Rows) > 0 {
			c.Sections = append(c.Sections, s)
		}
	}
	for _, r := range results {
		if r.Result == nil {
			c.Notes = append(c.Notes, fmt.Sprintf("%s: no plots nor checklist flags, and units and relations unknown (%s).", r.Label, r.Missing))
		}
	}
	c.Figures = append(c.Figures, drawn("overlay_history", "optimisation histories", func() (*plot.Figure, error) { return overlayHistory(results) }))
	c.Notes = append(c.Notes, historyLeftOut(results)...)
	if slices.ContainsFunc(results, func(r Compared) bool { return len(r.Summary.Front) > 0 }) {
		c.Figures = append(c.Figures, drawn("overlay_pareto", "Pareto fronts", func() (*plot.Figure, error) { return overlayPareto(results) }))
	}
	for _, src := range opt.Overlays {
		figs, notes := src(ctx, results)
		c.Figures = append(c.Figures, figs...)
		c.Notes = append(c.Notes, notes...)
	}
	return c, nil
}

// runSection tabulates each result's run.
func (c *Comparison) runSection() CompareSection {
	s := CompareSection{Title: "runs"}
	text := func(name string, f func(store.Summary) string) {
		row := CompareRow{Name: name}
		for _, r := range c.Results {
			row.Cells = append(row.Cells, CompareCell{Text: f(r.Summary), Value: math.NaN()})
		}
		s.Rows = append(s.Rows, row)
	}
	count := func(name string, f func(store.Summary) int) {
		row := CompareRow{Name: name}
		for _, r := range c.Results {
			n := f(r.Summary)
			row.Cells = append(row.Cells, CompareCell{Text: strconv.Itoa(n), Value: float64(n)})
		}
		s.Rows = append(s.Rows, row)
	}
	text("study", func(s store.Summary) string { return s.Study })
	text("optimiser", func(s store.Summary) string { return s.Optimizer })
	text("formulation", func(s store.Summary) string { return s.Formulation })
	text("seed", func(s store.Summary) string { return strconv.FormatUint(s.Seed, 10) })
	count("evaluations", func(s store.Summary) int { return s.Evaluations })
	count("failed analyses", func(s store.Summary) int { return s.Failed })
	text("stop", func(s store.Summary) string { return s.Stop })
	text("best point", func(s store.Summary) string {
		switch {
		case len(s.Front) > 0:
			return fmt.Sprintf("front of %d", len(s.Front))
		case s.Best == nil:
			return Absent
		case s.Best.Feasible:
			return fmt.Sprintf("#%d feasible", s.Best.ID)
		}
		return fmt.Sprintf("#%d INFEASIBLE", s.Best.ID)
	})
	return s
}

// points returns the points a result's cells describe: its best point,
// or its front.
func points(s store.Summary) []store.SummaryPoint {
	if len(s.Front) > 0 {
		return s.Front
	}
	if s.Best != nil {
		return []store.SummaryPoint{*s.Best}
	}
	return nil
}

// names returns the names of the results' maps in order of first
// appearance: each result's names sorted as its study declares them when
// its Result is known (else by name), those of later results that the
// earlier lack after.
func (c *Comparison) names(vals func(p store.SummaryPoint) map[string]store.Number, declared func(r *mdo.Result) []string) []string {
	var out []string
	for _, r := range c.Results {
		ps := points(r.Summary)
		if len(ps) == 0 {
			continue
		}
		m := vals(ps[0])
		var ns []string
		if r.Result != nil {
			for _, n := range declared(r.Result) {
				if _, ok := m[n]; ok {
					ns = append(ns, n)
				}
			}
		}
		var rest []string
		for n := range m {
			if !slices.Contains(ns, n) {
				rest = append(rest, n)
			}
		}
		slices.Sort(rest)
		for _, n := range append(ns, rest...) {
			if !slices.Contains(out, n) {
				out = append(out, n)
			}
		}
	}
	return out
}

// declaredNames returns the names of a section as the study declares
// them.
func declaredNames(title string) func(r *mdo.Result) []string {
	return func(r *mdo.Result) []string {
		var out []string
		switch title {
		case "design variables":
			for _, d := range r.Design {
				out = append(out, d.Name)
			}
		case "objectives":
			for _, o := range r.Objectives {
				out = append(out, o.Name)
			}
		default:
			for _, k := range r.Constraints {
				out = append(out, k.Name)
			}
		}
		return out
	}
}

// valueSection tabulates one kind of value of each result's best point
// (or its range over the front).
func (c *Comparison) valueSection(title string, vals func(p store.SummaryPoint) map[string]store.Number) CompareSection {
	s := CompareSection{Title: title}
	for _, name := range c.names(vals, declaredNames(title)) {
		row := CompareRow{Name: c.rowName(title, name), Unit: c.unit(name)}
		for _, r := range c.Results {
			row.Cells = append(row.Cells, valueCell(points(r.Summary), vals, name))
		}
		s.Rows = append(s.Rows, row)
	}
	return s
}

// rowName is a row's name: a constraint's relation (an objective's
// sense and name) when every result that knows it declares the same,
// else the bare name.
func (c *Comparison) rowName(title, name string) string {
	label := ""
	for _, r := range c.Results {
		if r.Result == nil {
			continue
		}
		l := ""
		switch title {
		case "objectives":
			for _, o := range r.Result.Objectives {
				if o.Name == name {
					l = sense(o.Maximize) + " " + name
				}
			}
		case "constraints":
			for _, k := range r.Result.Constraints {
				if k.Name == name {
					l = k.String()
				}
			}
		}
		switch {
		case l == "":
		case label == "":
			label = l
		case label != l:
			return name + " (differs)"
		}
	}
	if label == "" {
		return name
	}
	return label
}

// unit returns a name's unit as the first result that knows it gives it,
// or "-".
func (c *Comparison) unit(name string) string {
	for _, r := range c.Results {
		if r.Result == nil {
			continue
		}
		for _, d := range r.Result.Design {
			if d.Name == name && d.Unit != "" {
				return d.Unit
			}
		}
		if u := r.Result.Unit(name); u != "" {
			return u
		}
	}
	return "-"
}

// valueCell is a result's value of a name: that of its best point, or
// the range over its front.
func valueCell(ps []store.SummaryPoint, vals func(p store.SummaryPoint) map[string]store.Number, name string) CompareCell {
	lo, hi, found := math.Inf(1), math.Inf(-1), false
	for _, p := range ps {
		v, ok := vals(p)[name]
		if !ok {
			continue
		}
		found = true
		lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
		if math.IsNaN(float64(v)) {
			lo, hi = math.NaN(), math.NaN()
			break
		}
	}
	switch {
	case !found:
		return CompareCell{Text: Absent, Absent: true, Value: math.NaN()}
	case len(ps) > 1 && lo != hi:
		return CompareCell{Text: num(lo) + " … " + num(hi), Value: math.NaN()}
	}
	return CompareCell{Text: num(lo), Value: lo}
}

// marginSection tabulates the margin of each constraint at each result's
// best point, with its state; a front's cells give the least margin over
// the front.
func (c *Comparison) marginSection() CompareSection {
	s := CompareSection{Title: "margins"}
	margins := func(p store.SummaryPoint) map[string]store.Number { return p.Margins }
	for _, name := range c.names(margins, declaredNames("constraints")) {
		row := CompareRow{Name: name, Unit: c.unit(name)}
		for _, r := range c.Results {
			row.Cells = append(row.Cells, marginCell(r, name))
		}
		s.Rows = append(s.Rows, row)
	}
	return s
}

// marginCell is a result's least margin on a constraint and its state.
func marginCell(r Compared, name string) CompareCell {
	least, found := math.Inf(1), false
	for _, p := range points(r.Summary) {
		if m, ok := p.Margins[name]; ok {
			found = true
			if !(float64(m) >= least) {
				least = float64(m)
			}
		}
	}
	if !found {
		return CompareCell{Text: Absent, Absent: true, Value: math.NaN()}
	}
	state := "ok"
	switch {
	case !(least >= 0):
		state = "violated"
	case isActive(r, name):
		state = "active"
	}
	text := num(least) + " " + state
	if state == "violated" {
		text = num(least) + " VIOLATED"
	}
	return CompareCell{Text: text, Value: least, State: state}
}

// isActive reports whether the best point's margin on a constraint is
// active as the report says it (mdo.Result.Active with 0.1 %); unknown
// without the result, and for a front.
func isActive(r Compared, name string) bool {
	if r.Result == nil || len(r.Summary.Front) > 0 {
		return false
	}
	return slices.Contains(r.Result.Active(1e-3), name)
}

// flagSection tabulates the checklist flags of each result's best
// design.
func (c *Comparison) flagSection(src FlagSource) CompareSection {
	s := CompareSection{Title: "checklist flags (flags, not constraints)"}
	per := make([][]Flag, len(c.Results))
	var rules []string
	for i, r := range c.Results {
		if r.Result == nil {
			continue
		}
		per[i] = src(r.Result)
		for _, f := range per[i] {
			if !slices.Contains(rules, f.Rule) {
				rules = append(rules, f.Rule)
			}
		}
	}
	for _, rule := range rules {
		row := CompareRow{Name: rule, Unit: "-"}
		for i := range c.Results {
			k := slices.IndexFunc(per[i], func(f Flag) bool { return f.Rule == rule })
			if k < 0 {
				row.Cells = append(row.Cells, CompareCell{Text: Absent, Absent: true, Value: math.NaN()})
				continue
			}
			f := per[i][k]
			text, state := num(f.Value), "ok"
			if f.Unit != "" {
				text += " " + f.Unit
			}
			if !f.Pass {
				state = "flagged"
				text += " FLAG"
			} else {
				text += " ok"
			}
			row.Cells = append(row.Cells, CompareCell{Text: text, Value: f.Value, State: state})
		}
		s.Rows = append(s.Rows, row)
	}
	return s
}
