package disciplines

import (
	"math"

	"couplet/mdo"
	"gonum.org/v1/gonum/mathext"
)

// Aerodynamics of the aircraft from take-off to supersonic cruise (Mach 0
// to 2.5), for aft- and forward-swept wings:
//
//   - parasite drag by component build-up: Prandtl–Schlichting turbulent
//     flat-plate skin friction with a compressibility factor and a
//     roughness cut-off Reynolds number, form factors and interference
//     factors;
//   - induced drag with an Oswald estimate below Mach 1 and the
//     supersonic drag-due-to-lift factor above;
//   - transonic drag rise: Korn equation for the drag-divergence Mach
//     number, critical Mach number and a Lock-type rise 20(M − Mcrit)⁴,
//     faired into the supersonic wave drag at Mach 1;
//   - supersonic volume wave drag by the supersonic area rule: the
//     slender-body (von Kármán) wave-drag integral of the Mach-plane cross
//     section area distribution, averaged over roll angle; the lift term
//     of the area rule (equivalent area due to lift) is computed too;
//   - lift-curve slope by DATCOM (Helmbold–Polhamus) below Mach 1 and by
//     linear theory above, with the leading edge classed subsonic or
//     supersonic against the Mach cone;
//   - CLmax with sweep and high-lift increments, trim drag of the tail load.
//
// Through the transonic range the subsonic and supersonic estimates are
// blended with a smooth step so the polar is continuous in Mach.

// MaxMach is the highest Mach number the aerodynamic model accepts.
const MaxMach = 2.5

// WaveStations is the number of stations of the area distribution used by
// the wave-drag integral (cosine spacing along the aircraft).
const WaveStations = 32

// waveHarmonics is the number of Fourier terms of the wave-drag integral.
const waveHarmonics = WaveStations / 2

// WaveDragIntegrator evaluates the slender-body wave drag of an area
// distribution, D/q = −(1/2π)∫∫ S”(x1)S”(x2) ln|x1 − x2| dx1 dx2 (von
// Kármán), in its Fourier-series form: with x = (ℓ/2)(1 − cos θ) and
// S'(x) = Σ An sin nθ, D/q = (π/4) Σ n An². The coefficients An are
// linear in the areas at the stations θj = jπ/N, j = 1…N, so their
// quadrature weights are computed once; an analysis costs N·N/2
// multiply-adds. The value is immutable and safe for concurrent use.
//
// DragAreaFromSlope takes the slope S'(x) instead (used for the equivalent
// area due to lift, which ends in a "base" where the area form loses
// accuracy): An = (2/π)∫₀^π S' sin nθ dθ by the trapezoidal rule.
type WaveDragIntegrator struct {
	w  [WaveStations][waveHarmonics]float64 // from areas, by station
	v  [WaveStations][waveHarmonics]float64 // from slopes, by station
	xi [WaveStations]float64                // unit station positions
}

// NewWaveDragIntegrator computes the quadrature weights.
//
// An = (2/π)∫₀^π S'(x(θ)) sin nθ dθ; integrating by parts with
// gn(θ) = sin nθ / sin θ gives
// An·ℓ = (4/π)[S(ℓ)(−1)^(n+1) n − ∫₀^π S(θ) gn'(θ) dθ], the integral taken
// by the trapezoidal rule (S = 0 at the nose, gn'(π) = 0).
func NewWaveDragIntegrator() *WaveDragIntegrator {
	wd := &WaveDragIntegrator{}
	const n = WaveStations
	h := math.Pi / n
	for m := 1; m <= waveHarmonics; m++ {
		fm := float64(m)
		for j := 1; j < n; j++ {
			th := float64(j) * h
			s, c := math.Sincos(th)
			sm, cm := math.Sincos(fm * th)
			gp := (fm*cm*s - sm*c) / (s * s)
			wd.w[j-1][m-1] = -4 / math.Pi * h * gp
			wd.v[j-1][m-1] = 2 / math.Pi * h * sm
		}
		sign := 1.0
		if m%2 == 0 {
			sign = -1
		}
		wd.w[n-1][m-1] = 4 / math.Pi * sign * fm
	}
	for j := 1; j <= n; j++ {
		wd.xi[j-1] = 0.5 * (1 - math.Cos(float64(j)*h))
	}
	return wd
}

// Stations writes the WaveStations station positions for a body from lo to
// hi into x: x_j = lo + (hi − lo)(1 − cos(jπ/N))/2, j = 1…N (the nose
// station j = 0, where S = 0, is implied).
func (wd *WaveDragIntegrator) Stations(lo, hi float64, x []float64) {
	l := hi - lo
	for j, xi := range wd.xi {
		x[j] = lo + l*xi
	}
}

// DragArea returns the wave drag D/q [m2] of the area distribution s
// (areas [m2] at the Stations of a body of the given length [m]).
func (wd *WaveDragIntegrator) DragArea(s []float64, length float64) float64 {
	return math.Pi / 4 * harmonicSum(&wd.w, s) / (length * length)
}

// DragAreaFromSlope returns the wave drag D/q [m2] of a body whose area
// slope dS/dx [m] at the Stations is sp (zero at both ends).
func (wd *WaveDragIntegrator) DragAreaFromSlope(sp []float64) float64 {
	return math.Pi / 4 * harmonicSum(&wd.v, sp)
}

// harmonicSum returns Σ n·An² with An = Σj w[j][n−1]·s[j]; the
// coefficients are accumulated side by side (independent additions).
func harmonicSum(w *[WaveStations][waveHarmonics]float64, s []float64) float64 {
	s = s[:WaveStations]
	var a [waveHarmonics]float64
	for j, sj := range s {
		row := &w[j]
		for m := range a {
			a[m] += row[m] * sj
		}
	}
	sum := 0.0
	for m, am := range a {
		sum += float64(m+1) * am * am
	}
	return sum
}

// SearsHaackDragArea returns the wave drag D/q = 9π·Amax²/(2ℓ²) [m2] of
// the Sears–Haack body of maximum area amax [m2] and length l [m], the
// body of least wave drag for its volume and length.
func SearsHaackDragArea(amax, l float64) float64 {
	return 9 * math.Pi * amax * amax / (2 * l * l)
}

// SearsHaackArea returns the cross-section area of the Sears–Haack body at
// x ∈ [0, l]: S = Amax·(4ξ(1 − ξ))^(3/2), ξ = x/l.
func SearsHaackArea(amax, l, x float64) float64 {
	xi := x / l
	if xi <= 0 || xi >= 1 {
		return 0
	}
	v := 4 * xi * (1 - xi)
	return amax * v * math.Sqrt(v)
}

// TurbulentSkinFriction returns the turbulent flat-plate skin-friction
// coefficient of Prandtl–Schlichting with the compressibility factor,
// Cf = 0.455/((log10 Re)^2.58 (1 + 0.144M²)^0.65).
func TurbulentSkinFriction(re, mach float64) float64 {
	l := math.Log10(re)
	return 0.455 / (math.Pow(l, 2.58) * math.Pow(1+0.144*mach*mach, 0.65))
}

// LaminarSkinFriction returns the Blasius laminar flat-plate skin
// friction Cf = 1.328/√Re.
func LaminarSkinFriction(re float64) float64 { return 1.328 / math.Sqrt(re) }

