package disciplines

import (
	"fmt"
	"math"

	"couplet/mdo"
)

// AirframeAerodynamics is the "airframe_aero" discipline: the part of the
// aerodynamics that depends on the design parameters only, so that it runs
// once before the coupled loop instead of in every coupling iteration. It
// builds the airframe (wing, fuselage, tails; no pods) from the geometry
// outputs and the wing parameters and gives
//
//   - the friction, form and interference drag area Σ Cf·FF·Q·S_wet of
//     the airframe at cruise and at the low-speed condition
//     (aero.airframe_drag_area_cruise, aero.airframe_drag_area_low_speed;
//     without the miscellaneous share, which aerodynamics applies after
//     adding the pods), with the natural logarithms of the Reynolds
//     numbers per metre of both conditions
//     (aero.ln_reynolds_per_metre_cruise, _low_speed), the skin
//     friction's compressibility factors
//     (aero.friction_compressibility_cruise, _low_speed) and the
//     logarithms of the Mach factors of the roughness cut-off Reynolds
//     number (aero.ln_cutoff_reynolds_factor_cruise, _low_speed) for the
//     pods' skin friction (aerodynamics works with the logarithms, so
//     they are taken once here), and the cruise dynamic pressure
//     (aero.dynamic_pressure_cruise);
//   - the drag-due-to-lift factors aero.k_cruise, aero.k_takeoff,
//     aero.k_landing and the horizontal tail's at cruise,
//     aero.k_htail_cruise (for the trim drag);
//   - the wing-body lift-curve slopes aero.cla_cruise and
//     aero.cla_low_speed;
//   - the maximum lift coefficients aero.cl_max_clean, _takeoff, _landing
//     and the lift coefficient at V2 = 1.13·VSR (14 CFR 25.107),
//     aero.cl_takeoff = CLmax,TO/1.13²;
//   - the wing's parts of the Korn drag-divergence Mach number
//     (KornDragDivergence) Mdd = Mdd(CL = 0) − CL/(10 cos³Λ):
//     aero.mach_drag_divergence_zero_lift and aero.korn_lift_divisor,
//     to which aerodynamics adds the cruise lift.
//
// The methods are those of the aerodynamic model (AeroModel); the low-speed
// condition is Mach AeroOptions.TakeoffMach at the airport. Three
// calibration factors, default 1 (the model unchanged), multiply the lift
// slopes (aero.factor_lift_slope), the zero-lift drag areas
// (aero.factor_zero_lift_drag) and the wing's drag-due-to-lift factors
// (aero.factor_induced_drag); a calibration to measurements fits them.
type AirframeAerodynamics struct {
	model *AeroModel
	// machFFHigh is the surfaces' form-factor Mach factor 1.34·M^0.18 at
	// its upper limit M = blendLow (see frictionAt)
	machFFHigh float64
	// values for the options given to the constructor, used when the
	// arguments match (the model's options are exported and may change)
	low  lowSpeedFactors
	tail tailOswald
}

// lowSpeedFactors holds frictionCompressibility(mach) and the surfaces'
// form-factor Mach factor at one Mach number.
type lowSpeedFactors struct {
	mach, comp, mff, machFF float64
}

// newLowSpeedFactors evaluates lowSpeedFactors at mach as frictionAt does.
func newLowSpeedFactors(mach float64) lowSpeedFactors {
	mff := math.Max(math.Min(mach, blendLow), 0.2)
	return lowSpeedFactors{mach: mach, comp: frictionCompressibility(mach), mff: mff, machFF: 1.34 * math.Pow(mff, 0.18)}
}

// tailOswald is OswaldEfficiency(ar, sweepLE) = e.
type tailOswald struct {
	ar, sweepLE, e float64
}

// oswald returns OswaldEfficiency(w.AspectRatio, w.SweepLE), from t when
// the arguments are t's.
func (t *tailOswald) oswald(w *Wing) float64 {
	if w.AspectRatio == t.ar && w.SweepLE == t.sweepLE {
		return t.e
	}
	return OswaldEfficiency(w.AspectRatio, w.SweepLE)
}

