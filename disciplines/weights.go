package disciplines

// Weights: take-off mass as the sum of component masses from the
// statistical equations of D. P. Raymer, "Aircraft Design: A Conceptual
// Approach" (cargo/transport group, English units; coefficients from
// memory) and E. Torenbeek, "Synthesis of Subsonic Airplane Design" (flight
// controls, from memory); a structural penalty for forward sweep; the wing
// box sized for the root bending moment, which gives the torsional (GJ)
// and bending (EI) stiffness used by the divergence analysis; component
// centres of gravity and the aircraft CG at take-off, start and end of
// cruise and zero fuel.
//
// Calibration: the assembled equations are checked against Roskam's
// empty-mass regressions and the common-practice empty mass per seat of
// each aircraft class (mass_statistics.go); every statistical component
// is multiplied by weights.calibration, which the demonstration
// scenarios set to their class's EmptyMassCalibration (1.3 for jet
// transports, whose passenger cabins the cargo/transport equations
// under-weigh; 1 for business jets; 0.85 for supersonic airliners).
//
// Every statistical equation is evaluated in its own units (lb, ft, ft²,
// gal, kt, in) with the conversions written out (constants unit* of
// propulsion.go) and converted back to kg.
//
// Closure: every W0-dependent term is a power law of the design gross
// mass W0 (the landing mass and the fuel are fixed fractions of W0 given
// by the mission), so W0 = Σ Ci·W0^ei + (fixed masses) + φ·W0 is solved by
// Newton's method inside Compute; the residual is convex in W0, negative
// at zero, with one positive root, so the iteration (doubling W0 while the
// slope is not positive) converges, monotonically once it is to the right
// of the root.
//
// Forward-sweep penalty (modelling assumption, no source): a forward-swept
// wing (Λ < 0) is stiffened against bending–torsion divergence by
// thickening its box cover skins by the factor kfs = 1 + K·sin|Λ|; the
// extra cover material, (kfs − 1)·fcover·Mwing with fcover = 0.45 the
// cover share of the wing structural mass (common practice, no source),
// is the penalty mass, and the thicker covers raise GJ and EI. The
// divergence constraint itself is left to the stability discipline.

import (
	"math"

	"couplet/mdo"
)

// EmptyFractionRow is one row of the refined empty-mass-fraction
// regression We/W0 = a + b·W0^c·A^d·(T/W)^e·(W/S)^f·Mmax^g (W0 in lb, W/S in
// lbf/ft²; Raymer, conceptual-design textbooks).
type EmptyFractionRow struct{ A, B, C, D, E, F, G float64 }

// EmptyFractionJetFighter returns the jet-fighter row of the refined
// empty-mass-fraction regression (a = −0.02, b = 2.16, c = −0.10,
// d = 0.20, e = 0.04, f = −0.10, g = 0.08).
func EmptyFractionJetFighter() EmptyFractionRow {
	return EmptyFractionRow{-0.02, 2.16, -0.10, 0.20, 0.04, -0.10, 0.08}
}

// EmptyFractionJetTransport returns the jet-transport row of the refined
// empty-mass-fraction regression (from memory: a = 0.32, b = 0.66,
// c = −0.13, d = 0.30, e = 0.06, f = −0.05, g = 0.05).
func EmptyFractionJetTransport() EmptyFractionRow {
	return EmptyFractionRow{0.32, 0.66, -0.13, 0.30, 0.06, -0.05, 0.05}
}

// EmptyMassFraction returns We/W0 of the refined regression for take-off
// mass w0 [kg], aspect ratio, thrust-to-weight ratio tw, wing loading ws
// [Pa] and maximum Mach number.
func (r EmptyFractionRow) EmptyMassFraction(w0, aspect, tw, ws, mach float64) float64 {
	return r.A + r.B*math.Pow(w0/unitLb, r.C)*math.Pow(aspect, r.D)*math.Pow(tw, r.E)*
		math.Pow(ws/unitPsf, r.F)*math.Pow(mach, r.G)
}

// BoxMaterial is the structural material of the wing box.
type BoxMaterial struct {
	Name            string
	Young, Shear    float64 // E, G [Pa]
	Density         float64 // [kg/m3]
	AllowableStress float64 // design (ultimate-load) direct stress allowable [Pa]
	AllowableShear  float64 // design shear-stress allowable [Pa]
	MinGauge        float64 // minimum skin and web thickness [m]
}