// CutoffReynolds returns the Reynolds number above which surface roughness
// k [m] rather than viscosity sets the skin friction of a component of
// length l [m]: 38.21(l/k)^1.053 subsonic and 44.62(l/k)^1.053·M^1.16
// supersonic (conceptual-design textbooks, Raymer; from memory), blended
// between Mach 0.9 and 1.2.
func CutoffReynolds(l, k, mach float64) float64 {
	return math.Pow(l/k, 1.053) * cutoffFactor(mach)
}

// smoothstep is 0 below a, 1 above b and 3t² − 2t³ between.
func smoothstep(x, a, b float64) float64 {
	if x <= a {
		return 0
	}
	if x >= b {
		return 1
	}
	t := (x - a) / (b - a)
	return t * t * (3 - 2*t)
}

// blend returns fa below a, fb above b and a smooth step between.
func blend(x, a, b, fa, fb float64) float64 {
	w := smoothstep(x, a, b)
	return fa + w*(fb-fa)
}

// LiftSlopeSubsonic returns the lift-curve slope [1/rad] of a wing by the
// DATCOM (Helmbold–Polhamus) formula
// CLα = 2πA/(2 + √(4 + (A²β²/κ²)(1 + tan²Λ½c/β²))), β² = 1 − M², κ the
// section lift slope over 2π, Λ½c the half-chord sweep [deg]. mach must be
// in [0, 1).
func LiftSlopeSubsonic(aspectRatio, mach, sweepHalfChord, kappa float64) (float64, error) {
	if err := checkLiftSlopeSubsonic(aspectRatio, mach, kappa); err != nil {
		return 0, err
	}
	return liftSlopeSubsonicTan(aspectRatio, mach, math.Tan(sweepHalfChord*math.Pi/180), kappa), nil
}

// checkLiftSlopeSubsonic checks the inputs of LiftSlopeSubsonic.
func checkLiftSlopeSubsonic(aspectRatio, mach, kappa float64) error {
	if !(mach >= 0 && mach < 1) {
		return inputErr("mach", mach, "", "[0, 1) for the subsonic lift slope")
	}
	if !(aspectRatio > 0) {
		return inputErr("wing.aspect_ratio", aspectRatio, "", "> 0")
	}
	if !(kappa > 0 && kappa <= 1.5) {
		return inputErr("kappa", kappa, "", "(0, 1.5]")
	}
	return nil
}

// liftSlopeSubsonicTan is the formula of LiftSlopeSubsonic with the
// tangent t of the half-chord sweep given (no checks).
func liftSlopeSubsonicTan(a, mach, t, kappa float64) float64 {
	b2 := 1 - mach*mach
	return 2 * math.Pi * a / (2 + math.Sqrt(4+a*a/(kappa*kappa)*(b2+t*t)))
}

// LiftSlopeSupersonic returns the lift-curve slope [1/rad] of a wing at
// mach > 1 by linear theory. With m = β·cot|ΛLE|, a subsonic leading edge
// (m < 1, inside the Mach cone) gives the conical-flow result of the delta
// wing, CLα = 2π·m/(β·E(√(1 − m²))), E the complete elliptic integral of
// the second kind; a supersonic leading edge gives the Ackeret value 4/β.
// Both are multiplied by the tip Mach-cone loss of the rectangular wing
// applied to the tip chord, 1 − c_t²/(2βS) (exact for the delta and the
// rectangular wing with supersonic edges; an engineering interpolation
// otherwise, which keeps CLα continuous at the sonic leading edge).
func LiftSlopeSupersonic(w Wing, mach float64) (float64, error) {
	if !(mach > 1 && mach <= MaxMach) {
		return 0, inputErr("mach", mach, "", "(1, 2.5] for the supersonic lift slope")
	}
	b := math.Sqrt(mach*mach - 1)
	tle := math.Tan(math.Abs(w.SweepLE) * math.Pi / 180)
	m := math.Inf(1)
	if tle > 0 {
		m = b / tle
	}
	tip := math.Max(0.5, 1-w.TipChord*w.TipChord/(2*b*w.Area))
	if m < 1 {
		return tip * 2 * math.Pi * m / (b * mathext.CompleteE(1-m*m)), nil
	}
	return tip * 4 / b, nil
}

// AckeretLiftSlope returns the section lift slope 4/β [1/rad] of a thin
// aerofoil in supersonic flow (Ackeret), mach > 1.
func AckeretLiftSlope(mach float64) float64 { return 4 / math.Sqrt(mach*mach-1) }

// AckeretDoubleWedgeDrag returns the wave-drag coefficient
// 4(α² + (t/c)²)/β of a double-wedge section at incidence alpha [rad].
func AckeretDoubleWedgeDrag(mach, tc, alpha float64) float64 {
	return 4 * (alpha*alpha + tc*tc) / math.Sqrt(mach*mach-1)
}

// AckeretBiconvexDrag returns the wave-drag coefficient
// 4(α² + (4/3)(t/c)²)/β of a biconvex section at incidence alpha [rad].
func AckeretBiconvexDrag(mach, tc, alpha float64) float64 {
	return 4 * (alpha*alpha + 4.0/3.0*tc*tc) / math.Sqrt(mach*mach-1)
}

// OswaldEfficiency estimates the span efficiency e of a wing from its
// aspect ratio and leading-edge sweep [deg] (either sign):
// e = 1.78(1 − 0.045A^0.68) − 0.64 for straight wings and
// e = 4.61(1 − 0.045A^0.68)(cos ΛLE)^0.15 − 3.1 for swept wings
// (conceptual-design textbooks, Raymer; from memory), blended between 25°
// and 35° of sweep and held within [0.3, 0.95].
//
// The swept-wing fit falls with aspect ratio 2.6 times as steeply as the
// straight-wing one, so steeply that A·e, and with it the induced drag of
// a given lift on a given area, got worse as the span grew beyond A ≈ 8
// (at ΛLE 35°: e = 0.44 at A 9.5, the floor 0.3 at A 12): a swept
// transport lost L/D by a larger span. The swept-wing fit is therefore
// held at least at the transport relation e = 1/(1.05 + 0.007πA) (Obert,
// "Aerodynamic Design of Transport Aircraft", 2009; from memory), taken
// in full up to ΛLE 35° (the transports' sweeps) and scaled by
// cos ΛLE/cos 35° beyond (common practice, no source). A·e then rises
// with the aspect ratio at every sweep; the wings of the fit's own data,
// highly swept and of low aspect ratio (the supersonic wings: A 3 at
// ΛLE 62°, e = 0.63 against the floor's 0.54), keep Raymer's value.
func OswaldEfficiency(aspectRatio, sweepLE float64) float64 {
	f := 1 - 0.045*math.Pow(aspectRatio, 0.68)
	straight := 1.78*f - 0.64
	s := math.Abs(sweepLE)
	e := straight
	if s > oswaldBlendLow {
		c := math.Cos(sweepLE * math.Pi / 180)
		swept := 4.61*f*math.Pow(c, 0.15) - 3.1
		transport := math.Min(1, c/cosOswaldTransport) / (1.05 + 0.007*math.Pi*aspectRatio)
		e = blend(s, oswaldBlendLow, oswaldBlendHigh, straight, math.Max(swept, transport))
	}
	return math.Max(0.3, math.Min(0.95, e))
}

