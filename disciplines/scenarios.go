package disciplines

import (
	"fmt"
	"sort"

	"couplet/mdo"
)

// Scenario is an invented demonstration aircraft: the model choices, the
// parameter values and starting guesses of the coupling variables. Every
// number is invented for the demonstration; none is taken from a real
// aircraft.
type Scenario struct {
	Name        string
	Description string
	// Class is the aircraft's class in the empty-mass statistics
	// (EmptyMassRegression, EmptyMassPerSeatBand, EmptyMassCalibration).
	Class      AircraftClass
	Config     AircraftConfig
	Parameters map[string]float64 // parameter values (inputs nobody produces)
	Guesses    map[string]float64 // initial guesses of coupling variables
}

// NewSystem builds the aircraft System of the scenario's configuration.
func (s Scenario) NewSystem() (*mdo.System, error) { return NewAircraft(s.Config) }

// Apply sets the scenario's parameters and guesses on a workspace, in
// name order. An unknown name or a value outside its range is an error.
func (s Scenario) Apply(w *mdo.Workspace) error {
	for _, k := range sortedKeys(s.Parameters) {
		if err := w.Set(k, s.Parameters[k]); err != nil {
			return fmt.Errorf("scenario %s: %w", s.Name, err)
		}
	}
	for _, k := range sortedKeys(s.Guesses) {
		if err := w.SetGuess(k, s.Guesses[k]); err != nil {
			return fmt.Errorf("scenario %s: %w", s.Name, err)
		}
	}
	return nil
}

// Workspace builds the scenario's System and returns a workspace with the
// scenario applied.
func (s Scenario) Workspace() (*mdo.Workspace, error) {
	sys, err := s.NewSystem()
	if err != nil {
		return nil, err
	}
	w := sys.NewWorkspace()
	if err := s.Apply(w); err != nil {
		return nil, err
	}
	return w, nil
}

// sortedKeys returns the keys of m in order.
func sortedKeys(m map[string]float64) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// copyMap returns a copy of m.
func copyMap(m map[string]float64) map[string]float64 {
	c := make(map[string]float64, len(m))
	for k, v := range m {
		c[k] = v
	}
	return c
}

// Swiftlet returns "Swiftlet S12", an invented twelve-passenger supersonic
// business jet: cruise at Mach 1.5 and 17 km, two low-bypass engines
// under a trapezoidal wing of 58° quarter-chord sweep, 7 000 km range.
// The wing's camber and twist are chosen to give a nose-up pitching
// moment (stability.cm_ac_wing = +0.075) that trims supersonic cruise,
// where the aerodynamic centre has moved aft, without a large tail
// download. The mission fuel does not fit in the thin wing alone: 16 %
// of the slender fuselage's volume (nose and tail cones beyond the
// cabin) carries fuel (weights.fuselage_tank_share).
func Swiftlet() Scenario {
	return Scenario{
		Name:        "Swiftlet S12",
		Description: "invented 12-passenger supersonic business jet, Mach 1.5, twin engines, 7 000 km",
		Class:       ClassBusinessJet,
		Config:      DefaultAircraftConfig(),
		Parameters: map[string]float64{
			"wing.area": 115, "wing.aspect_ratio": 3.0, "wing.taper": 0.12, "wing.sweep": 58,
			"wing.thickness_ratio": 0.028, "wing.position": 0.44,
			"htail.volume": 0.25, "vtail.volume": 0.045,
			"cabin.passengers": 12, "cabin.seats_abreast": 2, "cabin.aisles": 1, "cabin.seat_pitch": 0.95,
			"fuselage.nose_fineness": 6, "fuselage.tail_fineness": 6.5,
			"engine.count": 2, "engine.bypass_ratio": 1.5, "engine.pressure_ratio": 26,
			"engine.turbine_temperature": 1850, "engine.thrust_scale": 1, "engine.sizing_field_length": 2400,
			"cruise.mach": 1.5, "cruise.altitude": 17000, "mission.range": 7.0e6, "mission.payload": 1300,
			"flap.cl_increment_takeoff": 0.5, "flap.cl_increment_landing": 0.9,
			"dive.dynamic_pressure": 40000, "stability.cm_ac_wing": 0.075, "cg.engine_position": 0.72,
			"airport.elevation": 0, "airport.temperature_offset": 0,
			"weights.calibration": EmptyMassCalibration(ClassBusinessJet), "weights.fuselage_tank_share": 0.16,
		},
		Guesses: map[string]float64{
			"mass.takeoff": 40000, "mass.zero_fuel": 21000, "mass.landing": 23000,
			"mass.cruise_start": 37000, "mass.cruise_end": 23000, "mission.fuel_fraction": 0.47,
			"engine.mass": 2100, "nacelle.diameter": 1.2, "nacelle.length": 5.2,
			"engine.thrust_takeoff": 97000, "engine.thrust_climb": 90000,
			"aero.drag_cruise": 35000, "aero.ld_cruise": 9.7, "stability.tail_lift_cruise": -4000,
		},
	}
}

