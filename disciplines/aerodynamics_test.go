package disciplines

import (
	"errors"
	"math"
	"testing"

	"couplet/mdo"
)

func TestSearsHaackWaveDrag(t *testing.T) {
	// Sears–Haack body: D/q = 9π·Amax²/(2ℓ²); ℓ = 20 m, r = 1 m →
	// 0.34882 m². The numerical slender-body integral must reproduce it
	// within 1 %.
	if got := SearsHaackDragArea(math.Pi, 20); math.Abs(got-0.34882) > 5e-6 {
		t.Errorf("closed form %g", got)
	}
	wd := NewWaveDragIntegrator()
	for _, l := range []float64{20, 7.5} {
		var x, s [WaveStations]float64
		wd.Stations(0, l, x[:])
		for i := range x {
			s[i] = SearsHaackArea(math.Pi, l, x[i])
		}
		got, want := wd.DragArea(s[:], l), SearsHaackDragArea(math.Pi, l)
		if relErr(got, want) > 0.01 {
			t.Errorf("ℓ = %g: numerical D/q = %g, Sears–Haack %g", l, got, want)
		}
	}
}

func TestJonesLiftWaveDrag(t *testing.T) {
	// Equivalent area due to lift with an elliptic lengthwise load:
	// D/q = β²(L/q)²/(2πℓ²) after the roll-angle average of cos²θ = ½,
	// i.e. the unaveraged slope integral gives 4/(πℓ²) for a unit load
	// (R. T. Jones, minimum wave drag due to lift; from memory).
	wd := NewWaveDragIntegrator()
	l := 20.0
	var x, sp [WaveStations]float64
	wd.Stations(0, l, x[:])
	for i := range x {
		xi := x[i] / l
		sp[i] = 8 / (math.Pi * l) * math.Sqrt(math.Max(0, xi*(1-xi)))
	}
	if got, want := wd.DragAreaFromSlope(sp[:]), 4/(math.Pi*l*l); relErr(got, want) > 1e-3 {
		t.Errorf("D = %g, want %g", got, want)
	}
}

func TestSkinFriction(t *testing.T) {
	// Prandtl–Schlichting turbulent flat plate with compressibility:
	// Re = 1e7 → 0.0030037 (M = 0), 0.0024495 (M = 1.6); Blasius laminar
	// 1.328/√Re (REFERENCES: recomputed from the equations).
	cases := []struct {
		name      string
		got, want float64
	}{
		{"turbulent M=0", TurbulentSkinFriction(1e7, 0), 0.0030037},
		{"turbulent M=1.6", TurbulentSkinFriction(1e7, 1.6), 0.0024495},
		{"laminar Re=1e6", LaminarSkinFriction(1e6), 0.001328},
	}
	for _, c := range cases {
		if relErr(c.got, c.want) > 5e-5 {
			t.Errorf("%s: Cf = %.7f, want %.7f", c.name, c.got, c.want)
		}
	}
	// The roughness cut-off Reynolds number grows with length/roughness
	// and Mach number (Raymer's relations, from memory: 38.21(l/k)^1.053).
	if got := CutoffReynolds(10, 6.34e-6, 0.5); relErr(got, 38.21*math.Pow(10/6.34e-6, 1.053)) > 1e-12 {
		t.Errorf("cut-off Re %g", got)
	}
	if CutoffReynolds(10, 6.34e-6, 2) <= CutoffReynolds(10, 6.34e-6, 0.5) {
		t.Error("supersonic cut-off not above subsonic")
	}
}

