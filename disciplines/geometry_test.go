package disciplines

import (
	"context"
	"errors"
	"math"
	"testing"

	"couplet/mdo"
)

func TestTrapezoidalWing(t *testing.T) {
	// Exact planform geometry of a straight-tapered wing (definitions:
	// b = √(AS), cr = 2S/(b(1+λ)), c̄ = (2/3)cr(1+λ+λ²)/(1+λ),
	// ȳ = (b/6)(1+2λ)/(1+λ)), recomputed by hand for S = 100 m², A = 8,
	// λ = 0.5, Λc/4 = 0.
	w, err := NewWing(100, 8, 0.5, 0, 0.12)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name      string
		got, want float64
	}{
		{"span", w.Span, 28.284271},
		{"root chord", w.RootChord, 4.714045},
		{"tip chord", w.TipChord, 2.357023},
		{"MAC", w.MAC, 3.666479},
		{"MAC y", w.MACY, 6.285394},
		{"LE sweep", w.SweepLE, math.Atan(1.0/24) * 180 / math.Pi},
		{"quarter-chord sweep", w.SweepAt(0.25), 0},
		{"MAC x", w.MACX, 6.285394 / 24},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 1e-5*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %.7g, want %.7g", c.name, c.got, c.want)
		}
	}
	// Area from the chords: S = (cr + ct)·b/2.
	if a := (w.RootChord + w.TipChord) * w.Span / 2; math.Abs(a-100) > 1e-9 {
		t.Errorf("area from chords %g", a)
	}
}

func TestSweepLines(t *testing.T) {
	// tan Λn = tan Λm − (4/A)(n − m)(1 − λ)/(1 + λ): a rectangular wing has
	// every line at the same sweep; a tapered aft-swept wing has
	// ΛLE > Λc/4 > ΛTE; a forward-swept one has its trailing edge swept
	// forward most (definition of the sweep lines).
	cases := []struct {
		name             string
		taper, sweep     float64
		le, half, te, cq float64 // expected ordering by sign of differences
	}{
		{"rectangular", 1, 30, 0, 0, 0, 30},
		{"aft", 0.3, 40, 1, -1, -1, 40},
		{"forward", 0.3, -30, 1, -1, -1, -30},
	}
	for _, c := range cases {
		w, err := NewWing(50, 4, c.taper, c.sweep, 0.05)
		if err != nil {
			t.Fatal(err)
		}
		le, half, te := w.SweepAt(0), w.SweepAt(0.5), w.SweepAt(1)
		if math.Abs(w.SweepAt(0.25)-c.cq) > 1e-12 || math.Abs(w.SweepLE-le) > 1e-12 {
			t.Errorf("%s: Λc/4 = %g, ΛLE %g vs %g", c.name, w.SweepAt(0.25), w.SweepLE, le)
		}
		if math.Signbit(le-c.cq) != (c.le < 0) && c.le != 0 || c.le == 0 && math.Abs(le-c.cq) > 1e-12 {
			t.Errorf("%s: ΛLE = %g vs Λc/4 %g", c.name, le, c.cq)
		}
		if c.half != 0 && !(half < c.cq && te < half) {
			t.Errorf("%s: Λ½ = %g, ΛTE = %g", c.name, half, te)
		}
	}
}

func TestWingRefusesBadInput(t *testing.T) {
	cases := []struct {
		name                 string
		area, ar, taper, swp float64
		wantVar              string
	}{
		{"zero area", 0, 3, 0.2, 0, "wing.area"},
		{"negative area", -5, 3, 0.2, 0, "wing.area"},
		{"zero aspect ratio", 50, 0, 0.2, 0, "wing.aspect_ratio"},
		{"negative aspect ratio", 50, -2, 0.2, 0, "wing.aspect_ratio"},
		{"aft sweep beyond 70", 50, 3, 0.2, 71, "wing.sweep"},
		{"forward sweep beyond 70", 50, 3, 0.2, -75, "wing.sweep"},
		{"NaN area", math.NaN(), 3, 0.2, 0, "wing.area"},
	}
	for _, c := range cases {
		_, err := NewWing(c.area, c.ar, c.taper, c.swp, 0.05)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Var != c.wantVar {
			t.Errorf("%s: err = %v, want an InputError naming %s", c.name, err, c.wantVar)
		}
	}
}

