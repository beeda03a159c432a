package disciplines

// variant returns a copy of base under a new name with some parameters
// and guesses changed.
func variant(base Scenario, name, desc string, params, guesses map[string]float64) Scenario {
	s := base
	s.Name, s.Description = name, desc
	s.Parameters = copyMap(base.Parameters)
	s.Guesses = copyMap(base.Guesses)
	for k, v := range params {
		s.Parameters[k] = v
	}
	for k, v := range guesses {
		s.Guesses[k] = v
	}
	return s
}

// SwiftletTrijet returns "Swiftlet S12-3", the three-engine variant of
// Swiftlet S12: the same airframe and mission with three smaller engines
// (the third in the tail cone), sized to the same field length. Every
// number is invented for the demonstration.
func SwiftletTrijet() Scenario {
	return variant(Swiftlet(), "Swiftlet S12-3", "three-engine variant of the invented supersonic business jet",
		map[string]float64{"engine.count": 3, "cg.engine_position": 0.78},
		map[string]float64{
			"engine.mass": 1500, "nacelle.diameter": 1.0, "nacelle.length": 4.4,
			"engine.thrust_takeoff": 66000, "engine.thrust_climb": 61000,
		})
}

// Condor returns "Condor S30", an invented 30-seat supersonic airliner:
// cruise at Mach 1.6 and 17 km, two engines under a 60° swept wing,
// 6 500 km range. Every number is invented for the demonstration.
func Condor() Scenario {
	s := variant(Swiftlet(), "Condor S30", "invented 30-seat supersonic airliner, Mach 1.6, twin engines, 6 500 km",
		map[string]float64{
			"wing.area": 190, "wing.aspect_ratio": 2.4, "wing.sweep": 60, "wing.thickness_ratio": 0.03,
			"cabin.passengers": 30, "cabin.seats_abreast": 3, "cabin.seat_pitch": 0.86,
			"cruise.mach": 1.6, "mission.range": 6.5e6, "mission.payload": 3000,
			"engine.sizing_field_length": 2600,
			"weights.calibration":        EmptyMassCalibration(ClassSupersonicCruise),
		},
		map[string]float64{
			"mass.takeoff": 65000, "mass.zero_fuel": 34000, "mass.landing": 37000,
			"mass.cruise_start": 61000, "mass.cruise_end": 37000,
			"engine.mass": 3200, "nacelle.diameter": 1.5, "nacelle.length": 6.1,
			"engine.thrust_takeoff": 150000, "engine.thrust_climb": 140000,
			"aero.drag_cruise": 60000, "aero.ld_cruise": 8.5,
		})
	s.Class = ClassSupersonicCruise
	return s
}