// NewAirframeAerodynamics returns the airframe_aero discipline; the layout
// options must be those of the geometry discipline.
func NewAirframeAerodynamics(g GeometryOptions, a AeroOptions) *AirframeAerodynamics {
	d := &AirframeAerodynamics{model: NewAeroModel(g, a), machFFHigh: 1.34 * math.Pow(blendLow, 0.18)}
	d.low = newLowSpeedFactors(a.TakeoffMach)
	d.tail = tailOswald{ar: math.NaN(), sweepLE: math.NaN()} // matches nothing
	// the sweep of the leading edge does not depend on the area
	if t, err := newSurface("htail", 1, g.HTailAspectRatio, g.HTailTaper, g.HTailSweep, g.HTailThickness); err == nil {
		d.tail = tailOswald{ar: t.AspectRatio, sweepLE: t.SweepLE, e: OswaldEfficiency(t.AspectRatio, t.SweepLE)}
	}
	return d
}

// friction is the model's frictionAt(rePerM, mach, true) with the
// cut-off factor cut = cutoffFactor(mach) and lnK, the logarithm of the
// roughness, given (the same values).
func (a *AirframeAerodynamics) friction(rePerM, mach, cut, lnK float64) frictionCondition {
	var comp float64
	if mach == a.low.mach {
		comp = a.low.comp
	} else {
		comp = frictionCompressibility(mach)
	}
	fc := frictionFrom(rePerM, comp, cut, mach, lnK)
	switch mff := math.Max(math.Min(mach, blendLow), 0.2); mff {
	case blendLow:
		fc.machFF = a.machFFHigh
	case a.low.mff:
		fc.machFF = a.low.machFF
	default:
		fc.machFF = 1.34 * math.Pow(mff, 0.18)
	}
	return fc
}

// Model returns the aerodynamic model the discipline uses.
func (a *AirframeAerodynamics) Model() *AeroModel { return a.model }

// Name implements mdo.Discipline.
func (a *AirframeAerodynamics) Name() string { return "airframe_aero" }

// Input indices of the airframe_aero discipline (the wing parameters come
// first, in the order of the geometry discipline).
const (
	afInFusLength = 6 + iota
	afInFusDiameter
	afInNoseLength
	afInTailLength
	afInHTailArea
	afInVTailArea
	afInMach
	afInAltitude
	afInFlapTakeoff
	afInFlapLanding
	afInElevation
	afInDT
	afInFactorLiftSlope
	afInFactorDragArea
	afInFactorInduced
	afNumIn
)

// Output indices of the airframe_aero discipline.
const (
	afOutAreaCruise = iota
	afOutAreaLow
	afOutReCruise
	afOutReLow
	afOutCompCruise
	afOutCompLow
	afOutCutCruise
	afOutCutLow
	afOutQ
	afOutK
	afOutKTail
	afOutKTO
	afOutKLdg
	afOutCLACruise
	afOutCLALow
	afOutCLMaxClean
	afOutCLMaxTO
	afOutCLMaxLdg
	afOutCLTO
	afOutMDDZeroLift
	afOutKornLift
	afNumOut
)

// Inputs implements mdo.Discipline.
func (a *AirframeAerodynamics) Inputs() []mdo.Var {
	in := make([]mdo.Var, afNumIn)
	w := wingParamVars()
	copy(in, w[:])
	shape := airframeShapeVars()
	copy(in[afInFusLength:], shape[:])
	v := func(i int, name, unit, desc string, def, lo, hi, scale float64) {
		in[i] = mdo.Var{Name: name, Unit: unit, Description: desc, Default: def, Min: lo, Max: hi, Scale: scale}
	}
	in[afInMach] = cruiseMachVar()
	in[afInAltitude] = cruiseAltitudeVar()
	v(afInFlapTakeoff, "flap.cl_increment_takeoff", "-", "CLmax increment of the take-off high-lift setting (unswept wing)", 0.4, 0, 3, 0)
	v(afInFlapLanding, "flap.cl_increment_landing", "-", "CLmax increment of the landing high-lift setting (unswept wing)", 0.8, 0, 3, 0)
	v(afInElevation, "airport.elevation", "m", "airport elevation", 0, -400, 4500, 1000)
	v(afInDT, "airport.temperature_offset", "K", "airport temperature above the standard day", 0, -50, 50, 10)
	// Calibration factors (1 = the model as published; a calibration to
	// measurements sets them, see optimizers.Calibration).
	v(afInFactorLiftSlope, "aero.factor_lift_slope", "-", "calibration factor on the wing-body lift-curve slopes (cruise and low speed)", 1, 0.2, 5, 0)
	v(afInFactorDragArea, "aero.factor_zero_lift_drag", "-", "calibration factor on the friction, form and interference drag areas (cruise and low speed; not the wave drag)", 1, 0.2, 5, 0)
	v(afInFactorInduced, "aero.factor_induced_drag", "-", "calibration factor on the wing's drag-due-to-lift factors (cruise, take-off, landing)", 1, 0.2, 5, 0)
	return in
}

