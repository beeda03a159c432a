package disciplines

import (
	"math"
	"testing"

	"couplet/mdo"
)

// supersonicAirliner is an invented 30-seat Mach 1.6 airliner of the
// tests' own, a layout the demonstration scenarios do not cover: a longer
// fuselage, three abreast and a larger, more slender wing.
func supersonicAirliner() Scenario {
	s := Swiftlet()
	s.Name = "test 30-seat Mach 1.6 airliner"
	s.Parameters = copyMap(s.Parameters)
	s.Guesses = copyMap(s.Guesses)
	for k, v := range map[string]float64{
		"cabin.passengers": 30, "cabin.seats_abreast": 3, "cabin.seat_pitch": 0.9,
		"cruise.mach": 1.6, "mission.payload": 3000, "mission.range": 6.0e6,
		"wing.area": 200, "wing.aspect_ratio": 2.2, "wing.sweep": 60, "wing.position": 0.42,
	} {
		s.Parameters[k] = v
	}
	s.Guesses["mass.takeoff"] = 70000
	return s
}

func TestSupersonicNeutralPointMovesAft(t *testing.T) {
	// In supersonic flow the wing's aerodynamic centre moves from about
	// 25 % to about 40–50 % MAC (Raymer, "Aircraft Design: A Conceptual
	// Approach", ch. 16; from memory), so the neutral point at the cruise
	// Mach lies aft of the low-speed one.
	lo, hi := SupersonicACShiftBand()
	scenarios := []Scenario{supersonicAirliner()}
	for _, sc := range demonstrationAircraft() {
		if sc.Parameters["cruise.mach"] > 1 {
			scenarios = append(scenarios, sc)
		}
	}
	if len(scenarios) < 5 {
		t.Fatalf("%d supersonic scenarios, want the three Swiftlets, Condor and the test airliner", len(scenarios))
	}
	for _, sc := range scenarios {
		w := solveScenario(t, sc, mdo.GaussSeidel)
		mach := sc.Parameters["cruise.mach"]
		// the wing alone: the aerodynamic centre's shift from take-off to cruise
		if d := ACFraction(mach) - ACFraction(NewNeutralPoints().LowSpeedMach); d < lo || d > hi {
			t.Errorf("%s: wing aerodynamic-centre shift %.3f MAC outside Raymer's %.2f–%.2f", sc.Name, d, lo, hi)
		}
		np, npLow, mac := get(t, w, "stability.neutral_point"), get(t, w, "stability.neutral_point_low_speed"), get(t, w, "wing.mac")
		shift := (np - npLow) / mac
		t.Logf("%s: neutral point %.2f m at take-off, %.2f m at Mach %g: %.3f MAC aft", sc.Name, npLow, np, mach, shift)
		// the whole aircraft: aft, and by no more than the wing's shift
		// plus the tail's gain in effectiveness can give; within
		// Raymer's band for the aerodynamic centre
		if !(shift >= lo && shift <= hi) {
			t.Errorf("%s: neutral point moves %.3f MAC aft from take-off to cruise, want %.2f–%.2f (Raymer's band)", sc.Name, shift, lo, hi)
		}
	}
}

func TestDownwashGradientAcrossMach(t *testing.T) {
	// Lifting-line far wake subsonic, 2·CLα/(πA); the supersonic value
	// 1.62·CLα/(πA) (Raymer, ch. 16; from memory) above Mach 1.3; the
	// smooth step between is monotone.
	tests := []struct {
		cla, a, mach, want float64
	}{
		{4.5, 9, 0.5, 2 * 4.5 / (math.Pi * 9)},
		{3.0, 3, 0.2, 2 * 3.0 / (math.Pi * 3)},
		{2.6, 3, 1.5, 1.62 * 2.6 / (math.Pi * 3)},
		{2.6, 3, 2.2, 1.62 * 2.6 / (math.Pi * 3)},
		{3.0, 1, 0.2, 0.95}, // limited
	}
	for _, c := range tests {
		if got := DownwashGradient(c.cla, c.a, c.mach); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("dε/dα(CLα %g, A %g, M %g) = %.6f, want %.6f", c.cla, c.a, c.mach, got, c.want)
		}
	}
	prev := math.Inf(1)
	for m := 0.85; m <= 1.35; m += 0.01 {
		d := DownwashGradient(3, 3, m)
		if d > prev {
			t.Errorf("downwash coefficient rises at Mach %.2f", m)
		}
		prev = d
	}
}
