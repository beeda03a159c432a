package disciplines

// Longitudinal static stability: neutral point from wing, fuselage and
// horizontal tail with the downwash gradient and the supersonic shift of
// the aerodynamic centre; static margins at take-off and at the start and
// end of cruise; the tail load that trims the aircraft in cruise; and the
// wing's divergence dynamic pressure and margin (aeroelastic.go).
//
//	x_np = (CLα,w·x_ac,w + ηh·CLα,h·(Sh/S)·(1 − dε/dα)·x_ac,h − 2(k2−k1)·Vf/S) / CLα
//	CLα  = CLα,w + ηh·CLα,h·(Sh/S)·(1 − dε/dα)
//
// The fuselage term is Munk's slender-body (airship) moment,
// dM/dα = 2q·(k2 − k1)·Vf, with Lamb's apparent-mass coefficients of the
// prolate spheroid of the same fineness ratio (Munk 1924; Lamb,
// "Hydrodynamics"; from memory); it is the ideal-flow value and so errs on
// the destabilising side. The fuselage volume is 0.7·(π/4)·D²·L (common
// practice, no source). The term is used while it moves the wing-body
// aerodynamic centre forward by at most MaxFuselageShift MACs; a smaller
// wing is refused (a wing of a few square metres against a transport
// fuselage put the neutral point 100 m ahead of the nose).
//
// Downwash at the tail: below Mach 0.9, dε/dα = 2·CLα,w/(π·A), the
// far-wake downwash of the wing's trailing vortex sheet (lifting-line
// theory). Above Mach 1.3, dε/dα = 1.62·CLα,w/(π·A), the reduced downwash
// behind a wing in supersonic flow that linear theory gives (a tail inside
// the wing's Mach cones sees only part of the trailing vortex system;
// the coefficient 1.62 in the form D. P. Raymer, "Aircraft Design: A
// Conceptual Approach", ch. 16, gives it; from memory), with the
// supersonic lift slope of linear theory (LiftSlopeSupersonic). Between,
// the coefficient falls from 2 to 1.62 by the smooth step of the
// aerodynamic centre. Limited to 0.95. The tail's own effectiveness is its
// lift slope at the same Mach number, by the same linear theory.
//
// Aerodynamic centre: a quarter of the MAC subsonic, 45 % of the MAC at
// and above Mach 1.3. Linear supersonic theory loads a trapezoidal wing
// nearly uniformly (Ackeret's flat plate: centre of pressure at mid-chord;
// the conical-flow delta: at the area centroid, which for any trapezoid is
// at mid-MAC), less the lift lost in the tip Mach cones, which lie on the
// aft part of the tips and so move the centre forward of 50 %. D. P.
// Raymer, "Aircraft Design: A Conceptual Approach", ch. 16 (from memory),
// puts the supersonic aerodynamic centre at about 40–50 % MAC, an aft
// shift of 0.15–0.25 MAC (SupersonicACShiftBand); 45 % is the middle of
// that band. Between Mach 0.9 and 1.3 a smooth (cubic) step (common
// practice, no source); the tail's centre moves likewise on its own MAC.

import (
	"math"

	"couplet/mdo"
)

// LambCoefficients returns the longitudinal and transverse apparent-mass
// coefficients k1, k2 of a prolate spheroid of fineness ratio
// (length/diameter) f > 1 (Lamb, "Hydrodynamics"):
// e = sqrt(1 − 1/f²), L = ln((1+e)/(1−e)),
// α0 = 2(1−e²)/e³·(L/2 − e), β0 = 1/e² − (1−e²)/(2e³)·L,
// k1 = α0/(2 − α0), k2 = β0/(2 − β0).
func LambCoefficients(f float64) (k1, k2 float64, err error) {
	if !(f > 1) || math.IsInf(f, 0) {
		return 0, 0, inputErr("fuselage.fineness", f, "", "> 1 (prolate spheroid)")
	}
	e := math.Sqrt(1 - 1/(f*f))
	l := math.Log((1 + e) / (1 - e))
	e3 := e * e * e
	a0 := 2 * (1 - e*e) / e3 * (l/2 - e)
	b0 := 1/(e*e) - (1-e*e)/(2*e3)*l
	return a0 / (2 - a0), b0 / (2 - b0), nil
}

