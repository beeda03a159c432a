package disciplines

import (
	"fmt"

	"couplet/mdo"
)

// NeutralPoints is the "neutral_point" discipline: the stick-fixed
// neutral points of the aircraft at take-off (Mach LowSpeedMach, with
// aero.cla_low_speed) and in cruise (aero.cla_cruise), and the downwash
// gradient at the tail in cruise, by the method of stability.go (wing,
// Munk's fuselage term, horizontal tail with the lifting-line downwash
// subsonic and linear theory's reduced downwash supersonic, the
// supersonic shift of the aerodynamic centres). They depend on the
// design parameters only, so the discipline runs once ahead of the
// coupled loop; stability turns them into static margins with the centres
// of gravity of weights.
//
// The horizontal tail's lift slope is that of a surface of the tail's
// area and span (aspect ratio b²/S), taper TailTaper and quarter-chord
// sweep TailSweep, t/c 0.05, κ = 0.95 (LiftSlope).
type NeutralPoints struct {
	// TailEfficiency is ηh = qh/q; 0.9 (common practice, no source).
	TailEfficiency float64
	// TailSweep is the horizontal tail's quarter-chord sweep [deg]; 35.
	TailSweep float64
	// TailTaper is its taper ratio; 0.35.
	TailTaper float64
	// LowSpeedMach is the Mach number of the take-off neutral point; 0.2.
	LowSpeedMach float64
}

// NewNeutralPoints returns the neutral_point discipline with the
// documented defaults.
func NewNeutralPoints() *NeutralPoints {
	return &NeutralPoints{TailEfficiency: 0.9, TailSweep: 35, TailTaper: 0.35, LowSpeedMach: 0.2}
}

// Name implements mdo.Discipline.
func (n *NeutralPoints) Name() string { return "neutral_point" }

// Indices of the neutral_point discipline's variables.
const (
	npInArea = iota
	npInAspect
	npInMAC
	npInMACX
	npInFusLength
	npInFusDiameter
	npInHtArea
	npInHtArm
	npInHtSpan
	npInHtMAC
	npInCLaCruise
	npInCLaLow
	npInMach
	npNumIn
)

const (
	npOutNP = iota
	npOutNPLow
	npOutDownwash
	npNumOut
)

// Inputs implements mdo.Discipline.
func (n *NeutralPoints) Inputs() []mdo.Var {
	wt := NewWeights().Inputs()
	in := make([]mdo.Var, npNumIn)
	in[npInArea] = wt[wtInArea]
	in[npInAspect] = wingAspectVar()
	in[npInMAC] = wt[wtInMAC]
	in[npInMACX] = wt[wtInMACX]
	in[npInFusLength] = wt[wtInFusLength]
	in[npInFusDiameter] = wt[wtInFusDiameter]
	in[npInHtArea] = htailAreaVar()
	in[npInHtArm] = wt[wtInHtArm]
	in[npInHtSpan] = mdo.Var{Name: "htail.span", Unit: "m", Description: "horizontal-tail span", Default: 8, Min: 0.1, Max: 100}
	in[npInHtMAC] = htailMACVar()
	in[npInCLaCruise] = mdo.Var{Name: "aero.cla_cruise", Unit: "1/rad", Description: "wing lift-curve slope at cruise Mach", Default: 2.8, Min: minLiftSlope, Max: maxLiftSlope}
	in[npInCLaLow] = mdo.Var{Name: "aero.cla_low_speed", Unit: "1/rad", Description: "wing lift-curve slope at low speed", Default: 3.0, Min: minLiftSlope, Max: maxLiftSlope}
	in[npInMach] = cruiseMachVar()
	return in
}

// Outputs implements mdo.Discipline.
func (n *NeutralPoints) Outputs() []mdo.Var {
	out := make([]mdo.Var, npNumOut)
	out[npOutNP] = mdo.Var{Name: "stability.neutral_point", Unit: "m", Description: "neutral point at cruise, from the nose", Default: 21, Min: -100, Max: 300, Scale: 10}
	out[npOutNPLow] = mdo.Var{Name: "stability.neutral_point_low_speed", Unit: "m", Description: "neutral point at take-off speed, from the nose", Default: 20, Min: -100, Max: 300, Scale: 10}
	out[npOutDownwash] = mdo.Var{Name: "stability.downwash_gradient", Unit: "-", Description: "downwash gradient at the tail at cruise", Default: 0.3, Min: 0, Max: 1}
	return out
}

