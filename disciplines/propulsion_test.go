package disciplines

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

// propRel is the relative difference |got−want|/|want|.
func propRel(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Ideal turbojet check values: closed form of Mattingly, "Elements of Gas
// Turbine Propulsion", chapter 5, recomputed with γ = 1.4,
// cp = 1004 J/(kg K), hPR = 42.8 MJ/kg (project reference table
// "Propulsion — ideal turbojet"), given to 5 significant figures.
var idealTurbojetRows = []struct {
	name             string
	m0, t0, pic, tt4 float64
	fs, f, sMg       float64 // F/ṁ [N s/kg], f, S [mg/(N s)]
}{
	{"M2 tropopause", 2.0, 216.7, 10, 1800, 768.45, 0.024558, 31.958},
	{"static sea level", 0, 288.15, 10, 1800, 1097.19, 0.029174, 26.590},
}

func checkIdealRow(t *testing.T, what string, got CycleResult, fs, f, sMg float64) {
	t.Helper()
	if e := propRel(got.SpecificThrust, fs); e > 5e-5 {
		t.Errorf("%s: F/m = %.6g, want %.6g", what, got.SpecificThrust, fs)
	}
	if e := propRel(got.FuelAirRatio, f); e > 5e-5 {
		t.Errorf("%s: f = %.6g, want %.6g", what, got.FuelAirRatio, f)
	}
	if e := propRel(got.TSFC*1e6, sMg); e > 5e-5 {
		t.Errorf("%s: S = %.6g mg/(N s), want %.6g", what, got.TSFC*1e6, sMg)
	}
}

func TestIdealTurbojetClosedForm(t *testing.T) {
	for _, r := range idealTurbojetRows {
		got, err := IdealTurbojet(r.m0, r.t0, r.pic, r.tt4, 1.4, 1004, 42.8e6)
		if err != nil {
			t.Fatalf("%s: %v", r.name, err)
		}
		checkIdealRow(t, "closed form "+r.name, got, r.fs, r.f, r.sMg)
	}
}

// With every component ideal the parametric analysis with losses must
// reduce to the closed form (same reference rows).
func TestComponentCycleReducesToIdeal(t *testing.T) {
	for _, r := range idealTurbojetRows {
		got, err := Turbojet(IdealComponents(), r.m0, r.t0, r.pic, r.tt4)
		if err != nil {
			t.Fatalf("%s: %v", r.name, err)
		}
		checkIdealRow(t, "component cycle "+r.name, got, r.fs, r.f, r.sMg)
		// a vanishing bypass stream joins the turbojet continuously
		fan, err := MixedFlowTurbofan(IdealComponents(), r.m0, r.t0, r.pic, 1e-9, r.tt4)
		if err != nil {
			t.Fatalf("%s: %v", r.name, err)
		}
		if e := propRel(fan.SpecificThrust, got.SpecificThrust); e > 1e-7 {
			t.Errorf("%s: turbofan at α→0 gives F/m %.8g, turbojet %.8g", r.name, fan.SpecificThrust, got.SpecificThrust)
		}
	}
}

// The fan pressure ratio of the mixed-flow turbofan, πc·πb·πt at the
// mixer (Pt16 = Pt6), joins the turbojet's continuously as the bypass
// ratio goes to zero (it was reported as 1 at α = 0); the ideal turbojet
// reports the same limit as the component cycle with ideal components.
func TestFanPressureRatioContinuousAtZeroBypass(t *testing.T) {
	for _, c := range []CycleComponents{IdealComponents(), TypicalComponents()} {
		for _, r := range []struct{ m, t0, pic, tt4 float64 }{{0, 288.15, 26, 1600}, {1.5, 216.65, 20, 1850}, {0.8, 216.65, 10, 1400}} {
			jet, err := MixedFlowTurbofan(c, r.m, r.t0, r.pic, 0, r.tt4)
			if err != nil {
				t.Fatal(err)
			}
			fan, err := MixedFlowTurbofan(c, r.m, r.t0, r.pic, 1e-9, r.tt4)
			if err != nil {
				t.Fatal(err)
			}
			if e := propRel(fan.FanPressureRatio, jet.FanPressureRatio); e > 1e-6 {
				t.Errorf("%+v: πf %.8g at α = 1e-9, %.8g at α = 0", r, fan.FanPressureRatio, jet.FanPressureRatio)
			}
		}
	}
	ideal, err := IdealTurbojet(2, 216.7, 10, 1800, 1.4, 1004, 42.8e6)
	if err != nil {
		t.Fatal(err)
	}
	comp, err := Turbojet(IdealComponents(), 2, 216.7, 10, 1800)
	if err != nil {
		t.Fatal(err)
	}
	if e := propRel(ideal.FanPressureRatio, comp.FanPressureRatio); e > 1e-12 {
		t.Errorf("ideal turbojet πf %.10g, component cycle %.10g", ideal.FanPressureRatio, comp.FanPressureRatio)
	}
}

func TestInletRecoveryMIL5007D(t *testing.T) {
	// MIL-E-5007D: ηr = 1 − 0.075 (M − 1)^1.35 (project reference checks)
	for _, c := range []struct{ m, want float64 }{{0, 1}, {0.9, 1}, {1, 1}, {1.6, 0.96237}, {2.0, 0.925}} {
		got, err := InletRecoveryMIL5007D(c.m)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-c.want) > 5e-6 {
			t.Errorf("ηr(%g) = %.6f, want %.5f", c.m, got, c.want)
		}
	}
	if _, err := InletRecoveryMIL5007D(5); err == nil {
		t.Error("Mach 5 accepted; MIL-E-5007D covers M < 5")
	}
}