func TestLiftSlopeSubsonic(t *testing.T) {
	// DATCOM / Helmbold–Polhamus: A = 6, M = 0, Λ½ = 0, κ = 1 → 4.5287;
	// A = 8, M = 0.8, Λ½ = 25°, κ = 0.95 → 5.7747 /rad (REFERENCES).
	cases := []struct{ a, m, sweep, kappa, want float64 }{
		{6, 0, 0, 1, 4.5287},
		{8, 0.8, 25, 0.95, 5.7747},
	}
	for _, c := range cases {
		got, err := LiftSlopeSubsonic(c.a, c.m, c.sweep, c.kappa)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-c.want) > 5e-5 {
			t.Errorf("A %g M %g: CLα = %.5f, want %.4f", c.a, c.m, got, c.want)
		}
	}
	if _, err := LiftSlopeSubsonic(6, 1.1, 0, 1); err == nil {
		t.Error("supersonic Mach accepted by the subsonic formula")
	}
}

func TestAckeret(t *testing.T) {
	// Ackeret thin-aerofoil theory at M = 2: clα = 4/β = 2.3094 /rad;
	// double wedge t/c = 0.05, α = 0.02 rad → cd = 0.0066973 (REFERENCES).
	if got := AckeretLiftSlope(2); math.Abs(got-2.3094) > 5e-5 {
		t.Errorf("clα = %g", got)
	}
	if got := AckeretDoubleWedgeDrag(2, 0.05, 0.02); math.Abs(got-0.0066973) > 5e-8 {
		t.Errorf("cd = %g", got)
	}
	// Biconvex at incidence, 4(α² + (4/3)(t/c)²)/β recomputed from the
	// project reference's formula: M = 1.8, t/c = 0.04, α = 0.03 rad →
	// 0.0081069243.
	if got := AckeretBiconvexDrag(1.8, 0.04, 0.03); math.Abs(got-0.0081069243) > 1e-10 {
		t.Errorf("biconvex cd = %.10f", got)
	}
	// Biconvex: the thickness term is 4/3 of the double wedge's.
	if got := AckeretBiconvexDrag(2, 0.05, 0) / AckeretDoubleWedgeDrag(2, 0.05, 0); math.Abs(got-4.0/3) > 1e-12 {
		t.Errorf("biconvex/double-wedge = %g", got)
	}
}

func TestLiftSlopeSupersonic(t *testing.T) {
	// Linear theory of the delta wing (taper 0): with a supersonic leading
	// edge CLα = 4/β (Ackeret); with a subsonic one 2π·m/(β E(√(1−m²))),
	// which tends to the slender-wing value πA/2 (R. T. Jones) as m → 0
	// and meets 4/β at the sonic leading edge m = 1 (from memory).
	delta := func(sweepLE float64) Wing {
		// A = 4 cot ΛLE for a delta; quarter-chord sweep from ΛLE.
		a := 4 / math.Tan(sweepLE*math.Pi/180)
		tq := math.Tan(sweepLE*math.Pi/180) - 1/a
		w, err := NewWing(50, a, 0, math.Atan(tq)*180/math.Pi, 0.03)
		if err != nil {
			t.Fatal(err)
		}
		return w
	}
	w := delta(45)
	if math.Abs(w.SweepLE-45) > 1e-9 {
		t.Fatalf("delta ΛLE = %g", w.SweepLE)
	}
	got, _ := LiftSlopeSupersonic(w, 2) // β = 1.732 > tan 45°: supersonic LE
	if relErr(got, 4/math.Sqrt(3)) > 1e-12 {
		t.Errorf("supersonic LE: %g", got)
	}
	w = delta(74) // slender: m = β cot 74° small at M = 1.02
	got, _ = LiftSlopeSupersonic(w, 1.02)
	if relErr(got, math.Pi*w.AspectRatio/2) > 0.01 {
		t.Errorf("slender delta %g vs πA/2 = %g", got, math.Pi*w.AspectRatio/2)
	}
	// Sonic leading edge: both branches agree.
	w = delta(60)
	msonic := math.Sqrt(1 + math.Pow(math.Tan(60*math.Pi/180), 2))
	lo, _ := LiftSlopeSupersonic(w, msonic*(1-1e-9))
	hi, _ := LiftSlopeSupersonic(w, msonic*(1+1e-9))
	if relErr(lo, hi) > 1e-5 {
		t.Errorf("sonic leading edge: %g vs %g", lo, hi)
	}
	if _, err := LiftSlopeSupersonic(w, 2.6); err == nil {
		t.Error("Mach 2.6 accepted")
	}
}