// Aluminium7075 is 7075-T6 plate (E 71.0 GPa, G 26.9 GPa, 2810 kg/m³,
// MIL-HDBK-5 values from memory) with design allowables of 300 MPa direct
// and 180 MPa shear at ultimate load (buckling and fatigue knock-down,
// common practice, no source) and a 1.5 mm minimum gauge.
func Aluminium7075() BoxMaterial {
	return BoxMaterial{Name: "aluminium 7075-T6", Young: 71.0e9, Shear: 26.9e9, Density: 2810, AllowableStress: 300e6, AllowableShear: 180e6, MinGauge: 1.5e-3}
}

// Titanium6Al4V is annealed Ti-6Al-4V (E 110 GPa, G 42 GPa, 4430 kg/m³,
// from memory) with allowables of 550 MPa direct and 330 MPa shear (common
// practice, no source) and a 1.0 mm minimum gauge.
func Titanium6Al4V() BoxMaterial {
	return BoxMaterial{Name: "titanium Ti-6Al-4V", Young: 110e9, Shear: 42e9, Density: 4430, AllowableStress: 550e6, AllowableShear: 330e6, MinGauge: 1.0e-3}
}

// WingBox is the sized root section of the wing box.
type WingBox struct {
	Width, Depth       float64 // box width (normal to the spars) and depth [m]
	CoverThickness     float64 // upper and lower cover skin [m]
	WebThickness       float64 // front and rear spar webs [m]
	RootMoment         float64 // ultimate root bending moment about the swept axis [N m]
	RootShear          float64 // ultimate root shear [N]
	TorsionalStiffness float64 // GJ [N m2], Bredt–Batho closed cell
	BendingStiffness   float64 // EI [N m2]
}

// Wing-box layout constants (common practice, no source): spars at 15 %
// and 60 % chord, box depth 0.9 of the section thickness, the spanwise
// centre of lift of half the wing at 4/(3π) of the exposed semispan
// (elliptic loading).
const (
	boxWidthFraction = 0.45
	boxDepthFraction = 0.9
)

// SizeWingBox sizes the root box of a wing carrying the ultimate lift
// nz·lift [N] (lift = weight less wing mass, times g): the covers carry
// the root bending moment as a couple (t = M/(σ·h·w), at least the minimum
// gauge, times the forward-sweep factor kfs), the two spar webs the root
// shear (t = V/(2·h·τ)). span [m], sweep [rad], root chord and thickness
// ratio, fuselage diameter [m] (the box root is at the side of the body).
// GJ = G·4A²/∮ds/t (Bredt–Batho) and EI = E·(w·tc·h²/2 + tw·h³/6).
func SizeWingBox(mat BoxMaterial, lift, span, sweep, rootChord, tc, fusDia, kfs float64) WingBox {
	cosL := math.Cos(sweep)
	exposed := math.Max(0.5*span-0.5*fusDia, 0.1*span)
	arm := 4 * exposed / (3 * math.Pi) / cosL
	m := 0.5 * lift * arm
	v := 0.5 * lift
	w := boxWidthFraction * rootChord * cosL
	h := boxDepthFraction * tc * rootChord
	ts := math.Max(m/(mat.AllowableStress*h*w), mat.MinGauge) * kfs
	tw := math.Max(v/(2*h*mat.AllowableShear), mat.MinGauge)
	area := w * h
	gj := mat.Shear * 4 * area * area / (2*w/ts + 2*h/tw)
	ei := mat.Young * (w*ts*h*h/2 + tw*h*h*h/6)
	return WingBox{Width: w, Depth: h, CoverThickness: ts, WebThickness: tw, RootMoment: m, RootShear: v, TorsionalStiffness: gj, BendingStiffness: ei}
}

// Indices of the weights discipline's variables.
const (
	wtInArea = iota
	wtInSweep
	wtInMAC
	wtInMACX
	wtInFusLength
	wtInFusDiameter
	wtInHtArm
	wtInVtArm
	wtInEngineCount
	wtInEngineMass
	wtInNacelleDia
	wtInNacelleLength
	wtInPayload
	wtInFuelFraction
	wtInReserveFraction
	wtInClimbFraction
	wtInCruiseEndFraction
	wtInTripFraction
	wtInCLmaxLanding
	wtInEnginePosition
	wtInFuelVolume
	wtInGuess
	wtInFusTankShare
	wtInCoefWing
	wtInCoefHtail
	wtInCoefVtail
	wtInCoefFuselage
	wtInSystemsFixed
	wtInFurnishings
	wtInCrew
	wtInCGCrew
	wtInCalibration
	wtNumIn
)

