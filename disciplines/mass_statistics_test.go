package disciplines

import (
	"math"
	"testing"

	"couplet/mdo"
)

// demonstrationAircraft returns every demonstration scenario, the
// variants included.
func demonstrationAircraft() []Scenario {
	return append(Scenarios(), SwiftletTrijet(), Condor())
}

func TestEmptyMassRegression(t *testing.T) {
	// Roskam, Airplane Design Part I, Table 2.15 (from memory):
	// log10 W_TO = A + B·log10 W_E with W in lb.
	tests := []struct {
		class AircraftClass
		a, b  float64
	}{
		{ClassJetTransport, 0.0833, 1.0383},
		{ClassBusinessJet, 0.2678, 0.9979},
		{ClassSupersonicCruise, 0.4221, 0.9876},
	}
	for _, c := range tests {
		for _, w0 := range []float64{10000, 40000, 180000} {
			we, err := c.class.EmptyMassRegression(w0)
			if err != nil {
				t.Fatal(err)
			}
			if got := c.a + c.b*math.Log10(we/unitLb); math.Abs(got-math.Log10(w0/unitLb)) > 1e-12 {
				t.Errorf("%s at %g kg: A + B·log10 W_E = %g, want log10 W_TO = %g", c.class, w0, got, math.Log10(w0/unitLb))
			}
		}
	}
	if _, err := AircraftClass(0).EmptyMassRegression(1e4); err == nil {
		t.Error("class 0 accepted")
	}
	if _, err := ClassBusinessJet.EmptyMassRegression(-1); err == nil {
		t.Error("negative take-off mass accepted")
	}
}

func TestScenarioMassesMatchStatistics(t *testing.T) {
	// Every demonstration aircraft: the empty-mass fraction (operating
	// empty mass less crew, as Roskam's W_E) within 10 % of its class's
	// regression, and the operating empty mass per seat within the
	// class's common-practice band (EmptyMassPerSeatBand).
	for _, sc := range demonstrationAircraft() {
		if sc.Class == 0 {
			t.Errorf("%s has no aircraft class", sc.Name)
			continue
		}
		if k := sc.Parameters["weights.calibration"]; k != EmptyMassCalibration(sc.Class) {
			t.Errorf("%s: weights.calibration %g, want its class's %g", sc.Name, k, EmptyMassCalibration(sc.Class))
		}
		w := solveScenario(t, sc, mdo.GaussSeidel)
		w0, oem, crew := get(t, w, "mass.takeoff"), get(t, w, "mass.empty"), get(t, w, "mass.crew")
		reg, err := sc.Class.EmptyMassRegression(w0)
		if err != nil {
			t.Fatal(err)
		}
		frac, want := (oem-crew)/w0, reg/w0
		if math.Abs(frac/want-1) > 0.10 {
			t.Errorf("%s: empty-mass fraction %.3f, %s regression %.3f (Roskam): %+.1f %%, want within 10 %%", sc.Name, frac, sc.Class, want, 100*(frac/want-1))
		}
		perSeat := oem / sc.Parameters["cabin.passengers"]
		if lo, hi := sc.Class.EmptyMassPerSeatBand(); perSeat < lo || perSeat > hi {
			t.Errorf("%s: %.0f kg operating empty mass per seat, want %g–%g (%s, common practice)", sc.Name, perSeat, lo, hi, sc.Class)
		}
		// the tanks hold the mission fuel at the scenario's baseline
		if fuel, capa := get(t, w, "mass.fuel"), get(t, w, "mass.fuel_capacity"); fuel > capa {
			t.Errorf("%s: %.0f kg of mission fuel in tanks of %.0f kg", sc.Name, fuel, capa)
		}
		t.Logf("%s: %.0f kg take-off, empty fraction %.3f (regression %.3f), %.0f kg per seat", sc.Name, w0, frac, want, perSeat)
	}
}