// MunkFuselageTerm returns 2·(k2 − k1)·V [m³], the destabilising pitching
// moment of a slender body of revolution per unit dynamic pressure and
// angle of attack (Munk's airship theory), for a fuselage of length l and
// diameter d [m] of volume 0.7·(π/4)·d²·l.
func MunkFuselageTerm(l, d float64) (float64, error) {
	k1, k2, err := LambCoefficients(l / d)
	if err != nil {
		return 0, err
	}
	return 2 * (k2 - k1) * 0.7 * math.Pi / 4 * d * d * l, nil
}

// Downwash coefficients k of dε/dα = k·CLα,w/(π·A): lifting-line far
// wake subsonic, Raymer's supersonic value (from memory) above Mach 1.3.
const (
	downwashSubsonic   = 2.0
	downwashSupersonic = 1.62
)

// DownwashGradient returns dε/dα at the tail for a wing of lift slope
// claWing [1/rad] (at mach) and aspect ratio A: k·CLα,w/(π·A) with k = 2
// below Mach 0.9, 1.62 above Mach 1.3 and the smooth step of ACFraction
// between; limited to 0.95.
func DownwashGradient(claWing, aspect, mach float64) float64 {
	k := blend(mach, transonicStart, transonicEnd, downwashSubsonic, downwashSupersonic)
	return math.Min(k*claWing/(math.Pi*aspect), 0.95)
}

// Mach numbers of the transonic step of the aerodynamic centre and the
// downwash coefficient.
const (
	transonicStart = 0.9
	transonicEnd   = 1.3
)

// ACFraction returns the aerodynamic centre as a fraction of the MAC: 0.25
// at and below Mach 0.9, 0.45 (the middle of Raymer's supersonic band, see
// SupersonicACShiftBand) at and above Mach 1.3, a smooth (cubic) step
// between (common practice, no source).
func ACFraction(mach float64) float64 {
	return blend(mach, transonicStart, transonicEnd, 0.25, 0.45)
}

// SupersonicACShiftBand returns the band of the aft shift of a wing's
// aerodynamic centre from subsonic to supersonic flow, as fractions of
// the MAC: from about 25 % to about 40–50 % MAC (D. P. Raymer, "Aircraft
// Design: A Conceptual Approach", ch. 16; from memory).
func SupersonicACShiftBand() (lo, hi float64) { return 0.15, 0.25 }

// Longitudinal is the layout data of a neutral-point estimate. Lengths are
// x from the nose [m].
type Longitudinal struct {
	WingArea, WingAspect float64 // S [m2], A
	MAC, MACX            float64 // mean aerodynamic chord and its leading edge [m]
	CLaWing              float64 // wing lift slope [1/rad]
	TailArea, TailArm    float64 // Sh [m2]; arm from the wing's to the tail's quarter-chord MAC points [m]
	TailMAC              float64 // tail mean aerodynamic chord [m]
	CLaTail              float64 // tail lift slope [1/rad]
	TailEfficiency       float64 // ηh = qh/q
	FuselageTerm         float64 // 2(k2 − k1)·Vf [m3] (MunkFuselageTerm)
	Mach                 float64
}