const (
	wtOutTakeoff = iota
	wtOutEmpty
	wtOutZeroFuel
	wtOutLanding
	wtOutCruiseStart
	wtOutCruiseEnd
	wtOutFuelCapacity
	wtOutCGTakeoff
	wtOutCGZeroFuel
	wtOutCGCruiseStart
	wtOutCGCruiseEnd
	wtOutCGEmpty
	wtOutWing
	wtOutFuselage
	wtOutHtail
	wtOutVtail
	wtOutGear
	wtOutPropulsion
	wtOutSystems
	wtOutPenalty
	wtOutCGWing
	wtOutCGFuselage
	wtOutCGHtail
	wtOutCGVtail
	wtOutCGGear
	wtOutCGPropulsion
	wtOutCGSystems
	wtOutCGCabin
	wtOutCGFuel
	wtNumOut
)

// Weights is the "weights" discipline. Its constants are the
// assumptions of the statistical equations; Compute does not change them.
//
// The W0-dependent equations of the airframe (wing, tails, fuselage) and
// the fixed masses of systems, furnishings and crew depend on the design
// parameters only; the "airframe_masses" discipline (AirframeMasses, made
// from the same Weights by NewAirframeMasses) evaluates them once before
// the coupled loop, and weights closes the mass balance with the engines,
// the landing gear, the fuel system and the fuel fractions that change
// inside it.
//
// Added variables: inputs mission.fuel_fraction, mission.reserve_fraction,
// mission.climb_fuel_fraction, mission.cruise_end_fuel_fraction,
// mission.trip_fuel_fraction (fuel as fractions of the take-off mass, from
// mission), cg.engine_position (engine group CG over fuselage length),
// weights.fuselage_tank_share (fuselage fuel volume over π/4·D²·L; the
// fuel capacity is wing.fuel_volume plus that share, at FuelDensity), the
// outputs of airframe_masses; outputs mass.cruise_start, mass.cruise_end,
// mass.fuel_capacity, cg.empty, the component masses mass.wing,
// mass.fuselage, mass.htail, mass.vtail, mass.landing_gear,
// mass.propulsion_group, mass.systems, mass.forward_sweep_penalty, their
// centres of gravity cg.wing, cg.fuselage, cg.htail, cg.vtail,
// cg.landing_gear, cg.propulsion_group, cg.systems, cg.cabin (furnishings
// and payload) and cg.fuel. The wing box is sized from the converged
// masses by the wing_box discipline (WingBoxSizing). mass.empty is the
// operating empty mass (including crew). mass.takeoff is also an input (a
// self-coupling): its current value only starts the Newton iteration of
// the mass closure, so that inside a converging coupled group the closure
// takes one or two steps; the result does not depend on it.
type Weights struct {
	Material BoxMaterial
	// UltimateLoadFactor Nz = 1.5 × limit load factor 2.5 (14 CFR 25.337
	// for heavier transports, from memory).
	UltimateLoadFactor float64
	// ForwardSweepStiffening is K of the forward-sweep cover factor
	// kfs = 1 + K·sin|Λ| (Λ < 0); 0.5 (no source).
	ForwardSweepStiffening float64
	// CoverShare is the cover-skin share of the wing structural mass, 0.45.
	CoverShare float64
	// FlightCrew (2) and CrewMass per crew member with bags [kg], 95.
	FlightCrew, CrewMass float64
	// PassengersPerAttendant, 50 (one cabin attendant per 50 seats or
	// part, 14 CFR 121.391 for more than 19 seats, from memory); none
	// below 20 passengers.
	PassengersPerAttendant float64
	// SeatMass is seats, galley and lavatory per passenger [kg], 25
	// (common practice, no source).
	SeatMass float64
	// AvionicsMass is the uninstalled avionics [kg], 360.
	AvionicsMass float64
	// APUMass is the uninstalled auxiliary power unit [kg], 0 for none.
	APUMass float64
	// ElectricalRating is the electrical system rating [kVA], 50.
	ElectricalRating float64
	// HydraulicFunctions is the number of hydraulic functions, 7.
	HydraulicFunctions float64
	// FuelDensity [kg/m3], 800 (kerosene).
	FuelDensity float64
}

// NewWeights returns the weights discipline with aluminium 7075-T6 and the
// documented defaults.
func NewWeights() *Weights {
	return &Weights{
		Material: Aluminium7075(), UltimateLoadFactor: 3.75, ForwardSweepStiffening: 0.5, CoverShare: 0.45,
		FlightCrew: 2, CrewMass: 95, PassengersPerAttendant: 50, SeatMass: 25, AvionicsMass: 360,
		ElectricalRating: 50, HydraulicFunctions: 7, FuelDensity: 800,
	}
}

// Name implements mdo.Discipline.
func (w *Weights) Name() string { return "weights" }