func TestAisleRules(t *testing.T) {
	// 14 CFR 25.815: minimum aisle width below / at and above 25 in from
	// the floor: ≤ 10 passengers 12/15 in, 11–19: 12/20 in, ≥ 20: 15/20 in.
	cases := []struct {
		pax       int
		low, high float64
	}{{8, 12, 15}, {10, 12, 15}, {11, 12, 20}, {19, 12, 20}, {20, 15, 20}, {180, 15, 20}}
	for _, c := range cases {
		lo, hi := AisleWidth(c.pax)
		if math.Abs(lo-c.low*0.0254) > 1e-12 || math.Abs(hi-c.high*0.0254) > 1e-12 {
			t.Errorf("%d passengers: %g/%g m", c.pax, lo, hi)
		}
	}
	// 14 CFR 25.817: at most three seats on each side of a single aisle.
	seats := []struct {
		abreast, aisles, wantAisles int
		ok                          bool
	}{
		{6, 1, 1, true}, {7, 1, 0, false}, {7, 0, 2, true}, {12, 2, 2, true}, {13, 0, 0, false}, {13, 2, 0, false}, {4, 0, 1, true},
	}
	for _, c := range seats {
		f, err := NewFuselage(Cabin{Passengers: 100, SeatsAbreast: c.abreast, Aisles: c.aisles, SeatPitch: 0.8}, 2, 3)
		if c.ok != (err == nil) {
			t.Errorf("%d abreast, %d aisles: err = %v", c.abreast, c.aisles, err)
			continue
		}
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) || ie.Var != "cabin.seats_abreast" {
				t.Errorf("%d abreast: error %v does not name cabin.seats_abreast", c.abreast, err)
			}
			continue
		}
		if f.Aisles != c.wantAisles {
			t.Errorf("%d abreast: %d aisles, want %d", c.abreast, f.Aisles, c.wantAisles)
		}
	}
}

func TestFuselageLayout(t *testing.T) {
	// Cabin: ceil(passengers/abreast) rows at the pitch plus the allowance
	// 1.6 m + 0.03 m per passenger; width = seats + aisle (25.815, 20 in
	// for 11–19 passengers at shoulder height) + 2 × 0.05 m; outer diameter
	// 1.045 w + 0.084 m (Torenbeek, from memory).
	f, err := NewFuselage(Cabin{Passengers: 13, SeatsAbreast: 2, SeatPitch: 1.0, SeatWidth: 0.6}, 3, 4)
	if err != nil {
		t.Fatal(err)
	}
	wantW := 2*0.6 + 20*0.0254 + 0.1
	wantL := 7*1.0 + 1.6 + 0.03*13
	if math.Abs(f.CabinWidth-wantW) > 1e-12 || math.Abs(f.CabinLength-wantL) > 1e-12 {
		t.Errorf("cabin %g × %g, want %g × %g", f.CabinWidth, f.CabinLength, wantW, wantL)
	}
	d := 1.045*wantW + 0.084
	if math.Abs(f.Diameter-d) > 1e-12 || math.Abs(f.Length-(wantL+7*d)) > 1e-9 || math.Abs(f.Fineness-f.Length/d) > 1e-12 {
		t.Errorf("diameter %g length %g fineness %g", f.Diameter, f.Length, f.Fineness)
	}
	// Volume and wetted area agree with a numerical integration of the
	// cross-section profile (consistency of the closed forms).
	n := 200000
	vol, wet := 0.0, 0.0
	dx := f.Length / float64(n)
	for i := 0; i < n; i++ {
		s := f.CrossSection((float64(i) + 0.5) * dx)
		vol += s * dx
		wet += 2 * math.Sqrt(math.Pi*s) * dx
	}
	if relErr(vol, f.Volume) > 1e-5 || relErr(wet, f.WettedArea) > 1e-4 {
		t.Errorf("volume %g vs %g, wetted %g vs %g", vol, f.Volume, wet, f.WettedArea)
	}
	// coneSurface = √π Γ(7/4)/(2 Γ(9/4)) (Beta-function integral).
	if c := math.Sqrt(math.Pi) * math.Gamma(1.75) / (2 * math.Gamma(2.25)); math.Abs(c-coneSurface) > 1e-7 {
		t.Errorf("coneSurface %g, want %g", coneSurface, c)
	}
}

