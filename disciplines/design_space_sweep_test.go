package disciplines

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
)

// The design-space sweep: a Latin hypercube (gonum's stat/samplemv,
// seeded) over wide design boxes of every demonstration aircraft and of
// invented variants of our own, each point analysed through an Evaluator
// as a study would. Every failure must be classified and name what it
// refuses; every converged state must be finite and plausible
// (plausibleState). TestParameterEdges does the same for every
// parameter at each end of its validity range. TestDesignSpaceSweep runs a small version;
// COUPLET_SWEEP=n runs n points per case and logs the tally.

// sweepCase is one family of points: a scenario, fixed overrides and a
// design box.
type sweepCase struct {
	label string
	scen  Scenario
	fixed map[string]float64
	box   []convBox
}

// sweepPoints returns n Latin-hypercube points of the case's box
// (physical values in the box's order) drawn from seed.
func sweepPoints(c sweepCase, n int, seed uint64) [][]float64 {
	d := len(c.box)
	u := mat.NewDense(n, d, nil)
	samplemv.LatinHypercube{Q: distmv.NewUnitUniform(d, nil), Src: rand.NewPCG(seed, 0x5eed)}.Sample(u)
	pts := make([][]float64, n)
	for i := range pts {
		p := make([]float64, d)
		for k, b := range c.box {
			p[k] = b.lower + u.At(i, k)*(b.hi-b.lower)
		}
		pts[i] = p
	}
	return pts
}

// with returns a copy of s's parameters and guesses changed by params.
func with(s Scenario, name string, params map[string]float64) Scenario {
	return variant(s, name, "invented sweep variant", params, nil)
}