// lnMaxRePerM is ln 1e10, the largest Reynolds number per metre accepted.
const lnMaxRePerM = 23.025850929940457

// airframeAeroOutputs returns the specifications of the airframe_aero
// outputs (aerodynamics reads some of them).
func airframeAeroOutputs() []mdo.Var {
	o := make([]mdo.Var, afNumOut)
	v := func(i int, name, unit, desc string, def, lo, hi float64) {
		o[i] = mdo.Var{Name: name, Unit: unit, Description: desc, Default: def, Min: lo, Max: hi, Scale: def}
	}
	v(afOutAreaCruise, "aero.airframe_drag_area_cruise", "m2", "friction, form and interference drag area of wing, fuselage and tails at cruise (no pods, no miscellaneous share)", 1, 0, 1e4)
	v(afOutAreaLow, "aero.airframe_drag_area_low_speed", "m2", "friction, form and interference drag area of wing, fuselage and tails at low speed (no pods, no miscellaneous share)", 1.5, 0, 1e4)
	// the logarithms' ranges are the logarithms of the ranges [0, 1e10]
	// (Reynolds number per metre, floored at 1e-300) and [1, 1000] (cut-off factor)
	v(afOutReCruise, "aero.ln_reynolds_per_metre_cruise", "-", "natural logarithm of the Reynolds number per metre [1/m] at cruise", 15.4, -700, lnMaxRePerM)
	v(afOutReLow, "aero.ln_reynolds_per_metre_low_speed", "-", "natural logarithm of the Reynolds number per metre [1/m] of the low-speed polar at the airport", 15.3, -700, lnMaxRePerM)
	v(afOutCompCruise, "aero.friction_compressibility_cruise", "-", "compressibility factor (1 + 0.144M²)^0.65 dividing the turbulent skin friction at cruise", 1.2, 1, 10)
	v(afOutCompLow, "aero.friction_compressibility_low_speed", "-", "compressibility factor (1 + 0.144M²)^0.65 dividing the turbulent skin friction at low speed", 1, 1, 10)
	v(afOutCutCruise, "aero.ln_cutoff_reynolds_factor_cruise", "-", "natural logarithm of the Mach factor C of the roughness cut-off Reynolds number C·(l/k)^1.053 at cruise", 4.25, 0, ln1000)
	v(afOutCutLow, "aero.ln_cutoff_reynolds_factor_low_speed", "-", "natural logarithm of the Mach factor C of the roughness cut-off Reynolds number C·(l/k)^1.053 at low speed", 3.64, 0, ln1000)
	v(afOutQ, "aero.dynamic_pressure_cruise", "Pa", "dynamic pressure at cruise", 25000, 0, 1e7)
	v(afOutK, "aero.k_cruise", "-", "drag-due-to-lift factor at cruise", 0.19, 0, 10)
	v(afOutKTail, "aero.k_htail_cruise", "-", "drag-due-to-lift factor of the horizontal tail at cruise (0 = no tail)", 0.2, 0, 10)
	v(afOutKTO, "aero.k_takeoff", "-", "drag-due-to-lift factor, take-off flaps", 0.15, 0, 10)
	v(afOutKLdg, "aero.k_landing", "-", "drag-due-to-lift factor, landing flaps", 0.16, 0, 10)
	v(afOutCLACruise, "aero.cla_cruise", "1/rad", "wing-body lift-curve slope at cruise Mach", 3, 0, 20)
	v(afOutCLALow, "aero.cla_low_speed", "1/rad", "wing-body lift-curve slope at low speed", 2.7, 0, 20)
	v(afOutCLMaxClean, "aero.cl_max_clean", "-", "maximum lift coefficient, clean", 0.7, 0, 5)
	v(afOutCLMaxTO, "aero.cl_max_takeoff", "-", "maximum lift coefficient, take-off flaps", 1.0, 0, 6)
	v(afOutCLMaxLdg, "aero.cl_max_landing", "-", "maximum lift coefficient, landing flaps", 1.3, 0, 6)
	v(afOutCLTO, "aero.cl_takeoff", "-", "lift coefficient at V2 (CLmax,TO/1.13²)", 0.8, 0, 6)
	v(afOutMDDZeroLift, "aero.mach_drag_divergence_zero_lift", "-", "drag-divergence Mach number (Korn) at zero lift, κA/cos Λ − (t/c)/cos²Λ", 1.5, -100, 100)
	v(afOutKornLift, "aero.korn_lift_divisor", "-", "10 cos³Λ of the Korn relation Mdd = Mdd(CL = 0) − CL/(10 cos³Λ)", 1.5, 0.1, 10)
	return o
}

