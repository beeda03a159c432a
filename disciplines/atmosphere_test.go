package disciplines

import (
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// readTable reads a reference table of testdata/: '#' lines are its
// provenance, the first other line the column names, then numbers.
func readTable(t *testing.T, name string) [][]float64 {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	var rows [][]float64
	for _, rec := range recs[1:] {
		row := make([]float64, len(rec))
		for k, field := range rec {
			if row[k], err = strconv.ParseFloat(field, 64); err != nil {
				t.Fatalf("%s: %v", name, err)
			}
		}
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		t.Fatalf("%s holds no rows", name)
	}
	return rows
}

func TestStandardAtmosphereTable(t *testing.T) {
	// U.S. Standard Atmosphere 1976, indexed by geopotential altitude H;
	// the table and its provenance are in testdata.
	for _, c := range readTable(t, "us_standard_atmosphere_1976.csv") {
		h := c[0]
		at, err := StandardAtmosphere(GeometricAltitude(h))
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{{"T", at.Temperature, c[1]}, {"p", at.Pressure, c[2]}, {"rho", at.Density, c[3]}, {"a", at.SpeedOfSound, c[4]}} {
			if e := relErr(q.got, q.want); e > 1e-5 {
				t.Errorf("H = %g m: %s = %.7g, want %.7g (rel %.2g)", h, q.name, q.got, q.want, e)
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

func TestStandardAtmosphereUpperLayers(t *testing.T) {
	// U.S. Standard Atmosphere 1976 above 32 km: the layers' lapse rates
	// +2.8, 0, −2.8, −2.0 K/km from 32, 47, 51 and 71 km geopotential
	// (project reference); T and p recomputed from the defining equations
	// (hydrostatic integration from 101 325 Pa, g0 = 9.80665 m/s²,
	// R = 287.05287 J/(kg K)).
	for _, c := range []struct{ h, t, p float64 }{
		{40000, 251.05, 277.5204}, {47000, 270.65, 110.9058}, {50000, 270.65, 75.94438},
		{51000, 270.65, 66.93853}, {60000, 245.45, 20.31414}, {71000, 214.65, 3.956392}, {80000, 196.65, 0.8862722},
	} {
		at, err := StandardAtmosphere(GeometricAltitude(c.h))
		if err != nil {
			t.Fatal(err)
		}
		// below 80 km geometric the kinetic and molecular-scale temperatures agree
		tm := at.SpeedOfSound * at.SpeedOfSound / (Gamma * RAir)
		if relErr(tm, c.t) > 1e-6 || relErr(at.Pressure, c.p) > 1e-5 {
			t.Errorf("H = %g m: T_M = %.4f K, p = %.7g Pa; want %.4f K, %.7g Pa", c.h, tm, at.Pressure, c.t, c.p)
		}
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
