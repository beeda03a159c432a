package optimizers

import (
	"fmt"
	"math"
	"regexp"
	"sort"
	"strings"

	"couplet/mdo"
)

// Every optimiser says in Result.StopDetail why its answer does not hold
// when it does not: a run whose evaluations all failed to analyse names
// the commonest cause of failure; a run that found no feasible point
// names the constraint most violated at its least violating point, by how
// much, and how often it was the worst; a run in which most evaluations
// failed says so and names the commonest cause even when it found a
// feasible point. The words are added to the method's own (a start moved,
// a stall) when the run finishes.

// diagnosis tallies the evaluations a run has been answered.
type diagnosis struct {
	seen     map[int]struct{}
	analysed int
	failed   int
	causes   map[string]*failureCause
	// worst counts, per constraint, the analysed infeasible evaluations
	// at which it was the most violated
	worst      []int
	infeasible int
}

// failureCause is one cause of failure: the failure class and the
// analysis message with its numbers masked, how many evaluations failed
// for it and the message of the first of them.
type failureCause struct {
	class mdo.FailureClass
	count int
	first int
	err   string
}

// numbers matches the numbers of a message, masked when failures are
// grouped by cause.
var numbers = regexp.MustCompile(`[-+]?[0-9]*\.?[0-9]+([eE][-+]?[0-9]+)?`)

// note tallies the evaluations of a batch, each once (a repeat is answered
// by the evaluation it repeats).
func (d *diagnosis) note(evs []*mdo.Evaluation) {
	if d.seen == nil {
		d.seen = map[int]struct{}{}
		d.causes = map[string]*failureCause{}
	}
	for _, ev := range evs {
		if ev == nil {
			continue
		}
		if _, ok := d.seen[ev.ID]; ok {
			continue
		}
		d.seen[ev.ID] = struct{}{}
		if !ev.Converged {
			d.failed++
			key := ev.Failure.String() + "|" + numbers.ReplaceAllString(ev.Err, "#")
			c := d.causes[key]
			if c == nil {
				c = &failureCause{class: ev.Failure, first: ev.ID, err: ev.Err}
				d.causes[key] = c
			}
			c.count++
			continue
		}
		d.analysed++
		if ev.Feasible {
			continue
		}
		if len(d.worst) < len(ev.G) {
			d.worst = append(d.worst, make([]int, len(ev.G)-len(d.worst))...)
		}
		at, top := -1, 0.0
		for i, g := range ev.G {
			if g > top {
				at, top = i, g
			}
		}
		if at >= 0 {
			d.worst[at]++
			d.infeasible++
		}
	}
}

// commonest returns the commonest cause of failure (the earliest among
// equals), nil when nothing failed.
func (d *diagnosis) commonest() *failureCause {
	var all []*failureCause
	for _, c := range d.causes {
		all = append(all, c)
	}
	sort.Slice(all, func(i, j int) bool {
		if all[i].count != all[j].count {
			return all[i].count > all[j].count
		}
		return all[i].first < all[j].first
	})
	if len(all) == 0 {
		return nil
	}
	return all[0]
}

// failures says how many evaluations failed to analyse and the commonest
// cause.
func (d *diagnosis) failures() string {
	c := d.commonest()
	if c == nil {
		return ""
	}
	total := d.failed + d.analysed
	class := ""
	if c.class != mdo.NotFailed {
		class = ", " + c.class.String()
	}
	return fmt.Sprintf("%d of %d evaluations failed to analyse; the commonest cause (%d of them%s): %s", d.failed, total, c.count, class, c.err)
}

// violated names the constraint most violated at ev (an analysed
// infeasible evaluation): its bound, its value, by how much in its unit
// and scaled, and at how many of the analysed infeasible evaluations it
// was the most violated.
func (d *diagnosis) violated(ev *mdo.Evaluation, cs []mdo.Constraint) string {
	at, top := -1, 0.0
	for i, g := range ev.G {
		if g > top {
			at, top = i, g
		}
	}
	if at < 0 || at >= len(cs) {
		return ""
	}
	c := cs[at]
	msg := fmt.Sprintf("the constraint most violated at the least violating point (evaluation %d) is %s: %.6g, violated by %.4g (scaled %.3g; all constraints' scaled violation %.3g)",
		ev.ID, c.String(), ev.Constraints[at], -ev.Margins[at], top, ev.Violation)
	if d.infeasible > 0 && at < len(d.worst) {
		msg += fmt.Sprintf("; %s was the most violated constraint at %d of the %d infeasible points analysed", c.Name, d.worst[at], d.infeasible)
	}
	return msg
}

// summary is what the diagnosis adds to the stop detail of a run whose
// best point is best: nothing when best is feasible and at most half of
// the evaluations failed.
func (d *diagnosis) summary(best *mdo.Evaluation, cs []mdo.Constraint) string {
	total := d.failed + d.analysed
	if total == 0 {
		return ""
	}
	var parts []string
	switch {
	case best == nil || !best.Converged:
		parts = append(parts, fmt.Sprintf("no point analysed in %d evaluations", total))
	case !best.Feasible:
		parts = append(parts, fmt.Sprintf("no feasible point found in %d evaluations", total))
		if v := d.violated(best, cs); v != "" {
			parts = append(parts, v)
		}
	}
	if d.failed > 0 && (len(parts) > 0 || 2*d.failed > total) {
		parts = append(parts, d.failures())
	}
	return strings.Join(parts, "; ")
}

// joinDetail joins the parts of a stop detail that are not empty.
func joinDetail(parts ...string) string {
	var out []string
	for _, p := range parts {
		if p != "" {
			out = append(out, p)
		}
	}
	return strings.Join(out, "; ")
}

// physical formats the design of the unit point u as name = value pairs.
func (r *run) physical(u []float64) string {
	names := r.ev.DesignNames()
	specs := r.ev.DesignSpecs()
	parts := make([]string, len(u))
	for j := range u {
		parts[j] = fmt.Sprintf("%s = %.6g", names[j], specs[j].Lower+u[j]*(specs[j].Upper-specs[j].Lower))
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// infeasibleStall watches a run's least violation while it has found no
// feasible point: stalled reports true once the least violation has not
// fallen by a thousandth for window consecutive checks, or nothing has
// analysed for window checks.
type infeasibleStall struct {
	window int
	best   float64
	since  int
}

// reset restarts the count (a phase where no stall is judged).
func (s *infeasibleStall) reset() { s.best, s.since = math.Inf(1), 0 }

// stalled takes the run's best point after one more generation (or
// outer iteration) and reports whether the run has stalled infeasible.
func (s *infeasibleStall) stalled(best *mdo.Evaluation) bool {
	if best != nil && best.Feasible {
		s.reset()
		return false
	}
	v := math.Inf(1)
	if best != nil && best.Converged {
		v = best.Violation
	}
	if v < s.best*(1-1e-3) || s.best == 0 {
		s.best, s.since = v, 0
		return false
	}
	s.since++
	return s.since >= s.window
}

// stallDetail says why a run stopped stalled without a feasible point.
func (s *infeasibleStall) stallDetail(what string) string {
	if math.IsInf(s.best, 1) {
		return fmt.Sprintf("stalled: no point analysed in %d %s", s.since, what)
	}
	return fmt.Sprintf("stalled: the least constraint violation %.4g fell by less than a thousandth over the last %d %s, a local minimum of the constraint violation", s.best, s.since, what)
}