// NeutralPoint returns the stick-fixed neutral point [m from the nose] and
// the aircraft lift slope [1/rad].
func (c Longitudinal) NeutralPoint() (xnp, cla float64) {
	ac := ACFraction(c.Mach)
	xw := c.MACX + ac*c.MAC
	xh := c.MACX + 0.25*c.MAC + c.TailArm + (ac-0.25)*c.TailMAC
	de := DownwashGradient(c.CLaWing, c.WingAspect, c.Mach)
	th := c.TailEfficiency * c.CLaTail * c.TailArea / c.WingArea * (1 - de)
	cla = c.CLaWing + th
	xnp = (c.CLaWing*xw + th*xh - c.FuselageTerm/c.WingArea) / cla
	return xnp, cla
}

// FuselageShift returns Munk's fuselage term as the forward shift of the
// wing-body aerodynamic centre it causes, in mean aerodynamic chords:
// Cmα,fus/CLα,w = 2(k2 − k1)·Vf/(S·c̄·CLα,w), the fuselage's destabilising
// pitching-moment slope over the wing's lift-curve slope (the form of the
// handbook fuselage term, Cmα,fus ∝ wf²·Lf/(S·c̄); D. P. Raymer,
// "Aircraft Design: A Conceptual Approach", ch. 16; from memory).
func (c Longitudinal) FuselageShift() float64 {
	return c.FuselageTerm / (c.WingArea * c.MAC * c.CLaWing)
}

// MaxFuselageShift is the largest FuselageShift the neutral point
// accepts: one MAC, where the fuselage's destabilising moment slope
// equals the wing's lift-curve slope. Beyond it the wing no longer carries
// the fuselage, the estimate is dominated by the slender-body term applied
// far outside the wing-body layouts it is used for, and the neutral point
// runs many chords ahead of the wing (tens of metres ahead of the nose
// for a wing of a few square metres). The bound is common practice (no
// source); the example studies' evaluations stay below 0.4.
// neutral_point and airframe_aero refuse a wing beyond it as an invalid
// input naming wing.area (or aero.factor_lift_slope, when a calibration
// factor below 1 takes the slope under it).
const MaxFuselageShift = 1.0

// TailTrimLoad returns the horizontal-tail lift [N] (negative = down)
// that trims an aircraft of weight w [N] with its CG at xcg, by moments
// about the wing's aerodynamic centre: Lt = (W·(xcg − xac,w) + q·S·c̄·Cm,ac)/(xac,h − xac,w).
func (c Longitudinal) TailTrimLoad(w, xcg, q, cmac float64) float64 {
	ac := ACFraction(c.Mach)
	xw := c.MACX + ac*c.MAC
	xh := c.MACX + 0.25*c.MAC + c.TailArm + (ac-0.25)*c.TailMAC
	return (w*(xcg-xw) + q*c.WingArea*c.MAC*cmac) / (xh - xw)
}

// StaticMargin returns (x_np − x_cg)/c̄.
func StaticMargin(xnp, xcg, mac float64) float64 { return (xnp - xcg) / mac }

// Indices of the stability discipline's variables.
const (
	stInArea = iota
	stInMAC
	stInMACX
	stInHtArm
	stInHtMAC
	stInMach
	stInQ
	stInNP
	stInNPLow
	stInCGTakeoff
	stInCGCruiseStart
	stInCGCruiseEnd
	stInMassCruiseStart
	stInCmac
	stNumIn
)

const (
	stOutSMTakeoff = iota
	stOutSMCruiseStart
	stOutSMCruiseEnd
	stOutTailLift
	stNumOut
)

// Stability is the "stability" discipline: the three static margins from
// the neutral points of the "neutral_point" discipline (NeutralPoints,
// which depend on the design parameters only and so run once before the
// coupled loop) and the centres of gravity of weights, and the cruise trim
// load. The wing's divergence (aeroelastic.go) is the wing_divergence
// discipline (WingDivergence), which runs after the loop.
//
// Added variables: inputs htail.mac (geometry), mass.cruise_start
// (weights), aero.dynamic_pressure_cruise (airframe_aero),
// stability.cm_ac_wing (parameter, wing pitching moment at zero lift about
// its aerodynamic centre).
type Stability struct{}