func testConfiguration(t testing.TB, sweep float64, nacelles bool) Configuration {
	t.Helper()
	w, err := NewWing(100, 3, 0.15, sweep, 0.035)
	if err != nil {
		t.Fatal(err)
	}
	f, err := NewFuselage(Cabin{Passengers: 12, SeatsAbreast: 2, SeatPitch: 0.95, SeatWidth: 0.55}, 3.5, 4)
	if err != nil {
		t.Fatal(err)
	}
	s := ConfigurationSpec{Wing: w, WingPosition: 0.35, Fuselage: f, HTailVolume: 0.15, VTailVolume: 0.05}
	if nacelles {
		s.EngineCount, s.NacelleDiameter, s.NacelleLength = 2, 1.2, 6
	}
	c, err := NewConfiguration(s, DefaultGeometryOptions())
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func TestTailVolumeSizing(t *testing.T) {
	// Tail-volume method: S_h = V_h·S·c̄/l_h, S_v = V_v·S·b/l_v.
	c := testConfiguration(t, 50, false)
	if got, want := c.HTailArea(), 0.15*100*c.Wing.MAC/c.HTailArm(); relErr(got, want) > 1e-12 {
		t.Errorf("S_h = %g, want %g", got, want)
	}
	if got, want := c.VTailArea(), 0.05*100*c.Wing.Span/c.VTailArm(); relErr(got, want) > 1e-12 {
		t.Errorf("S_v = %g, want %g", got, want)
	}
}

func TestAreaDistributionIntegratesToVolume(t *testing.T) {
	// Property: the integral of the normal-cut cross-section along x is
	// the enclosed volume.
	for _, sweep := range []float64{-30, 0, 50} {
		c := testConfiguration(t, sweep, true)
		lo, hi := c.CutRange(0)
		const n = 4000
		x := make([]float64, n)
		s := make([]float64, n)
		dx := (hi - lo) / n
		for i := range x {
			x[i] = lo + (float64(i)+0.5)*dx
		}
		c.AreaDistribution(0, x, s, nil)
		v := 0.0
		for _, si := range s {
			v += si * dx
		}
		if relErr(v, c.Volume()) > 2e-3 {
			t.Errorf("sweep %g: ∫S dx = %g, volume %g", sweep, v, c.Volume())
		}
	}
}

func TestNacelleFromMassFlow(t *testing.T) {
	// Capture area ṁ/(ρ0·170 m/s) with the capture diameter 0.8 d (the
	// rule stated in the function, common practice).
	d, l, err := NacelleFromMassFlow(100, 0)
	if err != nil {
		t.Fatal(err)
	}
	capture := math.Pi / 4 * (0.8 * d) * (0.8 * d)
	if relErr(capture, 100/(SeaLevelDensity*170)) > 1e-12 || l <= 5*d {
		t.Errorf("d = %g, l = %g", d, l)
	}
	if _, _, err := NacelleFromMassFlow(-1, 0); err == nil {
		t.Error("negative mass flow accepted")
	}
}

func TestGeometryDiscipline(t *testing.T) {
	g := NewGeometry(DefaultGeometryOptions())
	in := defaultValues(g.Inputs())
	out := make([]float64, len(g.Outputs()))
	if err := g.Compute(in, out); err != nil {
		t.Fatal(err)
	}
	get := func(name string) float64 { return out[varPosition(g.Outputs(), name)] }
	if relErr(get("wing.span"), math.Sqrt(in[geoInArea]*in[geoInAspect])) > 1e-12 {
		t.Errorf("span %g", get("wing.span"))
	}
	if get("aircraft.max_cross_section") < math.Pi/4*math.Pow(get("fuselage.diameter"), 2) {
		t.Errorf("max cross-section %g below the fuselage's", get("aircraft.max_cross_section"))
	}
	if a := testing.AllocsPerRun(100, func() { _ = g.Compute(in, out) }); a != 0 {
		t.Errorf("Compute allocates %v times", a)
	}
	in[geoInAbreast] = 13
	if err := g.Compute(in, out); err == nil {
		t.Error("13 seats abreast accepted")
	}
}

// defaults returns the default values of vars.
func defaultValues(vars []mdo.Var) []float64 {
	v := make([]float64, len(vars))
	for i, x := range vars {
		v[i] = x.Default
	}
	return v
}

// analysed builds a System of ds, sets the inputs (overridden by set) and
// analyses it.
func analysed(t *testing.T, inputs, set map[string]float64, ds ...mdo.Discipline) *mdo.Workspace {
	t.Helper()
	sys, err := mdo.NewSystem(ds...)
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	for k, v := range set {
		inputs[k] = v
	}
	for k, v := range inputs {
		if err := ws.Set(k, v); err != nil {
			t.Fatal(err)
		}
	}
	if err := ws.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	return ws
}

// benchCompute times d.Compute on fixed inputs, reporting allocations.
func benchCompute(b *testing.B, d mdo.Discipline, in, out []float64) {
	b.Helper()
	b.ReportAllocs()
	for b.Loop() {
		if err := d.Compute(in, out); err != nil {
			b.Fatal(err)
		}
	}
}

// indexOf returns the position of name in vars, or -1.
func varPosition(vars []mdo.Var, name string) int {
	for i, v := range vars {
		if v.Name == name {
			return i
		}
	}
	return -1
}