// Outputs implements mdo.Discipline.
func (a *AirframeAerodynamics) Outputs() []mdo.Var { return airframeAeroOutputs() }

// Compute implements mdo.Discipline. It allocates nothing.
func (a *AirframeAerodynamics) Compute(in, out []float64) error {
	m := a.model
	w, err := NewWing(in[geoInArea], in[geoInAspect], in[geoInTaper], in[geoInSweep], in[geoInTC])
	if err != nil {
		return err
	}
	f, err := FuselageFromDimensions(in[afInFusLength], in[afInFusDiameter], in[afInNoseLength], in[afInTailLength])
	if err != nil {
		return err
	}
	c, err := AssembleConfiguration(w, in[geoInPosition], f, in[afInHTailArea], in[afInVTailArea], 0, 0, 0, m.Geometry)
	if err != nil {
		return err
	}
	mach := in[afInMach]
	if !(mach > 0 && mach <= MaxMach) {
		return inputErr("cruise.mach", mach, "", "(0, 2.5]")
	}
	atm, err := StandardAtmosphere(in[afInAltitude])
	if err != nil {
		return renameInput(err, "cruise.altitude")
	}
	atmTO, err := OffsetAtmosphere(in[afInElevation], in[afInDT])
	if err != nil {
		return renameInput(err, "airport.elevation")
	}
	o := &m.Options
	tab := m.components(&c)
	e := OswaldEfficiency(w.AspectRatio, w.SweepLE)

	lnK := math.Log(o.Roughness)
	re := atm.Reynolds(mach)
	cut := cutoffFactor(mach)
	fc := a.friction(re, mach, cut, lnK)
	out[afOutCompCruise], out[afOutCutCruise] = fc.comp, fc.lnCut
	out[afOutAreaCruise] = m.dragArea(&tab, &fc) * in[afInFactorDragArea]
	out[afOutReCruise] = fc.lnRePerM
	out[afOutQ] = atm.DynamicPressure(mach)
	out[afOutK] = dragDueToLift(w, mach, e) * in[afInFactorInduced]
	kt := 0.0
	if c.HTail.Area > 0 {
		kt = dragDueToLift(c.HTail, mach, a.tail.oswald(&c.HTail)) // DragDueToLift(c.HTail, mach, 0)
	}
	out[afOutKTail] = kt
	bf := wingBodyLiftFactor(&c)
	// the wing's half-chord sweep, for both subsonic lift slopes
	tanHalf := math.Tan(w.SweepAt(0.5) * math.Pi / 180)
	cla, err := liftSlopeTan(w, mach, o.Kappa, tanHalf)
	if err != nil {
		return err
	}
	out[afOutCLACruise] = cla * bf * in[afInFactorLiftSlope]

	reLow := atmTO.Reynolds(o.TakeoffMach)
	cutLow := cutoffFactor(o.TakeoffMach)
	fcLow := a.friction(reLow, o.TakeoffMach, cutLow, lnK)
	out[afOutCompLow], out[afOutCutLow] = fcLow.comp, fcLow.lnCut
	out[afOutAreaLow] = m.dragArea(&tab, &fcLow) * in[afInFactorDragArea]
	out[afOutReLow] = fcLow.lnRePerM
	if !(o.TakeoffMach >= 0 && o.TakeoffMach <= MaxMach) {
		return inputErr("mach", o.TakeoffMach, "", "[0, 2.5]")
	}
	claLow, err := liftSlopeTan(w, o.TakeoffMach, o.Kappa, tanHalf)
	if err != nil {
		return err
	}
	out[afOutCLALow] = claLow * bf * in[afInFactorLiftSlope]
	// CLMaxClean and CLMaxFlapped, sharing cos Λc/4
	clean := CLMaxClean(w)
	cq := math.Cos(w.Sweep * math.Pi / 180)
	clTO := clean + in[afInFlapTakeoff]*cq
	out[afOutCLMaxClean] = clean
	out[afOutCLMaxTO] = clTO
	out[afOutCLMaxLdg] = clean + in[afInFlapLanding]*cq
	out[afOutCLTO] = clTO / (1.13 * 1.13)
	if err := checkCalibratedLift(out[afOutCLACruise], out[afOutCLALow], in[afInFactorLiftSlope], in[geoInArea], clean, cq, in[afInFlapTakeoff], in[afInFlapLanding]); err != nil {
		return err
	}
	if err := checkFuselageCarried(w.Area, w.MAC, out[afOutCLALow], out[afOutCLACruise], in[afInFactorLiftSlope], in[afInFusLength], in[afInFusDiameter]); err != nil {
		return err
	}
	// the Korn relation's parts fixed by the wing (kornFromCos in two
	// pieces, the same operations): aerodynamics adds the cruise lift
	kf := m.Geometry.KornFactor
	out[afOutMDDZeroLift] = kf/cq - w.ThicknessRatio/(cq*cq)
	out[afOutKornLift] = 10 * cq * cq * cq
	out[afOutKTO] = dragDueToLift(w, o.TakeoffMach, e-o.OswaldReductionTakeoff) * in[afInFactorInduced]
	out[afOutKLdg] = dragDueToLift(w, o.TakeoffMach, e-o.OswaldReductionLanding) * in[afInFactorInduced]
	return nil
}