// Leading-edge sweeps [deg] of OswaldEfficiency: the straight-wing fit
// up to oswaldBlendLow, the swept-wing fit from oswaldBlendHigh, a
// smooth step between; cosOswaldTransport is cos 35°, beyond which the
// transport relation's floor is scaled by cos ΛLE/cos 35°.
const (
	oswaldBlendLow, oswaldBlendHigh = 25.0, 35.0
	cosOswaldTransport              = 0.8191520442889918
)

// KornDragDivergence returns the drag-divergence Mach number of the Korn
// equation, Mdd = κA/cosΛ − (t/c)/cos²Λ − CL/(10cos³Λ), κA the aerofoil
// technology factor (0.87 conventional, 0.95 supercritical), Λ the sweep
// [deg] (either sign) (Korn; from memory).
func KornDragDivergence(kornFactor, tc, sweep, cl float64) float64 {
	return kornFromCos(kornFactor, tc, math.Cos(sweep*math.Pi/180), cl)
}

// kornFromCos is KornDragDivergence with the cosine c of the sweep given.
func kornFromCos(kornFactor, tc, c, cl float64) float64 {
	return kornFactor/c - tc/(c*c) - cl/(10*c*c*c)
}

// lockOffset is Mdd − Mcrit for the Lock-type rise 20(M − Mcrit)⁴ when
// the drag divergence is defined by dCD/dM = 0.1: (0.1/80)^(1/3).
const lockOffset = 0.10772173450159418

// CriticalMach returns the critical Mach number belonging to a
// drag-divergence Mach number, Mcrit = Mdd − (0.1/80)^(1/3) (Korn–Lock
// relation; from memory).
func CriticalMach(mdd float64) float64 { return mdd - lockOffset }

// LockDragRise returns the compressibility drag 20(M − Mcrit)⁴ for
// M > Mcrit, 0 below.
func LockDragRise(mach, mcrit float64) float64 {
	if mach <= mcrit {
		return 0
	}
	d := mach - mcrit
	return 20 * d * d * d * d
}

// SupersonicDragDueToLift returns K in CD = CD0 + K·CL² at mach > 1,
// K = A(M² − 1)cosΛLE/(4A√(M² − 1) − 2) (conceptual-design textbooks;
// from memory); the denominator is held at least A√(M² − 1).
func SupersonicDragDueToLift(aspectRatio, mach, sweepLE float64) float64 {
	b := math.Sqrt(mach*mach - 1)
	den := math.Max(4*aspectRatio*b-2, aspectRatio*b)
	return aspectRatio * (mach*mach - 1) * math.Cos(sweepLE*math.Pi/180) / den
}

// Transonic blending range of the lift slope and the drag-due-to-lift
// factor: the subsonic estimate at and below blendLow, the supersonic at
// and above blendHigh.
const (
	blendLow  = 0.95
	blendHigh = 1.2
)

// LiftSlope returns the wing's lift-curve slope [1/rad] at any Mach number
// in [0, 2.5]: DATCOM below Mach 0.95, linear theory above 1.2, a smooth
// step between. kappa is the section lift slope over 2π.
func LiftSlope(w Wing, mach, kappa float64) (float64, error) {
	if !(mach >= 0 && mach <= MaxMach) {
		return 0, inputErr("mach", mach, "", "[0, 2.5]")
	}
	tanHalf := 0.0 // needed below Mach 1.2 only
	if smoothstep(mach, blendLow, blendHigh) < 1 {
		tanHalf = math.Tan(w.SweepAt(0.5) * math.Pi / 180)
	}
	return liftSlopeTan(w, mach, kappa, tanHalf)
}

// liftSlopeTan is LiftSlope, less its Mach check, with tanHalf =
// tan(w.SweepAt(0.5)·π/180) given (used below Mach 1.2 only).
func liftSlopeTan(w Wing, mach, kappa, tanHalf float64) (float64, error) {
	var sub, sup float64
	var err error
	wt := smoothstep(mach, blendLow, blendHigh)
	if wt < 1 {
		ms := math.Min(mach, blendLow)
		if err = checkLiftSlopeSubsonic(w.AspectRatio, ms, kappa); err != nil {
			return 0, err
		}
		sub = liftSlopeSubsonicTan(w.AspectRatio, ms, tanHalf, kappa)
	}
	if wt > 0 {
		if sup, err = LiftSlopeSupersonic(w, math.Max(mach, blendHigh)); err != nil {
			return 0, err
		}
	}
	return sub + wt*(sup-sub), nil
}

// DragDueToLift returns K of CD = CD0 + K·CL² for the wing at any Mach
// number in [0, 2.5]: 1/(πAe) below Mach 0.95 (e reduced by
// oswaldReduction for deflected flaps), SupersonicDragDueToLift above
// 1.2, a smooth step between.
func DragDueToLift(w Wing, mach, oswaldReduction float64) float64 {
	return dragDueToLift(w, mach, OswaldEfficiency(w.AspectRatio, w.SweepLE)-oswaldReduction)
}

// dragDueToLift is DragDueToLift with the span efficiency e given.
func dragDueToLift(w Wing, mach, e float64) float64 {
	sub := 1 / (math.Pi * w.AspectRatio * e)
	wt := smoothstep(mach, blendLow, blendHigh)
	if wt == 0 {
		return sub
	}
	sup := SupersonicDragDueToLift(w.AspectRatio, math.Max(mach, blendHigh), w.SweepLE)
	return sub + wt*(sup-sub)
}

// AeroOptions are the aerodynamic model's settings.
type AeroOptions struct {
	Roughness       float64 // equivalent sand roughness [m]
	LaminarFraction float64 // share of the wetted area in laminar flow
	// Interference factors Q (conceptual-design textbooks, Raymer; from
	// memory): wing and fuselage 1.0, tails 1.04, pods close to the wing 1.3.
	QWing, QFuselage, QTail, QNacelle float64
	Miscellaneous                     float64 // leakage and protuberances, share of the parasite drag
	Kappa                             float64 // section lift slope / 2π
	FlapDragPerCL                     float64 // ΔCD0 per unit ΔCLmax of the flaps
	GearDrag                          float64 // ΔCD0 of the extended landing gear
	OswaldReductionTakeoff            float64 // Δe with take-off flaps
	OswaldReductionLanding            float64 // Δe with landing flaps
	TakeoffMach                       float64 // Mach number of the low-speed polar
}

// DefaultAeroOptions returns the default settings: smooth paint
// (k = 6.34e-6 m, Raymer's table, from memory), fully turbulent, 3 %
// miscellaneous drag, κ = 0.95, flap drag 0.025 per unit ΔCLmax, gear
// ΔCD0 = 0.015, Δe 0.05 (take-off) and 0.10 (landing), low-speed polar at
// Mach 0.2 (increments: common practice, no source).
func DefaultAeroOptions() AeroOptions {
	return AeroOptions{
		Roughness: 6.34e-6, QWing: 1, QFuselage: 1, QTail: 1.04, QNacelle: 1.3,
		Miscellaneous: 0.03, Kappa: 0.95, FlapDragPerCL: 0.025, GearDrag: 0.015,
		OswaldReductionTakeoff: 0.05, OswaldReductionLanding: 0.10, TakeoffMach: 0.2,
	}
}

// AeroModel evaluates drag polars and lift characteristics of a
// Configuration. It is immutable after NewAeroModel and safe for
// concurrent use.
type AeroModel struct {
	Geometry GeometryOptions
	Options  AeroOptions
	wave     *WaveDragIntegrator
}

