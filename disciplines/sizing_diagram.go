package disciplines

// Sizing diagram of a converged aircraft analysis: the least
// sea-level-static thrust-to-weight ratio each requirement asks for as a
// function of the take-off wing loading, and the wing loadings the landing
// field length allows, by the same methods the propulsion and mission
// disciplines use, so that the analysed design sits on the boundary of
// the requirement that sized it:
//
//   - take-off field length: the FAR 25 take-off parameter of J. Roskam,
//     "Airplane Design" Part I (from memory), TOFL[ft] = 37.5·TOP,
//     TOP = (W/S)[lbf/ft²]/(σ·CLmax,TO·T/W), with the all-engines static
//     thrust at the airport (TakeoffFieldLength);
//   - second-segment climb, 14 CFR 25.121(b): one engine inoperative,
//     take-off flaps, gear up, at V2 = 1.13·VSR1 (25.107) at the take-off
//     mass, thrust linear in Mach between the static thrust and that at
//     engine.climb_mach (ClimbGradient, as the mission discipline);
//   - approach climb, 14 CFR 25.121(d): one engine inoperative at 1.4·VSR1
//     and the landing mass; landing climb, 14 CFR 25.119: all engines at
//     VREF = 1.23·VSR0 (25.125) and the landing mass, 3.2 %;
//   - cruise: thrust = drag·(1 + margin) at the cruise Mach number and
//     altitude at the mass at the start of cruise, with the drag polar
//     CD = CD0 + K·CL² of the cruise point (CD0 calibrated so that the polar
//     gives aero.drag_cruise at the design wing loading, which folds the
//     trim drag in) and the engine's thrust lapse at cruise
//     (engine.thrust_cruise_available / engine.thrust_sea_level);
//   - top of climb: thrust = drag + W·ROC/V at the cruise point, W the mass
//     after take-off and climb by the historical fractions (the top-of-climb
//     requirement of the propulsion discipline);
//   - landing field length, 14 CFR 121.195(b): the landing distance from
//     50 ft at VREF (LandingSettings) divided by 0.60, solved for the
//     largest wing loading — a vertical limit on the diagram.
//
// T/W is the sea-level-static thrust of all engines over the take-off
// weight; W/S the take-off weight over the wing reference area [N/m2]. The
// mass ratios (landing, start of cruise) and the aerodynamic coefficients
// are those of the analysed design, held fixed as the wing loading varies:
// the diagram is the usual first-order picture around the design, not a
// re-analysis at every wing loading.

import (
	"fmt"
	"math"
)

// SizingBoundary is one thrust requirement of a sizing diagram: the least
// sea-level-static thrust-to-weight ratio that meets it at a take-off wing
// loading [N/m2].
type SizingBoundary struct {
	Name           string
	ThrustToWeight func(wingLoading float64) float64
}

// WingLoadingLimit is a requirement that caps the take-off wing loading
// [N/m2] whatever the thrust (the landing field length).
type WingLoadingLimit struct {
	Name        string
	WingLoading float64
}

// SizingLimits are the requirements drawn on a sizing diagram. A zero
// field takes its default.
type SizingLimits struct {
	// TakeoffFieldLength [m]; default engine.sizing_field_length, else the
	// design's own perf.takeoff_field_length.
	TakeoffFieldLength float64
	// LandingFieldLength [m]; default the design's own
	// perf.landing_field_length.
	LandingFieldLength float64
	// SecondSegmentGradient; default the 25.121(b) minimum for the engine
	// count (SecondSegmentMinGradient).
	SecondSegmentGradient float64
	// Propulsion and Mission give the settings of the disciplines the
	// analysis ran with (top-of-climb rate, cruise thrust margin, landing
	// assumptions); nil takes NewPropulsion and NewMission.
	Propulsion *Propulsion
	Mission    *Mission
}

// SizingDiagram is the sizing diagram of one analysed design (drawn by
// package disciplines/drawings).
type SizingDiagram struct {
	Boundaries []SizingBoundary
	Limits     []WingLoadingLimit
	// WingLoading [N/m2] and ThrustToWeight are the design's:
	// mass.takeoff·g/wing.area and
	// engine.count·engine.thrust_sea_level/(mass.takeoff·g).
	WingLoading, ThrustToWeight float64
}

// sizingLookup reads the variables of an analysis, keeping the first
// missing or unusable one.
type sizingLookup struct {
	get func(string) (float64, bool)
	err error
}

// need returns a variable that must be present, finite and satisfy ok
// (allowed describes ok for the error).
func (l *sizingLookup) need(name, unit, allowed string, ok func(float64) bool) float64 {
	if l.err != nil {
		return math.NaN()
	}
	x, found := l.get(name)
	if !found {
		l.err = fmt.Errorf("disciplines: sizing diagram needs %s, which the analysis does not have", name)
		return math.NaN()
	}
	if math.IsNaN(x) || math.IsInf(x, 0) || !ok(x) {
		l.err = inputErr(name, x, unit, allowed)
		return math.NaN()
	}
	return x
}