// Ranges the disciplines downstream of airframe_aero accept for its lift
// outputs (neutral_point's lift slopes, propulsion's and mission's
// maximum lift coefficients).
const (
	minLiftSlope    = 0.1
	maxLiftSlope    = 10.0
	minCLMax        = 0.3
	maxCLMaxTakeoff = 4.0
	maxCLMaxLanding = 4.5
)

// checkCalibratedLift refuses lift outputs the disciplines that read
// them would refuse, naming the input that drives them: the lift-slope
// calibration factor (slopes cla, claLow [1/rad] with the factor
// applied) and the high-lift increments (clean maximum lift clean, cos Λc/4
// cq). Without it the design would be reported as not closing through
// aero.cla_cruise or aero.cl_max_takeoff. A slope below the neutral
// point's minimum names the factor when it is below 1, else the wing
// area (area [m2]): a wing whose span barely exceeds the fuselage
// diameter exposes almost none of itself.
func checkCalibratedLift(cla, claLow, factor, area, clean, cq, dTO, dLdg float64) error {
	if hi := math.Max(cla, claLow); hi > maxLiftSlope {
		return inputErr("aero.factor_lift_slope", factor, "", fmt.Sprintf("at most %.3g with this wing: the calibrated lift-curve slope %.3g /rad exceeds the %g /rad the neutral point accepts", factor*maxLiftSlope/hi, hi, maxLiftSlope))
	}
	if lo := math.Min(cla, claLow); lo < minLiftSlope {
		if factor < 1 {
			return inputErr("aero.factor_lift_slope", factor, "", fmt.Sprintf("at least %.3g with this wing: the calibrated lift-curve slope %.3g /rad is below the %g /rad the neutral point accepts", factor*minLiftSlope/lo, lo, minLiftSlope))
		}
		return inputErr("wing.area", area, "m2", fmt.Sprintf("a larger wing: its exposed part gives a wing-body lift-curve slope of %.3g /rad, below the %g /rad the neutral point accepts", lo, minLiftSlope))
	}
	for _, f := range []struct {
		name      string
		inc, high float64
	}{{"flap.cl_increment_takeoff", dTO, maxCLMaxTakeoff}, {"flap.cl_increment_landing", dLdg, maxCLMaxLanding}} {
		cl := clean + f.inc*cq
		switch {
		case cl > f.high:
			return inputErr(f.name, f.inc, "", fmt.Sprintf("at most %.3g with this wing: the maximum lift coefficient %.3g exceeds the %g the field-length and climb analyses accept", (f.high-clean)/cq, cl, f.high))
		case cl < minCLMax:
			return inputErr(f.name, f.inc, "", fmt.Sprintf("at least %.3g with this wing: the maximum lift coefficient %.3g (clean %.3g at its sweep) is below the %g the field-length and climb analyses accept", (minCLMax-clean)/cq, cl, clean, minCLMax))
		}
	}
	return nil
}
