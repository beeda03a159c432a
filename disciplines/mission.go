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

	_ "couplet/mdo"
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
	f1 := WarmupTakeoffFraction * ClimbFraction(mach)
	f2 := f1 * BreguetFraction(r, v, tsfc, ld)
	f3 := f2 * LandingFraction
	trip := 1 - f3
	hold := f3 * (1 - EnduranceFraction(p.HoldTime, tsfc, ld))
	res := p.ContingencyFraction*trip + hold
	total := trip + res
	return MissionFuel{Total: total, Trip: trip, Reserve: res, ToCruise: 1 - f1, AtCruiseEnd: total - (1 - f2)}
}

// RangeForFuel returns the Breguet cruise range [m] with fuel mass fuel
// [kg] loaded on an aircraft of zero-fuel mass mzf [kg], keeping the
// reserves of the profile; 0 when the fuel does not cover take-off, climb,
// descent and reserves. It inverts FuelFractions: with W0 = mzf + fuel and
// h the hold fraction, the trip fuel is (fuel − h·W0·fixed)/(1 + c − h·…).
func (p MissionProfile) RangeForFuel(fuel, mzf, mach, v, tsfc, ld float64) float64 {
	w0 := mzf + fuel
	h := 1 - EnduranceFraction(p.HoldTime, tsfc, ld)
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