// NewStability returns the stability discipline.
func NewStability() *Stability { return &Stability{} }

// Name implements mdo.Discipline.
func (s *Stability) Name() string { return "stability" }

// Inputs implements mdo.Discipline.
func (s *Stability) Inputs() []mdo.Var {
	wt := NewWeights().Inputs()
	wo := NewWeights().Outputs()
	np := NewNeutralPoints().Outputs()
	in := make([]mdo.Var, stNumIn)
	in[stInArea] = wt[wtInArea]
	in[stInMAC] = wt[wtInMAC]
	in[stInMACX] = wt[wtInMACX]
	in[stInHtArm] = wt[wtInHtArm]
	in[stInHtMAC] = htailMACVar()
	in[stInMach] = cruiseMachVar()
	in[stInQ] = airframeAeroOutputs()[afOutQ]
	in[stInNP] = np[npOutNP]
	in[stInNPLow] = np[npOutNPLow]
	in[stInCGTakeoff] = wo[wtOutCGTakeoff]
	in[stInCGCruiseStart] = wo[wtOutCGCruiseStart]
	in[stInCGCruiseEnd] = wo[wtOutCGCruiseEnd]
	in[stInMassCruiseStart] = wo[wtOutCruiseStart]
	in[stInCmac] = mdo.Var{Name: "stability.cm_ac_wing", Unit: "-", Description: "wing pitching-moment coefficient about its aerodynamic centre", Default: -0.02, Min: -0.5, Max: 0.5, Scale: 0.01}
	return in
}

// htailMACVar is the specification of htail.mac as stability and the
// neutral point read it.
func htailMACVar() mdo.Var {
	return mdo.Var{Name: "htail.mac", Unit: "m", Description: "horizontal-tail mean aerodynamic chord", Default: 2.8, Min: 0.01, Max: 50}
}

// Outputs implements mdo.Discipline.
func (s *Stability) Outputs() []mdo.Var {
	sm := func(name, desc string) mdo.Var {
		return mdo.Var{Name: name, Unit: "-", Description: desc, Default: 0.1, Min: -10, Max: 10, Scale: 0.1}
	}
	out := make([]mdo.Var, stNumOut)
	out[stOutSMTakeoff] = sm("stability.static_margin_takeoff", "static margin at take-off (fraction of MAC)")
	out[stOutSMCruiseStart] = sm("stability.static_margin_cruise_start", "static margin at the start of cruise (fraction of MAC)")
	out[stOutSMCruiseEnd] = sm("stability.static_margin_cruise_end", "static margin at the end of cruise (fraction of MAC)")
	out[stOutTailLift] = mdo.Var{Name: "stability.tail_lift_cruise", Unit: "N", Description: "horizontal-tail lift that trims the start of cruise (negative = down)", Default: -20000, Min: -1e7, Max: 1e7, Scale: 1e4}
	return out
}

// Compute implements mdo.Discipline.
func (s *Stability) Compute(in, out []float64) error {
	if len(in) != stNumIn || len(out) != stNumOut {
		return inputErr("stability.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	mach := in[stInMach]
	area := in[stInArea]
	mac := in[stInMAC]
	cr := Longitudinal{WingArea: area, MAC: mac, MACX: in[stInMACX], TailArm: in[stInHtArm], TailMAC: in[stInHtMAC], Mach: mach}
	np, npLow := in[stInNP], in[stInNPLow]
	q := in[stInQ]

	out[stOutSMTakeoff] = StaticMargin(npLow, in[stInCGTakeoff], mac)
	out[stOutSMCruiseStart] = StaticMargin(np, in[stInCGCruiseStart], mac)
	out[stOutSMCruiseEnd] = StaticMargin(np, in[stInCGCruiseEnd], mac)
	out[stOutTailLift] = cr.TailTrimLoad(in[stInMassCruiseStart]*G0, in[stInCGCruiseStart], q, in[stInCmac])
	return nil
}
