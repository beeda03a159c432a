package disciplines

import (
	"math"
	"testing"
)

// propRel is the relative difference |got−want|/|want|.
func propRel(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Ideal turbojet check values: closed form of Mattingly chapter 5,
// recomputed with γ = 1.4, cp = 1004 J/(kg K), hPR = 42.8 MJ/kg
// (project REFERENCES table "Propulsion — ideal turbojet").
var idealTurbojetRows = []struct {
	name             string
	m0, t0, pic, tt4 float64
	fs, f, sMg       float64 // F/ṁ [N s/kg], f, S [mg/(N s)]
}{
	{"M2 tropopause", 2.0, 216.7, 10, 1800, 768.45, 0.024558, 31.958},
	{"static sea level", 0, 288.15, 10, 1800, 1097.19, 0.029174, 26.590},
}

func TestIdealTurbojetClosedForm(t *testing.T) {
	for _, r := range idealTurbojetRows {
		got, err := IdealTurbojet(r.m0, r.t0, r.pic, r.tt4, 1.4, 1004, 42.8e6)
		if err != nil {
			t.Fatalf("%s: %v", r.name, err)
		}
		// table values are given to 5 significant figures
		if e := propRel(got.SpecificThrust, r.fs); e > 5e-5 {
			t.Errorf("%s: F/m = %.6g, want %.6g", r.name, got.SpecificThrust, r.fs)
		}
		if e := propRel(got.FuelAirRatio, r.f); e > 5e-5 {
			t.Errorf("%s: f = %.6g, want %.6g", r.name, got.FuelAirRatio, r.f)
		}
		if e := propRel(got.TSFC*1e6, r.sMg); e > 5e-5 {
			t.Errorf("%s: S = %.6g mg/(N s), want %.6g", r.name, got.TSFC*1e6, r.sMg)
		}
	}
}

// propulsionBench runs engine_cycle once and returns propulsion inputs
// at the defaults with the cycle outputs filled in.
func propulsionBench(tb testing.TB) []float64 {
	cyc := NewEngineCycle()
	cin := make([]float64, cycNumIn)
	for i, v := range cyc.Inputs() {
		cin[i] = v.Default
	}
	cout := make([]float64, cycNumOut)
	if err := cyc.Compute(cin, cout); err != nil {
		tb.Fatal(err)
	}
	p := NewPropulsion()
	in := make([]float64, propNumIn)
	for i, v := range p.Inputs() {
		in[i] = v.Default
	}
	copy(in[propInUnitSLS:], cout[cycOutUnitSLS:cycOutUnitCruise+1])
	copy(in[propInTSFCCruiseMax:], cout[cycOutTSFCCruiseMax:cycOutTt4Node2+1])
	return in
}

func BenchmarkEngineCycleCompute(b *testing.B) {
	cyc := NewEngineCycle()
	cin := make([]float64, cycNumIn)
	for i, v := range cyc.Inputs() {
		cin[i] = v.Default
	}
	cin[cycInAirportElevation] = 1000
	out := make([]float64, cycNumOut)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := cyc.Compute(cin, out); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkPropulsionCompute(b *testing.B) {
	p := NewPropulsion()
	in := propulsionBench(b)
	out := make([]float64, propNumOut)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if err := p.Compute(in, out); err != nil {
			b.Fatal(err)
		}
	}
}

func TestPropulsionDefaultsPrint(t *testing.T) {
	p := NewPropulsion()
	out := make([]float64, propNumOut)
	in := propulsionBench(t)
	if err := p.Compute(in, out); err != nil {
		t.Fatal(err)
	}
	for i, v := range p.Outputs() {
		t.Logf("%s = %g %s", v.Name, out[i], v.Unit)
	}
	c := TypicalComponents()
	at, _ := StandardAtmosphere(15000)
	r, tt, err := PartThrottle(c, 1.5, at.Temperature, 18, 0.6, 1700, in[propInUnitCruise]/CorrectedFlowLapse(at.Pressure, at.Temperature, 1.5, true)*out[propOutCruiseThrottle]*0+
		in[propInDragCruise]/2/out[propOutMassFlow]/CorrectedFlowLapse(at.Pressure, at.Temperature, 1.5, true))
	t.Log(r.TSFC, tt/1700, err)
}