func TestKornAndLock(t *testing.T) {
	// Korn equation recomputed by hand: κA = 0.95, t/c = 0.12, Λ = 25°,
	// CL = 0.5 → Mdd = 1.04822 − 0.14609 − 0.06717 = 0.83496; forward
	// and aft sweep give the same value (cos Λ).
	if got := KornDragDivergence(0.95, 0.12, 25, 0.5); math.Abs(got-0.83496) > 2e-5 {
		t.Errorf("Mdd = %g", got)
	}
	if KornDragDivergence(0.95, 0.12, -25, 0.5) != KornDragDivergence(0.95, 0.12, 25, 0.5) {
		t.Error("forward sweep differs")
	}
	// Lock's rise has slope 0.1 at Mdd when Mcrit = Mdd − (0.1/80)^(1/3).
	mdd := 0.83
	mc := CriticalMach(mdd)
	h := 1e-6
	if s := (LockDragRise(mdd+h, mc) - LockDragRise(mdd-h, mc)) / (2 * h); math.Abs(s-0.1) > 1e-6 {
		t.Errorf("slope at Mdd %g", s)
	}
}

func TestInducedDragSubsonic(t *testing.T) {
	// Induced drag CDi = CL²/(π A e) (project reference): below the
	// transonic blend (Mach 0.95) K is 1/(π A e) with the Oswald estimate
	// e, less the flap reduction; e stays within [0.3, 0.95] and falls
	// with sweep beyond the straight-wing range.
	for _, c := range []struct{ area, ar, taper, sweep float64 }{{84, 9, 0.3, 25}, {115, 3, 0.12, 58}, {60, 12, 0.4, 0}, {100, 6, 0.3, -30}} {
		w, err := NewWing(c.area, c.ar, c.taper, c.sweep, 0.1)
		if err != nil {
			t.Fatal(err)
		}
		e := OswaldEfficiency(w.AspectRatio, w.SweepLE)
		if !(e >= 0.3 && e <= 0.95) {
			t.Errorf("A %g Λ %g: e = %g outside [0.3, 0.95]", c.ar, c.sweep, e)
		}
		for _, m := range []float64{0, 0.5, 0.95} {
			for _, de := range []float64{0, 0.05} {
				if got, want := DragDueToLift(w, m, de), 1/(math.Pi*w.AspectRatio*(e-de)); relErr(got, want) > 1e-14 {
					t.Errorf("A %g Λ %g M %g Δe %g: K = %g, want 1/(πAe) = %g", c.ar, c.sweep, m, de, got, want)
				}
			}
		}
	}
	if !(OswaldEfficiency(8, 50) < OswaldEfficiency(8, 20)) {
		t.Error("Oswald e does not fall with sweep")
	}
}

func TestSupersonicCentreNotAftOfMidChord(t *testing.T) {
	// Linear supersonic theory puts the centre of pressure of a flat
	// plate at mid-chord (Ackeret; project reference); the tip Mach cones
	// of a finite wing move it forward, so the model's aerodynamic centre
	// (ACFraction, a fraction of the MAC) lies aft of the subsonic quarter
	// chord and never aft of mid-chord.
	for m := 1.3; m <= MaxMach+1e-9; m += 0.1 {
		if ac := ACFraction(m); !(ac > 0.25 && ac <= 0.5) {
			t.Errorf("M %.1f: aerodynamic centre at %.3f MAC, want (0.25, 0.5]", m, ac)
		}
	}
	if ac := ACFraction(0.5); ac != 0.25 {
		t.Errorf("subsonic aerodynamic centre at %.3f MAC, want the quarter chord", ac)
	}
}