// SwiftletForwardSwept returns "Swiftlet S12-F", the forward-swept variant
// of Swiftlet S12: the same aircraft with the wing's quarter chord swept
// forward by 45°, taper 0.3, the wing moved aft and a larger horizontal
// tail to keep the balance (it still flies near neutral stability at
// take-off, and its divergence margin shows the aeroelastic penalty of
// forward sweep), on the shorter 5 500 km mission: with the forward-sweep
// penalty the 7 000 km mission needs more than twice the fuel its tanks
// hold.
func SwiftletForwardSwept() Scenario {
	s := Swiftlet()
	s.Name = "Swiftlet S12-F"
	s.Description = "forward-swept variant of the invented supersonic business jet"
	s.Parameters = copyMap(s.Parameters)
	s.Guesses = copyMap(s.Guesses)
	s.Parameters["wing.sweep"] = -45
	s.Parameters["wing.taper"] = 0.3
	s.Parameters["wing.position"] = 0.61
	s.Parameters["htail.volume"] = 0.5
	s.Parameters["mission.range"] = 5.5e6
	for k, v := range map[string]float64{
		"mass.takeoff": 49000, "mass.zero_fuel": 25000, "mass.landing": 27000,
		"mass.cruise_start": 46000, "mass.cruise_end": 27000, "mission.fuel_fraction": 0.5,
		"engine.mass": 3200, "nacelle.diameter": 1.5, "nacelle.length": 6.1,
		"engine.thrust_takeoff": 140000, "engine.thrust_climb": 130000,
		"aero.drag_cruise": 51000, "aero.ld_cruise": 8.7, "stability.tail_lift_cruise": 55000,
	} {
		s.Guesses[k] = v
	}
	return s
}

// Kestrel returns "Kestrel R76", an invented 76-seat subsonic regional
// jet: cruise at Mach 0.78, two turbofans ahead of a moderately swept
// wing of aspect ratio 9, about 3 000 km range. With the jet-transport
// calibration of the empty mass (EmptyMassCalibration) it weighs about
// 37 t at take-off; the wing (84 m²) and the landing flaps (ΔCL 1.6,
// slats and double-slotted flaps) are sized so that it lands within
// 1 400 m, and the engines for a 1 600 m take-off field.
func Kestrel() Scenario {
	return Scenario{
		Name:        "Kestrel R76",
		Description: "invented 76-seat subsonic regional jet, Mach 0.78, twin turbofans",
		Class:       ClassJetTransport,
		Config:      AircraftConfig{Geometry: SubsonicGeometryOptions(), Aero: DefaultAeroOptions()},
		Parameters: map[string]float64{
			"wing.area": 84, "wing.aspect_ratio": 9, "wing.taper": 0.3, "wing.sweep": 25,
			"wing.thickness_ratio": 0.12, "wing.position": 0.33,
			"htail.volume": 0.8, "vtail.volume": 0.08,
			"cabin.passengers": 76, "cabin.seats_abreast": 4, "cabin.aisles": 1, "cabin.seat_pitch": 0.79,
			"fuselage.nose_fineness": 1.6, "fuselage.tail_fineness": 2.8,
			"engine.count": 2, "engine.bypass_ratio": 3, "engine.pressure_ratio": 28,
			"engine.turbine_temperature": 1600, "engine.thrust_scale": 1, "engine.sizing_field_length": 1600,
			"cruise.mach": 0.78, "cruise.altitude": 11000, "mission.range": 3.0e6, "mission.payload": 7600,
			"flap.cl_increment_takeoff": 0.8, "flap.cl_increment_landing": 1.6,
			"dive.dynamic_pressure": 30000, "stability.cm_ac_wing": -0.06, "cg.engine_position": 0.42,
			"airport.elevation": 0, "airport.temperature_offset": 0,
			"weights.calibration": EmptyMassCalibration(ClassJetTransport),
		},
		Guesses: map[string]float64{
			"mass.takeoff": 29000, "mass.zero_fuel": 22000, "mass.landing": 23000,
			"mass.cruise_start": 27600, "mass.cruise_end": 22900, "mission.fuel_fraction": 0.24,
			"mission.reserve_fraction": 0.03, "mission.climb_fuel_fraction": 0.048,
			"mission.cruise_end_fuel_fraction": 0.035, "mission.trip_fuel_fraction": 0.21,
			"engine.mass": 800, "nacelle.diameter": 1.0, "nacelle.length": 2.8,
			"engine.thrust_takeoff": 42000, "engine.thrust_climb": 36000, "engine.tsfc_cruise": 2.1e-5,
			"aero.drag_cruise": 18000, "aero.ld_cruise": 14.6, "aero.ld_takeoff": 9.6,
			"aero.cd0_takeoff": 0.036, "aero.k_takeoff": 0.052, "aero.cd0_landing": 0.064, "aero.k_landing": 0.056,
			"aero.cl_max_takeoff": 2.0, "aero.cl_max_landing": 2.5, "aero.cla_cruise": 5.9, "aero.cla_low_speed": 4.5,
			"cg.takeoff": 14.4, "cg.cruise_start": 14.3, "cg.cruise_end": 14.2, "stability.tail_lift_cruise": -9000,
		},
	}
}

// Scenarios returns the demonstration scenarios.
func Scenarios() []Scenario { return []Scenario{Swiftlet(), SwiftletForwardSwept(), Kestrel()} }