func sweepVar() mdo.Var {
	return mdo.Var{Name: "wing.sweep", Unit: "deg", Description: "quarter-chord sweep (negative = forward)", Default: 45, Min: -70, Max: 70, Scale: 10}
}

func fracVar(name, desc string, def float64) mdo.Var {
	return mdo.Var{Name: name, Unit: "-", Description: desc, Default: def, Min: 0, Max: 0.95}
}

// Inputs implements mdo.Discipline.
func (w *Weights) Inputs() []mdo.Var {
	in := make([]mdo.Var, wtNumIn)
	in[wtInArea] = wingAreaVar()
	in[wtInSweep] = sweepVar()
	in[wtInMAC] = mdo.Var{Name: "wing.mac", Unit: "m", Description: "mean aerodynamic chord", Default: 6.2, Min: 0.1, Max: 50}
	in[wtInMACX] = mdo.Var{Name: "wing.mac_x", Unit: "m", Description: "leading edge of the MAC from the nose", Default: 18, Min: 0, Max: 150}
	in[wtInFusLength] = fuselageLengthVar()
	in[wtInFusDiameter] = fuselageDiameterVar()
	in[wtInHtArm] = htailArmVar()
	in[wtInVtArm] = vtailArmVar()
	in[wtInEngineCount] = engineCountVar()
	in[wtInEngineMass] = engineMassVar()
	in[wtInNacelleDia] = nacelleDiameterVar()
	in[wtInNacelleLength] = nacelleLengthVar()
	in[wtInPayload] = mdo.Var{Name: "mission.payload", Unit: "kg", Description: "payload (passengers and baggage, cargo)", Default: 1300, Min: 0, Max: 150000, Scale: 1000}
	in[wtInFuelFraction] = fracVar("mission.fuel_fraction", "fuel loaded over take-off mass", 0.45)
	in[wtInReserveFraction] = fracVar("mission.reserve_fraction", "reserve fuel over take-off mass", 0.04)
	in[wtInClimbFraction] = fracVar("mission.climb_fuel_fraction", "fuel burnt to the start of cruise over take-off mass", 0.05)
	in[wtInCruiseEndFraction] = fracVar("mission.cruise_end_fuel_fraction", "fuel on board at the end of cruise over take-off mass", 0.05)
	in[wtInTripFraction] = fracVar("mission.trip_fuel_fraction", "trip fuel (brake release to landing) over take-off mass", 0.41)
	in[wtInCLmaxLanding] = clMaxLandingVar()
	in[wtInEnginePosition] = mdo.Var{Name: "cg.engine_position", Unit: "-", Description: "engine group CG over fuselage length", Default: 0.75, Min: 0, Max: 1.2}
	in[wtInFuelVolume] = mdo.Var{Name: "wing.fuel_volume", Unit: "m3", Description: "wing-box fuel volume", Default: 15, Min: 0, Max: 2000}
	in[wtInGuess] = massTakeoffVar()
	in[wtInFusTankShare] = mdo.Var{Name: "weights.fuselage_tank_share", Unit: "-", Description: "fuel volume in the fuselage over the fuselage volume π/4·D²·L", Default: 0.05, Min: 0, Max: 0.5}
	copy(in[wtInCoefWing:], airframeMassOutputs())
	in[wtInCalibration] = calibrationVar()
	return in
}

// calibrationVar is the specification of weights.calibration.
func calibrationVar() mdo.Var {
	return mdo.Var{Name: "weights.calibration", Unit: "-",
		Description: "calibration factor on the statistical empty-mass components (airframe, gear, nacelles, systems, furnishings; not the engines, crew or payload), fitted per aircraft class (EmptyMassCalibration)",
		Default:     1, Min: 0.5, Max: 2.5}
}

// Specifications of the geometry variables that weights, airframe_masses,
// the neutral point and stability share.
func fuselageLengthVar() mdo.Var {
	return mdo.Var{Name: "fuselage.length", Unit: "m", Description: "fuselage length", Default: 33, Min: 2, Max: 150}
}

func fuselageDiameterVar() mdo.Var {
	return mdo.Var{Name: "fuselage.diameter", Unit: "m", Description: "fuselage maximum diameter", Default: 2.3, Min: 0.3, Max: 12}
}

func htailArmVar() mdo.Var {
	return mdo.Var{Name: "htail.arm", Unit: "m", Description: "horizontal tail arm, wing to tail quarter-chord of the MACs", Default: 13, Min: 0.5, Max: 100}
}