// sweepCases returns the cases of the sweep: every demonstration
// aircraft over a wide box around its design, and invented variants.
func sweepCases() []sweepCase {
	wideJet := []convBox{
		{"wing.area", 70, 300}, {"wing.aspect_ratio", 1.5, 4.5}, {"wing.sweep", 40, 70}, {"wing.taper", 0.05, 0.5},
		{"wing.thickness_ratio", 0.02, 0.07}, {"wing.position", 0.3, 0.6}, {"htail.volume", 0.1, 0.6},
		{"cruise.mach", 1.1, 2.2}, {"cruise.altitude", 14000, 19000}, {"mission.range", 2e6, 8e6},
		{"engine.bypass_ratio", 0.3, 2.5}, {"engine.pressure_ratio", 12, 35}, {"engine.turbine_temperature", 1500, 2100},
		{"engine.sizing_field_length", 1800, 3200}, {"stability.cm_ac_wing", -0.05, 0.1},
	}
	wideForward := []convBox{
		{"wing.area", 90, 260}, {"wing.aspect_ratio", 1.8, 4}, {"wing.sweep", -60, -25}, {"wing.taper", 0.15, 0.6},
		{"wing.thickness_ratio", 0.025, 0.06}, {"wing.position", 0.45, 0.7}, {"htail.volume", 0.3, 0.8},
		{"cruise.mach", 1.1, 1.8}, {"mission.range", 2e6, 6e6},
	}
	wideRegional := []convBox{
		{"wing.area", 50, 140}, {"wing.aspect_ratio", 6, 14}, {"wing.sweep", 0, 35}, {"wing.taper", 0.15, 0.6},
		{"wing.thickness_ratio", 0.08, 0.18}, {"wing.position", 0.25, 0.45}, {"htail.volume", 0.5, 1.2},
		{"cruise.mach", 0.5, 0.85}, {"cruise.altitude", 7000, 12500}, {"mission.range", 1e6, 5e6},
		{"engine.bypass_ratio", 1, 3}, {"engine.sizing_field_length", 1200, 2400},
		{"flap.cl_increment_landing", 0.8, 2}, {"airport.elevation", 0, 2500}, {"airport.temperature_offset", -20, 35},
	}
	airliner := []convBox{
		{"wing.area", 140, 320}, {"wing.aspect_ratio", 1.6, 3.4}, {"wing.sweep", 50, 68}, {"wing.thickness_ratio", 0.022, 0.05},
		{"cruise.mach", 1.2, 2.2}, {"mission.range", 3e6, 8e6},
	}
	return []sweepCase{
		{"Swiftlet S12 wide box", Swiftlet(), nil, wideJet},
		{"Swiftlet S12-F wide box", SwiftletForwardSwept(), nil, wideForward},
		{"Swiftlet S12-3 wide box", SwiftletTrijet(), nil, wideJet},
		{"Kestrel R76 wide box", Kestrel(), nil, wideRegional},
		{"Condor S30 wide box", Condor(), nil, airliner},
		// a forward-swept-wing subsonic transport
		{"forward-swept transport", with(Kestrel(), "forward-swept transport", map[string]float64{"wing.sweep": -25, "wing.position": 0.45, "htail.volume": 1.0}), nil,
			[]convBox{{"wing.area", 60, 130}, {"wing.aspect_ratio", 6, 12}, {"wing.sweep", -40, -5}, {"wing.thickness_ratio", 0.09, 0.16},
				{"wing.position", 0.35, 0.6}, {"cruise.mach", 0.6, 0.82}}},
		// a slow regional near the turboprop's speeds (bypass at its limit)
		{"slow regional", with(Kestrel(), "slow regional", map[string]float64{
			"cabin.passengers": 50, "wing.sweep": 0, "wing.aspect_ratio": 12, "wing.thickness_ratio": 0.16, "wing.area": 60,
			"cruise.mach": 0.5, "cruise.altitude": 7000, "mission.range": 1.5e6, "mission.payload": 5000, "engine.bypass_ratio": 3,
			"engine.sizing_field_length": 1300}), nil,
			[]convBox{{"wing.area", 40, 110}, {"wing.aspect_ratio", 9, 16}, {"wing.sweep", -5, 10}, {"wing.thickness_ratio", 0.12, 0.2},
				{"cruise.mach", 0.35, 0.6}, {"cruise.altitude", 4000, 8000}, {"mission.range", 4e5, 2.5e6}}},
		// a heavy long-range supersonic transport on four engines
		{"heavy supersonic", with(Condor(), "heavy supersonic", map[string]float64{
			"cabin.passengers": 100, "cabin.seats_abreast": 4, "engine.count": 4, "mission.payload": 10000, "mission.range": 8e6,
			"wing.area": 450, "cg.engine_position": 0.7}), nil,
			[]convBox{{"wing.area", 300, 800}, {"wing.aspect_ratio", 1.6, 3}, {"wing.sweep", 52, 68}, {"wing.thickness_ratio", 0.022, 0.045},
				{"cruise.mach", 1.6, 2.4}, {"mission.range", 5e6, 1.1e7}}},
		// the concepts of other classes (concepts.go) over wide boxes
		{"Dunlin F10 wide box", Dunlin(), nil, []convBox{
			{"wing.area", 28, 90}, {"wing.aspect_ratio", 5, 11}, {"wing.sweep", -35, 5}, {"wing.taper", 0.2, 0.6},
			{"wing.thickness_ratio", 0.08, 0.15}, {"wing.position", 0.4, 0.6}, {"htail.volume", 0.6, 1.2},
			{"cruise.mach", 0.6, 0.86}, {"cruise.altitude", 9000, 14000}, {"mission.range", 2e6, 7e6},
			{"dive.dynamic_pressure", 20000, 36000}, {"engine.sizing_field_length", 1200, 2200}}},
		{"Godwit L320 wide box", Godwit(), nil, []convBox{
			{"wing.area", 300, 600}, {"wing.aspect_ratio", 7, 14}, {"wing.sweep", 15, 40}, {"wing.taper", 0.15, 0.4},
			{"wing.thickness_ratio", 0.09, 0.15}, {"wing.position", 0.26, 0.36}, {"cruise.mach", 0.72, 0.88},
			{"cruise.altitude", 9000, 12500}, {"mission.range", 4e6, 1.1e7}, {"mission.payload", 20000, 45000},
			{"engine.sizing_field_length", 2200, 3400}}},
		{"Sanderling S56 wide box", Sanderling(), nil, []convBox{
			{"wing.area", 150, 450}, {"wing.aspect_ratio", 1.5, 3.5}, {"wing.sweep", 50, 68}, {"wing.thickness_ratio", 0.02, 0.05},
			{"wing.position", 0.36, 0.48}, {"cruise.mach", 1.4, 2.3}, {"cruise.altitude", 16000, 20000},
			{"mission.range", 3e6, 8e6}, {"engine.bypass_ratio", 0.3, 1.5}, {"engine.turbine_temperature", 1700, 2100}}},
		// the edges of the validity ranges
		{"edges of validity", Swiftlet(), nil, []convBox{
			{"wing.area", 1, 2000}, {"wing.aspect_ratio", 0.5, 20}, {"wing.sweep", -70, 70}, {"wing.taper", 0, 1},
			{"wing.thickness_ratio", 0.01, 0.25}, {"wing.position", 0.05, 0.9}, {"htail.volume", 0.01, 3}, {"vtail.volume", 0.005, 1},
			{"cruise.mach", 0.3, 2.5}, {"cruise.altitude", 0, 25000}, {"mission.range", 1e5, 2e7}, {"mission.payload", 0, 20000},
			{"engine.bypass_ratio", 0, 3}, {"engine.pressure_ratio", 3, 45}, {"engine.turbine_temperature", 1100, 2200},
			{"engine.sizing_field_length", 500, 5000}, {"engine.thrust_scale", 1, 3}, {"fuselage.nose_fineness", 0.5, 10},
			{"fuselage.tail_fineness", 0.5, 10}, {"flap.cl_increment_takeoff", 0, 3}, {"flap.cl_increment_landing", 0, 3},
			{"stability.cm_ac_wing", -0.5, 0.5}, {"cg.engine_position", 0, 1.2}, {"airport.elevation", -400, 4500},
			{"airport.temperature_offset", -50, 50}, {"dive.dynamic_pressure", 1000, 300000}, {"weights.calibration", 0.5, 2.5},
			{"weights.fuselage_tank_share", 0, 0.5}, {"aero.factor_zero_lift_drag", 0.2, 5}, {"aero.factor_induced_drag", 0.2, 5},
			{"aero.factor_lift_slope", 0.2, 5},
		}},
	}
}

