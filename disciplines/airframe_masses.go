package disciplines

import (
	"fmt"
	"math"

	"couplet/mdo"
)

// AirframeMasses is the "airframe_masses" discipline: the parts of the
// weights estimate that depend on the design parameters only, evaluated
// once before the coupled loop. It gives the coefficients C of the
// airframe's W0-dependent statistical equations, mass = C·W0^e with W0
// the take-off mass in kg (wing with the forward-sweep penalty, e = 0.557;
// horizontal tail, 0.639; vertical tail, 0.556; fuselage, 0.5; Raymer's
// transport equations, see weights.go), the fixed masses of the systems
// (instruments, hydraulics, electrical system, installed avionics, air
// conditioning, APU: mass.systems_fixed, without the flight controls and
// the W0-proportional anti-ice and handling gear), of the furnishings
// (mass.furnishings) and of the crew (mass.crew, with its CG cg.crew).
// weights closes the mass balance with them.
//
// It reads the assumptions of the Weights it was made from, so that both
// disciplines use one set of constants.
type AirframeMasses struct {
	w *Weights
}

// NewAirframeMasses returns the airframe_masses discipline of w.
func NewAirframeMasses(w *Weights) *AirframeMasses { return &AirframeMasses{w: w} }

// Name implements mdo.Discipline.
func (a *AirframeMasses) Name() string { return "airframe_masses" }

// Exponents of the airframe's W0-dependent equations.
const (
	expWing     = 0.557
	expHtail    = 0.639
	expVtail    = 0.556
	expFuselage = 0.5
)

// Indices of the airframe_masses discipline's variables.
const (
	amInArea = iota
	amInAspect
	amInTaper
	amInSweep
	amInTC
	amInSpan
	amInFusLength
	amInFusDiameter
	amInFusWetted
	amInHtArea
	amInVtArea
	amInHtArm
	amInVtArm
	amInEngineCount
	amInPassengers
	amNumIn
)

const (
	amOutCoefWing = iota
	amOutCoefHtail
	amOutCoefVtail
	amOutCoefFuselage
	amOutSystemsFixed
	amOutFurnishings
	amOutCrew
	amOutCGCrew
	amNumOut
)

// Inputs implements mdo.Discipline.
func (a *AirframeMasses) Inputs() []mdo.Var {
	in := make([]mdo.Var, amNumIn)
	wt := a.w.Inputs()
	in[amInArea] = wt[wtInArea]
	in[amInAspect] = wingAspectVar()
	in[amInTaper] = wingTaperVar()
	in[amInSweep] = wt[wtInSweep]
	in[amInTC] = wingThicknessVar()
	in[amInSpan] = wingSpanVar()
	in[amInFusLength] = fuselageLengthVar()
	in[amInFusDiameter] = fuselageDiameterVar()
	in[amInFusWetted] = mdo.Var{Name: "fuselage.wetted_area", Unit: "m2", Description: "fuselage wetted area", Default: 190, Min: 1, Max: 5000}
	in[amInHtArea] = htailAreaVar()
	in[amInVtArea] = mdo.Var{Name: "vtail.area", Unit: "m2", Description: "vertical tail area", Default: 14, Min: 0, Max: 1000}
	in[amInHtArm] = htailArmVar()
	in[amInVtArm] = vtailArmVar()
	in[amInEngineCount] = engineCountVar()
	in[amInPassengers] = mdo.Var{Name: "cabin.passengers", Unit: "-", Description: "number of passengers", Default: 12, Min: 1, Max: 800}
	return in
}

// airframeMassOutputs returns the specifications of the airframe_masses
// outputs (weights reads them in this order).
func airframeMassOutputs() []mdo.Var {
	c := func(name, part string, e float64, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: fmt.Sprintf("kg^%.3f", 1-e),
			Description: fmt.Sprintf("coefficient C of the %s mass C·W0^%g (W0 = take-off mass [kg])", part, e),
			Default:     def, Min: 0, Max: 1e6, Scale: math.Max(def, 1e-3)}
	}
	m := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "kg", Description: desc, Default: def, Min: 0, Max: 2e6, Scale: math.Max(def, 100)}
	}
	return []mdo.Var{
		c("weights.wing_coefficient", "wing structure (with the forward-sweep penalty)", expWing, 18),
		c("weights.htail_coefficient", "horizontal-tail", expHtail, 0.7),
		c("weights.vtail_coefficient", "vertical-tail", expVtail, 0.8),
		c("weights.fuselage_coefficient", "fuselage structure", expFuselage, 18),
		m("mass.systems_fixed", "instruments, hydraulics, electrical, avionics, air conditioning and APU (the systems without flight controls, anti-ice and handling gear)", 1300),
		m("mass.furnishings", "furnishings, seats, galley and lavatories", 400),
		m("mass.crew", "flight and cabin crew with bags", 190),
		{Name: "cg.crew", Unit: "m", Description: "CG of the crew (flight deck at 6 % length, cabin crew in the cabin)", Default: 3, Min: -50, Max: 200, Scale: 10},
	}
}

