package disciplines

import (
	"errors"
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

// The neutral_point discipline accepts a wing that carries the fuselage
// and gives the published neutral point; a wing too small for its
// fuselage (Munk's term more than MaxFuselageShift MACs) is refused as an
// invalid input naming wing.area, its value and what is allowed, rather
// than a neutral point tens of metres ahead of the nose.
func TestNeutralPointRefusesAWingThatCannotCarryTheFuselage(t *testing.T) {
	// Wing alone with a fuselage, no tail, subsonic (Mach 0.2 and 0.5: the
	// aerodynamic centre at a quarter MAC). Wing lift slope 4.5287 /rad:
	// A = 6, M = 0, κ = 1 (DATCOM / Helmbold–Polhamus check value).
	const cla = 4.5287
	// Fuselage 30 m by 3 m, fineness 10: k2 − k1 = 0.960 − 0.021 (Lamb,
	// "Hydrodynamics"; Munk's table, from memory), volume 0.7·(π/4)·d²·l
	// (common practice, no source): Munk's term 2(k2 − k1)·Vf.
	const l, d = 30.0, 3.0
	fus := 2 * (0.960 - 0.021) * 0.7 * math.Pi / 4 * d * d * l
	const macX = 12.0
	// x_np = x_ac − 2(k2 − k1)·Vf/(S·CLα) (stability.go's formula without a tail)
	npOf := func(s, mac float64) float64 { return macX + 0.25*mac - fus/(s*cla) }
	// the MAC that puts Munk's term at r MACs for a wing of area s
	macAt := func(s, r float64) float64 { return fus / (s * cla * r) }
	for _, c := range []struct {
		name    string
		s, mac  float64 // wing area [m2] and MAC [m]
		refused []string
	}{
		// A = 6, 100 m2: span 24.5 m, mean chord 4.08 m; Munk's term
		// moves the wing-body centre 0.15 MAC forward
		{"business-jet wing", 100, 4.08, nil},
		// the same aspect ratio at 3.4 m2: span 4.52 m, mean chord
		// 0.753 m, Munk's term 24 MACs (x_np would be −6 m)
		{"tiny wing", 3.4, 0.753, []string{"wing.area = 3.4 m2 is not allowed", "allowed: a wing that carries the fuselage", "is 24.1 times the wing's lift-curve slope 4.53 /rad", "at most 1 times", "a larger wing"}},
		// either side of the bound
		{"just inside", 20, macAt(20, 0.999), nil},
		{"just outside", 20, macAt(20, 1.001), []string{"wing.area = 20 m2 is not allowed", "is 1 times", "at most 1 times"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			n := NewNeutralPoints()
			in := make([]float64, npNumIn)
			in[npInArea], in[npInAspect], in[npInMAC], in[npInMACX] = c.s, 6, c.mac, macX
			in[npInFusLength], in[npInFusDiameter] = l, d
			in[npInHtArea], in[npInHtArm], in[npInHtSpan], in[npInHtMAC] = 0, 15, 8, 2
			in[npInCLaCruise], in[npInCLaLow], in[npInMach] = cla, cla, 0.5
			out := make([]float64, npNumOut)
			err := n.Compute(in, out)
			if c.refused != nil {
				var ie *InputError
				if err == nil {
					t.Fatalf("accepted: x_np %g m (cruise), %g m (take-off)", out[npOutNP], out[npOutNPLow])
				}
				if !errors.As(err, &ie) || ie.Var != "wing.area" || ie.Value != c.s {
					t.Fatalf("err %v, want an input error naming wing.area = %g", err, c.s)
				}
				for _, w := range c.refused {
					if !strings.Contains(err.Error(), w) {
						t.Errorf("message %q does not contain %q", err, w)
					}
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			// 1e-3 of Munk's shift: Lamb's coefficients to three decimals
			want := npOf(c.s, c.mac)
			tol := 1e-3 * fus / (c.s * cla)
			for _, got := range []float64{out[npOutNP], out[npOutNPLow]} {
				if math.Abs(got-want) > tol {
					t.Errorf("x_np %.5f m, want %.5f ± %.2g", got, want, tol)
				}
			}
		})
	}
}

// In an aircraft, airframe_aero refuses the wing first (it computes the
// slopes the neutral point reads), naming wing.area, or the lift-slope
// calibration factor when a factor below 1 takes the slope under the
// fuselage's term and the uncalibrated wing would carry it.
func TestAircraftRefusesAWingThatCannotCarryTheFuselage(t *testing.T) {
	runRefusals(t, []refusalCase{
		{"tiny wing on the long-range transport", Condor(), map[string]float64{"wing.area": 3.4},
			mdo.InvalidInput, []string{"wing.area = 3.4 m2 is not allowed", "a wing that carries the fuselage", "at most 1 times"}},
		{"tiny wing on the supersonic business jet", Swiftlet(), map[string]float64{"wing.area": 5},
			mdo.InvalidInput, []string{"wing.area = 5 m2 is not allowed", "a wing that carries the fuselage"}},
		{"lift slope calibrated down", Kestrel(), map[string]float64{"aero.factor_lift_slope": 0.2},
			mdo.InvalidInput, []string{"aero.factor_lift_slope = 0.2 is not allowed", "at least 0.202", "below the fuselage's destabilising moment slope"}},
	})
}
