package drawings

import (
	"context"
	"math"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/plot"
)

// shortJetRun evaluates a few wings of the invented business jet in
// process.
func shortJetRun(t *testing.T, constraints []mdo.Constraint) (*mdo.Result, *mdo.Study) {
	t.Helper()
	jet := disciplines.Swiftlet()
	sys, err := jet.NewSystem()
	if err != nil {
		t.Fatal(err)
	}
	fixed := map[string]float64{}
	for k, v := range jet.Parameters {
		fixed[k] = v
	}
	fixed["mission.range"] = 6.5e6 // not the default: the re-analysis must use Fixed
	st := &mdo.Study{
		Name:        "short_jet",
		System:      sys,
		Design:      []mdo.DesignVar{mdo.Continuous("wing.area", 100, 160), mdo.Continuous("wing.aspect_ratio", 2, 3.4)},
		Objectives:  []mdo.Objective{mdo.Minimize("mass.takeoff")},
		Constraints: constraints,
		Fixed:       fixed,
		Seed:        5,
		Workers:     1,
	}
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	for _, x := range [][]float64{{0.5, 0.5}, {0.2, 0.7}, {0.8, 0.3}, {0.6, 0.6}} {
		if _, err := ev.EvaluateOne(context.Background(), x); err != nil {
			t.Fatal(err)
		}
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	if r.Best == nil {
		t.Fatal("no best design")
	}
	return r, st
}

// The re-analysis of the best design reproduces its recorded outputs
// (design values over the study's Fixed parameters, as the evaluator
// sets them), and the plotted geometry has the analysed areas.
func TestAircraftFiguresOfBestDesign(t *testing.T) {
	r, st := shortJetRun(t, []mdo.Constraint{mdo.AtMost("perf.takeoff_field_length", 2300)})
	sol, err := plot.Reanalyse(context.Background(), r, st)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"mass.takeoff", "mass.fuel", "engine.thrust_sea_level", "perf.landing_field_length", "wing.span"} {
		want, err := r.Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		if got := sol.Get(name); math.Abs(got-want) > 1e-8*math.Abs(want) {
			t.Errorf("re-analysed %s = %g, recorded %g", name, got, want)
		}
	}
	if len(sol.CouplingReports) == 0 || !sol.CouplingReports[0].Converged || len(sol.CouplingReports[0].History) == 0 {
		t.Errorf("re-analysis reports %v: want a converged coupled group with its history", sol.CouplingReports)
	}

	get := func(name string) (float64, bool) { x, err := r.Lookup(name); return x, err == nil }
	a := aircraftOf(get, geometryOptions(st.System))
	// trapezoidal areas b·(c_r + c_t)/2 of the drawn surfaces against the
	// analysed ones (the fin is one side: height·(c_r + c_t)/2)
	areas := []struct {
		name  string
		drawn float64
	}{
		{"wing.area", a.WingArea()},
		{"htail.area", a.HTailSpan * (a.HTailRootChord + a.HTailTipChord) / 2},
		{"vtail.area", a.VTailHeight * (a.VTailRootChord + a.VTailTipChord) / 2},
	}
	for _, c := range areas {
		want, _ := get(c.name)
		if math.Abs(c.drawn-want) > 1e-9*want {
			t.Errorf("drawn %s %g m2, analysed %g m2", c.name, c.drawn, want)
		}
	}
	// the tails' MAC quarter chords lie their arms behind the wing's
	// (each tail's MAC by Aircraft.MAC of a wing of its planform; the
	// fin as one half of a mirrored surface)
	wingAC := func(p Aircraft) float64 { c, _, x := p.MAC(); return x + c/4 }
	tails := []struct {
		arm  string
		surf Aircraft
	}{
		{"htail.arm", Aircraft{WingSpan: a.HTailSpan, WingRootChord: a.HTailRootChord, WingTipChord: a.HTailTipChord, WingSweepLE: a.HTailSweepLE, WingApex: a.HTailApex}},
		{"vtail.arm", Aircraft{WingSpan: 2 * a.VTailHeight, WingRootChord: a.VTailRootChord, WingTipChord: a.VTailTipChord, WingSweepLE: a.VTailSweepLE, WingApex: a.VTailApex}},
	}
	for _, c := range tails {
		want, _ := get(c.arm)
		if got := wingAC(c.surf) - wingAC(a); math.Abs(got-want) > 1e-9*want {
			t.Errorf("drawn %s %g m, analysed %g m", c.arm, got, want)
		}
	}

	figs, notes := Figures(context.Background(), r, st)
	if len(notes) != 1 || !strings.Contains(notes[0], "the study's constraints on perf.takeoff_field_length;") {
		t.Errorf("notes %q, want only the sizing diagram's, naming the take-off constraint", notes)
	}
	var names []string
	for _, f := range figs {
		names = append(names, f.Name)
	}
	if got := strings.Join(names, " "); got != "planform top_view sizing_diagram residuals" {
		t.Errorf("figures %q, want planform top_view sizing_diagram residuals", got)
	}
	if figs, notes := Figures(context.Background(), r, nil); len(figs) != 3 || len(notes) != 1 {
		t.Errorf("without the study: %d figures, notes %q; want the three drawn from the outputs", len(figs), notes)
	}
}