// The mixer condition Pt16 = Pt6 must hold: πf = πc·πb·πt with
// πt = τt^(γt/((γt−1)et)).
func TestMixedFlowTurbofanMixerBalance(t *testing.T) {
	c := TypicalComponents()
	for _, alpha := range []float64{0.2, 0.6, 1.5, 3} {
		r, err := MixedFlowTurbofan(c, 0.9, 216.65, 20, alpha, 1650)
		if err != nil {
			t.Fatalf("α=%g: %v", alpha, err)
		}
		pit := math.Pow(r.TurbineTempRatio, c.GammaT/((c.GammaT-1)*c.TurbinePolytropic))
		if e := propRel(r.FanPressureRatio, 20*c.BurnerPressureRatio*pit); e > 1e-10 {
			t.Errorf("α=%g: πf = %.10g but πc·πb·πt = %.10g", alpha, r.FanPressureRatio, 20*c.BurnerPressureRatio*pit)
		}
		if !(r.FanPressureRatio > 1 && r.FanPressureRatio < 20) {
			t.Errorf("α=%g: πf = %g outside (1, πc)", alpha, r.FanPressureRatio)
		}
	}
}

// Practitioner's properties: losses cost thrust and fuel; at subsonic
// cruise a larger bypass ratio lowers TSFC and specific thrust.
func TestCycleTrends(t *testing.T) {
	// component losses alone (same gas, fuel mass neglected as in the ideal cycle)
	lossy := IdealComponents()
	lossy.InletRecoveryMax, lossy.CompressorPolytropic, lossy.BurnerEfficiency = 0.97, 0.9, 0.99
	lossy.BurnerPressureRatio, lossy.TurbinePolytropic, lossy.NozzlePressureRatio = 0.96, 0.89, 0.98
	ideal, _ := Turbojet(IdealComponents(), 0.9, 216.65, 20, 1650)
	real, err := Turbojet(lossy, 0.9, 216.65, 20, 1650)
	if err != nil {
		t.Fatal(err)
	}
	if !(real.SpecificThrust < ideal.SpecificThrust && real.TSFC > ideal.TSFC) {
		t.Errorf("losses: F/m %g vs ideal %g, S %g vs ideal %g", real.SpecificThrust, ideal.SpecificThrust, real.TSFC, ideal.TSFC)
	}
	prev, _ := Turbojet(TypicalComponents(), 0.9, 216.65, 20, 1650)
	for _, alpha := range []float64{0.5, 1, 2} {
		r, err := MixedFlowTurbofan(TypicalComponents(), 0.9, 216.65, 20, alpha, 1650)
		if err != nil {
			t.Fatal(err)
		}
		if !(r.TSFC < prev.TSFC && r.SpecificThrust < prev.SpecificThrust) {
			t.Errorf("α=%g: S %g (prev %g), F/m %g (prev %g)", alpha, r.TSFC, prev.TSFC, r.SpecificThrust, prev.SpecificThrust)
		}
		prev = r
	}
}