// NewAeroModel returns a model with the given layout and aerodynamic
// options.
func NewAeroModel(g GeometryOptions, a AeroOptions) *AeroModel {
	return &AeroModel{Geometry: g, Options: a, wave: NewWaveDragIntegrator()}
}

// FlightCondition is a Mach number at a geometric altitude [m] on a day
// TemperatureOffset [K] from standard.
type FlightCondition struct {
	Mach, Altitude, TemperatureOffset float64
}

// Polar is the drag polar CD = CD0 + K·CL² at one flight condition,
// with its parts.
type Polar struct {
	Mach       float64
	CD0        float64 // zero-lift drag: friction, form, interference, wave
	CDFriction float64 // friction, form, interference and miscellaneous
	CDWave     float64 // volume wave drag (transonic rise and supersonic)
	K          float64 // drag-due-to-lift factor
	// KWaveLift is the lift term of the supersonic area rule (drag due to
	// lift from the equivalent area of the lift), CDwave,lift = KWaveLift·CL².
	// It is part of K above Mach 1 and reported for information.
	KWaveLift float64
	CLAlpha   float64 // lift-curve slope of the wing-body [1/rad]
	MachDD    float64 // drag-divergence Mach number (Korn)
	MachCrit  float64 // critical Mach number
}

// CD returns the drag coefficient at lift coefficient cl.
func (p Polar) CD(cl float64) float64 { return p.CD0 + p.K*cl*cl }

// Roll angles of the supersonic area rule's average: the two-point
// Gauss–Legendre nodes on [0, π/2], π/4·(1 ∓ 1/√3), with weights ½.
const (
	rollNode1  = 0.33194832233889376
	rollNode2  = 1.2388480044560026
	rollWeight = 0.5
)

// rollNodes returns the roll angles [rad] of the area-rule average.
func rollNodes() [2]float64 { return [2]float64{rollNode1, rollNode2} }

// rollCosines returns the cosines of the roll angles (a test checks them).
func rollCosines() [2]float64 { return [2]float64{0.94540920808797713, 0.3258856076332064} }

// Polar returns the drag polar of c at fc; cl is the lift coefficient
// used by the Korn equation (the drag-divergence Mach number falls with
// lift). Bad input is an error naming the variable.
func (m *AeroModel) Polar(c *Configuration, fc FlightCondition, cl float64) (Polar, error) {
	if !(fc.Mach >= 0 && fc.Mach <= MaxMach) {
		return Polar{}, inputErr("mach", fc.Mach, "", "[0, 2.5]")
	}
	atm, err := OffsetAtmosphere(fc.Altitude, fc.TemperatureOffset)
	if err != nil {
		return Polar{}, err
	}
	return m.polar(c, atm, fc.Mach, cl, true, nil)
}

// polar is Polar at a known atmosphere; the area-rule lift term is
// computed only when withLift is set; aw, if not nil, is the airframe's
// area rule at this Mach number (the pods are added to it).
func (m *AeroModel) polar(c *Configuration, atm Atmosphere, mach, cl float64, withLift bool, aw *AirframeWave) (Polar, error) {
	t := m.components(c)
	return m.polarFrom(c, &t, atm, mach, cl, withLift, aw, OswaldEfficiency(c.Wing.AspectRatio, c.Wing.SweepLE))
}

// polarFrom is polar with the component table and the wing's Oswald
// efficiency already computed.
func (m *AeroModel) polarFrom(c *Configuration, t *dragComponents, atm Atmosphere, mach, cl float64, withLift bool, aw *AirframeWave, e float64) (Polar, error) {
	p := Polar{Mach: mach}
	p.CDFriction = m.parasite(t, atm, mach)
	w := c.Wing
	p.MachDD = KornDragDivergence(m.Geometry.KornFactor, w.ThicknessRatio, w.Sweep, cl)
	p.MachCrit = CriticalMach(p.MachDD)
	p.CDWave, p.KWaveLift = m.waveDrag(c, mach, p.MachDD, withLift, aw)
	p.CD0 = p.CDFriction + p.CDWave
	p.K = dragDueToLift(w, mach, e)
	cla, err := LiftSlope(w, mach, m.Options.Kappa)
	if err != nil {
		return p, err
	}
	p.CLAlpha = cla * wingBodyLiftFactor(c)
	return p, nil
}

// wingBodyLiftFactor is (S_exposed/S)·1.07(1 + d/b)², at most 0.98: the
// lift of the wing-body from the wing's (conceptual-design textbooks,
// Raymer; from memory).
func wingBodyLiftFactor(c *Configuration) float64 {
	w := c.Wing
	d := c.Fuselage.Diameter
	f := 1.07 * (1 + d/w.Span) * (1 + d/w.Span)
	return math.Min(0.98, w.ExposedArea(d)/w.Area*f)
}

// formFactorWeight is the weight of the subsonic form factors: 1 below
// Mach 0.95, 0 (form factor 1: thickness drag is wave drag) above 1.2.
func formFactorWeight(mach float64) float64 { return 1 - smoothstep(mach, blendLow, blendHigh) }

// dragComponents are the Mach-independent data of the component drag
// build-up of one configuration: for each component the logarithm of its
// reference length, its wetted area times its interference factor, and
// the Mach-independent part of its form factor (surfaces: the thickness
// term times (cos Λm)^0.28; bodies: the excess over 1).
type dragComponents struct {
	n       int
	surface [5]bool
	lnL     [5]float64
	swetQ   [5]float64
	ff      [5]float64
	sref    float64
}

// components tabulates the drag build-up data of c.
func (m *AeroModel) components(c *Configuration) dragComponents {
	o := &m.Options
	xm := m.Geometry.MaxThicknessChord
	var t dragComponents
	t.sref = c.Wing.Area
	add := func(surface bool, l, swetQ, ff float64) {
		t.surface[t.n], t.lnL[t.n], t.swetQ[t.n], t.ff[t.n] = surface, math.Log(l), swetQ, ff
		t.n++
	}
	surf := func(w *Wing) float64 {
		tc := w.ThicknessRatio
		// (cos Λm)^0.28 = (1 + tan²Λm)^−0.14
		t := w.tanSweepAt(xm)
		return (1 + 0.6/xm*tc + 100*tc*tc*tc*tc) * math.Exp(-0.14*math.Log1p(t*t))
	}
	swW, swF, swH, swV, swN := c.WettedAreas()
	add(true, c.Wing.MAC, swW*o.QWing, surf(&c.Wing))
	if swH > 0 {
		add(true, c.HTail.MAC, swH*o.QTail, surf(&c.HTail))
	}
	add(true, c.VTail.MAC, swV*o.QTail, surf(&c.VTail))
	f := c.Fuselage.Fineness
	add(false, c.Fuselage.Length, swF*o.QFuselage, 60/(f*f*f)+f/400)
	if swN > 0 {
		n := &c.Nacelles
		add(false, n.Length, swN*o.QNacelle, 0.35/(n.Length/n.Diameter))
	}
	return t
}

// parasite returns the friction, form and interference drag coefficient
// of the tabulated components at mach in the atmosphere atm.
func (m *AeroModel) parasite(t *dragComponents, atm Atmosphere, mach float64) float64 {
	fc := m.frictionAt(atm.Reynolds(mach), mach, true)
	return m.frictionCoefficient(m.dragArea(t, &fc), t.sref)
}