// Outputs implements mdo.Discipline.
func (a *AirframeMasses) Outputs() []mdo.Var { return airframeMassOutputs() }

// forwardSweepFactor returns the cover factor kfs = 1 + K·sin|Λ| of a
// forward-swept wing (sweep [rad] < 0), 1 otherwise.
func (w *Weights) forwardSweepFactor(sweep float64) float64 {
	kfs := 1.0
	if sweep < 0 {
		kfs = 1 + w.ForwardSweepStiffening*math.Sin(-sweep)
	}
	return kfs
}

// Compute implements mdo.Discipline. It allocates nothing.
func (a *AirframeMasses) Compute(in, out []float64) error {
	if len(in) != amNumIn || len(out) != amNumOut {
		return inputErr("airframe_masses.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	w := a.w
	s := in[amInArea]
	ar := in[amInAspect]
	taper := in[amInTaper]
	sweep := in[amInSweep] * math.Pi / 180
	tc := in[amInTC]
	span := in[amInSpan]
	lf := in[amInFusLength]
	df := in[amInFusDiameter]
	nen := math.Round(in[amInEngineCount])
	npax := in[amInPassengers]
	nz := w.UltimateLoadFactor
	cosL := math.Cos(sweep)

	// English-unit quantities
	sFt := s / unitFt2
	lfFt := lf / unitFt
	bFt := span / unitFt
	htFt := in[amInHtArea] / unitFt2
	vtFt := in[amInVtArea] / unitFt2
	lhFt := in[amInHtArm] / unitFt
	lvFt := in[amInVtArm] / unitFt
	sfFt := in[amInFusWetted] / unitFt2
	const lb = -0.7905563476977234 // ln(unitLb): W0[lb] = W0[kg]/unitLb
	lnS, lnNz, lnLh, lnLf, lnSf, lnNen := math.Log(sFt), math.Log(nz), math.Log(math.Max(lhFt, 1e-3)), math.Log(lfFt), math.Log(sfFt), math.Log(nen)
	lnDf := math.Log(df)
	lnLB := math.Log(lfFt + bFt)

	kfs := w.forwardSweepFactor(sweep)
	penalty := (kfs - 1) * w.CoverShare

	var terms [numTerms]weightTerm
	// Wing: 0.0051 (Wdg·Nz)^0.557 Sw^0.649 A^0.5 (t/c)^-0.4 (1+λ)^0.1 (cosΛ)^-1 Scsw^0.1, Scsw = 0.15 Sw
	terms[termWing] = weightTerm{
		coef: (1 + penalty) * unitLb * 0.0051 * math.Exp(0.557*lnNz+0.649*lnS+0.5*math.Log(ar)-
			0.4*math.Log(tc)+0.1*math.Log(1+taper)+0.1*(lnS+ln0p15)-0.557*lb) / cosL,
		exp: expWing,
	}
	// Horizontal tail: 0.0379 Kuht (1+Fw/Bh)^-0.25 Wdg^0.639 Nz^0.10 Sht^0.75 Lt^-1 Ky^0.704
	// (cosΛht)^-1 Aht^0.166 (1+Se/Sht)^0.1; Kuht = 1, Fw/Bh = 0.25, Ky = 0.3 Lt,
	// Λht = 35°, Aht = 4, Se/Sht = 0.3 (assumed tail layout, no source).
	if htFt > 0 {
		terms[termHtail] = weightTerm{
			coef: unitLb * 0.0379 * math.Exp(-0.25*ln1p25+0.10*lnNz+0.75*math.Log(htFt)-lnLh+
				0.704*(lnLh+ln0p3)+0.166*ln4+0.1*ln1p3-0.639*lb) / cos35,
			exp: expHtail,
		}
	}
	// Vertical tail: 0.0026 (1+Ht/Hv)^0.225 Wdg^0.556 Nz^0.536 Lt^-0.5 Svt^0.5 Kz^0.875
	// (cosΛvt)^-1 Avt^0.35 (t/c)^-0.5; Ht/Hv = 0, Kz = Lt, Λvt = 40°, Avt = 1.5, t/c = 0.09.
	if vtFt > 0 {
		terms[termVtail] = weightTerm{
			coef: unitLb * 0.0026 * math.Exp(0.536*lnNz+0.375*math.Log(lvFt)+0.5*math.Log(vtFt)+
				0.35*ln1p5-0.5*ln0p09-0.556*lb) / cos40,
			exp: expVtail,
		}
	}
	// Fuselage: 0.3280 Kdoor Klg (Wdg·Nz)^0.5 L^0.25 Sf^0.302 (1+Kws)^0.04 (L/D)^0.10,
	// Kdoor = 1.06, Klg = 1, Kws = 0.75 (1+2λ)/(1+λ) Bw |tanΛ|/L.
	kws := 0.75 * (1 + 2*taper) / (1 + taper) * bFt * math.Abs(math.Tan(sweep)) / lfFt
	terms[termFuselage] = weightTerm{
		coef: unitLb * 0.3280 * 1.06 * math.Exp(0.5*lnNz+0.25*lnLf+0.302*lnSf+
			0.04*math.Log(1+kws)+0.10*(lnLf+lnFtUnit-lnDf)-0.5*lb),
		exp: expFuselage,
	}
	out[amOutCoefWing] = terms[termWing].coef
	out[amOutCoefHtail] = terms[termHtail].coef
	out[amOutCoefVtail] = terms[termVtail].coef
	out[amOutCoefFuselage] = terms[termFuselage].coef

	nCrew := w.FlightCrew
	if npax >= 20 {
		nCrew += math.Ceil(npax / w.PassengersPerAttendant)
	}
	crew := nCrew * w.CrewMass
	wuavLb := w.AvionicsMass / unitLb
	lnWuav := math.Log(wuavLb)
	// Instruments: 4.509 Kr Ktp Nc^0.541 Nen (Lf + Bw)^0.5, Kr = Ktp = 1, Nc = flight crew.
	instr := unitLb * 4.509 * math.Exp(0.541*math.Log(w.FlightCrew)+0.5*lnLB) * nen
	// Hydraulics: 0.2673 Nf (Lf + Bw)^0.937.
	hydr := unitLb * 0.2673 * w.HydraulicFunctions * math.Exp(0.937*lnLB)
	// Electrical: 7.291 Rkva^0.782 La^0.346 Ngen^0.10, La = Lf, Ngen = Nen.
	elec := unitLb * 7.291 * math.Exp(0.782*math.Log(w.ElectricalRating)+0.346*lnLf+0.10*lnNen)
	// Avionics (installed): 1.73 Wuav^0.983.
	avion := unitLb * 1.73 * math.Exp(0.983*lnWuav)
	// Air conditioning: 62.36 Np^0.25 (Vpr/1000)^0.604 Wuav^0.10, Vpr = π/4 D² (0.8 Lf) [ft³].
	lnVpr := lnPi4x0p8PerFt3 + 2*lnDf + lnLf + lnFtUnit // ln Vpr[ft³]
	aircond := unitLb * 62.36 * math.Exp(0.25*math.Log(npax+nCrew)+0.604*(lnVpr-ln1000)+0.10*lnWuav)
	apu := 2.2 * w.APUMass
	out[amOutSystemsFixed] = instr + hydr + elec + avion + aircond + apu
	// Furnishings: 0.0577 Nc^0.1 Wc^0.393 Sf^0.75 (Wc = baggage, 20 kg per passenger)
	// plus seats, galley and lavatories per passenger.
	wcLb := 20 * npax / unitLb
	out[amOutFurnishings] = unitLb*0.0577*math.Exp(0.1*math.Log(nCrew)+0.393*math.Log(wcLb)+0.75*lnSf) + w.SeatMass*npax
	out[amOutCrew] = crew
	xCabin := 0.45 * lf
	out[amOutCGCrew] = (w.FlightCrew*0.06*lf + (nCrew-w.FlightCrew)*xCabin) / nCrew
	return nil
}
