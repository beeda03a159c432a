package disciplines

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

func TestEmptyMassFractionWorkedExample(t *testing.T) {
	// Refined empty-mass-fraction regression, jet-fighter row, published
	// worked example (conceptual-design textbooks, project reference):
	// W0 = 20 000 lb, A = 5, T/W = 0.6, W/S = 25 lbf/ft², Mmax = 2 → 0.8109.
	got := EmptyFractionJetFighter().EmptyMassFraction(20000*unitLb, 5, 0.6, 25*unitPsf, 2)
	if math.Abs(got-0.8109) > 5e-5 {
		t.Errorf("We/W0 = %.5f, want 0.8109", got)
	}
}

func TestWingBoxTorsionMatchesRoark(t *testing.T) {
	// Thin-walled rectangular tube (Roark's Formulas for Stress and Strain,
	// from memory): J = 2·t1·t2·a²·b²/(a·t1 + b·t2) for sides a (wall t2)
	// and b (wall t1); here a = box width (covers t1 = tc), b = depth
	// (webs t2 = tw) — a different arrangement of Bredt–Batho.
	mat := Aluminium7075()
	for _, c := range []struct{ lift, span, sweep, chord, tc, fus, kfs float64 }{
		{1.5e6, 20, 0, 8, 0.05, 2.2, 1},
		{4.0e6, 30, 30 * math.Pi / 180, 7, 0.10, 3.5, 1},
		{1.0e6, 18, -25 * math.Pi / 180, 6, 0.06, 2.0, 1.2},
	} {
		b := SizeWingBox(mat, c.lift, c.span, c.sweep, c.chord, c.tc, c.fus, c.kfs)
		w, h, t1, t2 := b.Width, b.Depth, b.CoverThickness, b.WebThickness
		j := 2 * t2 * t1 * w * w * h * h / (w*t2 + h*t1)
		if e := math.Abs(b.TorsionalStiffness-mat.Shear*j) / (mat.Shear * j); e > 1e-12 {
			t.Errorf("%+v: GJ %g, Roark %g", c, b.TorsionalStiffness, mat.Shear*j)
		}
		// covers at the allowable stress (or minimum gauge) before the
		// forward-sweep factor
		stress := b.RootMoment / (h * w * t1 / c.kfs)
		if stress > mat.AllowableStress*(1+1e-12) {
			t.Errorf("%+v: cover stress %g above the allowable", c, stress)
		}
	}
}

// The stiffness follows the box: a thicker or stiffer-material box is
// stiffer; a heavier aircraft needs thicker covers.
func TestWingBoxStiffnessFollowsBox(t *testing.T) {
	al := Aluminium7075()
	base := SizeWingBox(al, 2e6, 20, 0.5, 8, 0.05, 2.2, 1)
	thick := SizeWingBox(al, 2e6, 20, 0.5, 8, 0.08, 2.2, 1)
	heavy := SizeWingBox(al, 4e6, 20, 0.5, 8, 0.05, 2.2, 1)
	ti := SizeWingBox(Titanium6Al4V(), 2e6, 20, 0.5, 8, 0.05, 2.2, 1)
	if !(thick.BendingStiffness > base.BendingStiffness && thick.TorsionalStiffness > base.TorsionalStiffness) {
		t.Errorf("t/c 0.08: EI %g GJ %g not above t/c 0.05: EI %g GJ %g", thick.BendingStiffness, thick.TorsionalStiffness, base.BendingStiffness, base.TorsionalStiffness)
	}
	if !(heavy.CoverThickness > base.CoverThickness && heavy.BendingStiffness > base.BendingStiffness) {
		t.Error("a doubled lift does not thicken the covers")
	}
	if !(ti.TorsionalStiffness/ti.CoverThickness > base.TorsionalStiffness/base.CoverThickness) {
		t.Error("titanium is not stiffer per unit cover thickness")
	}
}