// optional returns a variable if present, else def.
func (l *sizingLookup) optional(name string, def float64) float64 {
	if x, ok := l.get(name); ok && !math.IsNaN(x) && !math.IsInf(x, 0) {
		return x
	}
	return def
}

func sizingPositive(x float64) bool    { return x > 0 }
func sizingNonNegative(x float64) bool { return x >= 0 }
func sizingAny(float64) bool           { return true }

// NewSizingDiagram builds the sizing diagram of a converged aircraft
// analysis from its variable values (get returns a variable's value and
// whether the analysis has it; mdo.Values.Lookup or a Solution's Lookup
// adapt to it). The error names a missing or unusable variable.
func NewSizingDiagram(get func(name string) (float64, bool), lim SizingLimits) (SizingDiagram, error) {
	if get == nil {
		return SizingDiagram{}, fmt.Errorf("disciplines: sizing diagram: the variable lookup is nil")
	}
	prop, mis := lim.Propulsion, lim.Mission
	if prop == nil {
		prop = NewPropulsion()
	}
	if mis == nil {
		mis = NewMission()
	}
	l := &sizingLookup{get: get}
	m0 := l.need("mass.takeoff", "kg", "> 0", sizingPositive)
	area := l.need("wing.area", "m2", "> 0", sizingPositive)
	n := math.Round(l.need("engine.count", "", "2, 3 or 4", func(x float64) bool { return math.Round(x) >= 2 && math.Round(x) <= 4 }))
	tsls := l.need("engine.thrust_sea_level", "N", "> 0", sizingPositive)
	tTO := l.need("engine.thrust_takeoff", "N", "> 0", sizingPositive)
	tCl := l.need("engine.thrust_climb", "N", "> 0", sizingPositive)
	tCr := l.need("engine.thrust_cruise_available", "N", "> 0", sizingPositive)
	clTO := l.need("aero.cl_max_takeoff", "", "> 0", sizingPositive)
	clL := l.need("aero.cl_max_landing", "", "> 0", sizingPositive)
	cd0TO := l.need("aero.cd0_takeoff", "", ">= 0", sizingNonNegative)
	kTO := l.need("aero.k_takeoff", "", ">= 0", sizingNonNegative)
	cd0L := l.need("aero.cd0_landing", "", ">= 0", sizingNonNegative)
	kL := l.need("aero.k_landing", "", ">= 0", sizingNonNegative)
	kCr := l.need("aero.k_cruise", "", ">= 0", sizingNonNegative)
	dragCr := l.need("aero.drag_cruise", "N", "> 0", sizingPositive)
	ml := l.need("mass.landing", "kg", "> 0", sizingPositive)
	mcs := l.need("mass.cruise_start", "kg", "> 0", sizingPositive)
	mach := l.need("cruise.mach", "", "> 0", sizingPositive)
	alt := l.need("cruise.altitude", "m", "any", sizingAny)
	elev := l.optional("airport.elevation", 0)
	dT := l.optional("airport.temperature_offset", 0)
	climbMach := l.optional("engine.climb_mach", mis.ClimbMach)
	if l.err != nil {
		return SizingDiagram{}, l.err
	}
	if !(climbMach > 0) {
		return SizingDiagram{}, inputErr("engine.climb_mach", climbMach, "", "> 0")
	}
	apt, err := OffsetAtmosphere(elev, dT)
	if err != nil {
		return SizingDiagram{}, renameInput(err, "airport.elevation")
	}
	cr, err := OffsetAtmosphere(alt, 0)
	if err != nil {
		return SizingDiagram{}, renameInput(err, "cruise.altitude")
	}
	w0 := m0 * G0
	ws0 := w0 / area
	d := SizingDiagram{WingLoading: ws0, ThrustToWeight: n * tsls / w0}

	tofl := lim.TakeoffFieldLength
	if tofl == 0 {
		tofl = l.optional("engine.sizing_field_length", l.optional("perf.takeoff_field_length", 0))
	}
	lfl := lim.LandingFieldLength
	if lfl == 0 {
		lfl = l.optional("perf.landing_field_length", 0)
	}
	grad2 := lim.SecondSegmentGradient
	if grad2 == 0 {
		if grad2, err = SecondSegmentMinGradient(n); err != nil {
			return SizingDiagram{}, err
		}
	}
	gradApp, err := ApproachClimbMinGradient(n)
	if err != nil {
		return SizingDiagram{}, err
	}

	rho, sigma := apt.Density, apt.Density/SeaLevelDensity
	// thrust at the airport over sea-level-static thrust at speed v: the
	// mission discipline's model, linear in Mach from static to climbMach
	lapseLow := func(v float64) float64 {
		return (tTO + (tCl-tTO)*v/(apt.SpeedOfSound*climbMach)) / tsls
	}
	betaL, betaCr := ml/m0, mcs/m0
	nan := math.NaN()

	if tofl > 0 {
		lapseTO := tTO / tsls
		d.Boundaries = append(d.Boundaries, SizingBoundary{
			Name: fmt.Sprintf("take-off field length %.0f m", tofl),
			ThrustToWeight: func(ws float64) float64 {
				// TOFL = 37.5·TOP ft ⇒ (T/W)airport = 37.5·(W/S)psf/(σ·CLmax,TO·TOFLft)
				return RoskamTakeoffParameter * (ws / unitPsf) / (sigma * clTO * tofl / unitFt) / lapseTO
			},
		})
	}
	// a climb requirement (engines operating of n, gradient, speed ratio
	// over the stall speed with clmax, polar, mass ratio to take-off)
	climb := func(name string, operating, gamma, ratio, clmax, cd0, k, beta float64) SizingBoundary {
		cl := clmax / (ratio * ratio) // lift coefficient at ratio·VS
		dw := (cd0 + k*cl*cl) / cl    // D/W, independent of the wing loading
		return SizingBoundary{Name: name, ThrustToWeight: func(ws float64) float64 {
			if !(ws > 0) {
				return nan
			}
			v := ratio * math.Sqrt(2*beta*ws/(rho*clmax))
			return n / operating * beta * (gamma + dw) / lapseLow(v)
		}}
	}
	d.Boundaries = append(d.Boundaries,
		climb(fmt.Sprintf("second segment %.3g %% OEI (25.121(b))", 100*grad2), n-1, grad2, V2MinRatio, clTO, cd0TO, kTO, 1),
		climb(fmt.Sprintf("approach climb %.3g %% OEI (25.121(d))", 100*gradApp), n-1, gradApp, 1.4, clTO, cd0TO, kTO, betaL),
		climb(fmt.Sprintf("landing climb %.3g %% (25.119)", 100*LandingClimbMinGradient), n, LandingClimbMinGradient, VRefMinRatio, clL, cd0L, kL, betaL),
	)

	// cruise polar at the start of cruise, CD0 calibrated to the design's drag
	q := 0.5 * cr.Density * math.Pow(mach*cr.SpeedOfSound, 2)
	vCr := mach * cr.SpeedOfSound
	clDesign := betaCr * ws0 / q
	cd0Cr := dragCr/(q*area) - kCr*clDesign*clDesign
	lapseCr := tCr / tsls
	dragOverW0 := func(ws float64) float64 { // D/W0 at the start of cruise
		return q*cd0Cr/ws + kCr*betaCr*betaCr*ws/q
	}
	betaTOC := WarmupTakeoffFraction * ClimbFraction(mach)
	d.Boundaries = append(d.Boundaries,
		SizingBoundary{
			Name: fmt.Sprintf("cruise Mach %.3g at %.0f m (%.0f %% margin)", mach, alt, 100*prop.CruiseThrustMargin),
			ThrustToWeight: func(ws float64) float64 {
				if !(ws > 0) {
					return nan
				}
				return (1 + prop.CruiseThrustMargin) * dragOverW0(ws) / lapseCr
			},
		},
		SizingBoundary{
			Name: fmt.Sprintf("top of climb %.3g m/s", prop.TopOfClimbRate),
			ThrustToWeight: func(ws float64) float64 {
				if !(ws > 0) {
					return nan
				}
				return (dragOverW0(ws) + betaTOC*prop.TopOfClimbRate/vCr) / lapseCr
			},
		},
	)

	if lfl > 0 {
		wsMax, err := landingWingLoading(mis.Landing, lfl, rho, clL, betaL)
		if err != nil {
			return SizingDiagram{}, err
		}
		d.Limits = append(d.Limits, WingLoadingLimit{Name: fmt.Sprintf("landing field length %.0f m (121.195(b))", lfl), WingLoading: wsMax})
	}
	return d, nil
}