// Compute implements mdo.Discipline. It allocates nothing.
func (n *NeutralPoints) Compute(in, out []float64) error {
	if len(in) != npNumIn || len(out) != npNumOut {
		return inputErr("neutral_point.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	mach := in[npInMach]
	ht := in[npInHtArea]
	fus, err := MunkFuselageTerm(in[npInFusLength], in[npInFusDiameter])
	if err != nil {
		return err
	}
	cfg := Longitudinal{
		WingArea: in[npInArea], WingAspect: in[npInAspect], MAC: in[npInMAC], MACX: in[npInMACX],
		TailArea: ht, TailArm: in[npInHtArm], TailMAC: in[npInHtMAC],
		TailEfficiency: n.TailEfficiency, FuselageTerm: fus,
	}
	var claTailLow, claTailCruise float64
	if ht > 0 {
		span := in[npInHtSpan]
		tail, err := newSurface("htail", ht, span*span/ht, n.TailTaper, n.TailSweep, 0.05)
		if err != nil {
			return err
		}
		if claTailLow, err = LiftSlope(tail, n.LowSpeedMach, 0.95); err != nil {
			return err
		}
		if claTailCruise, err = LiftSlope(tail, mach, 0.95); err != nil {
			return renameInput(err, "cruise.mach")
		}
	}
	low := cfg
	low.CLaWing, low.CLaTail, low.Mach = in[npInCLaLow], claTailLow, n.LowSpeedMach
	cr := cfg
	cr.CLaWing, cr.CLaTail, cr.Mach = in[npInCLaCruise], claTailCruise, mach
	if err := checkFuselageShift(low, 1, "take-off"); err != nil {
		return err
	}
	if err := checkFuselageShift(cr, 1, "cruise"); err != nil {
		return err
	}
	npLow, _ := low.NeutralPoint()
	np, _ := cr.NeutralPoint()
	out[npOutNP] = np
	out[npOutNPLow] = npLow
	out[npOutDownwash] = DownwashGradient(cr.CLaWing, cr.WingAspect, mach)
	return nil
}

// checkFuselageShift refuses a wing too small to carry the fuselage at
// the flight condition named by when (c's FuselageShift above
// MaxFuselageShift): the neutral point would lie beyond the method's
// range of validity. It names aero.factor_lift_slope when that factor
// (factor, applied to c.CLaWing) is below 1 and the uncalibrated slope
// would carry the fuselage, else wing.area. Called with factor 1 by
// neutral_point (which reads the calibrated slope only) and with the
// factor by airframe_aero, which refuses first in an aircraft.
func checkFuselageShift(c Longitudinal, factor float64, when string) error {
	r := c.FuselageShift()
	if r <= MaxFuselageShift {
		return nil
	}
	cm := c.FuselageTerm / (c.WingArea * c.MAC)
	if factor < 1 && r*factor <= MaxFuselageShift {
		return inputErr("aero.factor_lift_slope", factor, "", fmt.Sprintf("at least %.3g with this wing and fuselage: at %s the calibrated lift-curve slope %.3g /rad is below the fuselage's destabilising moment slope 2(k2 − k1)·Vf/(S·c̄) = %.3g /rad, more than the neutral-point method accepts (common practice, no source)", factor*r/MaxFuselageShift, when, c.CLaWing, cm))
	}
	return inputErr("wing.area", c.WingArea, "m2", fmt.Sprintf("a wing that carries the fuselage: at %s the fuselage's destabilising moment slope 2(k2 − k1)·Vf/(S·c̄) = %.3g /rad is %.3g times the wing's lift-curve slope %.3g /rad, and the neutral-point method accepts at most %g times (common practice, no source); a larger wing, or a shorter or slimmer fuselage", when, cm, r, c.CLaWing, MaxFuselageShift))
}

// checkFuselageCarried is checkFuselageShift at take-off and in cruise
// for a wing of area s [m2] and MAC mac [m] with the calibrated lift
// slopes claLow, claCruise [1/rad] against a fuselage of length l and
// diameter d [m].
func checkFuselageCarried(s, mac, claLow, claCruise, factor, l, d float64) error {
	fus, err := MunkFuselageTerm(l, d)
	if err != nil {
		return err
	}
	c := Longitudinal{WingArea: s, MAC: mac, CLaWing: claLow, FuselageTerm: fus}
	if err := checkFuselageShift(c, factor, "take-off"); err != nil {
		return err
	}
	c.CLaWing = claCruise
	return checkFuselageShift(c, factor, "cruise")
}