// weightsInputs returns consistent business-jet inputs (invented).
func weightsInputs() map[string]float64 {
	return map[string]float64{
		"wing.area": 120, "wing.aspect_ratio": 3.2, "wing.taper": 0.2, "wing.sweep": 45, "wing.thickness_ratio": 0.04,
		"wing.span": 19.6, "wing.root_chord": 10.2, "wing.mac": 6.9, "wing.mac_x": 16.5,
		"fuselage.length": 34, "fuselage.diameter": 2.2, "fuselage.wetted_area": 190,
		"htail.area": 18, "vtail.area": 14, "htail.arm": 12, "vtail.arm": 11,
		"engine.count": 2, "engine.mass": 1900, "nacelle.diameter": 1.1, "nacelle.length": 5.5,
		"cabin.passengers": 12, "mission.payload": 1300,
		"mission.fuel_fraction": 0.42, "mission.reserve_fraction": 0.04, "mission.climb_fuel_fraction": 0.06,
		"mission.cruise_end_fuel_fraction": 0.05, "mission.trip_fuel_fraction": 0.38,
		"aero.cl_max_landing": 1.6, "cg.engine_position": 0.78, "wing.fuel_volume": 24,
	}
}

// newWeightsPair returns weights with the airframe_masses and wing_box
// disciplines made from it (the parts of the mass estimate).
func newWeightsPair() []mdo.Discipline {
	w := NewWeights()
	return []mdo.Discipline{NewAirframeMasses(w), w, NewWingBoxSizing(w)}
}

func weightsSystem(t *testing.T, set map[string]float64) *mdo.Workspace {
	t.Helper()
	return analysed(t, weightsInputs(), set, newWeightsPair()...)
}

func TestWeightsSystem(t *testing.T) {
	ws := weightsSystem(t, nil)
	m0 := get(t, ws, "mass.takeoff")
	// closure: take-off mass is the sum of its parts and the fuel fraction
	sum := 0.0
	for _, n := range []string{"mass.wing", "mass.fuselage", "mass.htail", "mass.vtail", "mass.landing_gear",
		"mass.propulsion_group", "mass.systems", "mass.furnishings", "mass.crew"} {
		sum += get(t, ws, n)
	}
	if e := math.Abs(sum-get(t, ws, "mass.empty")) / sum; e > 1e-12 {
		t.Errorf("components sum to %g, operating empty mass %g", sum, get(t, ws, "mass.empty"))
	}
	if e := math.Abs(sum+1300+0.42*m0-m0) / m0; e > 1e-12 {
		t.Errorf("empty %g + payload + fuel %g ≠ take-off %g", sum, 0.42*m0, m0)
	}
	// plausibility (common practice, no source): operating-empty fraction
	// of a supersonic business jet 0.40–0.60; wing 8–15 % of take-off mass
	if f := sum / m0; !(f > 0.40 && f < 0.60) {
		t.Errorf("empty fraction %g outside 0.40–0.60", f)
	}
	if f := get(t, ws, "mass.wing") / m0; !(f > 0.08 && f < 0.15) {
		t.Errorf("wing fraction %g outside 0.08–0.15", f)
	}
	// CG travel: fuel burn moves the CG from the take-off value towards the
	// zero-fuel value; every CG lies within the wing's root region
	x0, xs, xe, xz := get(t, ws, "cg.takeoff"), get(t, ws, "cg.cruise_start"), get(t, ws, "cg.cruise_end"), get(t, ws, "cg.zero_fuel")
	lo, hi := math.Min(x0, xz), math.Max(x0, xz)
	for _, x := range []float64{xs, xe} {
		if x < lo || x > hi {
			t.Errorf("cruise CG %g outside [%g, %g]", x, lo, hi)
		}
	}
	for _, x := range []float64{x0, xs, xe, xz} {
		if x < 16.5-6.9 || x > 16.5+6.9 {
			t.Errorf("CG %g m far from the wing (MAC from 16.5 m, 6.9 m)", x)
		}
	}
	if get(t, ws, "mass.forward_sweep_penalty") != 0 {
		t.Error("an aft-swept wing carries a forward-sweep penalty")
	}
	if gj := get(t, ws, "wing.box_torsional_stiffness"); !(gj > 1e7 && gj < 1e10) {
		t.Errorf("GJ %g outside 1e7–1e10 N m2", gj)
	}
}

