package disciplines

// Mission performance: a fuel-fraction mission profile with Breguet
// cruise and endurance segments, the fuel for a range and the range for a
// fuel load, field lengths, the one-engine-inoperative and landing climb
// gradients of 14 CFR Part 25, and the reference speeds.
//
// Profile (mass fractions Wi/Wi−1, conceptual-design textbooks, from
// memory): warm-up and take-off 0.970; climb and acceleration to the
// cruise Mach number M: 1.0065 − 0.0325·M for M < 1 and
// 0.991 − 0.007·M − 0.01·M² for M > 1 (both 0.974 at M = 1); cruise by
// Breguet, Wf/Wi = exp(−R·g·TSFC/(V·L/D)) with no distance credit for
// climb and descent (conservative); descent and landing 0.995.
// Reserves (documented choice, common practice, no source): 5 % of the
// trip fuel as contingency plus a 30-minute hold at the cruise L/D and
// TSFC (the ICAO final-reserve duration, from memory), held at the
// landing mass. Because every segment is a mass fraction, the fuel is a
// fixed fraction of the take-off mass for given aerodynamics and engine;
// the weights discipline closes its mass equation with that fraction.

import (
	"math"

	"couplet/mdo"
)

// Historical mission-segment mass fractions (conceptual-design textbooks,
// from memory).
const (
	// WarmupTakeoffFraction is W1/W0 for engine start, warm-up, taxi and
	// take-off.
	WarmupTakeoffFraction = 0.970
	// LandingFraction is the mass fraction of descent and landing.
	LandingFraction = 0.995
)

// ClimbFraction returns the historical mass fraction of the climb and
// acceleration to Mach number mach: 1.0065 − 0.0325M below Mach 1 and
// 0.991 − 0.007M − 0.01M² above (from memory, conceptual-design textbooks).
func ClimbFraction(mach float64) float64 {
	if mach < 1 {
		return 1.0065 - 0.0325*mach
	}
	return 0.991 - 0.007*mach - 0.01*mach*mach
}

// BreguetRange returns the jet Breguet range R = (V/(g·TSFC))·(L/D)·ln(Wi/Wf)
// [m] for speed v [m/s], tsfc [kg/(N s)], lift-to-drag ratio ld and mass
// ratio wiwf = Wi/Wf (> 1).
func BreguetRange(v, tsfc, ld, wiwf float64) (float64, error) {
	switch {
	case !(v > 0):
		return 0, inputErr("cruise.speed", v, "m/s", "> 0")
	case !(tsfc > 0):
		return 0, inputErr("engine.tsfc_cruise", tsfc, "kg/(N s)", "> 0")
	case !(ld > 0):
		return 0, inputErr("aero.ld_cruise", ld, "", "> 0")
	case !(wiwf >= 1):
		return 0, inputErr("mission.mass_ratio", wiwf, "", ">= 1")
	}
	return v / (G0 * tsfc) * ld * math.Log(wiwf), nil
}

// BreguetFraction returns the cruise mass fraction Wf/Wi that flies the
// range r [m] at speed v [m/s], tsfc [kg/(N s)] and lift-to-drag ratio ld.
func BreguetFraction(r, v, tsfc, ld float64) float64 {
	return math.Exp(-r * G0 * tsfc / (v * ld))
}

// EnduranceFraction returns the mass fraction Wf/Wi of a hold of duration
// t [s] at tsfc [kg/(N s)] and lift-to-drag ratio ld (Breguet endurance).
func EnduranceFraction(t, tsfc, ld float64) float64 {
	return math.Exp(-t * G0 * tsfc / ld)
}

// MissionProfile describes the reserves and the fixed segments of the
// mission.
type MissionProfile struct {
	ContingencyFraction float64 // contingency fuel over trip fuel; 0.05
	HoldTime            float64 // final-reserve hold [s]; 1800
}