// frictionCoefficient returns the friction, form and interference drag
// coefficient (1 + miscellaneous)·D/q/S of the drag area dq [m2].
func (m *AeroModel) frictionCoefficient(dq, sref float64) float64 {
	return (1 + m.Options.Miscellaneous) * dq / sref
}

// frictionCondition holds the factors of the component drag build-up
// that are common to every component at one flight condition: the
// compressibility factor of the skin friction, the logarithms of the
// cut-off Reynolds number's Mach factor, of the roughness and of the
// Reynolds number per metre, the weight of the subsonic form factors and
// the Mach factor of the surfaces' form factors.
type frictionCondition struct {
	comp, lnCut, lnK, lnRePerM, fw, machFF float64
}

// frictionAt returns the common factors at mach with the Reynolds number
// per metre rePerM [1/m]; the surfaces' Mach factor only when surfaces is
// set.
func (m *AeroModel) frictionAt(rePerM, mach float64, surfaces bool) frictionCondition {
	fc := frictionFrom(rePerM, frictionCompressibility(mach), cutoffFactor(mach), mach, math.Log(m.Options.Roughness))
	if surfaces {
		mff := math.Max(math.Min(mach, blendLow), 0.2)
		fc.machFF = 1.34 * math.Pow(mff, 0.18)
	}
	return fc
}

// frictionFrom returns the common factors of the bodies (no surfaces'
// Mach factor) from the Reynolds number per metre rePerM [1/m], the
// compressibility factor comp of the skin friction and the cut-off
// Reynolds number's Mach factor cut at mach, for the roughness e^lnK [m].
func frictionFrom(rePerM, comp, cut, mach, lnK float64) frictionCondition {
	var fc frictionCondition
	fc.comp = comp
	// in logarithms: ln Re = ln(Re/m) + ln l, cut-off ln Re = ln C + 1.053(ln l − ln k)
	fc.lnK = lnK
	fc.lnCut = math.Log(cut)
	fc.lnRePerM = math.Log(math.Max(rePerM, 1e-300))
	fc.fw = formFactorWeight(mach)
	return fc
}

// frictionFromLogs is frictionFrom with the logarithms of the Reynolds
// number per metre (floored at 1e-300) and of the cut-off factor given.
func frictionFromLogs(lnRePerM, comp, lnCut, mach, lnK float64) frictionCondition {
	return frictionCondition{comp: comp, lnCut: lnCut, lnK: lnK, lnRePerM: lnRePerM, fw: formFactorWeight(mach)}
}

// frictionCompressibility returns the compressibility factor
// (1 + 0.144M²)^0.65 that divides the turbulent skin friction.
func frictionCompressibility(mach float64) float64 { return math.Pow(1+0.144*mach*mach, 0.65) }

// cutoffFactor returns the Mach factor C of the cut-off Reynolds number
// C·(l/k)^1.053 (CutoffReynolds): 38.21 subsonic, 44.62·M^1.16
// supersonic, blended between Mach 0.9 and 1.2 (the power skipped where
// its weight is zero).
func cutoffFactor(mach float64) float64 {
	if mach <= 0.9 {
		return 38.21
	}
	return blend(mach, 0.9, 1.2, 38.21, 44.62*math.Pow(math.Max(mach, 1.2), 1.16))
}

// dragArea returns Σ Cf·FF·Q·S_wet [m2] of the tabulated components (the
// friction, form and interference drag area without the miscellaneous
// share).
func (m *AeroModel) dragArea(t *dragComponents, fc *frictionCondition) float64 {
	sum := 0.0
	for i := 0; i < t.n; i++ {
		sum += m.componentDragArea(fc, t.surface[i], t.lnL[i], t.swetQ[i], t.ff[i])
	}
	return sum
}

// componentDragArea returns Cf·FF·Q·S_wet [m2] of one component of
// reference length e^lnL, wetted area times interference factor swetQ and
// Mach-independent form-factor part ff (see dragComponents).
func (m *AeroModel) componentDragArea(fc *frictionCondition, surface bool, lnL, swetQ, ff float64) float64 {
	const lnMin = 11.512925464970229 // ln 1e5
	o := &m.Options
	lnRe := max(fc.lnRePerM+lnL, lnMin) // math.Max exactly (a finite constant operand), inlined
	lnRe = math.Min(lnRe, fc.lnCut+1.053*(lnL-fc.lnK))
	cf := 0.455 / (math.Exp(2.58*math.Log(lnRe/math.Ln10)) * fc.comp)
	if o.LaminarFraction > 0 {
		cf = o.LaminarFraction*LaminarSkinFriction(math.Exp(lnRe)) + (1-o.LaminarFraction)*cf
	}
	f := 1 + fc.fw*ff
	if surface {
		f = 1 + fc.fw*(ff*fc.machFF-1)
	}
	return cf * f * swetQ
}

// nacelleDragData returns the drag build-up data of the pods n (as
// components tabulates them): ln l, S_wet·Q and the form-factor excess.
func (m *AeroModel) nacelleDragData(n *Nacelles) (lnL, swetQ, ff float64) {
	swN := float64(n.Count) * NacelleWettedArea(n.Diameter, n.Length)
	return math.Log(n.Length), swN * m.Options.QNacelle, 0.35 / (n.Length / n.Diameter)
}

// areaScratch holds the area distribution of one cut.
type areaScratch struct {
	x, s, p [WaveStations]float64
}

// VolumeWaveDragArea returns the volume wave drag D/q [m2] of c at
// mach >= 1 by the supersonic area rule: the slender-body wave drag of
// the area distribution cut by Mach planes x = x0 + β·cos θ·y, averaged
// over roll angle θ (two-point Gauss–Legendre on [0, π/2]; the
// configuration is symmetric), and the lift factor KWaveLift of the
// equivalent area due to lift, S_L' = (β cos θ/2)·(L/q)·l(x)/L with l the
// lift per unit length along the cut, taking a uniform spanwise lift
// coefficient on the exposed wing and a parabolic chordwise loading
// (a smoothed flat-plate loading). For an elliptic lengthwise lift
// distribution this gives Jones's β²L²/(2πq²ℓ²). At Mach 1 the cuts are
// normal (transonic area rule).
// The lift term is computed only when withLift is set.
func (m *AeroModel) VolumeWaveDragArea(c *Configuration, mach float64, withLift bool) (dq, kLift float64) {
	if mach < 1 {
		mach = 1
	}
	b := math.Sqrt(mach*mach - 1)
	var sc areaScratch
	if b == 0 {
		lo, hi := c.CutRange(0)
		m.wave.Stations(lo, hi, sc.x[:])
		c.AreaDistribution(0, sc.x[:], sc.s[:], nil)
		return m.wave.DragArea(sc.s[:], hi-lo), 0
	}
	for _, cth := range rollCosines() {
		k := b * cth
		lo, hi := c.CutRange(k)
		m.wave.Stations(lo, hi, sc.x[:])
		var p []float64
		if withLift {
			p = sc.p[:]
		}
		c.AreaDistribution(k, sc.x[:], sc.s[:], p)
		l := hi - lo
		dq += rollWeight * m.wave.DragArea(sc.s[:], l)
		if pe := c.Wing.ExposedArea(c.Fuselage.Diameter); withLift && pe > 0 {
			for i := range sc.p {
				sc.p[i] /= pe
			}
			// S_L' = (k/2)·CL·S·l/L: D/(qS) = (k²/4)·CL²·S·D[l/L]
			kLift += rollWeight * 0.25 * k * k * c.Wing.Area * m.wave.DragAreaFromSlope(sc.p[:])
		}
	}
	return dq, kLift
}