func TestSupersonicDragDueToLift(t *testing.T) {
	// K = A(M² − 1)cosΛLE/(4A√(M² − 1) − 2) (from memory): grows with
	// Mach number beyond the transonic range and falls with sweep.
	prev := 0.0
	for _, m := range []float64{1.2, 1.5, 2, 2.5} {
		k := SupersonicDragDueToLift(3, m, 55)
		want := 3 * (m*m - 1) * math.Cos(55*math.Pi/180) / (12*math.Sqrt(m*m-1) - 2)
		if relErr(k, want) > 1e-12 || k <= prev {
			t.Errorf("M %g: K = %g", m, k)
		}
		prev = k
	}
	if SupersonicDragDueToLift(3, 1.6, 65) >= SupersonicDragDueToLift(3, 1.6, 45) {
		t.Error("K does not fall with sweep")
	}
}

func TestDragRisesWithLift(t *testing.T) {
	// Property: at every Mach number CD grows with |CL|.
	c := testConfiguration(t, 50, true)
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	for _, mach := range []float64{0.2, 0.8, 0.98, 1.3, 2.2} {
		prev := -1.0
		for _, cl := range []float64{0, 0.1, 0.3, 0.6} {
			p, err := m.Polar(&c, FlightCondition{Mach: mach, Altitude: 12000}, cl)
			if err != nil {
				t.Fatal(err)
			}
			cd := p.CD(cl)
			if cd <= prev {
				t.Errorf("M %g: CD(%g) = %g not above %g", mach, cl, cd, prev)
			}
			prev = cd
		}
	}
}

func TestWaveDragPeaksNearMachOne(t *testing.T) {
	// Property (transonic area rule / supersonic area rule): the wave drag
	// rises through the transonic range, peaks near Mach 1 and falls
	// beyond; below the critical Mach number it is zero.
	for _, sweep := range []float64{50, -35} {
		c := testConfiguration(t, sweep, true)
		m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
		best, bestM := 0.0, 0.0
		var at = map[float64]float64{}
		for mach := 0.5; mach <= 2.5+1e-9; mach += 0.01 {
			p, err := m.Polar(&c, FlightCondition{Mach: mach, Altitude: 15000}, 0.1)
			if err != nil {
				t.Fatal(err)
			}
			at[math.Round(mach*100)/100] = p.CDWave
			if p.CDWave > best {
				best, bestM = p.CDWave, mach
			}
		}
		if at[0.5] != 0 || bestM < 0.97 || bestM > 1.15 {
			t.Errorf("sweep %g: wave drag %g at M 0.5, peak at M %.2f", sweep, at[0.5], bestM)
		}
		if !(at[1.2] > at[1.6] && at[1.6] > at[2.0] && at[2.0] > at[2.4]) {
			t.Errorf("sweep %g: wave drag does not fall beyond Mach 1: %g %g %g %g", sweep, at[1.2], at[1.6], at[2.0], at[2.4])
		}
	}
}

func TestSweepLowersSupersonicWaveDrag(t *testing.T) {
	// Property (supersonic area rule, linear theory): at equal area, once
	// the ridge line of maximum thickness (half chord for the sections
	// used) lies inside the Mach cone (Λ½ > 90° − μ), more sweep spreads
	// the wing's volume along the Mach-plane cuts and lowers the volume
	// wave drag; linear theory peaks between the sonic leading edge and
	// the sonic ridge line. The wing's MAC quarter chord stays at 60 % of the fuselage and
	// the tails keep their area, so only the sweep changes.
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	f, err := NewFuselage(Cabin{Passengers: 12, SeatsAbreast: 2, SeatPitch: 0.95, SeatWidth: 0.55}, 3.5, 4)
	if err != nil {
		t.Fatal(err)
	}
	for _, mach := range []float64{1.3, 1.6, 2.0} {
		mu := math.Asin(1/mach) * 180 / math.Pi
		prev := math.Inf(1)
		n := 0
		for sweep := 0.0; sweep <= 70; sweep += 2.5 {
			w, err := NewWing(100, 3, 0.15, sweep, 0.035)
			if err != nil {
				t.Fatal(err)
			}
			if w.SweepAt(0.5) < 90-mu {
				continue
			}
			pos := (0.6*f.Length - w.MACX - 0.25*w.MAC) / f.Length
			c, err := AssembleConfiguration(w, pos, f, 20, 15, 0, 0, 0, DefaultGeometryOptions())
			if err != nil {
				t.Fatal(err)
			}
			dq, _ := m.VolumeWaveDragArea(&c, mach, false)
			if dq >= prev {
				t.Errorf("M %g, sweep %g: D/q = %g not below %g", mach, sweep, dq, prev)
			}
			prev = dq
			n++
		}
		if n < 3 {
			t.Errorf("M %g: only %d sweeps compared", mach, n)
		}
	}
}