func TestPartThrottle(t *testing.T) {
	c := TypicalComponents()
	full, _ := MixedFlowTurbofan(c, 1.5, 216.65, 18, 0.6, 1700)
	for _, x := range []float64{0.95, 0.8, 0.6} {
		r, tt4, err := PartThrottle(c, 1.5, 216.65, 18, 0.6, 1700, x*full.SpecificThrust)
		if err != nil {
			t.Fatalf("x=%g: %v", x, err)
		}
		if e := propRel(r.SpecificThrust, x*full.SpecificThrust); e > 1e-10 {
			t.Errorf("x=%g: F/m %g, want %g", x, r.SpecificThrust, x*full.SpecificThrust)
		}
		if !(tt4 < 1700) {
			t.Errorf("x=%g: Tt4 %g not throttled", x, tt4)
		}
	}
	if _, _, err := PartThrottle(c, 1.5, 216.65, 18, 0.6, 1700, 1.01*full.SpecificThrust); err == nil {
		t.Error("a thrust above full throttle was accepted")
	}
}

// The engine_cycle deck interpolated by propulsion must match a direct
// part-throttle cycle.
func TestPartThrottleInterpolation(t *testing.T) {
	cyc := NewEngineCycle()
	in := defaultValues(cyc.Inputs())
	out := make([]float64, cycNumOut)
	if err := cyc.Compute(in, out); err != nil {
		t.Fatal(err)
	}
	at, _ := StandardAtmosphere(in[cycInAltitude])
	full, _ := MixedFlowTurbofan(cyc.Components, in[cycInMach], at.Temperature, in[cycInPressureRatio], in[cycInBypass], in[cycInTt4])
	for _, x := range []float64{0.9, 0.75, 0.65} {
		want, _, err := PartThrottle(cyc.Components, in[cycInMach], at.Temperature, in[cycInPressureRatio], in[cycInBypass], in[cycInTt4], x*full.SpecificThrust)
		if err != nil {
			t.Fatal(err)
		}
		got, _ := PartThrottleInterp(x, out[cycOutTSFCCruiseMax], out[cycOutThrustNode1], out[cycOutTSFCNode1], out[cycOutTt4Node1],
			out[cycOutThrustNode2], out[cycOutTSFCNode2], out[cycOutTt4Node2])
		// quadratic deck through three nodes: 0.2 % is the accuracy claimed
		if e := propRel(got, want.TSFC); e > 2e-3 {
			t.Errorf("x=%g: interpolated TSFC %.5g, cycle %.5g", x, got, want.TSFC)
		}
	}
}

func TestSecondSegmentMinGradient(t *testing.T) {
	// 14 CFR 25.121(b): 2.4 / 2.7 / 3.0 % for 2 / 3 / 4 engines
	for _, c := range []struct{ n, want float64 }{{2, 0.024}, {3, 0.027}, {4, 0.030}} {
		got, err := SecondSegmentMinGradient(c.n)
		if err != nil || got != c.want {
			t.Errorf("n=%g: %g, %v; want %g", c.n, got, err, c.want)
		}
	}
	if _, err := SecondSegmentMinGradient(1); err == nil || !strings.Contains(err.Error(), "engine.count") {
		t.Errorf("one engine: err = %v, want an error naming engine.count", err)
	}
}

func TestEngineMassAndNacelle(t *testing.T) {
	// Raymer's regression is a power law T^1.1: doubling thrust multiplies
	// mass by 2^1.1; bypass lowers mass by exp(−0.045 BPR).
	m1 := EngineMassRaymer(50000, 0)
	if e := propRel(EngineMassRaymer(100000, 0)/m1, math.Pow(2, 1.1)); e > 1e-12 {
		t.Errorf("mass ratio %g, want 2^1.1", EngineMassRaymer(100000, 0)/m1)
	}
	if e := propRel(EngineMassRaymer(50000, 1)/m1, math.Exp(-0.045)); e > 1e-12 {
		t.Errorf("bypass factor %g", EngineMassRaymer(50000, 1)/m1)
	}
	// fan face at Mach 0.55 at standard sea-level total conditions: the
	// flow per unit area must match the isentropic relations of NACA 1135.
	d, l := NacelleSize(100, 90000, 0.8)
	dfan := d / nacelleDiaFactor
	area := math.Pi / 4 * dfan * dfan * (1 - fanHubTip*fanHubTip)
	tr := IsentropicTemperatureRatio(fanFaceMach)
	pr := IsentropicPressureRatio(fanFaceMach)
	rho := SeaLevelPressure * pr / (RAir * SeaLevelTemperature * tr)
	v := fanFaceMach * math.Sqrt(Gamma*RAir*SeaLevelTemperature*tr)
	if e := propRel(rho*v*area, 100); e > 1e-9 {
		t.Errorf("fan face passes %g kg/s, want 100", rho*v*area)
	}
	if !(l > d) {
		t.Errorf("nacelle length %g not above diameter %g", l, d)
	}
}