// RollAngles is the number of roll angles of the supersonic area rule's
// average.
const RollAngles = 2

// AirframeWave holds the supersonic area rule of the airframe without its
// pods at one Mach number: for each roll angle the start and length of
// the Mach-plane cut range and the Fourier coefficients ℓ·An of the
// airframe's area distribution. The coefficients are linear in the areas,
// so the pods' share can be added later without cutting the airframe
// again (the split that keeps the airframe's area rule out of the coupled
// loop, where only the pods change).
type AirframeWave struct {
	Mach   float64
	Start  [RollAngles]float64
	Length [RollAngles]float64
	A      [RollAngles][waveHarmonics]float64
}

// AirframeWave returns the airframe part of the supersonic area rule of c
// (its pods are ignored) at mach >= 1; below Mach 1 the zero value.
func (wd *WaveDragIntegrator) AirframeWave(c *Configuration, mach float64) AirframeWave {
	aw := AirframeWave{Mach: mach}
	if mach < 1 {
		return aw
	}
	air := *c
	air.Nacelles = Nacelles{}
	b := math.Sqrt(mach*mach - 1)
	var sc areaScratch
	for r, cth := range rollCosines() {
		k := b * cth
		lo, hi := air.CutRange(k)
		wd.Stations(lo, hi, sc.x[:])
		air.AreaDistribution(k, sc.x[:], sc.s[:], nil)
		aw.Start[r], aw.Length[r] = lo, hi-lo
		aw.A[r] = wd.coefficients(&sc.s)
	}
	return aw
}

// coefficients returns the Fourier coefficients ℓ·An of the areas s at
// the stations, Σj w[j][n]·s[j] summed in station order, eight
// harmonics at a time in registers.
func (wd *WaveDragIntegrator) coefficients(s *[WaveStations]float64) [waveHarmonics]float64 {
	var a [waveHarmonics]float64
	for m := 0; m+8 <= waveHarmonics; m += 8 {
		var a0, a1, a2, a3, a4, a5, a6, a7 float64
		for j, sj := range s {
			row := (*[8]float64)(wd.w[j][m : m+8])
			a0 += row[0] * sj
			a1 += row[1] * sj
			a2 += row[2] * sj
			a3 += row[3] * sj
			a4 += row[4] * sj
			a5 += row[5] * sj
			a6 += row[6] * sj
			a7 += row[7] * sj
		}
		a[m], a[m+1], a[m+2], a[m+3] = a0, a1, a2, a3
		a[m+4], a[m+5], a[m+6], a[m+7] = a4, a5, a6, a7
	}
	return a
}

// WaveDragWithPods returns the volume wave drag D/q [m2] of the airframe
// of aw with the pods n added, by the supersonic area rule at aw.Mach.
// The pods are cut over the airframe's cut range; a pod reaching beyond
// it (ahead of the nose or behind the last airframe cut) is clipped. With
// the pods inside the range the result equals VolumeWaveDragArea of the
// whole configuration.
func (wd *WaveDragIntegrator) WaveDragWithPods(aw *AirframeWave, n *Nacelles) float64 {
	if aw.Mach < 1 {
		return 0
	}
	b := math.Sqrt(aw.Mach*aw.Mach - 1)
	dq := 0.0
	amax := nacelleNetArea(n.Diameter)
	for r, cth := range rollCosines() {
		k := b * cth
		a := aw.A[r]
		lo, l := aw.Start[r], aw.Length[r]
		if n.Count > 0 && n.Length > 0 {
			for p := 0; p < n.n; p++ {
				for side := -1.0; side <= 1; side += 2 {
					x0, share := n.cutInlet(p, side, k)
					j := firstAbove(wd.xi[:], (x0-lo)/l)
					for ; j < WaveStations; j++ {
						x := lo + l*wd.xi[j]
						if x >= x0+n.Length {
							break
						}
						sn := share * n.podSection(amax, x0, x)
						row := &wd.w[j]
						for m := range a {
							a[m] += row[m] * sn
						}
					}
				}
			}
		}
		sum := 0.0
		for m, am := range a {
			sum += float64(m+1) * am * am
		}
		dq += rollWeight * math.Pi / 4 * sum / (l * l)
	}
	return dq
}

// waveDrag returns the volume wave-drag coefficient at mach and the
// area-rule lift factor: zero below the critical Mach number, the Lock
// rise to the drag-divergence Mach number (held at or below 0.95), a cubic
// fairing to the area-rule value at Mach 1 (zero slope there), the
// supersonic area rule above.
func (m *AeroModel) waveDrag(c *Configuration, mach, mdd float64, withLift bool, aw *AirframeWave) (float64, float64) {
	s := c.Wing.Area
	if mach >= 1 && aw != nil && !withLift {
		return m.wave.WaveDragWithPods(aw, &c.Nacelles) / s, 0
	}
	if mach >= 1 {
		dq, kl := m.VolumeWaveDragArea(c, mach, withLift)
		return dq / s, kl
	}
	md := min(mdd, blendLow)
	mc := md - lockOffset
	if mach <= md {
		return LockDragRise(mach, mc), 0
	}
	dq, _ := m.VolumeWaveDragArea(c, 1, false)
	y0, d0 := LockDragRise(md, mc), 0.1
	y1 := dq / s
	h := 1 - md
	t := (mach - md) / h
	t2, t3 := t*t, t*t*t
	v := (2*t3-3*t2+1)*y0 + (t3-2*t2+t)*h*d0 + (-2*t3+3*t2)*y1
	return max(0, v), 0
}

// CLMaxClean returns the clean wing's maximum lift coefficient,
// 0.9·clmax·cos Λc/4 (conceptual-design textbooks, Raymer; from memory)
// with the section clmax = min(1.8, 0.85 + 6 t/c) (common practice, no
// source).
func CLMaxClean(w Wing) float64 {
	clmax := math.Min(1.8, 0.85+6*w.ThicknessRatio)
	return 0.9 * clmax * math.Cos(w.Sweep*math.Pi/180)
}

// CLMaxFlapped returns the maximum lift coefficient with high-lift
// devices of increment dcl (the increment of an unswept wing), applied
// with the cosine of the quarter-chord sweep.
func CLMaxFlapped(w Wing, dcl float64) float64 {
	return CLMaxClean(w) + dcl*math.Cos(w.Sweep*math.Pi/180)
}

// TrimmedDrag returns the drag coefficient of the trimmed aircraft at
// total lift coefficient cl when the horizontal tail carries tailLift [N]
// at dynamic pressure q [Pa]: the wing carries CLw = CL − L_t/(qS) and the
// tail's own drag due to lift K_t·CLt²·S_t/S is added (the trim drag).
// It returns the total CD and the trim drag (CD minus the untrimmed
// CD0 + K·CL²).
func (m *AeroModel) TrimmedDrag(c *Configuration, p Polar, cl, tailLift, q float64) (cd, trim float64) {
	kt := 0.0
	if c.HTail.Area > 0 {
		kt = DragDueToLift(c.HTail, p.Mach, 0)
	}
	return trimmedDrag(c, p, cl, tailLift, q, kt)
}

