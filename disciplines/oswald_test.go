package disciplines

import (
	"math"
	"testing"
)

func TestOswaldSpanEfficiencyRisesWithAspectRatio(t *testing.T) {
	// Induced drag CDi = CL²/(π A e) (project reference): at a given
	// area and lift a larger span lowers the induced drag, so π A e must
	// rise with the aspect ratio at every sweep (lifting-line theory; from
	// memory). Raymer's swept-wing fit alone gave A·e falling beyond
	// A ≈ 8 at 35° (e 0.44 at A 9.5, the floor 0.3 at A 12): a swept
	// transport lost L/D by a larger span.
	for _, c := range []struct{ sweepLE, maxA float64 }{
		{0, 16}, {20, 16}, {28, 16}, {32, 16}, {35, 16}, {38, 16}, {40, 16}, {-35, 16}, {-25, 16},
		{45, 16}, {50, 16}, {60, 16}, {-60, 16}, {70, 16},
	} {
		sweepLE := c.sweepLE
		prev := 0.0
		for a := 2.0; a <= c.maxA; a += 0.5 {
			ae := a * OswaldEfficiency(a, sweepLE)
			if !(ae > prev) {
				t.Errorf("ΛLE %g°: A·e = %.4g at A %g, not above %.4g at A %g", sweepLE, ae, a, prev, a-0.5)
			}
			prev = ae
		}
	}
	// Typical span efficiencies of subsonic transports, about 0.7–0.85
	// (conceptual-design textbooks, Raymer; from memory), at their aspect
	// ratios and leading-edge sweeps up to 35°.
	for _, c := range []struct{ a, sweepLE float64 }{
		{7, 25}, {9, 27}, {9.5, 30}, {9.5, 35}, {11, 33}, {12, 35}, {12, 30}, {8, -30},
	} {
		if e := OswaldEfficiency(c.a, c.sweepLE); !(e >= 0.7 && e <= 0.85) {
			t.Errorf("A %g, ΛLE %g°: e = %.3f outside the transports' 0.7–0.85", c.a, c.sweepLE, e)
		}
	}
	// The highly swept wings of low aspect ratio (the supersonic wings and
	// tails) keep Raymer's swept-wing fit,
	// 4.61(1 − 0.045A^0.68)(cos ΛLE)^0.15 − 3.1.
	for _, c := range []struct{ a, sweepLE float64 }{{3, 62}, {2.3, 65}, {2.2, 64}, {3.6, 62}, {3, 49.7}, {3, -39.4}} {
		want := 4.61*(1-0.045*math.Pow(c.a, 0.68))*math.Pow(math.Cos(c.sweepLE*math.Pi/180), 0.15) - 3.1
		if got := OswaldEfficiency(c.a, c.sweepLE); relErr(got, want) > 1e-14 {
			t.Errorf("A %g, ΛLE %g°: e = %.15g, want Raymer's swept-wing fit %.15g", c.a, c.sweepLE, got, want)
		}
	}
}
