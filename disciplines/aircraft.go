package disciplines

import (
	"fmt"

	"couplet/mdo"
)

// AircraftConfig holds the model choices of an assembled aircraft that
// are not design parameters: the layout options shared by geometry and
// aerodynamics, and the aerodynamic model's settings.
type AircraftConfig struct {
	Geometry GeometryOptions
	Aero     AeroOptions
}

// DefaultAircraftConfig returns the supersonic business-jet layout with
// the default aerodynamic settings.
func DefaultAircraftConfig() AircraftConfig {
	return AircraftConfig{Geometry: DefaultGeometryOptions(), Aero: DefaultAeroOptions()}
}

// AircraftDisciplines returns the disciplines of the aircraft model in
// their Gauss–Seidel order: geometry, airframe_aero, neutral_point,
// airframe_masses, flight_conditions, aerodynamics, engine_cycle,
// propulsion, mission, weights, stability, wing_box, wing_divergence. The
// airframe's aerodynamics (airframe_aero), the neutral points
// (neutral_point), the airframe's statistical masses (airframe_masses)
// and the air at cruise and at the airport (flight_conditions) depend on
// the design parameters only and run once ahead of the coupled group;
// inside it
// aerodynamics adds what the loop changes (pods, lift, trim), weights the
// engines, gear, fuel system and fuel, and stability the static margins
// and the trim load. The wing box (wing_box) and its divergence
// (wing_divergence) are read by nothing inside the loop and run once
// after it. Mission runs before weights so that the fuel fractions reach
// the mass closure in the same sweep; this order needs less than half the
// iterations of weights-before-mission and converges to the same state.
func AircraftDisciplines(cfg AircraftConfig) []mdo.Discipline {
	wt := NewWeights()
	return []mdo.Discipline{
		NewGeometry(cfg.Geometry),
		NewAirframeAerodynamics(cfg.Geometry, cfg.Aero),
		NewNeutralPoints(),
		NewAirframeMasses(wt),
		NewFlightConditions(),
		NewAerodynamics(cfg.Geometry, cfg.Aero),
		NewEngineCycle(),
		NewPropulsion(),
		NewMission(),
		wt,
		NewStability(),
		NewWingBoxSizing(wt),
		NewWingDivergence(),
	}
}

// NewAircraft builds the coupled System of the whole aircraft. Geometry,
// the airframe's aerodynamics, neutral points and masses, the flight
// conditions and the engine cycle run first; aerodynamics, propulsion, weights,
// stability and mission form one coupled group (mass ↔ aerodynamics ↔
// propulsion ↔ stability ↔ mission) that the System's solver converges.
// The group's solver is AircraftSolver (SetSolver changes it).
func NewAircraft(cfg AircraftConfig) (*mdo.System, error) {
	s, err := mdo.NewSystem(AircraftDisciplines(cfg)...)
	if err != nil {
		return nil, fmt.Errorf("disciplines: building the aircraft: %w", err)
	}
	if err := s.SetSolver(AircraftSolver()); err != nil {
		return nil, fmt.Errorf("disciplines: building the aircraft: %w", err)
	}
	return s, nil
}

// AircraftSolver returns the coupling solver of NewAircraft: mdo's
// default settings (tolerance 1e-10, at most 200 iterations) with
// Anderson-accelerated Gauss–Seidel, and in a study every point started
// from the converged reference design (mdo.SolverSettings.FromReference).
// It converges the aircraft in about 60 % of the discipline calls of
// Aitken relaxation from the defaults (see BenchmarkConvergence) to the
// same state within the tolerance.
func AircraftSolver() mdo.SolverSettings {
	set := mdo.DefaultSolver()
	set.Method = mdo.AndersonGaussSeidel
	set.FromReference = true
	return set
}