func TestPolarContinuousInMach(t *testing.T) {
	// The blend through the transonic range keeps CD0, K and CLα
	// continuous from Mach 0.1 (below, the Reynolds number tends to zero)
	// to 2.5: between Mach numbers 1e-4 apart no change larger than a
	// slope of 1 per unit Mach (CD0), 1 (K) and 20 /rad (CLα) allows.
	c := testConfiguration(t, 45, true)
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	var prev Polar
	const dm = 1e-4
	for i := 1000; i <= 25000; i++ {
		mach := float64(i) * dm
		p, err := m.Polar(&c, FlightCondition{Mach: mach, Altitude: 14000}, 0.2)
		if err != nil {
			t.Fatal(err)
		}
		if i > 1000 {
			if math.Abs(p.CD0-prev.CD0) > 1e-4 || math.Abs(p.K-prev.K) > 1e-4 || math.Abs(p.CLAlpha-prev.CLAlpha) > 2e-3 {
				t.Fatalf("jump at M %.4f: CD0 %g→%g, K %g→%g, CLα %g→%g", mach, prev.CD0, p.CD0, prev.K, p.K, prev.CLAlpha, p.CLAlpha)
			}
		}
		prev = p
	}
}

func TestAeroRefusesBadInput(t *testing.T) {
	c := testConfiguration(t, 50, true)
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	cases := []struct {
		name    string
		fc      FlightCondition
		wantVar string
	}{
		{"Mach above 2.5", FlightCondition{Mach: 2.6, Altitude: 15000}, "mach"},
		{"negative Mach", FlightCondition{Mach: -0.1, Altitude: 15000}, "mach"},
		{"above the atmosphere", FlightCondition{Mach: 1.5, Altitude: 90000}, "altitude"},
	}
	for _, cs := range cases {
		_, err := m.Polar(&c, cs.fc, 0.1)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Var != cs.wantVar {
			t.Errorf("%s: err = %v, want an InputError naming %s", cs.name, err, cs.wantVar)
		}
	}
	// The disciplines name the aircraft variable.
	af := NewAirframeAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())
	in := defaultValues(af.Inputs())
	out := make([]float64, len(af.Outputs()))
	in[afInAltitude] = 90000
	err := af.Compute(in, out)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Var != "cruise.altitude" {
		t.Errorf("cruise altitude 90 km: err = %v", err)
	}
	for _, d := range []mdo.Discipline{af, NewAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())} {
		in := defaultValues(d.Inputs())
		out := make([]float64, len(d.Outputs()))
		in[geoInArea] = 0
		if err := d.Compute(in, out); !errors.As(err, &ie) || ie.Var != "wing.area" {
			t.Errorf("%s, zero area: err = %v", d.Name(), err)
		}
	}
}

// feedByName copies the values src (of the variables srcVars) into dst
// (of dstVars) where the names match.
func feedByName(dst []float64, dstVars []mdo.Var, src []float64, srcVars []mdo.Var) {
	for i, v := range dstVars {
		if k := varPosition(srcVars, v.Name); k >= 0 {
			dst[i] = src[k]
		}
	}
}