// sweepEvaluator returns an Evaluator of the case (take-off mass
// minimised, no constraints) and the index of every variable by name.
func sweepEvaluator(c sweepCase, workers int) (*mdo.Evaluator, map[string]int, error) {
	sys, err := c.scen.NewSystem()
	if err != nil {
		return nil, nil, err
	}
	fixed := copyMap(c.scen.Parameters)
	for k, v := range c.fixed {
		fixed[k] = v
	}
	st := &mdo.Study{Name: c.label, System: sys, Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")}, Fixed: fixed, Workers: workers, CacheLimit: -1}
	for _, b := range c.box {
		st.Design = append(st.Design, mdo.Continuous(b.name, b.lower, b.hi))
	}
	ev, err := st.NewEvaluator()
	if err != nil {
		return nil, nil, err
	}
	idx := map[string]int{}
	for i, v := range ev.OutputVars() {
		idx[v.Name] = i
	}
	return ev, idx, nil
}

// sweepValues reads a converged evaluation's outputs by name.
type sweepValues struct {
	out []float64
	idx map[string]int
}

// get returns the value of name (panics on an unknown name: a test bug).
func (v sweepValues) get(name string) float64 {
	i, ok := v.idx[name]
	if !ok {
		panic("sweep: unknown variable " + name)
	}
	return v.out[i]
}

// plausibleState returns what is implausible in a converged state, one
// line per finding (empty when nothing is). The bands are common
// practice (no source) unless a source is named.
func plausibleState(v sweepValues, maxLD float64) []string {
	var bad []string
	f := func(format string, a ...any) { bad = append(bad, fmt.Sprintf(format, a...)) }
	for name, i := range v.idx {
		if x := v.out[i]; math.IsNaN(x) || math.IsInf(x, 0) {
			f("%s = %g is not finite", name, x)
		}
	}
	for _, m := range []string{"mass.takeoff", "mass.empty", "mass.zero_fuel", "mass.landing", "mass.fuel", "mass.wing",
		"mass.fuselage", "mass.propulsion_group", "mass.landing_gear", "mass.systems", "engine.mass"} {
		if !(v.get(m) > 0) {
			f("%s = %g is not positive", m, v.get(m))
		}
	}
	mto, me, mzf, fuel := v.get("mass.takeoff"), v.get("mass.empty"), v.get("mass.zero_fuel"), v.get("mass.fuel")
	if !(me <= mzf && mzf < mto) {
		f("masses out of order: empty %g, zero-fuel %g, take-off %g", me, mzf, mto)
	}
	// closure (definition): take-off = zero-fuel + fuel
	if relErr(mzf+fuel, mto) > 1e-6 {
		f("zero-fuel %g + fuel %g ≠ take-off %g", mzf, fuel, mto)
	}
	if ml := v.get("mass.landing"); !(ml >= mzf && ml < mto) {
		f("landing mass %g outside [zero-fuel %g, take-off %g)", ml, mzf, mto)
	}
	if ff := v.get("mission.fuel_fraction"); !(ff > 0 && ff < 1) || relErr(ff, fuel/mto) > 1e-6 {
		f("fuel fraction %g (fuel/take-off = %g)", ff, fuel/mto)
	}
	// cruise L/D of conceptual designs: about 4–25 (supersonic 4–12,
	// subsonic transports 12–22; common practice, no source), below maxLD
	if ld := v.get("aero.ld_cruise"); !(ld > 2 && ld < maxLD) {
		f("cruise L/D %g outside (2, %g)", ld, maxLD)
	}
	if ld := v.get("aero.ld_takeoff"); !(ld > 2 && ld < maxLD) {
		f("take-off L/D %g outside (2, %g)", ld, maxLD)
	}
	for _, c := range []string{"aero.cd0_cruise", "aero.cd_cruise", "aero.cd_friction_cruise", "aero.cd0_takeoff", "aero.cd0_landing",
		"aero.k_cruise", "aero.k_takeoff", "aero.k_landing"} {
		if !(v.get(c) > 0) {
			f("%s = %g is not positive", c, v.get(c))
		}
	}
	if w := v.get("aero.wave_drag_cruise"); w < 0 {
		f("wave drag %g < 0", w)
	}
	// static margin (definition): (x_np − x_cg)/MAC
	mac := v.get("wing.mac")
	for _, c := range [][3]string{
		{"stability.static_margin_takeoff", "stability.neutral_point_low_speed", "cg.takeoff"},
		{"stability.static_margin_cruise_start", "stability.neutral_point", "cg.cruise_start"},
		{"stability.static_margin_cruise_end", "stability.neutral_point", "cg.cruise_end"},
	} {
		if sm, want := v.get(c[0]), (v.get(c[1])-v.get(c[2]))/mac; math.Abs(sm-want) > 1e-9*math.Max(1, math.Abs(want)) {
			f("%s = %g, (x_np − x_cg)/MAC = %g", c[0], sm, want)
		}
	}
	// every c.g. on the aircraft
	for _, c := range []string{"cg.takeoff", "cg.zero_fuel", "cg.cruise_start", "cg.cruise_end", "cg.empty"} {
		if x := v.get(c); !(x > 0 && x < v.get("fuselage.length")) {
			f("%s = %g outside the fuselage (0, %g)", c, x, v.get("fuselage.length"))
		}
	}
	for _, c := range []string{"perf.takeoff_field_length", "perf.landing_field_length", "perf.v_stall", "perf.v_ref", "perf.range_full_fuel"} {
		if !(v.get(c) > 0) {
			f("%s = %g is not positive", c, v.get(c))
		}
	}
	// 14 CFR 25.125: VREF ≥ 1.23 VSR
	if vr, vs := v.get("perf.v_ref"), v.get("perf.v_stall"); vr < 1.23*vs*(1-1e-9) {
		f("VREF %g < 1.23 VSR %g", vr, vs)
	}
	if tc := v.get("engine.tsfc_cruise"); !(tc >= v.get("engine.tsfc_cruise_full")*0.5) {
		f("cruise TSFC %g far below the full-throttle %g", tc, v.get("engine.tsfc_cruise_full"))
	}
	if th := v.get("engine.cruise_throttle"); !(th > 0 && th <= 1) {
		f("cruise throttle %g outside (0, 1]", th)
	}
	if q := v.get("stability.divergence_dynamic_pressure"); !(q > 0) {
		f("divergence dynamic pressure %g is not positive", q)
	}
	return bad
}

// varInMessage matches a dotted variable name.
var varInMessage = regexp.MustCompile(`[a-z][a-z0-9_]*\.[a-z][a-z0-9_]*`)

// numberInMessage matches a number.
var numberInMessage = regexp.MustCompile(`[-+]?[0-9]+(\.[0-9]+)?([eE][-+]?[0-9]+)?`)

// failureNamesCulprit reports whether a failed evaluation's message names
// a variable and a value, and for a bad input what is allowed (the
// validity range, or the bound the discipline gives), or for a design
// that does not close the balance that runs away (a derived quantity
// outside a later discipline's range is not a balance: the input behind
// it should be named instead).
func failureNamesCulprit(ev *mdo.Evaluation) bool {
	m := ev.Err
	if !varInMessage.MatchString(m) || !numberInMessage.MatchString(m) {
		return false
	}
	switch mdo.ClassOf(ev) {
	case mdo.InvalidInput:
		return strings.Contains(m, "(allowed: ") || strings.Contains(m, "validity range [")
	case mdo.DoesNotClose:
		return strings.Contains(m, "the balance of ")
	}
	return true
}

// sweepTally sums one case's outcomes.
type sweepTally struct {
	points    int
	byClass   map[mdo.FailureClass]int
	reasons   map[string]int
	bad       []string // implausible converged states, with the point
	unnamed   []string // failures whose message does not name the culprit
	examples  []string // the first failure of each reason, in full
	converged int
	// aboveCLmax counts converged states whose cruise lift coefficient
	// exceeds the clean maximum (the checklist flags them; the analysis
	// converges, for the model knows no buffet)
	aboveCLmax int
}

// runSweep analyses n points of every case and returns the tallies.
func runSweep(ctx context.Context, cases []sweepCase, n int, seed uint64) ([]sweepTally, error) {
	var out []sweepTally
	for k, c := range cases {
		ev, idx, err := sweepEvaluator(c, 2)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", c.label, err)
		}
		pts := sweepPoints(c, n, seed+uint64(k))
		xs := make([][]float64, len(pts))
		for i, p := range pts {
			xs[i] = ev.ToUnit(p)
		}
		evs, err := ev.Evaluate(ctx, xs)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", c.label, err)
		}
		t := sweepTally{points: len(evs), byClass: map[mdo.FailureClass]int{}, reasons: map[string]int{}}
		for i, e := range evs {
			point := describePoint(c, pts[i])
			if !e.Converged {
				cl := mdo.ClassOf(e)
				t.byClass[cl]++
				r := cl.String() + ": " + shortReason(e.Err)
				if t.reasons[r] == 0 {
					t.examples = append(t.examples, point+" → "+e.Err)
				}
				t.reasons[r]++
				if cl == mdo.NotFailed || !failureNamesCulprit(e) {
					t.unnamed = append(t.unnamed, fmt.Sprintf("%s [%s] %s", point, cl, e.Err))
				}
				continue
			}
			t.converged++
			if v := (sweepValues{e.Outputs, idx}); v.get("aero.cl_cruise") > v.get("aero.cl_max_clean") {
				t.aboveCLmax++
			}
			for _, b := range plausibleState(sweepValues{e.Outputs, idx}, 30) {
				t.bad = append(t.bad, point+": "+b)
			}
		}
		out = append(out, t)
	}
	return out, nil
}