// propulsionSystem builds engine_cycle + propulsion with business-jet
// parameters and coupling inputs set as parameters.
func propulsionSystem(t *testing.T, set map[string]float64) *mdo.Workspace {
	t.Helper()
	sys, err := mdo.NewSystem(NewFlightConditions(), NewEngineCycle(), NewPropulsion())
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	base := map[string]float64{
		"mass.takeoff": 42000, "aero.drag_cruise": 48000, "aero.ld_takeoff": 8, "aero.cl_max_takeoff": 1.5,
		"wing.area": 120, "cruise.mach": 1.5, "cruise.altitude": 15500, "engine.bypass_ratio": 0.7,
	}
	for k, v := range set {
		base[k] = v
	}
	for k, v := range base {
		if err := ws.Set(k, v); err != nil {
			t.Fatal(err)
		}
	}
	if err := ws.Analyze(context.Background()); err != nil {
		t.Fatal(err)
	}
	return ws
}

func get(t *testing.T, ws *mdo.Workspace, name string) float64 {
	t.Helper()
	v, err := ws.Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestPropulsionSystem(t *testing.T) {
	ws := propulsionSystem(t, nil)
	n := 2.0
	m0 := get(t, ws, "mass.takeoff") * G0
	tsls := get(t, ws, "engine.thrust_sea_level")
	// every sizing requirement is met, the sizing one exactly
	tw := n * get(t, ws, "engine.thrust_takeoff") / m0
	twReq := RoskamTakeoffParameter * (m0 / 120 / unitPsf) / (1.5 * 1900 / unitFt)
	// thrust at V2 = 1.13 VSR1, linear in Mach between static and Mach 0.25
	v2 := 1.13 * math.Sqrt(2*m0/(SeaLevelDensity*120*1.5))
	t0, t1 := get(t, ws, "engine.thrust_takeoff"), get(t, ws, "engine.thrust_climb")
	tv2 := t0 + (t1-t0)*v2/(0.25*math.Sqrt(Gamma*RAir*SeaLevelTemperature))
	grad := (n-1)*tv2/m0 - 1/8.0
	cruise := n * get(t, ws, "engine.thrust_cruise_available") / (48000 * 1.1)
	if tw < twReq*(1-1e-12) || grad < 0.024-1e-12 || cruise < 1-1e-12 {
		t.Errorf("requirements not met: T/W %g (need %g), 2nd-segment gradient %g, cruise thrust/required %g", tw, twReq, grad, cruise)
	}
	kase := get(t, ws, "engine.sizing_case")
	exact := map[float64]float64{SizingTakeoff: tw / twReq, SizingSecondSegment: (grad + 1/8.0) / (0.024 + 1/8.0), SizingCruise: cruise}
	if r, ok := exact[kase]; ok && math.Abs(r-1) > 1e-9 {
		t.Errorf("sizing case %g not met exactly: ratio %g", kase, r)
	}
	// plausibility (common practice, no source): installed T/W of a
	// supersonic business jet 0.3–0.6; supersonic cruise TSFC of a
	// low-bypass engine 0.9–1.4 lb/(lbf h) = 2.5–4.0e-5 kg/(N s); engine
	// thrust-to-weight 3–8
	if !(tw > 0.3 && tw < 0.6) {
		t.Errorf("take-off T/W %g outside 0.3–0.6", tw)
	}
	if s := get(t, ws, "engine.tsfc_cruise"); !(s > 2.5e-5 && s < 4e-5) {
		t.Errorf("cruise TSFC %g outside 2.5e-5–4e-5", s)
	}
	if r := tsls / (get(t, ws, "engine.mass") * G0); !(r > 3 && r < 8) {
		t.Errorf("engine T/W %g outside 3–8", r)
	}
	if thr := get(t, ws, "engine.cruise_throttle"); !(thr > 0.5 && thr < 1) {
		t.Errorf("cruise throttle %g", thr)
	}
	// a bigger engine: thrust scales with engine.thrust_scale
	big := propulsionSystem(t, map[string]float64{"engine.thrust_scale": 1.5})
	if e := propRel(get(t, big, "engine.thrust_sea_level"), 1.5*tsls); e > 1e-12 {
		t.Errorf("thrust_scale 1.5 gives %g, want %g", get(t, big, "engine.thrust_sea_level"), 1.5*tsls)
	}
	if !(get(t, big, "engine.cruise_throttle") < get(t, ws, "engine.cruise_throttle")) {
		t.Error("a larger engine does not cruise at a lower throttle")
	}
}

func TestPropulsionRefusesBadInput(t *testing.T) {
	sys, err := mdo.NewSystem(NewFlightConditions(), NewEngineCycle(), NewPropulsion())
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	var re *mdo.RangeError
	for _, c := range []struct {
		name string
		v    float64
	}{{"engine.count", 1}, {"cruise.mach", 3}, {"engine.bypass_ratio", -1}, {"engine.thrust_scale", 0.5}} {
		if err := ws.Set(c.name, c.v); !errors.As(err, &re) || re.Var != c.name {
			t.Errorf("%s = %g: err = %v, want a range error naming it", c.name, c.v, err)
		}
	}
	// a turbine temperature too low to drive the compressor at Mach 2.5
	if err := ws.Set("engine.turbine_temperature", 1100); err != nil {
		t.Fatal(err)
	}
	_ = ws.Set("cruise.mach", 2.5)
	_ = ws.Set("engine.pressure_ratio", 40)
	err = ws.Analyze(context.Background())
	if err == nil || !strings.Contains(err.Error(), "engine.turbine_temperature") {
		t.Errorf("err = %v, want an error naming engine.turbine_temperature", err)
	}
}

// propulsionBench runs engine_cycle once and returns propulsion inputs at
// the defaults with the cycle outputs filled in.
func propulsionBench(tb testing.TB) []float64 {
	cyc := NewEngineCycle()
	cout := make([]float64, cycNumOut)
	if err := cyc.Compute(defaultValues(cyc.Inputs()), cout); err != nil {
		tb.Fatal(err)
	}
	in := defaultValues(NewPropulsion().Inputs())
	copy(in[propInUnitSLS:], cout[cycOutUnitSLS:cycOutUnitCruise+1])
	copy(in[propInTSFCCruiseMax:], cout[cycOutTSFCCruiseMax:cycOutTt4Node2+1])
	return in
}

func BenchmarkEngineCycleCompute(b *testing.B) {
	cyc := NewEngineCycle()
	cin := defaultValues(cyc.Inputs())
	cin[cycInAirportElevation] = 1000
	out := make([]float64, cycNumOut)
	benchCompute(b, cyc, cin, out)
}

func BenchmarkPropulsionCompute(b *testing.B) {
	p := NewPropulsion()
	in := propulsionBench(b)
	out := make([]float64, propNumOut)
	benchCompute(b, p, in, out)
}

// A sized engine: full throttle at sea-level static reproduces the
// rating; thrust lapses with altitude; throttling lowers thrust; fuel
// flow is TSFC times thrust.
func TestEngineAt(t *testing.T) {
	c := TypicalComponents()
	sls, err := MixedFlowTurbofan(c, 0, SeaLevelTemperature, 20, 0.8, 1750)
	if err != nil {
		t.Fatal(err)
	}
	p0, err := EngineAt(c, 0.8, 20, 1750, 100, 0, 0, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	if e := propRel(p0.Thrust, 100*sls.SpecificThrust); e > 1e-12 {
		t.Errorf("SLS thrust %g, want %g", p0.Thrust, 100*sls.SpecificThrust)
	}
	prev := math.Inf(1)
	for _, h := range []float64{0, 5000, 11000, 16000} {
		p, err := EngineAt(c, 0.8, 20, 1750, 100, 0.9, h, 0, 1)
		if err != nil {
			t.Fatal(err)
		}
		if !(p.Thrust < prev) {
			t.Errorf("h=%g: thrust %g not below %g", h, p.Thrust, prev)
		}
		if e := propRel(p.FuelFlow, p.TSFC*p.Thrust); e > 1e-14 {
			t.Error("fuel flow is not TSFC × thrust")
		}
		prev = p.Thrust
	}
	pt, err := EngineAt(c, 0.8, 20, 1750, 100, 0.9, 11000, 0, 0.85)
	if err != nil {
		t.Fatal(err)
	}
	full, _ := EngineAt(c, 0.8, 20, 1750, 100, 0.9, 11000, 0, 1)
	if !(pt.Thrust < full.Thrust) {
		t.Error("part throttle does not lower thrust")
	}
	if _, err := EngineAt(c, 0.8, 20, 1750, 100, 0.9, 11000, 0, 1.2); err == nil || !strings.Contains(err.Error(), "engine.throttle") {
		t.Errorf("throttle 1.2: err = %v", err)
	}
}
