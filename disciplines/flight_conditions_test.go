package disciplines

import (
	"errors"
	"strings"
	"testing"
)

func TestFlightConditions(t *testing.T) {
	f := NewFlightConditions()
	in := make([]float64, fcNumIn)
	out := make([]float64, fcNumOut)
	for _, c := range []struct {
		mach, alt, elev, dT    float64
		speed, rho, sound, tol float64
		source                 string
	}{
		// U.S. Standard Atmosphere 1976: sea level ρ = 1.2250 kg/m³,
		// a = 340.29 m/s; at 11 000 m geopotential (11 019 m geometric)
		// a = 295.07 m/s, so Mach 0.8 flies 236.06 m/s.
		{0.8, 11019, 0, 0, 0.8 * 295.07, 1.2250, 340.29, 1e-4, "U.S. Standard Atmosphere 1976"},
		// a hot airport: ISA + 20 K at sea level, the standard pressure
		// 101 325 Pa at 308.15 K: ρ = p/(R·T) = 1.1455 kg/m³,
		// a = sqrt(1.4·287.053·308.15) = 351.91 m/s (gas law, γ = 1.4).
		{1.5, 11019, 0, 20, 1.5 * 295.07, 1.1455, 351.91, 2e-4, "ideal-gas law at ISA + 20 K"},
	} {
		in[fcInMach], in[fcInAltitude], in[fcInAirportElevation], in[fcInAirportDT] = c.mach, c.alt, c.elev, c.dT
		if err := f.Compute(in, out); err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{
			{"cruise.true_airspeed", out[fcOutCruiseSpeed], c.speed},
			{"airport.density", out[fcOutAirportDensity], c.rho},
			{"airport.speed_of_sound", out[fcOutAirportSound], c.sound},
		} {
			if e := relErr(q.got, q.want); e > c.tol {
				t.Errorf("%s (%s): %s = %.6g, want %.6g", c.source, fmtG(c.alt), q.name, q.got, q.want)
			}
		}
	}
	// the outputs are exactly the atmosphere's (what propulsion and
	// mission evaluated before the discipline existed)
	in[fcInMach], in[fcInAltitude], in[fcInAirportElevation], in[fcInAirportDT] = 1.5, 17000, 1000, 15
	if err := f.Compute(in, out); err != nil {
		t.Fatal(err)
	}
	cr, _ := OffsetAtmosphere(17000, 0)
	apt, _ := OffsetAtmosphere(1000, 15)
	if out[fcOutCruiseSpeed] != 1.5*cr.SpeedOfSound || out[fcOutAirportDensity] != apt.Density || out[fcOutAirportSound] != apt.SpeedOfSound {
		t.Errorf("outputs %v differ from the atmosphere's", out)
	}
	// a refused altitude names the variable
	in[fcInAltitude] = 90000
	var ie *InputError
	if err := f.Compute(in, out); !errors.As(err, &ie) || ie.Var != "cruise.altitude" || !strings.Contains(err.Error(), "90000") {
		t.Errorf("err = %v, want an input error naming cruise.altitude and its value", err)
	}
}

func BenchmarkFlightConditionsCompute(b *testing.B) {
	f := NewFlightConditions()
	in := defaultValues(f.Inputs())
	out := make([]float64, fcNumOut)
	benchCompute(b, f, in, out)
}