// describePoint formats a point of a case's box.
func describePoint(c sweepCase, p []float64) string {
	parts := make([]string, len(p))
	for k, b := range c.box {
		parts[k] = b.name + "=" + strconv.FormatFloat(p[k], 'g', 5, 64)
	}
	return c.label + " {" + strings.Join(parts, " ") + "}"
}

// sweepReport formats the tallies.
func sweepReport(cases []sweepCase, ts []sweepTally) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%-28s %6s %9s %14s %13s %13s %17s %11s %9s\n", "case", "points", "converged", "does-not-close", "solver-failed", "invalid-input", "discipline-failed", "implausible", "CL>CLmax")
	for k, t := range ts {
		fmt.Fprintf(&b, "%-28s %6d %9d %14d %13d %13d %17d %11d %9d\n", cases[k].label, t.points, t.converged,
			t.byClass[mdo.DoesNotClose], t.byClass[mdo.SolverFailed], t.byClass[mdo.InvalidInput], t.byClass[mdo.DisciplineFailed], len(t.bad), t.aboveCLmax)
	}
	for k, t := range ts {
		keys := make([]string, 0, len(t.reasons))
		for r := range t.reasons {
			keys = append(keys, r)
		}
		sort.Strings(keys)
		fmt.Fprintf(&b, "%s failures:\n", cases[k].label)
		for _, r := range keys {
			fmt.Fprintf(&b, "  %5d  %s\n", t.reasons[r], r)
		}
		if testing.Verbose() {
			for _, s := range t.examples {
				fmt.Fprintf(&b, "  EXAMPLE %s\n", s)
			}
		}
		for _, s := range t.bad {
			fmt.Fprintf(&b, "  IMPLAUSIBLE %s\n", s)
		}
		for _, s := range t.unnamed {
			fmt.Fprintf(&b, "  UNNAMED %s\n", s)
		}
	}
	return b.String()
}