// The sizing diagram's requirements come from the study's
// constraints on the field lengths and the second-segment gradient, else
// from the design's own field lengths (the gradient then defaults to the
// 25.121(b) minimum in the disciplines package).
func TestSizingLimitsFromStudy(t *testing.T) {
	own := map[string]float64{"perf.takeoff_field_length": 2211, "perf.landing_field_length": 1820}
	outs := []mdo.Var{{Name: "perf.takeoff_field_length"}, {Name: "perf.landing_field_length"}}
	r := &mdo.Result{Outputs: outs, Best: &mdo.Evaluation{Outputs: []float64{own["perf.takeoff_field_length"], own["perf.landing_field_length"]}}}
	get := func(name string) (float64, bool) { x, err := r.Lookup(name); return x, err == nil }
	scripted := mdo.AtMost("perf.takeoff_field_length", 1000).WithFunc(func(mdo.Values) float64 { return 0 })
	tests := []struct {
		name                string
		constraints         []mdo.Constraint
		tofl, lfl, gradient float64
		from                string
	}{
		{"study's limits", []mdo.Constraint{mdo.AtMost("perf.takeoff_field_length", 2400), mdo.AtMost("perf.landing_field_length", 1950), mdo.AtLeast("perf.climb_gradient_second_segment", 0.03)}, 2400, 1950, 0.03,
			"perf.takeoff_field_length perf.landing_field_length perf.climb_gradient_second_segment"},
		{"band", []mdo.Constraint{mdo.Between("perf.landing_field_length", 1000, 1700)}, 2211, 1700, 0, "perf.landing_field_length"},
		{"no constraint: the design's own", nil, 2211, 1820, 0, ""},
		{"a lower bound on a length is no requirement", []mdo.Constraint{mdo.AtLeast("perf.takeoff_field_length", 900)}, 2211, 1820, 0, ""},
		{"a scripted constraint is not the variable", []mdo.Constraint{scripted}, 2211, 1820, 0, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r.Constraints = tc.constraints
			lim, from := sizingLimits(get, r)
			if lim.TakeoffFieldLength != tc.tofl || lim.LandingFieldLength != tc.lfl || lim.SecondSegmentGradient != tc.gradient {
				t.Errorf("limits %+v, want take-off %g m, landing %g m, gradient %g", lim, tc.tofl, tc.lfl, tc.gradient)
			}
			if got := strings.Join(from, " "); got != tc.from {
				t.Errorf("from the study %q, want %q", got, tc.from)
			}
		})
	}
	// a result without the aircraft geometry gets no aircraft figure
	if figs, notes := Figures(context.Background(), r, nil); figs != nil || notes != nil {
		t.Errorf("figures %v, notes %v for a result without geometry", figs, notes)
	}
}