// trimmedDrag is TrimmedDrag with the tail's drag-due-to-lift factor kt.
func trimmedDrag(c *Configuration, p Polar, cl, tailLift, q, kt float64) (cd, trim float64) {
	s := c.Wing.Area
	clt := tailLift / (q * s)
	clw := cl - clt
	cd = p.CD0 + p.K*clw*clw
	if c.HTail.Area > 0 {
		ct := tailLift / (q * c.HTail.Area)
		cd += kt * ct * ct * c.HTail.Area / s
	}
	return cd, cd - p.CD(cl)
}

// Aerodynamics is the "aerodynamics" discipline: the parts of the drag
// polar that change inside the coupled loop. The airframe's own share
// (friction, form and interference drag of wing, fuselage and tails, the
// drag-due-to-lift factors, lift-curve slopes and maximum lift) depends on
// the design parameters only and comes from the "airframe_aero"
// discipline (AirframeAerodynamics), which runs once before the loop;
// aerodynamics adds the pods that propulsion sizes (their friction and
// their share of the supersonic area rule), the lift that the masses of
// weights ask for and the trim drag of the tail load of stability.
//
// Cruise lift: aero.cl_cruise, cd_cruise and ld_cruise are at the
// mid-cruise mass, the mean of mass.cruise_start and mass.cruise_end (from
// weights); aero.drag_cruise is the trimmed drag at the start of cruise
// (the engine-sizing case). Low-speed values are at Mach
// AeroOptions.TakeoffMach at the airport; aero.ld_takeoff is at V2 =
// 1.13·VSR (14 CFR 25.107), CL = aero.cl_takeoff. aero.cd0_takeoff is
// flaps at take-off, gear up (second segment); aero.cd0_landing is landing
// flaps, gear down.
//
// The airframe's supersonic area rule at cruise Mach comes from geometry
// (geometry.area_rule_*); aerodynamics adds the pods. In the transonic
// fairing (between the drag-divergence Mach number and Mach 1) the whole
// configuration is cut again.
//
// Outputs beyond the fixed aircraft names: aero.trim_drag_cruise,
// aero.cd_friction_cruise, aero.mach_drag_divergence, aero.cd0_landing.
type Aerodynamics struct {
	model *AeroModel
}

// NewAerodynamics returns the aerodynamics discipline; the layout options
// must be those of the geometry discipline.
func NewAerodynamics(g GeometryOptions, a AeroOptions) *Aerodynamics {
	return &Aerodynamics{model: NewAeroModel(g, a)}
}

// Model returns the aerodynamic model the discipline uses.
func (a *Aerodynamics) Model() *AeroModel { return a.model }

// Name implements mdo.Discipline.
func (a *Aerodynamics) Name() string { return "aerodynamics" }

// Input indices of the aerodynamics discipline (the wing parameters come
// first, in the order of the geometry discipline).
const (
	aeroInFusLength = 6 + iota
	aeroInFusDiameter
	aeroInNoseLength
	aeroInTailLength
	aeroInHTailArea
	aeroInVTailArea
	aeroInEngines
	aeroInNacDiameter
	aeroInNacLength
	aeroInMach
	aeroInMassStart
	aeroInMassEnd
	aeroInTailLift
	aeroInFlapTakeoff
	aeroInFlapLanding
	aeroInAirframeCruise
	aeroInAirframeLow
	aeroInReCruise
	aeroInReLow
	aeroInCompCruise
	aeroInCompLow
	aeroInCutCruise
	aeroInCutLow
	aeroInQ
	aeroInK
	aeroInKTail
	aeroInKTO
	aeroInCLTO
	aeroInMDDZeroLift
	aeroInKornLift
	aeroInWave // RollAngles × (start, length, waveHarmonics coefficients)
	aeroNumIn  = aeroInWave + RollAngles*areaRulePerRoll
)

// Output indices of the aerodynamics discipline.
const (
	aeroOutCD0 = iota
	aeroOutCL
	aeroOutCD
	aeroOutLD
	aeroOutDrag
	aeroOutCD0TO
	aeroOutLDTO
	aeroOutWave
	aeroOutTrim
	aeroOutFriction
	aeroOutMDD
	aeroOutCD0Ldg
	aeroNumOut
)

// Inputs implements mdo.Discipline.
func (a *Aerodynamics) Inputs() []mdo.Var {
	in := make([]mdo.Var, aeroNumIn)
	w := wingParamVars()
	copy(in, w[:])
	shape := airframeShapeVars()
	copy(in[aeroInFusLength:], shape[:])
	v := func(i int, name, unit, desc string, def, lo, hi, scale float64) {
		in[i] = mdo.Var{Name: name, Unit: unit, Description: desc, Default: def, Min: lo, Max: hi, Scale: scale}
	}
	in[aeroInEngines] = engineCountVar()
	v(aeroInNacDiameter, "nacelle.diameter", "m", "nacelle maximum diameter", 1.2, 0, 6, 0)
	v(aeroInNacLength, "nacelle.length", "m", "nacelle length (inlet to nozzle)", 6, 0, 30, 0)
	in[aeroInMach] = cruiseMachVar()
	v(aeroInMassStart, "mass.cruise_start", "kg", "mass at the start of cruise", 42000, 100, 1e6, 1e4)
	v(aeroInMassEnd, "mass.cruise_end", "kg", "mass at the end of cruise", 30000, 100, 1e6, 1e4)
	v(aeroInTailLift, "stability.tail_lift_cruise", "N", "horizontal-tail lift in trimmed cruise (positive up)", 0, -1e7, 1e7, 1e4)
	v(aeroInFlapTakeoff, "flap.cl_increment_takeoff", "-", "CLmax increment of the take-off high-lift setting (unswept wing)", 0.4, 0, 3, 0)
	v(aeroInFlapLanding, "flap.cl_increment_landing", "-", "CLmax increment of the landing high-lift setting (unswept wing)", 0.8, 0, 3, 0)
	af := airframeAeroOutputs()
	for _, k := range [...][2]int{
		{aeroInAirframeCruise, afOutAreaCruise}, {aeroInAirframeLow, afOutAreaLow},
		{aeroInReCruise, afOutReCruise}, {aeroInReLow, afOutReLow}, {aeroInQ, afOutQ},
		{aeroInCompCruise, afOutCompCruise}, {aeroInCompLow, afOutCompLow},
		{aeroInCutCruise, afOutCutCruise}, {aeroInCutLow, afOutCutLow},
		{aeroInK, afOutK}, {aeroInKTail, afOutKTail}, {aeroInKTO, afOutKTO}, {aeroInCLTO, afOutCLTO},
		{aeroInMDDZeroLift, afOutMDDZeroLift}, {aeroInKornLift, afOutKornLift},
	} {
		in[k[0]] = af[k[1]]
	}
	copy(in[aeroInWave:], areaRuleVars())
	return in
}

