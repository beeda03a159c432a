package disciplines

import (
	"context"
	"math"
	"testing"

	"couplet/mdo"
)

// solveScenario converges the scenario with the given coupling solver.
func solveScenario(t testing.TB, sc Scenario, m mdo.Method) *mdo.Workspace {
	t.Helper()
	w, err := sc.Workspace()
	if err != nil {
		t.Fatal(err)
	}
	if err := w.SetSolver(mdo.SolverSettings{Method: m, Tolerance: 1e-12, MaxIterations: 500}); err != nil {
		t.Fatal(err)
	}
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatalf("%s with %s: %v", sc.Name, m, err)
	}
	return w
}

func TestAircraftStructure(t *testing.T) {
	// One call builds the coupled aircraft: geometry and the engine cycle
	// ahead of one coupled group of aerodynamics, propulsion, weights,
	// stability and mission.
	s, err := NewAircraft(DefaultAircraftConfig())
	if err != nil {
		t.Fatal(err)
	}
	cg := s.CoupledGroups()
	if len(cg) != 1 || len(cg[0]) != 5 {
		t.Fatalf("coupled groups %v", cg)
	}
	want := map[string]bool{"aerodynamics": true, "propulsion": true, "weights": true, "stability": true, "mission": true}
	for _, n := range cg[0] {
		if !want[n] {
			t.Errorf("unexpected member %s of the coupled group", n)
		}
	}
	if s.Producer("aero.drag_cruise") != "aerodynamics" || s.Producer("wing.span") != "geometry" || !s.IsParameter("wing.sweep") {
		t.Error("producers")
	}
	// The parameter-only parts run once before the coupled group, the
	// wing box and its divergence once after it.
	pos := map[string]int{}
	coupled := -1
	for i, g := range s.Groups() {
		for _, n := range g {
			pos[n] = i
		}
		if len(g) > 1 {
			coupled = i
		}
	}
	for _, n := range []string{"geometry", "airframe_aero", "neutral_point", "airframe_masses", "flight_conditions", "engine_cycle"} {
		if p, ok := pos[n]; !ok || p >= coupled {
			t.Errorf("%s does not run ahead of the coupled group", n)
		}
	}
	for _, n := range []string{"wing_box", "wing_divergence"} {
		if p, ok := pos[n]; !ok || p <= coupled {
			t.Errorf("%s does not run after the coupled group", n)
		}
	}
}

func TestScenariosConvergeToOneState(t *testing.T) {
	// Gauss–Seidel and Newton must reach the same coupled state (1e-8
	// relative on every variable of the system).
	for _, sc := range Scenarios() {
		gs := solveScenario(t, sc, mdo.GaussSeidel)
		nw := solveScenario(t, sc, mdo.Newton)
		vars := gs.System().Vars()
		a, b := gs.Values(), nw.Values()
		worst, name := 0.0, ""
		for i := range a {
			v := vars.At(i)
			d := math.Abs(a[i]-b[i]) / math.Max(math.Abs(a[i]), math.Max(v.Scale, 1e-300))
			if v.Scale == 0 {
				d = math.Abs(a[i]-b[i]) / math.Max(math.Abs(a[i]), 1)
			}
			if d > worst {
				worst, name = d, v.Name
			}
		}
		if worst > 1e-8 {
			t.Errorf("%s: Gauss–Seidel and Newton differ by %.3g in %s", sc.Name, worst, name)
		}
		gsIt := gs.CouplingReports()[0].CouplingIterations
		nwIt := nw.CouplingReports()[0].CouplingIterations
		t.Logf("%s: Gauss–Seidel %d iterations, Newton %d", sc.Name, gsIt, nwIt)
	}
}