func vtailArmVar() mdo.Var {
	return mdo.Var{Name: "vtail.arm", Unit: "m", Description: "vertical tail arm, wing to fin quarter-chord of the MACs", Default: 12, Min: 0.5, Max: 100}
}

func wingThicknessVar() mdo.Var {
	return mdo.Var{Name: "wing.thickness_ratio", Unit: "-", Description: "wing thickness-to-chord ratio", Default: 0.045, Min: 0.01, Max: 0.25}
}

func wingSpanVar() mdo.Var {
	return mdo.Var{Name: "wing.span", Unit: "m", Description: "wing span", Default: 19.6, Min: 0.5, Max: 120}
}

func wingRootChordVar() mdo.Var {
	return mdo.Var{Name: "wing.root_chord", Unit: "m", Description: "wing root chord (centreline, streamwise)", Default: 9, Min: 0.1, Max: 60}
}

func wingAspectVar() mdo.Var {
	return mdo.Var{Name: "wing.aspect_ratio", Unit: "-", Description: "wing aspect ratio b²/S", Default: 3.5, Min: 0.5, Max: 20}
}

func wingTaperVar() mdo.Var {
	return mdo.Var{Name: "wing.taper", Unit: "-", Description: "wing taper ratio tip/root chord", Default: 0.25, Min: 0, Max: 1}
}

func htailAreaVar() mdo.Var {
	return mdo.Var{Name: "htail.area", Unit: "m2", Description: "horizontal tail area", Default: 20, Min: 0, Max: 1000}
}

// Outputs implements mdo.Discipline.
func (w *Weights) Outputs() []mdo.Var {
	m := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "kg", Description: desc, Default: def, Min: 0, Max: 2e6, Scale: math.Max(def, 100)}
	}
	x := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "m", Description: desc, Default: def, Min: -50, Max: 200, Scale: 10}
	}
	out := make([]mdo.Var, wtNumOut)
	out[wtOutTakeoff] = massTakeoffVar()
	out[wtOutEmpty] = m("mass.empty", "operating empty mass (including crew)", 20000)
	out[wtOutZeroFuel] = m("mass.zero_fuel", "zero-fuel mass", 21300)
	out[wtOutLanding] = m("mass.landing", "landing mass at destination (zero fuel plus reserves)", 23000)
	out[wtOutCruiseStart] = m("mass.cruise_start", "mass at the start of cruise", 43000)
	out[wtOutCruiseEnd] = m("mass.cruise_end", "mass at the end of cruise", 24000)
	out[wtOutFuelCapacity] = m("mass.fuel_capacity", "usable fuel capacity of the wing and fuselage tanks", 25000)
	out[wtOutCGTakeoff] = x("cg.takeoff", "aircraft CG at take-off, from the nose", 20)
	out[wtOutCGZeroFuel] = x("cg.zero_fuel", "aircraft CG at zero fuel, from the nose", 19)
	out[wtOutCGCruiseStart] = x("cg.cruise_start", "aircraft CG at the start of cruise, from the nose", 20)
	out[wtOutCGCruiseEnd] = x("cg.cruise_end", "aircraft CG at the end of cruise, from the nose", 19.5)
	out[wtOutCGEmpty] = x("cg.empty", "CG of the operating empty aircraft, from the nose", 19)
	out[wtOutWing] = m("mass.wing", "wing structure (Raymer transport equation)", 3500)
	out[wtOutFuselage] = m("mass.fuselage", "fuselage structure (Raymer transport equation)", 3500)
	out[wtOutHtail] = m("mass.htail", "horizontal tail (Raymer transport equation)", 400)
	out[wtOutVtail] = m("mass.vtail", "vertical tail (Raymer transport equation)", 300)
	out[wtOutGear] = m("mass.landing_gear", "main and nose landing gear (Raymer transport equations)", 1500)
	out[wtOutPropulsion] = m("mass.propulsion_group", "engines, nacelle group, engine controls, starters and fuel system", 5000)
	out[wtOutSystems] = m("mass.systems", "flight controls, APU, instruments, hydraulics, electrical, avionics, air conditioning, anti-ice, handling", 3000)
	out[wtOutPenalty] = m("mass.forward_sweep_penalty", "wing cover stiffening of a forward-swept wing", 0)
	out[wtOutCGWing] = x("cg.wing", "CG of the wing (40 % MAC)", 19)
	out[wtOutCGFuselage] = x("cg.fuselage", "CG of the fuselage structure (45 % length)", 15)
	out[wtOutCGHtail] = x("cg.htail", "CG of the horizontal tail (its quarter-chord MAC point)", 30)
	out[wtOutCGVtail] = x("cg.vtail", "CG of the vertical tail (its quarter-chord MAC point)", 29)
	out[wtOutCGGear] = x("cg.landing_gear", "CG of the main and nose gear (main at 55 % MAC, nose at 12 % length)", 18)
	out[wtOutCGPropulsion] = x("cg.propulsion_group", "CG of the propulsion group (cg.engine_position)", 25)
	out[wtOutCGSystems] = x("cg.systems", "CG of the systems (45 % length)", 15)
	out[wtOutCGCabin] = x("cg.cabin", "CG of furnishings and payload (45 % length)", 15)
	out[wtOutCGFuel] = x("cg.fuel", "CG of the fuel (45 % MAC)", 19.5)
	return out
}