// TestDesignSpaceSweep analyses a Latin hypercube over every sweep case
// and asserts that no point panics, that every failure is classified and
// names its culprit, and that every converged state is plausible.
func TestDesignSpaceSweep(t *testing.T) {
	n := 24
	if s := os.Getenv("COUPLET_SWEEP"); s != "" {
		var err error
		if n, err = strconv.Atoi(s); err != nil {
			t.Fatal(err)
		}
	}
	cases := sweepCases()
	ts, err := runSweep(context.Background(), cases, n, 2026)
	if err != nil {
		t.Fatal(err)
	}
	t.Log("\n" + sweepReport(cases, ts))
	for k, tt := range ts {
		for _, s := range tt.unnamed {
			t.Errorf("%s: failure does not name its culprit: %s", cases[k].label, s)
		}
		for _, s := range tt.bad {
			t.Errorf("implausible: %s", s)
		}
	}
}

// Every parameter of every demonstration aircraft at each end of its
// validity range, the rest at the scenario's values: no panic, every
// failure classified and naming its culprit, every converged state
// plausible (cruise L/D below 40 here: the zero-lift-drag calibration
// factor at its lower end, 0.2, gives the regional jet about 35).
func TestParameterEdges(t *testing.T) {
	ctx := context.Background()
	for _, sc := range demonstrationAircraft() {
		sys, err := sc.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range sys.Parameters() {
			c := sweepCase{label: sc.Name, scen: sc, box: []convBox{{p.Name, p.Min, p.Max}}}
			ev, idx, err := sweepEvaluator(c, 1)
			if err != nil {
				t.Fatal(err)
			}
			evs, err := ev.Evaluate(ctx, [][]float64{{0}, {1}})
			if err != nil {
				t.Fatal(err)
			}
			for k, e := range evs {
				at := fmt.Sprintf("%s, %s = %g", sc.Name, p.Name, []float64{p.Min, p.Max}[k])
				if !e.Converged {
					if mdo.ClassOf(e) == mdo.NotFailed || !failureNamesCulprit(e) {
						t.Errorf("%s: failure [%s] does not name its culprit: %s", at, mdo.ClassOf(e), e.Err)
					}
					continue
				}
				for _, b := range plausibleState(sweepValues{e.Outputs, idx}, 40) {
					t.Errorf("%s: %s", at, b)
				}
			}
		}
	}
}