// A forward-swept wing pays a mass penalty that grows with sweep and is
// stiffer than the aft-swept wing of equal |Λ|.
func TestForwardSweepPenalty(t *testing.T) {
	aft := weightsSystem(t, map[string]float64{"wing.sweep": 30})
	prev := 0.0
	for _, sw := range []float64{-10, -20, -30} {
		fw := weightsSystem(t, map[string]float64{"wing.sweep": sw})
		p := get(t, fw, "mass.forward_sweep_penalty")
		if !(p > prev) {
			t.Errorf("sweep %g: penalty %g not above %g", sw, p, prev)
		}
		prev = p
		if sw == -30 {
			if !(get(t, fw, "mass.takeoff") > get(t, aft, "mass.takeoff")) {
				t.Error("forward sweep −30° not heavier than aft sweep 30°")
			}
			if !(get(t, fw, "wing.box_torsional_stiffness") > get(t, aft, "wing.box_torsional_stiffness")) {
				t.Error("stiffened forward-swept box not stiffer")
			}
		}
	}
}

func TestWeightsRefusesBadInput(t *testing.T) {
	sys, err := mdo.NewSystem(newWeightsPair()...)
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	var re *mdo.RangeError
	for _, c := range []struct {
		name string
		v    float64
	}{{"wing.area", 0}, {"wing.aspect_ratio", -1}, {"wing.sweep", 75}, {"mission.fuel_fraction", 0.99}} {
		if err := ws.Set(c.name, c.v); !errors.As(err, &re) || re.Var != c.name {
			t.Errorf("%s = %g: err = %v, want a range error naming it", c.name, c.v, err)
		}
	}
	// a fuel fraction that leaves no room for the empty mass
	for k, v := range weightsInputs() {
		_ = ws.Set(k, v)
	}
	_ = ws.Set("mission.fuel_fraction", 0.95)
	_ = ws.Set("mission.trip_fuel_fraction", 0.9)
	err = ws.Analyze(context.Background())
	if err == nil || !strings.Contains(err.Error(), "mass.takeoff") && !strings.Contains(err.Error(), "mission.fuel_fraction") {
		t.Errorf("err = %v, want a refusal naming mass.takeoff or mission.fuel_fraction", err)
	}
}

// BenchmarkWeightsCompute times one call inside a converging coupled
// group: mass.takeoff (the closure's start) already at its converged value.
func BenchmarkAirframeMassesCompute(b *testing.B) {
	am := NewAirframeMasses(NewWeights())
	in := defaultValues(am.Inputs())
	out := make([]float64, amNumOut)
	benchCompute(b, am, in, out)
}

func BenchmarkWeightsCompute(b *testing.B) {
	w := NewWeights()
	am := NewAirframeMasses(w)
	amIn := defaultValues(am.Inputs())
	amOut := make([]float64, amNumOut)
	if err := am.Compute(amIn, amOut); err != nil {
		b.Fatal(err)
	}
	in := defaultValues(w.Inputs())
	copy(in[wtInCoefWing:], amOut)
	out := make([]float64, wtNumOut)
	if err := w.Compute(in, out); err != nil {
		b.Fatal(err)
	}
	in[wtInGuess] = out[wtOutTakeoff]
	benchCompute(b, w, in, out)
}

// The aircraft CGs are the mass-weighted means of the component CGs.
func TestWeightsComponentCG(t *testing.T) {
	ws := weightsSystem(t, nil)
	parts := [][2]string{{"mass.wing", "cg.wing"}, {"mass.fuselage", "cg.fuselage"}, {"mass.htail", "cg.htail"},
		{"mass.vtail", "cg.vtail"}, {"mass.landing_gear", "cg.landing_gear"}, {"mass.propulsion_group", "cg.propulsion_group"},
		{"mass.systems", "cg.systems"}, {"mass.furnishings", "cg.cabin"}, {"mass.crew", "cg.crew"}}
	m, mx := 0.0, 0.0
	for _, p := range parts {
		m += get(t, ws, p[0])
		mx += get(t, ws, p[0]) * get(t, ws, p[1])
	}
	if x := get(t, ws, "cg.empty"); math.Abs(mx/m-x) > 1e-9 {
		t.Errorf("empty CG %g, component mean %g", x, mx/m)
	}
	m += 1300
	mx += 1300 * get(t, ws, "cg.cabin")
	fuel := 0.42 * get(t, ws, "mass.takeoff")
	want := (mx + fuel*get(t, ws, "cg.fuel")) / (m + fuel)
	if x := get(t, ws, "cg.takeoff"); math.Abs(want-x) > 1e-9 {
		t.Errorf("take-off CG %g, component mean %g", x, want)
	}
}