// weightTerm is one W0-dependent component: mass = coef·W0^exp [kg].
type weightTerm struct{ coef, exp float64 }

// value returns coef·W0^exp for ln W0 = lw.
func (t weightTerm) value(lw float64) float64 { return t.coef * math.Exp(t.exp*lw) }

// Indices of the W0-dependent terms.
const (
	termWing = iota
	termHtail
	termVtail
	termFuselage
	termMainGear
	termNoseGear
	termFuelSystem
	termFlightControls
	numTerms
)

// Constants of the statistical equations (logarithms of fixed parameters).
const (
	ln0p7x12PerFt   = 3.3163311610189137
	ln1000          = 6.907755278982137
	ln2p331         = 0.8462973600536201
	lnFtUnit        = -1.1880994551696458
	lnPi            = 1.1447298858494002
	lnPi4x0p8PerFt3 = 3.099590338924237
	cos35           = 0.8191520442889918
	cos40           = 0.766044443118978
	ln0p09          = -2.4079456086518722
	ln0p15          = -1.8971199848858813
	ln0p3           = -1.2039728043259361
	ln1p25          = 0.22314355131420976
	ln1p3           = 0.26236426446749106
	ln1p5           = 0.4054651081081644
	ln2             = 0.6931471805599453
	ln4             = 1.3862943611198906
	ln4p5           = 1.5040773967762742
	ln6             = 1.791759469228055
)