// DefaultMissionProfile returns 5 % contingency and a 30-minute hold.
func DefaultMissionProfile() MissionProfile {
	return MissionProfile{ContingencyFraction: 0.05, HoldTime: 1800}
}

// MissionFuel is the fuel of a mission as fractions of the take-off mass.
type MissionFuel struct {
	Total       float64 // all fuel loaded (trip + reserves)
	Trip        float64 // burnt from brake release to landing
	Reserve     float64 // contingency plus hold, still on board at landing
	ToCruise    float64 // burnt in warm-up, take-off, climb and acceleration
	AtCruiseEnd float64 // on board at the end of cruise
}

// FuelFractions returns the mission fuel, as fractions of the take-off
// mass, that flies the range r [m] at cruise speed v [m/s], tsfc and ld.
func (p MissionProfile) FuelFractions(r, mach, v, tsfc, ld float64) MissionFuel {
	return p.fuelFractions(r, mach, v, tsfc, ld, EnduranceFraction(p.HoldTime, tsfc, ld))
}

// fuelFractions is FuelFractions with the hold's mass fraction
// EnduranceFraction(p.HoldTime, tsfc, ld) given.
func (p MissionProfile) fuelFractions(r, mach, v, tsfc, ld, holdFraction float64) MissionFuel {
	f1 := WarmupTakeoffFraction * ClimbFraction(mach)
	f2 := f1 * BreguetFraction(r, v, tsfc, ld)
	f3 := f2 * LandingFraction
	trip := 1 - f3
	hold := f3 * (1 - holdFraction)
	res := p.ContingencyFraction*trip + hold
	total := trip + res
	return MissionFuel{Total: total, Trip: trip, Reserve: res, ToCruise: 1 - f1, AtCruiseEnd: total - (1 - f2)}
}

// RangeForFuel returns the Breguet cruise range [m] with fuel mass fuel
// [kg] loaded on an aircraft of zero-fuel mass mzf [kg], keeping the
// reserves of the profile; 0 when the fuel does not cover take-off, climb,
// descent and reserves. It inverts FuelFractions: with W0 = mzf + fuel,
// contingency c and hold fraction h, fuel = (1 + c)·trip + h·(W0 − trip)
// gives the trip fuel, and the cruise mass ratio follows from the fixed
// segment fractions.
func (p MissionProfile) RangeForFuel(fuel, mzf, mach, v, tsfc, ld float64) float64 {
	return p.rangeForFuel(fuel, mzf, mach, v, tsfc, ld, EnduranceFraction(p.HoldTime, tsfc, ld))
}

// rangeForFuel is RangeForFuel with the hold's mass fraction given (see
// fuelFractions).
func (p MissionProfile) rangeForFuel(fuel, mzf, mach, v, tsfc, ld, holdFraction float64) float64 {
	w0 := mzf + fuel
	h := 1 - holdFraction
	// fuel = (1+c)·trip + h·(w0 − trip)  →  trip = (fuel − h·w0)/(1 + c − h)
	trip := (fuel - h*w0) / (1 + p.ContingencyFraction - h)
	wEnd := w0 - trip // landing mass
	fixed := WarmupTakeoffFraction * ClimbFraction(mach) * LandingFraction
	ratio := w0 * fixed / wEnd // Wi/Wf of the cruise
	if !(ratio > 1) {
		return 0
	}
	return v / (G0 * tsfc) * ld * math.Log(ratio)
}

// StallSpeed returns VS = sqrt(2·m·g/(ρ·S·CLmax)) [m/s].
func StallSpeed(mass, rho, area, clmax float64) float64 {
	return math.Sqrt(2 * mass * G0 / (rho * area * clmax))
}

// Minimum speed ratios of 14 CFR Part 25 (from memory): V2 ≥ 1.13 VSR
// (25.107), VREF ≥ 1.23 VSR0 (25.125).
const (
	V2MinRatio   = 1.13
	VRefMinRatio = 1.23
)