// airframeThenAero runs airframe_aero on its defaults and returns the
// inputs of aerodynamics (defaults, with the airframe's outputs fed in),
// the airframe's outputs and the two disciplines.
func airframeThenAero(t *testing.T) (*AirframeAerodynamics, []float64, *Aerodynamics, []float64) {
	t.Helper()
	af := NewAirframeAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())
	afOut := make([]float64, len(af.Outputs()))
	if err := af.Compute(defaultValues(af.Inputs()), afOut); err != nil {
		t.Fatal(err)
	}
	a := NewAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())
	in := defaultValues(a.Inputs())
	feedByName(in, a.Inputs(), afOut, af.Outputs())
	return af, afOut, a, in
}

func TestAerodynamicsDiscipline(t *testing.T) {
	af, afOut, a, in := airframeThenAero(t)
	out := make([]float64, len(a.Outputs()))
	if err := a.Compute(in, out); err != nil {
		t.Fatal(err)
	}
	get := func(name string) float64 {
		if k := varPosition(a.Outputs(), name); k >= 0 {
			return out[k]
		}
		return afOut[varPosition(af.Outputs(), name)]
	}
	// Internal consistency: L/D = CL/CD, CD = CD0 + K·CL² + trim, and the
	// high-lift settings order the maximum lift coefficients.
	if relErr(get("aero.ld_cruise"), get("aero.cl_cruise")/get("aero.cd_cruise")) > 1e-12 {
		t.Error("L/D inconsistent")
	}
	cl := get("aero.cl_cruise")
	if relErr(get("aero.cd_cruise"), get("aero.cd0_cruise")+get("aero.k_cruise")*cl*cl+get("aero.trim_drag_cruise")) > 1e-12 {
		t.Error("CD inconsistent")
	}
	if !(get("aero.cl_max_clean") < get("aero.cl_max_takeoff") && get("aero.cl_max_takeoff") < get("aero.cl_max_landing")) {
		t.Error("CLmax ordering")
	}
	// A tail download costs trim drag.
	in[aeroInTailLift] = -20000
	_ = a.Compute(in, out)
	if get("aero.trim_drag_cruise") <= 0 {
		t.Errorf("trim drag %g with a tail download", get("aero.trim_drag_cruise"))
	}
	if n := testing.AllocsPerRun(100, func() { _ = a.Compute(in, out) }); n != 0 {
		t.Errorf("Compute allocates %v times", n)
	}
	afIn := defaultValues(af.Inputs())
	if n := testing.AllocsPerRun(100, func() { _ = af.Compute(afIn, afOut) }); n != 0 {
		t.Errorf("airframe_aero Compute allocates %v times", n)
	}
}