// Outputs implements mdo.Discipline.
func (a *Aerodynamics) Outputs() []mdo.Var {
	o := make([]mdo.Var, aeroNumOut)
	v := func(i int, name, unit, desc string, def, lo, hi float64) {
		o[i] = mdo.Var{Name: name, Unit: unit, Description: desc, Default: def, Min: lo, Max: hi, Scale: def}
	}
	v(aeroOutCD0, "aero.cd0_cruise", "-", "zero-lift drag coefficient at cruise (friction, form, wave)", 0.02, 0, 1)
	v(aeroOutCL, "aero.cl_cruise", "-", "lift coefficient at mid-cruise mass", 0.15, -10, 10)
	v(aeroOutCD, "aero.cd_cruise", "-", "trimmed drag coefficient at mid-cruise mass", 0.024, 0, 10)
	v(aeroOutLD, "aero.ld_cruise", "-", "trimmed lift-to-drag ratio at mid-cruise mass", 7, -100, 100)
	v(aeroOutDrag, "aero.drag_cruise", "N", "trimmed drag at the start of cruise", 60000, 0, 1e8)
	v(aeroOutCD0TO, "aero.cd0_takeoff", "-", "zero-lift drag coefficient, take-off flaps, gear up", 0.03, 0, 1)
	v(aeroOutLDTO, "aero.ld_takeoff", "-", "lift-to-drag ratio at V2, take-off flaps", 7, 0, 100)
	v(aeroOutWave, "aero.wave_drag_cruise", "-", "volume wave-drag coefficient at cruise", 0.01, 0, 1)
	v(aeroOutTrim, "aero.trim_drag_cruise", "-", "trim drag coefficient at mid-cruise mass", 0.0005, -1, 1)
	v(aeroOutFriction, "aero.cd_friction_cruise", "-", "friction, form and interference drag coefficient at cruise", 0.01, 0, 1)
	v(aeroOutMDD, "aero.mach_drag_divergence", "-", "drag-divergence Mach number (Korn) at cruise lift", 1.2, -10, 10)
	v(aeroOutCD0Ldg, "aero.cd0_landing", "-", "zero-lift drag coefficient, landing flaps, gear down", 0.05, 0, 1)
	return o
}

// lowSpeedLift is the lift coefficient of the low-speed polar's Korn
// estimate.
const lowSpeedLift = 0.5

// Compute implements mdo.Discipline. It allocates nothing.
func (a *Aerodynamics) Compute(in, out []float64) error {
	m := a.model
	// the planform places the pods; the whole wing (NewWing) only in the
	// transonic fairing
	w, err := surfacePlanform("wing", in[geoInArea], in[geoInAspect], in[geoInTaper], in[geoInSweep], in[geoInTC])
	if err != nil {
		return err
	}
	f, err := FuselageFromDimensions(in[aeroInFusLength], in[aeroInFusDiameter], in[aeroInNoseLength], in[aeroInTailLength])
	if err != nil {
		return err
	}
	pos := in[geoInPosition]
	if !(pos >= 0.05 && pos <= 0.9) {
		return inputErr("wing.position", pos, "", "[0.05, 0.9] (apex x / fuselage length)")
	}
	mach := in[aeroInMach]
	if !(mach > 0 && mach <= MaxMach) {
		return inputErr("cruise.mach", mach, "", "(0, 2.5]")
	}
	// the pods and the parts of the configuration the polar reads; the
	// whole configuration only in the transonic fairing
	c := Configuration{Wing: w, WingApex: pos * f.Length, Fuselage: f}
	c.HTail.Area = in[aeroInHTailArea]
	if c.Nacelles, err = placeNacelles(&c.Wing, c.WingApex, &c.Fuselage, roundCount(in[aeroInEngines]),
		in[aeroInNacDiameter], in[aeroInNacLength], &m.Geometry); err != nil {
		return err
	}
	s := w.Area
	q := in[aeroInQ]
	mStart := in[aeroInMassStart]
	mMid := 0.5 * (mStart + in[aeroInMassEnd])
	cl := mMid * G0 / (q * s)
	// Korn (kornFromCos) with the wing's parts from airframe_aero
	mdd0, kornLift := in[aeroInMDDZeroLift], in[aeroInKornLift]
	mdd := mdd0 - cl/kornLift
	o := &m.Options
	mddLow := mdd0 - lowSpeedLift/kornLift
	if inFairing(mach, mdd) || inFairing(o.TakeoffMach, mddLow) {
		if w, err = NewWing(w.Area, w.AspectRatio, w.Taper, w.Sweep, w.ThicknessRatio); err != nil {
			return err
		}
		if c, err = AssembleConfiguration(w, pos, f, in[aeroInHTailArea], in[aeroInVTailArea],
			roundCount(in[aeroInEngines]), in[aeroInNacDiameter], in[aeroInNacLength], m.Geometry); err != nil {
			return err
		}
	}
	var aw AirframeWave
	unpackAreaRule(in[aeroInWave:], mach, &aw)

	// friction: the airframe's drag area plus the pods'
	n := &c.Nacelles
	hasPods := n.Count > 0 && n.Length > 0 && n.Diameter > 0
	var lnN, swN, ffN, lnK float64
	if hasPods {
		lnN, swN, ffN = m.nacelleDragData(n)
		lnK = math.Log(o.Roughness)
	}
	dq := in[aeroInAirframeCruise]
	if hasPods {
		fc := frictionFromLogs(in[aeroInReCruise], in[aeroInCompCruise], in[aeroInCutCruise], mach, lnK)
		dq += m.componentDragArea(&fc, false, lnN, swN, ffN)
	}
	var p Polar
	p.CDFriction = m.frictionCoefficient(dq, s)
	p.MachDD = mdd
	p.CDWave, _ = m.waveDrag(&c, mach, mdd, false, &aw)
	p.CD0 = p.CDFriction + p.CDWave
	p.K = in[aeroInK]
	lt := in[aeroInTailLift]
	kt := in[aeroInKTail]
	cd, trim := trimmedDrag(&c, p, cl, lt, q, kt)
	clStart := mStart * G0 / (q * s)
	cdStart, _ := trimmedDrag(&c, p, clStart, lt, q, kt)
	out[aeroOutCD0] = p.CD0
	out[aeroOutCL] = cl
	out[aeroOutCD] = cd
	out[aeroOutLD] = cl / cd
	out[aeroOutDrag] = q * s * cdStart
	out[aeroOutWave] = p.CDWave
	out[aeroOutTrim] = trim
	out[aeroOutFriction] = p.CDFriction
	out[aeroOutMDD] = p.MachDD

	dqLow := in[aeroInAirframeLow]
	if hasPods {
		fc := frictionFromLogs(in[aeroInReLow], in[aeroInCompLow], in[aeroInCutLow], o.TakeoffMach, lnK)
		dqLow += m.componentDragArea(&fc, false, lnN, swN, ffN)
	}
	waveLow, _ := m.waveDrag(&c, o.TakeoffMach, mddLow, false, nil)
	cd0Low := m.frictionCoefficient(dqLow, s) + waveLow
	cd0TO := cd0Low + o.FlapDragPerCL*in[aeroInFlapTakeoff]
	cl2 := in[aeroInCLTO]
	out[aeroOutCD0TO] = cd0TO
	out[aeroOutLDTO] = cl2 / (cd0TO + in[aeroInKTO]*cl2*cl2)
	out[aeroOutCD0Ldg] = cd0Low + o.FlapDragPerCL*in[aeroInFlapLanding] + o.GearDrag
	return nil
}

// inFairing reports whether mach lies in the transonic fairing of the
// wave drag (above the drag-divergence Mach number mdd, held at or below
// 0.95, and below Mach 1), where the whole configuration is cut.
func inFairing(mach, mdd float64) bool {
	return mach < 1 && mach > min(mdd, blendLow)
}