// TakeoffFieldLength returns the FAR 25 take-off field length [m] by the
// take-off parameter of J. Roskam, "Airplane Design" Part I (from
// memory): TOFL[ft] = 37.5·TOP, TOP = (W/S)[lbf/ft²]/(σ·CLmax,TO·T/W).
// mass [kg], area [m²], sigma = ρ/ρ0 at the airport, thrust the total
// static take-off thrust [N].
func TakeoffFieldLength(mass, area, sigma, clmaxTO, thrust float64) float64 {
	w := mass * G0
	top := w / area / unitPsf / (sigma * clmaxTO * thrust / w)
	return RoskamTakeoffParameter * top * unitFt
}

// LandingSettings are the assumptions of the landing-distance estimate
// (common practice, no source).
type LandingSettings struct {
	ScreenHeight   float64 // 50 ft = 15.24 m (14 CFR 25.125)
	GlideSlope     float64 // approach path angle [rad]; 3°
	TouchdownToRef float64 // touchdown speed over VREF; 0.95
	FreeRollTime   float64 // delay before full braking [s]; 2
	Deceleration   float64 // mean braking deceleration over g; 0.35
}

// DefaultLandingSettings returns the documented defaults.
func DefaultLandingSettings() LandingSettings {
	return LandingSettings{ScreenHeight: 15.24, GlideSlope: 3 * math.Pi / 180, TouchdownToRef: 0.95, FreeRollTime: 2, Deceleration: 0.35}
}

// LandingDistance returns the distance from the screen height to a stop
// [m] at reference speed vref [m/s]: an air segment along the glide slope,
// a free roll at touchdown speed and braking at constant deceleration.
func (l LandingSettings) LandingDistance(vref float64) float64 {
	vtd := l.TouchdownToRef * vref
	return l.ScreenHeight/math.Tan(l.GlideSlope) + vtd*l.FreeRollTime + vtd*vtd/(2*l.Deceleration*G0)
}

// LandingFieldLength returns the landing field length of 14 CFR 121.195(b):
// the landing distance divided by 0.60.
func LandingFieldLength(distance float64) float64 { return distance / 0.60 }

// ClimbGradient returns the steady climb gradient (T − D)/W at speed v
// [m/s] and density rho with total thrust [N], mass [kg], wing area [m²]
// and a parabolic polar CD = cd0 + k·CL².
func ClimbGradient(thrust, mass, rho, v, area, cd0, k float64) float64 {
	w := mass * G0
	q := 0.5 * rho * v * v
	cl := w / (q * area)
	d := q * area * (cd0 + k*cl*cl)
	return (thrust - d) / w
}

// Minimum climb gradients of 14 CFR Part 25 (from memory).
const (
	LandingClimbMinGradient = 0.032 // 25.119, all engines
)

// ApproachClimbMinGradient returns the 25.121(d) minimum approach climb
// gradient with one engine inoperative: 2.1/2.4/2.7 % for 2/3/4 engines.
func ApproachClimbMinGradient(n float64) (float64, error) {
	switch math.Round(n) {
	case 2:
		return 0.021, nil
	case 3:
		return 0.024, nil
	case 4:
		return 0.027, nil
	}
	return 0, inputErr("engine.count", n, "", "2, 3 or 4 (14 CFR 25.121)")
}

// Indices of the mission discipline's variables.
const (
	misInMassTakeoff = iota
	misInMassLanding
	misInMassZeroFuel
	misInFuelCapacity
	misInLDCruise
	misInTSFCCruise
	misInMach
	misInCruiseSpeed
	misInRange
	misInEngineCount
	misInThrustTakeoff
	misInThrustClimb
	misInArea
	misInCLmaxTakeoff
	misInCLmaxLanding
	misInCD0Takeoff
	misInKTakeoff
	misInCD0Landing
	misInKLanding
	misInAirportDensity
	misInAirportSound
	misNumIn
)