func TestAerodynamicsSplitMatchesPolar(t *testing.T) {
	// airframe_aero followed by aerodynamics gives the polar of the
	// aerodynamic model for the whole configuration (pods included), at
	// supersonic, transonic-fairing and subsonic cruise: the split only
	// moves the pods-free parts out of the coupled loop.
	o := DefaultGeometryOptions()
	g := NewGeometry(o)
	af := NewAirframeAerodynamics(o, DefaultAeroOptions())
	a := NewAerodynamics(o, DefaultAeroOptions())
	for _, mach := range []float64{1.5, 0.97, 0.7} {
		gin := defaultValues(g.Inputs())
		gin[geoInMach] = mach
		gout := make([]float64, len(g.Outputs()))
		if err := g.Compute(gin, gout); err != nil {
			t.Fatal(err)
		}
		afIn := defaultValues(af.Inputs())
		feedByName(afIn, af.Inputs(), gin, g.Inputs())
		feedByName(afIn, af.Inputs(), gout, g.Outputs())
		afOut := make([]float64, len(af.Outputs()))
		if err := af.Compute(afIn, afOut); err != nil {
			t.Fatal(err)
		}
		in := defaultValues(a.Inputs())
		feedByName(in, a.Inputs(), gin, g.Inputs())
		feedByName(in, a.Inputs(), gout, g.Outputs())
		feedByName(in, a.Inputs(), afOut, af.Outputs())
		out := make([]float64, len(a.Outputs()))
		if err := a.Compute(in, out); err != nil {
			t.Fatal(err)
		}
		conf, err := g.Layout(gin)
		if err != nil {
			t.Fatal(err)
		}
		c, err := AssembleConfiguration(conf.Wing, gin[geoInPosition], conf.Fuselage, conf.HTailArea(), conf.VTailArea(),
			roundCount(in[aeroInEngines]), in[aeroInNacDiameter], in[aeroInNacLength], o)
		if err != nil {
			t.Fatal(err)
		}
		cl := out[aeroOutCL]
		p, err := a.Model().Polar(&c, FlightCondition{Mach: mach, Altitude: afIn[afInAltitude]}, cl)
		if err != nil {
			t.Fatal(err)
		}
		pl, err := a.Model().Polar(&c, FlightCondition{Mach: a.Model().Options.TakeoffMach, Altitude: afIn[afInElevation], TemperatureOffset: afIn[afInDT]}, lowSpeedLift)
		if err != nil {
			t.Fatal(err)
		}
		checks := []struct {
			name      string
			got, want float64
		}{
			{"aero.cd_friction_cruise", out[aeroOutFriction], p.CDFriction},
			{"aero.wave_drag_cruise", out[aeroOutWave], p.CDWave},
			{"aero.mach_drag_divergence", out[aeroOutMDD], p.MachDD},
			{"aero.k_cruise", afOut[afOutK], p.K},
			{"aero.cla_cruise", afOut[afOutCLACruise], p.CLAlpha},
			{"aero.cla_low_speed", afOut[afOutCLALow], pl.CLAlpha},
			{"aero.cd0_takeoff", out[aeroOutCD0TO], pl.CD0 + a.Model().Options.FlapDragPerCL*in[aeroInFlapTakeoff]},
		}
		for _, ck := range checks {
			// the area rule of the whole configuration is cut over the
			// pods' range too, so the wave drag agrees to the quadrature
			tol := 1e-12
			if ck.name == "aero.wave_drag_cruise" {
				tol = 1e-9
			}
			if relErr(ck.got, ck.want) > tol {
				t.Errorf("M %g: %s = %.15g, the model's polar gives %.15g", mach, ck.name, ck.got, ck.want)
			}
		}
	}
}

func BenchmarkAerodynamicsCompute(b *testing.B) {
	a := NewAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())
	in := defaultValues(a.Inputs())
	out := make([]float64, len(a.Outputs()))
	benchCompute(b, a, in, out)
}

func BenchmarkAirframeAerodynamicsCompute(b *testing.B) {
	a := NewAirframeAerodynamics(DefaultGeometryOptions(), DefaultAeroOptions())
	in := defaultValues(a.Inputs())
	out := make([]float64, len(a.Outputs()))
	benchCompute(b, a, in, out)
}

func BenchmarkGeometryCompute(b *testing.B) {
	g := NewGeometry(DefaultGeometryOptions())
	in := defaultValues(g.Inputs())
	out := make([]float64, len(g.Outputs()))
	benchCompute(b, g, in, out)
}

func TestAirframeWaveSplit(t *testing.T) {
	// The area-rule coefficients are linear in the areas: the airframe's
	// coefficients plus the pods' give the wave drag of the whole
	// configuration (pods inside the airframe's cut range).
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	for _, sweep := range []float64{50, -35} {
		c := testConfiguration(t, sweep, true)
		for _, mach := range []float64{1.1, 1.5, 2.2} {
			aw := m.wave.AirframeWave(&c, mach)
			split := m.wave.WaveDragWithPods(&aw, &c.Nacelles)
			whole, _ := m.VolumeWaveDragArea(&c, mach, false)
			if relErr(split, whole) > 1e-9 {
				t.Errorf("sweep %g, M %g: split %g, whole %g", sweep, mach, split, whole)
			}
		}
	}
}