func TestScenarioPlausibility(t *testing.T) {
	// Plausibility bands of the converged demo aircraft.
	type band struct {
		name   string
		lo, hi float64
		origin string
	}
	get := func(w *mdo.Workspace, n string) float64 {
		v, err := w.Lookup(n)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	check := func(sc Scenario, bands []band) {
		w := solveScenario(t, sc, mdo.AitkenGaussSeidel)
		mto := get(w, "mass.takeoff")
		derived := map[string]float64{
			"empty-mass fraction": get(w, "mass.empty") / mto,
			"wing loading":        mto / get(w, "wing.area"),
		}
		for _, b := range bands {
			v, ok := derived[b.name]
			if !ok {
				v = get(w, b.name)
			}
			if !(v >= b.lo && v <= b.hi) {
				t.Errorf("%s: %s = %.4g outside [%g, %g] (%s)", sc.Name, b.name, v, b.lo, b.hi, b.origin)
			}
		}
	}
	supersonic := []band{
		// Conceptual-design textbooks (Raymer, from memory): jet transports
		// and supersonic designs have empty-mass fractions of 0.40–0.60.
		{"empty-mass fraction", 0.40, 0.60, "conceptual-design textbooks, from memory"},
		// Supersonic cruise L/D of about 7–10 at Mach 1.4–2 (common practice, no source).
		{"aero.ld_cruise", 7, 10.5, "common practice (no source)"},
		// Low-bypass engines at Mach 1.5: TSFC about 0.9–1.2 lb/(lbf h) =
		// 2.5e-5–3.4e-5 kg/(N s) (common practice, no source).
		{"engine.tsfc_cruise", 2.5e-5, 3.4e-5, "common practice (no source)"},
		// Wing loading of supersonic transports 250–500 kg/m² (common practice, no source).
		{"wing loading", 250, 500, "common practice (no source)"},
		// Take-off L/D about 5–9 for thin low-aspect-ratio wings (REFERENCES rule of thumb: about 5).
		{"aero.ld_takeoff", 4.5, 9, "common practice (no source)"},
	}
	swiftlet := append([]band{
		// A stable aircraft: 5–15 % MAC typical at take-off (common
		// practice, no source); the aerodynamic centre moves aft by about a
		// quarter chord at supersonic speed, so the cruise margin is larger.
		{"stability.static_margin_takeoff", 0.05, 0.20, "common practice (no source)"},
		{"stability.static_margin_cruise_start", 0.15, 0.50, "common practice (no source): supersonic aerodynamic-centre shift"},
	}, supersonic...)
	check(Swiftlet(), swiftlet)
	forward := append([]band{
		// The forward-swept variant flies near neutral stability at take-off
		// (longitudinal penalty of forward sweep, REFERENCES rule of thumb).
		{"stability.static_margin_takeoff", -0.05, 0.15, "common practice (no source)"},
		{"stability.static_margin_cruise_start", 0.05, 0.40, "common practice (no source)"},
		// ... and diverges below the dive dynamic pressure (negative margin).
		{"stability.divergence_margin", -1, 0, "forward-sweep divergence (REFERENCES)"},
	}, supersonic...)
	check(SwiftletForwardSwept(), forward)
	check(Kestrel(), []band{
		{"empty-mass fraction", 0.45, 0.62, "conceptual-design textbooks, from memory: jet transports"},
		// Subsonic jet transports cruise at L/D 14–19 (common practice, no source).
		{"aero.ld_cruise", 13, 19, "common practice (no source)"},
		// Turbofans of bypass 3–6 at Mach 0.8: 0.6–0.8 lb/(lbf h) = 1.7e-5–2.3e-5 kg/(N s).
		{"engine.tsfc_cruise", 1.6e-5, 2.4e-5, "common practice (no source)"},
		// Regional jets: 350–600 kg/m² (common practice, no source).
		{"wing loading", 330, 600, "common practice (no source)"},
		{"stability.static_margin_takeoff", 0.05, 0.20, "common practice (no source)"},
		{"stability.static_margin_cruise_start", 0.05, 0.20, "common practice (no source)"},
	})
}

func BenchmarkAircraftMDA(b *testing.B) {
	w, err := Swiftlet().Workspace()
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	if err := w.Analyze(ctx); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := w.Analyze(ctx); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.CouplingReports()[0].CouplingIterations), "iterations")
}

func BenchmarkAircraftMDAWarmStart(b *testing.B) {
	// One converged analysis of the business jet at a design 0.5 % away
	// in wing area, started from the converged state of the baseline (as
	// an optimiser moving between neighbouring points would).
	w, err := Swiftlet().Workspace()
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	if err := w.Analyze(ctx); err != nil {
		b.Fatal(err)
	}
	sys := w.System()
	base := append([]float64(nil), w.Values()...)
	var tear []int
	for _, v := range sys.CouplingVars() {
		tear = append(tear, sys.Index(v.Name))
	}
	for _, i := range tear {
		w.SetGuessIndex(i, base[i])
	}
	area := sys.Index("wing.area")
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		w.SetIndex(area, base[area]*(1+0.005*float64(1-2*(i%2))))
		if err := w.Analyze(ctx); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.CouplingReports()[0].CouplingIterations), "iterations")
}