const (
	misOutFuel = iota
	misOutFuelFraction
	misOutReserveFraction
	misOutClimbFraction
	misOutCruiseEndFraction
	misOutTripFraction
	misOutReserve
	misOutRangeFull
	misOutTOFL
	misOutLFL
	misOutGrad2
	misOutGradApproach
	misOutGradLanding
	misOutVStall
	misOutVStallTO
	misOutV2
	misOutVRef
	misOutVApproach
	misNumOut
)

// Mission is the "mission" discipline: the fuel for mission.range
// (mass.fuel and its fractions of the take-off mass, which weights uses to
// close the mass equation), the range with full tanks, and the field and
// climb performance.
//
// Performance conventions (conceptual estimates of the regulatory
// quantities, never a showing of compliance):
//
//   - take-off field length: Roskam's FAR 25 take-off parameter
//     (TakeoffFieldLength) with the all-engines static thrust at the airport;
//   - landing field length: 14 CFR 121.195(b), landing distance / 0.60,
//     the distance from 50 ft at VREF by LandingSettings;
//   - second segment, 25.121(b): one engine inoperative, take-off flaps,
//     gear up, at V2 = 1.13·VSR1 (25.107 minimum) and take-off mass;
//   - approach climb, 25.121(d): one engine inoperative, approach (taken
//     as take-off) flaps, gear up, at 1.4·VSR1 and landing mass;
//   - landing climb, 25.119: all engines, landing configuration, at VREF =
//     1.23·VSR0 (25.125 minimum) and landing mass;
//   - thrust at speed V: linear in Mach between the static thrust and the
//     thrust at the second-segment Mach ClimbMach (engine.thrust_takeoff,
//     engine.thrust_climb); windmilling drag of the failed engine ignored;
//   - v_stall is VSR0 (landing configuration, landing mass, airport),
//     v_stall_takeoff VSR1 (take-off flaps, take-off mass), v_approach =
//     VREF + 5 kt (common practice, no source).
//
// The range with full fuel flies mass.fuel_capacity with the zero-fuel
// mass of the design mission (take-off mass not limited).
//
// The air at cruise and at the airport comes from "flight_conditions"
// (cruise.true_airspeed, airport.density, airport.speed_of_sound), which
// runs once before the coupled loop.
//
// Added variables: inputs mass.fuel_capacity, aero.cd0_landing,
// aero.k_landing, engine.thrust_takeoff, engine.thrust_climb; outputs
// mission.fuel_fraction, mission.reserve_fraction,
// mission.climb_fuel_fraction, mission.cruise_end_fuel_fraction,
// mission.trip_fuel_fraction, mission.fuel_reserve, perf.v_stall_takeoff.
type Mission struct {
	Profile MissionProfile
	Landing LandingSettings
	// ClimbMach is the Mach number of engine.thrust_climb; 0.25, the
	// ClimbMach of NewEngineCycle (keep the two equal).
	ClimbMach float64
}

// NewMission returns the mission discipline with the default profile and
// landing settings.
func NewMission() *Mission {
	return &Mission{Profile: DefaultMissionProfile(), Landing: DefaultLandingSettings(), ClimbMach: 0.25}
}

// Name implements mdo.Discipline.
func (m *Mission) Name() string { return "mission" }

