package disciplines

import (
	"errors"
	"math"
	"testing"
)

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func TestStandardAtmosphereTable(t *testing.T) {
	// U.S. Standard Atmosphere 1976, indexed by geopotential altitude H
	// (values recomputed from the defining equations; the standard's own
	// tables agree to the digits given).
	cases := []struct {
		h, t, p, rho, a float64
	}{
		{0, 288.15, 101325, 1.2250, 340.294},
		{11000, 216.65, 22632.0, 0.363918, 295.069},
		{20000, 216.65, 5474.88, 0.0880347, 295.069},
		{32000, 228.65, 868.016, 0.0132250, 303.131},
	}
	for _, c := range cases {
		at, err := StandardAtmosphere(GeometricAltitude(c.h))
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{{"T", at.Temperature, c.t}, {"p", at.Pressure, c.p}, {"rho", at.Density, c.rho}, {"a", at.SpeedOfSound, c.a}} {
			if e := relErr(q.got, q.want); e > 1e-5 {
				t.Errorf("H = %g m: %s = %.7g, want %.7g (rel %.2g)", c.h, q.name, q.got, q.want, e)
			}
		}
	}
}

func TestGeometricAltitude5000(t *testing.T) {
	// U.S. Standard Atmosphere 1976 tables by geometric height: 5 000 m
	// geometric is H = 4 996.07 m, p = 54 048 Pa.
	at, err := StandardAtmosphere(5000)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(at.Geopotential-4996.07) > 0.01 {
		t.Errorf("H(5000 m) = %.3f, want 4996.07", at.Geopotential)
	}
	if relErr(at.Pressure, 54048) > 2e-5 {
		t.Errorf("p(5000 m) = %.2f, want 54048", at.Pressure)
	}
	if z := GeometricAltitude(GeopotentialAltitude(12345.6)); math.Abs(z-12345.6) > 1e-8 {
		t.Errorf("round trip z = %v", z)
	}
}

func TestSutherlandViscosity(t *testing.T) {
	// U.S. Standard Atmosphere 1976: μ(288.15 K) = 1.7894e-5 Pa s.
	if mu := SutherlandViscosity(288.15); relErr(mu, 1.7894e-5) > 1e-4 {
		t.Errorf("μ = %g", mu)
	}
}

func TestAtmosphereLayersContinuous(t *testing.T) {
	// Property of the defining equations: T and p are continuous at every
	// layer boundary (geopotential 11, 20, 32, 47, 51, 71 km).
	for _, hb := range []float64{11000, 20000, 32000, 47000, 51000, 71000} {
		lo, _ := StandardAtmosphere(GeometricAltitude(hb - 1e-6))
		hi, _ := StandardAtmosphere(GeometricAltitude(hb + 1e-6))
		if relErr(lo.Pressure, hi.Pressure) > 1e-9 || relErr(lo.Temperature, hi.Temperature) > 1e-9 {
			t.Errorf("discontinuity at H = %g: %+v vs %+v", hb, lo, hi)
		}
	}
	// Top of the 1976 standard: 86 km geometric, T = 186.87 K (kinetic),
	// p ≈ 0.3734 Pa (U.S. Standard Atmosphere 1976 tables, from memory).
	top, err := StandardAtmosphere(86000)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(top.Temperature-186.87) > 0.01 || relErr(top.Pressure, 0.3734) > 1e-3 {
		t.Errorf("86 km: T = %.3f K, p = %.5g Pa", top.Temperature, top.Pressure)
	}
}

func TestOffsetAtmosphere(t *testing.T) {
	// Hot day ISA+20 at sea level: p unchanged, T = 308.15 K, ρ = p/(R T)
	// (definition of an ISA offset day).
	at, err := OffsetAtmosphere(0, 20)
	if err != nil {
		t.Fatal(err)
	}
	if at.Pressure != SeaLevelPressure || at.Temperature != 308.15 {
		t.Errorf("hot day: %+v", at)
	}
	if relErr(at.Density, 101325/(RAir*308.15)) > 1e-12 {
		t.Errorf("hot-day density %g", at.Density)
	}
	if relErr(at.SpeedOfSound, math.Sqrt(1.4*RAir*308.15)) > 1e-12 {
		t.Errorf("hot-day a %g", at.SpeedOfSound)
	}
}

func TestAtmosphereRefusesAltitude(t *testing.T) {
	for _, z := range []float64{-5001, 86001, math.NaN(), math.Inf(1)} {
		_, err := StandardAtmosphere(z)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Var != "altitude" {
			t.Errorf("z = %g: err = %v, want an InputError naming altitude", z, err)
		}
	}
	if _, err := OffsetAtmosphere(0, 150); err == nil {
		t.Error("offset 150 K accepted")
	}
}

func BenchmarkStandardAtmosphere(b *testing.B) {
	b.ReportAllocs()
	z := 0.0
	for i := 0; i < b.N; i++ {
		at, _ := StandardAtmosphere(z)
		z = math.Mod(z+997, 80000) + at.Temperature*0
	}
}

func TestAtmosphereAllocatesNothing(t *testing.T) {
	// Deterministic count: the hot path allocates nothing.
	z := 12000.0
	if n := testing.AllocsPerRun(100, func() { _, _ = OffsetAtmosphere(z, 10) }); n != 0 {
		t.Errorf("%v allocations", n)
	}
}