// landingWingLoading returns the largest take-off wing loading [N/m2]
// whose landing field length (14 CFR 121.195(b): landing distance / 0.60)
// is lfl [m]: the landing distance h/tan γ + k·VREF·t + (k·VREF)²/(2·a·g)
// of LandingSettings solved for VREF, VSR0 = VREF/1.23, and
// W_L/S = ½ρ·VSR0²·CLmax,L with W_L = betaL·W0.
func landingWingLoading(s LandingSettings, lfl, rho, clmax, betaL float64) (float64, error) {
	dist := 0.60 * lfl
	air := s.ScreenHeight / math.Tan(s.GlideSlope)
	if !(dist > air) {
		return 0, inputErr("perf.landing_field_length", lfl, "m", fmt.Sprintf("> %.4g m (the air distance from the screen height over 0.60)", air/0.60))
	}
	a := 1 / (2 * s.Deceleration * G0)
	// a·v² + t·v − (dist − air) = 0 for the touchdown speed v
	vtd := (-s.FreeRollTime + math.Sqrt(s.FreeRollTime*s.FreeRollTime+4*a*(dist-air))) / (2 * a)
	vs0 := vtd / s.TouchdownToRef / VRefMinRatio
	return 0.5 * rho * vs0 * vs0 * clmax / betaL, nil
}