// Inputs implements mdo.Discipline.
func (m *Mission) Inputs() []mdo.Var {
	wo := NewWeights().Outputs()
	po := NewPropulsion().Outputs()
	pol := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "-", Description: desc, Default: def, Min: 0, Max: 10, Scale: 0.1}
	}
	in := make([]mdo.Var, misNumIn)
	in[misInMassTakeoff] = massTakeoffVar()
	in[misInMassLanding] = wo[wtOutLanding]
	in[misInMassZeroFuel] = wo[wtOutZeroFuel]
	in[misInFuelCapacity] = wo[wtOutFuelCapacity]
	in[misInLDCruise] = mdo.Var{Name: "aero.ld_cruise", Unit: "-", Description: "lift-to-drag ratio in cruise", Default: 7.5, Min: 0.5, Max: 40}
	in[misInTSFCCruise] = po[propOutTSFCCruise]
	in[misInMach] = cruiseMachVar()
	in[misInCruiseSpeed] = cruiseSpeedVar()
	in[misInRange] = mdo.Var{Name: "mission.range", Unit: "m", Description: "design range", Default: 7.0e6, Min: 1e5, Max: 2e7, Scale: 1e6}
	in[misInEngineCount] = engineCountVar()
	in[misInThrustTakeoff] = engineThrustTakeoffVar()
	in[misInThrustClimb] = engineThrustClimbVar()
	in[misInArea] = wingAreaVar()
	in[misInCLmaxTakeoff] = clMaxTakeoffVar()
	in[misInCLmaxLanding] = clMaxLandingVar()
	in[misInCD0Takeoff] = pol("aero.cd0_takeoff", "zero-lift drag coefficient, take-off flaps, gear up", 0.03)
	in[misInKTakeoff] = pol("aero.k_takeoff", "drag-due-to-lift factor, take-off flaps", 0.15)
	in[misInCD0Landing] = pol("aero.cd0_landing", "zero-lift drag coefficient, landing flaps, gear down", 0.06)
	in[misInKLanding] = pol("aero.k_landing", "drag-due-to-lift factor, landing flaps", 0.16)
	in[misInAirportDensity] = airportDensityVar()
	in[misInAirportSound] = airportSoundVar()
	return in
}

// Outputs implements mdo.Discipline.
func (m *Mission) Outputs() []mdo.Var {
	length := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "m", Description: desc, Default: def, Min: 0, Max: 1e5, Scale: 1000}
	}
	grad := func(name, desc string) mdo.Var {
		return mdo.Var{Name: name, Unit: "-", Description: desc, Default: 0.05, Min: -10, Max: 10, Scale: 0.01}
	}
	speed := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "m/s", Description: desc, Default: def, Min: 0, Max: 1000, Scale: 10}
	}
	out := make([]mdo.Var, misNumOut)
	out[misOutFuel] = mdo.Var{Name: "mass.fuel", Unit: "kg", Description: "fuel loaded for mission.range (trip and reserves)", Default: 20000, Min: 0, Max: 1e6, Scale: 1e4}
	wi := NewWeights().Inputs()
	out[misOutFuelFraction] = wi[wtInFuelFraction]
	out[misOutReserveFraction] = wi[wtInReserveFraction]
	out[misOutClimbFraction] = wi[wtInClimbFraction]
	out[misOutCruiseEndFraction] = wi[wtInCruiseEndFraction]
	out[misOutTripFraction] = wi[wtInTripFraction]
	out[misOutReserve] = mdo.Var{Name: "mission.fuel_reserve", Unit: "kg", Description: "reserve fuel (contingency and hold)", Default: 2000, Min: 0, Max: 1e6, Scale: 1000}
	out[misOutRangeFull] = mdo.Var{Name: "perf.range_full_fuel", Unit: "m", Description: "range with full tanks at the design zero-fuel mass", Default: 7e6, Min: 0, Max: 1e8, Scale: 1e6}
	out[misOutTOFL] = length("perf.takeoff_field_length", "FAR 25 take-off field length (Roskam take-off parameter)", 1900)
	out[misOutLFL] = length("perf.landing_field_length", "landing field length, 14 CFR 121.195(b)", 1800)
	out[misOutGrad2] = grad("perf.climb_gradient_second_segment", "second-segment climb gradient, one engine inoperative (25.121(b))")
	out[misOutGradApproach] = grad("perf.climb_gradient_approach", "approach climb gradient, one engine inoperative (25.121(d))")
	out[misOutGradLanding] = grad("perf.climb_gradient_landing", "landing climb gradient, all engines (25.119)")
	out[misOutVStall] = speed("perf.v_stall", "reference stall speed VSR0, landing configuration and mass", 60)
	out[misOutVStallTO] = speed("perf.v_stall_takeoff", "reference stall speed VSR1, take-off configuration and mass", 75)
	out[misOutV2] = speed("perf.v2", "take-off safety speed V2 = 1.13 VSR1", 85)
	out[misOutVRef] = speed("perf.v_ref", "landing reference speed VREF = 1.23 VSR0", 75)
	out[misOutVApproach] = speed("perf.v_approach", "approach speed VREF + 5 kt", 78)
	return out
}

