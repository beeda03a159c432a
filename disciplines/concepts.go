package disciplines

// Three concepts of other classes than the demonstration aircraft the
// model was first built around: a forward-swept transonic business jet, a
// long-range four-engine transport and a small Mach 1.9 supersonic
// transport. Each lies inside the model's documented validity (mixed-flow
// turbofans of bypass ratio at most 3, cruise Mach 0.3–2.5, two to four
// engines). Every number is invented for the demonstration.

// Dunlin returns "Dunlin F10", an invented ten-passenger transonic
// business jet with a forward-swept wing: cruise at Mach 0.8 and 12.5 km,
// 6 000 km range, two turbofans of bypass ratio 3 (their mass at 70 % of
// the fuselage length, as on the aft fuselage; their drag and wetted
// area those of the subsonic layout's wing pods), the quarter chord swept
// 20° forward (the wing apex at mid-fuselage, behind the cabin's front),
// aspect ratio 7.5, t/c 0.11. Its empty-mass factor is the jet
// transports' (EmptyMassCalibration(ClassJetTransport)): the
// business-jet factor is fitted to the supersonic business jets, and
// like the regional jet's cabin the business jet's furnishings are what
// the cargo/transport equations leave out; with it the jet lies within
// Roskam's business-jet regression. Forward sweep brings its divergence
// penalty: at 20° forward the wing diverges below the dive speed + 15 %
// (14 CFR 25.629(b)), which a study constrains. The parameters not
// named here (bypass ratio 3, empty-mass factor, airport) are those of
// Kestrel R76.
func Dunlin() Scenario {
	s := variant(Kestrel(), "Dunlin F10", "invented 10-passenger forward-swept transonic business jet, Mach 0.8, twin turbofans, 6 000 km",
		map[string]float64{
			"wing.area": 50, "wing.aspect_ratio": 7.5, "wing.taper": 0.4, "wing.sweep": -20,
			"wing.thickness_ratio": 0.11, "wing.position": 0.5, "htail.volume": 0.9,
			"cabin.passengers": 10, "cabin.seats_abreast": 2, "cabin.seat_pitch": 1.0,
			"fuselage.nose_fineness": 1.8, "fuselage.tail_fineness": 3.0,
			"engine.pressure_ratio": 26, "engine.turbine_temperature": 1550, "engine.sizing_field_length": 1700,
			"cruise.mach": 0.8, "cruise.altitude": 12500, "mission.range": 6.0e6, "mission.payload": 1000,
			"flap.cl_increment_takeoff": 0.6, "flap.cl_increment_landing": 1.2,
			"dive.dynamic_pressure": 28000, "stability.cm_ac_wing": -0.05, "cg.engine_position": 0.7,
		},
		map[string]float64{
			"mass.takeoff": 15000, "mass.zero_fuel": 8800, "mass.landing": 9500,
			"mass.cruise_start": 14500, "mass.cruise_end": 9500, "mission.fuel_fraction": 0.38,
			"engine.mass": 450, "nacelle.diameter": 0.8, "nacelle.length": 2.2,
			"engine.thrust_takeoff": 21000, "engine.thrust_climb": 18000, "engine.tsfc_cruise": 2.15e-5,
			"aero.drag_cruise": 9000, "aero.ld_cruise": 13.8,
			"cg.takeoff": 10, "cg.cruise_start": 10, "cg.cruise_end": 10, "stability.tail_lift_cruise": -2000,
		})
	s.Class = ClassBusinessJet
	return s
}

// Godwit returns "Godwit L320", an invented 320-seat long-range
// transport: cruise at Mach 0.84 and 11 km, 9 000 km range, four
// turbofans of bypass ratio 3 (the model's limit: an early-generation
// turbofan) ahead of an aft-swept wing of 33° quarter-chord sweep,
// aspect ratio 9.5, 420 m², nine abreast on two aisles. The rest of its
// parameters (bypass ratio 3, flaps, tail cone, airport) are those of
// Kestrel R76.
func Godwit() Scenario {
	return variant(Kestrel(), "Godwit L320", "invented 320-seat long-range transport, Mach 0.84, four turbofans, 9 000 km",
		map[string]float64{
			"wing.area": 420, "wing.aspect_ratio": 9.5, "wing.taper": 0.25, "wing.sweep": 33,
			"wing.thickness_ratio": 0.11, "wing.position": 0.30, "htail.volume": 0.85, "vtail.volume": 0.07,
			"cabin.passengers": 320, "cabin.seats_abreast": 9, "cabin.aisles": 2, "cabin.seat_pitch": 0.81,
			"fuselage.nose_fineness": 1.7,
			"engine.count":           4, "engine.pressure_ratio": 32, "engine.turbine_temperature": 1650, "engine.sizing_field_length": 2900,
			"cruise.mach": 0.84, "mission.range": 9.0e6, "mission.payload": 32000,
			"dive.dynamic_pressure": 32000, "stability.cm_ac_wing": -0.08, "cg.engine_position": 0.40,
		},
		map[string]float64{
			"mass.takeoff": 276000, "mass.zero_fuel": 167000, "mass.landing": 180000,
			"mass.cruise_start": 266000, "mass.cruise_end": 180000, "mission.fuel_fraction": 0.4,
			"engine.mass": 3800, "nacelle.diameter": 2.4, "nacelle.length": 5,
			"engine.thrust_takeoff": 200000, "engine.thrust_climb": 170000, "engine.tsfc_cruise": 2.14e-5,
			"aero.drag_cruise": 130000, "aero.ld_cruise": 19.5,
			"cg.takeoff": 32, "cg.cruise_start": 32, "cg.cruise_end": 32, "stability.tail_lift_cruise": -27000,
		})
}

// Sanderling returns "Sanderling S56", an invented 56-seat supersonic
// transport: cruise at Mach 1.9 and 18 km, 6 000 km range, four
// low-bypass engines (bypass 0.7, Tt4 1 900 K) under a 62° swept wing of
// aspect ratio 2.2 and t/c 0.03, four abreast. Its empty-mass factor is
// that of the supersonic airliners (EmptyMassCalibration).
func Sanderling() Scenario {
	s := variant(Swiftlet(), "Sanderling S56", "invented 56-seat supersonic transport, Mach 1.9, four engines, 6 000 km",
		map[string]float64{
			"wing.area": 300, "wing.aspect_ratio": 2.2, "wing.taper": 0.1, "wing.sweep": 62,
			"wing.thickness_ratio": 0.03, "wing.position": 0.42,
			"cabin.passengers": 56, "cabin.seats_abreast": 4, "cabin.seat_pitch": 0.86,
			"engine.count": 4, "engine.bypass_ratio": 0.7, "engine.pressure_ratio": 22, "engine.turbine_temperature": 1900,
			"cruise.mach": 1.9, "cruise.altitude": 18000, "mission.range": 6.0e6, "mission.payload": 5600,
			"engine.sizing_field_length": 2900, "cg.engine_position": 0.75,
			"weights.calibration": EmptyMassCalibration(ClassSupersonicCruise),
		},
		map[string]float64{
			"mass.takeoff": 97000, "mass.zero_fuel": 50000, "mass.landing": 53000,
			"mass.cruise_start": 92000, "mass.cruise_end": 53000, "mission.fuel_fraction": 0.48,
			"engine.mass": 2700, "nacelle.diameter": 1.6, "nacelle.length": 6.5,
			"engine.thrust_takeoff": 98000, "engine.thrust_climb": 90000,
			"aero.drag_cruise": 80000, "aero.ld_cruise": 8,
		})
	s.Class = ClassSupersonicCruise
	return s
}