func TestGeometryFeedsAerodynamics(t *testing.T) {
	// The discipline chain geometry → aerodynamics gives the wave drag of
	// the aerodynamic model for the same configuration.
	o := DefaultGeometryOptions()
	g := NewGeometry(o)
	a := NewAerodynamics(o, DefaultAeroOptions())
	gin := defaultValues(g.Inputs())
	gout := make([]float64, len(g.Outputs()))
	if err := g.Compute(gin, gout); err != nil {
		t.Fatal(err)
	}
	af := NewAirframeAerodynamics(o, DefaultAeroOptions())
	afIn := defaultValues(af.Inputs())
	feedByName(afIn, af.Inputs(), gin, g.Inputs())
	feedByName(afIn, af.Inputs(), gout, g.Outputs())
	afOut := make([]float64, len(af.Outputs()))
	if err := af.Compute(afIn, afOut); err != nil {
		t.Fatal(err)
	}
	ain := defaultValues(a.Inputs())
	feedByName(ain, a.Inputs(), afOut, af.Outputs())
	for i, v := range a.Inputs() {
		if k := varPosition(g.Outputs(), v.Name); k >= 0 {
			ain[i] = gout[k]
		} else if k := varPosition(g.Inputs(), v.Name); k >= 0 {
			ain[i] = gin[k]
		}
	}
	aout := make([]float64, len(a.Outputs()))
	if err := a.Compute(ain, aout); err != nil {
		t.Fatal(err)
	}
	conf, err := g.Layout(gin)
	if err != nil {
		t.Fatal(err)
	}
	f, _ := FuselageFromDimensions(conf.Fuselage.Length, conf.Fuselage.Diameter, conf.Fuselage.NoseLength, conf.Fuselage.TailLength)
	c, err := AssembleConfiguration(conf.Wing, gin[geoInPosition], f, conf.HTailArea(), conf.VTailArea(), 2, ain[aeroInNacDiameter], ain[aeroInNacLength], o)
	if err != nil {
		t.Fatal(err)
	}
	dq, _ := a.Model().VolumeWaveDragArea(&c, ain[aeroInMach], false)
	if got := aout[varPosition(a.Outputs(), "aero.wave_drag_cruise")]; relErr(got, dq/c.Wing.Area) > 1e-9 {
		t.Errorf("wave drag %g, model %g", got, dq/c.Wing.Area)
	}
}

func TestPolarAllocatesNothing(t *testing.T) {
	c := testConfiguration(t, 50, true)
	m := NewAeroModel(DefaultGeometryOptions(), DefaultAeroOptions())
	fc := FlightCondition{Mach: 1.6, Altitude: 16000}
	if n := testing.AllocsPerRun(50, func() { _, _ = m.Polar(&c, fc, 0.2) }); n != 0 {
		t.Errorf("Polar allocates %v times", n)
	}
}

func TestRollNodes(t *testing.T) {
	// Two-point Gauss–Legendre nodes on [0, π/2]: π/4·(1 ∓ 1/√3), and
	// their cosines as tabulated.
	n, c := rollNodes(), rollCosines()
	want := [2]float64{math.Pi / 4 * (1 - 1/math.Sqrt(3)), math.Pi / 4 * (1 + 1/math.Sqrt(3))}
	for i := range n {
		if math.Abs(n[i]-want[i]) > 1e-15 || math.Abs(c[i]-math.Cos(want[i])) > 1e-15 {
			t.Errorf("node %d: %v (cos %v), want %v", i, n[i], c[i], want[i])
		}
	}
	if math.Abs(lockOffset-math.Cbrt(0.1/80)) > 1e-16 {
		t.Errorf("lockOffset %v", lockOffset)
	}
}