// Compute implements mdo.Discipline.
func (m *Mission) Compute(in, out []float64) error {
	if len(in) != misNumIn || len(out) != misNumOut {
		return inputErr("mission.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	n := math.Round(in[misInEngineCount])
	if n < 2 {
		return inputErr("engine.count", in[misInEngineCount], "", "2, 3 or 4")
	}
	mach := in[misInMach]
	m0 := in[misInMassTakeoff]
	ml := in[misInMassLanding]
	tsfc, ld := in[misInTSFCCruise], in[misInLDCruise]
	v := in[misInCruiseSpeed]
	// the hold's fraction is common to the design mission and the range
	// with full tanks
	hold := EnduranceFraction(m.Profile.HoldTime, tsfc, ld)
	fr := m.Profile.fuelFractions(in[misInRange], mach, v, tsfc, ld, hold)
	out[misOutFuel] = fr.Total * m0
	out[misOutFuelFraction] = fr.Total
	out[misOutReserveFraction] = fr.Reserve
	out[misOutClimbFraction] = fr.ToCruise
	out[misOutCruiseEndFraction] = fr.AtCruiseEnd
	out[misOutTripFraction] = fr.Trip
	out[misOutReserve] = fr.Reserve * m0
	out[misOutRangeFull] = m.Profile.rangeForFuel(in[misInFuelCapacity], in[misInMassZeroFuel], mach, v, tsfc, ld, hold)

	rho, sound := in[misInAirportDensity], in[misInAirportSound]
	area := in[misInArea]
	t0, t1 := in[misInThrustTakeoff], in[misInThrustClimb]
	thrust := func(speed float64) float64 { // per engine
		return t0 + (t1-t0)*speed/(sound*m.ClimbMach)
	}
	vs1 := StallSpeed(m0, rho, area, in[misInCLmaxTakeoff])
	vs0 := StallSpeed(ml, rho, area, in[misInCLmaxLanding])
	vs1l := StallSpeed(ml, rho, area, in[misInCLmaxTakeoff])
	v2 := V2MinRatio * vs1
	vref := VRefMinRatio * vs0
	vapp := 1.4 * vs1l
	cd0TO, kTO := in[misInCD0Takeoff], in[misInKTakeoff]
	out[misOutTOFL] = TakeoffFieldLength(m0, area, rho/SeaLevelDensity, in[misInCLmaxTakeoff], n*t0)
	out[misOutLFL] = LandingFieldLength(m.Landing.LandingDistance(vref))
	out[misOutGrad2] = ClimbGradient((n-1)*thrust(v2), m0, rho, v2, area, cd0TO, kTO)
	out[misOutGradApproach] = ClimbGradient((n-1)*thrust(vapp), ml, rho, vapp, area, cd0TO, kTO)
	out[misOutGradLanding] = ClimbGradient(n*thrust(vref), ml, rho, vref, area, in[misInCD0Landing], in[misInKLanding])
	out[misOutVStall] = vs0
	out[misOutVStallTO] = vs1
	out[misOutV2] = v2
	out[misOutVRef] = vref
	out[misOutVApproach] = vref + 5*unitKt
	return nil
}