// Compute implements mdo.Discipline.
func (w *Weights) Compute(in, out []float64) error {
	if len(in) != wtNumIn || len(out) != wtNumOut {
		return inputErr("weights.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	s := in[wtInArea]
	sweep := in[wtInSweep] * math.Pi / 180
	lf := in[wtInFusLength]
	df := in[wtInFusDiameter]
	nen := math.Round(in[wtInEngineCount])
	phi := in[wtInFuelFraction]
	trip := in[wtInTripFraction]
	nz := w.UltimateLoadFactor
	if phi >= 0.95 || trip > phi {
		return inputErr("mission.fuel_fraction", phi, "", "below 0.95 and at least the trip fuel fraction")
	}

	// English-unit quantities
	lfFt := lf / unitFt
	weLb := in[wtInEngineMass] / unitLb
	lnFt := in[wtInNacelleLength] / unitFt
	dnFt := in[wtInNacelleDia] / unitFt
	// gear strut length [in]: 0.7 fuselage diameters (no source)
	const lb = -0.7905563476977234 // ln(unitLb): W0[lb] = W0[kg]/unitLb
	lnNz, lnNen := math.Log(nz), math.Log(nen)
	lnDf := math.Log(df)
	lnGear := lnDf + ln0p7x12PerFt

	kfs := w.forwardSweepFactor(sweep)
	penalty := (kfs - 1) * w.CoverShare

	// W0-dependent terms as coef·W0[kg]^exp [kg]; Raymer's equations in lb
	// with W[lb] = W[kg]/unitLb, result ×unitLb. The airframe's terms come
	// from airframe_masses.
	var terms [numTerms]weightTerm
	terms[termWing] = weightTerm{coef: in[wtInCoefWing], exp: expWing}
	terms[termHtail] = weightTerm{coef: in[wtInCoefHtail], exp: expHtail}
	terms[termVtail] = weightTerm{coef: in[wtInCoefVtail], exp: expVtail}
	terms[termFuselage] = weightTerm{coef: in[wtInCoefFuselage], exp: expFuselage}
	// Landing mass Wl = (1 − trip)·W0; stall speed in landing configuration
	// at sea level VS = sqrt(2 Wl g/(ρ0 S CLmax)) ∝ Wl^0.5.
	wl := 1 - trip
	lnWl := math.Log(wl)
	vsCoef := math.Sqrt(2*G0/(SeaLevelDensity*s*in[wtInCLmaxLanding])) / unitKt // VS[kt] = vsCoef·sqrt(Wl[kg])
	// Main gear: 0.0106 Kmp Wl^0.888 Nl^0.25 Lm^0.4 Nmw^0.321 Nmss^-0.5 Vstall^0.1,
	// Kmp = 1, Nl = 1.5×3, Lm [in], Nmw = 4, Nmss = 2.
	terms[termMainGear] = weightTerm{
		coef: unitLb * 0.0106 * math.Exp(0.888*(lnWl-lb)+0.25*ln4p5+0.4*lnGear+
			0.321*ln4-0.5*ln2+0.1*(math.Log(vsCoef)+0.5*lnWl)),
		exp: 0.888 + 0.05,
	}
	// Nose gear: 0.032 Knp Wl^0.646 Nl^0.2 Ln^0.5 Nnw^0.45, Knp = 1, Ln = Lm, Nnw = 2.
	terms[termNoseGear] = weightTerm{
		coef: unitLb * 0.032 * math.Exp(0.646*(lnWl-lb)+0.2*ln4p5+0.5*lnGear+0.45*ln2),
		exp:  0.646,
	}
	// Fuel system: 2.405 Vt^0.606 (1+Vi/Vt)^-1 (1+Vp/Vt) Nt^0.5, Vt [gal] = φ·W0/ρf,
	// all tanks integral (Vi = Vt), Vp = 0, Nt = 6.
	if phi > 0 {
		terms[termFuelSystem] = weightTerm{
			coef: unitLb * 2.405 * math.Exp(0.606*math.Log(phi/w.FuelDensity/unitGal)+0.5*ln6) / 2,
			exp:  0.606,
		}
	}
	// Flight controls (Torenbeek, from memory): 0.768·ksc·W0^(2/3) [kg],
	// ksc = 0.64 (powered controls, trailing-edge high lift).
	terms[termFlightControls] = weightTerm{coef: 0.768 * 0.64, exp: 2.0 / 3}
	// Calibration: every statistical term scales by weights.calibration
	// (the engines, the crew and the payload do not).
	kc := in[wtInCalibration]
	for i := range terms {
		terms[i].coef *= kc
	}

	// Fixed masses [kg].
	// Nacelle group: 0.6724 Kng NLt^0.10 Nw^0.294 Nz^0.119 Wec^0.611 Nen^0.984 Sn^0.224,
	// Kng = 1, Wec = 2.331 We^0.901 (no reverser), Sn = π Dn Ln.
	var nacelle, starter float64
	if weLb > 0 && lnFt > 0 && dnFt > 0 {
		lnWe, lnNL, lnND := math.Log(weLb), math.Log(lnFt), math.Log(dnFt)
		lnWec := ln2p331 + 0.901*lnWe // ln Wec
		nacelle = unitLb * 0.6724 * math.Exp(0.10*lnNL+0.294*lnND+0.119*lnNz+
			0.611*lnWec+0.984*lnNen+0.224*(lnPi+lnND+lnNL))
		// Starter (pneumatic): 49.19 (Nen·We/1000)^0.541
		starter = unitLb * 49.19 * math.Exp(0.541*(lnNen+lnWe-ln1000))
	}
	// Engine controls: 5 Nen + 0.80 Lec, Lec = Nen × engine-to-cockpit length.
	lec := nen * in[wtInEnginePosition] * lfFt
	engControls := unitLb * (5*nen + 0.80*lec)
	propGroupFixed := nen*in[wtInEngineMass] + kc*nacelle + kc*starter + kc*engControls

	systemsFixed, furn, crew := kc*in[wtInSystemsFixed], kc*in[wtInFurnishings], in[wtInCrew]
	linear := kc * (0.002 + 3e-4) // anti-ice 0.002 Wdg + handling gear 3.0e-4 Wdg (Raymer)

	fixed := propGroupFixed + systemsFixed + furn + crew + in[wtInPayload]
	// Newton on f(W) = (1 − φ − linear)·W − Σ ci·W^ei − fixed (convex, one root).
	a := 1 - phi - linear
	if !(a > 0.02) {
		return inputErr("mission.fuel_fraction", phi, "", "low enough to leave room for the empty mass")
	}
	// start from the previous take-off mass (the self-coupling input) when it
	// lies to the right of the root region, else from a safe upper value;
	// the converged mass does not depend on the start
	w0 := 2 * fixed / a
	if g := in[wtInGuess]; g > fixed/a && g < 50*fixed/a {
		w0 = g
	}
	converged := false
	var mt [numTerms]float64 // term masses at the last evaluated W0
	for it := 0; it < 50; it++ {
		lw := math.Log(w0)
		sum, dsum := 0.0, 0.0
		for i, t := range terms {
			if t.coef == 0 {
				mt[i] = 0
				continue
			}
			v := t.value(lw)
			mt[i] = v
			sum += v
			dsum += t.exp * v
		}
		f := a*w0 - sum - fixed
		df := a - dsum/w0
		if !(df > 0) {
			// left of the minimum of the convex residual: the root lies to
			// the right
			w0 *= 2
			continue
		}
		step := f / df
		if step > 0.9*w0 {
			step = 0.9 * w0
		}
		w0 -= step
		if math.Abs(step) <= 1e-13*w0 {
			// move the term masses to the final W0 to first order (exact
			// to round-off for a step this small)
			r := -step / (w0 + step)
			for i, t := range terms {
				mt[i] *= 1 + t.exp*r
			}
			converged = true
			break
		}
	}
	if !converged || !(w0 > 0) || w0 > massTakeoffVar().Max {
		return inputErr("mass.takeoff", w0, "kg", "a take-off mass closure below 1e6 kg (mission fuel fraction too large?)")
	}
	wingTotal := mt[termWing]
	penMass := wingTotal * penalty / (1 + penalty)
	gear := mt[termMainGear] + mt[termNoseGear]
	propGroup := propGroupFixed + mt[termFuelSystem]
	systems := systemsFixed + mt[termFlightControls] + linear*w0
	oem := wingTotal + mt[termHtail] + mt[termVtail] + mt[termFuselage] + gear + propGroup + systems + furn + crew
	zf := oem + in[wtInPayload]

	// fuel capacity: the wing-box volume of geometry and a fuselage share
	fusVol := in[wtInFusTankShare] * math.Pi / 4 * df * df * lf
	capacity := (in[wtInFuelVolume] + fusVol) * w.FuelDensity

	// centres of gravity (x from the nose; common practice, no source)
	macx, mac := in[wtInMACX], in[wtInMAC]
	xWing := macx + 0.40*mac
	xAC := macx + 0.25*mac
	xHt := xAC + in[wtInHtArm]
	xVt := xAC + in[wtInVtArm]
	xMain := macx + 0.55*mac
	xNose := 0.12 * lf
	xProp := in[wtInEnginePosition] * lf
	xCabin := 0.45 * lf
	xCrew := in[wtInCGCrew]
	xFuel := macx + 0.45*mac
	mGearMain, mGearNose := mt[termMainGear], mt[termNoseGear]
	moment := wingTotal*xWing + mt[termHtail]*xHt + mt[termVtail]*xVt + mt[termFuselage]*0.45*lf +
		mGearMain*xMain + mGearNose*xNose + propGroup*xProp + systems*0.45*lf + furn*xCabin + crew*xCrew
	xOEM := moment / oem
	momZF := moment + in[wtInPayload]*xCabin
	xZF := momZF / zf
	fuel := phi * w0
	fuelStart := fuel - in[wtInClimbFraction]*w0
	fuelEnd := in[wtInCruiseEndFraction] * w0
	cg := func(f float64) float64 { return (momZF + f*xFuel) / (zf + f) }

	out[wtOutTakeoff] = w0
	out[wtOutEmpty] = oem
	out[wtOutZeroFuel] = zf
	out[wtOutLanding] = zf + in[wtInReserveFraction]*w0
	out[wtOutCruiseStart] = zf + fuelStart
	out[wtOutCruiseEnd] = zf + fuelEnd
	out[wtOutFuelCapacity] = capacity
	out[wtOutCGTakeoff] = cg(fuel)
	out[wtOutCGZeroFuel] = xZF
	out[wtOutCGCruiseStart] = cg(fuelStart)
	out[wtOutCGCruiseEnd] = cg(fuelEnd)
	out[wtOutCGEmpty] = xOEM
	out[wtOutWing] = wingTotal
	out[wtOutFuselage] = mt[termFuselage]
	out[wtOutHtail] = mt[termHtail]
	out[wtOutVtail] = mt[termVtail]
	out[wtOutGear] = gear
	out[wtOutPropulsion] = propGroup
	out[wtOutSystems] = systems
	out[wtOutPenalty] = penMass
	out[wtOutCGWing] = xWing
	out[wtOutCGFuselage] = 0.45 * lf
	out[wtOutCGHtail] = xHt
	out[wtOutCGVtail] = xVt
	out[wtOutCGGear] = (mGearMain*xMain + mGearNose*xNose) / gear
	out[wtOutCGPropulsion] = xProp
	out[wtOutCGSystems] = 0.45 * lf
	out[wtOutCGCabin] = xCabin
	out[wtOutCGFuel] = xFuel
	return nil
}
