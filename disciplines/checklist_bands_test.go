package disciplines

import "testing"

func TestChecklistSubsonicAndTwinAisleBands(t *testing.T) {
	// The fuselage fineness band of 10–15 is that of supersonic fuselages
	// (project reference, common practice); subsonic transports and
	// business jets span about 7–15 (from memory, no source). The
	// operating empty mass per seat of the single-aisle and regional jet
	// transports, about 220–320 kg, is not that of the wide bodies, about
	// 320–470 kg, and that of business jets runs from the light jets'
	// about 480–600 kg to the large-cabin jets' 1 300–1 700 kg (from
	// memory, no source). The wing loading and the take-off thrust over
	// weight are read against the class's bands (mass_statistics.go).
	// Each row: the values changed from a subsonic
	// business jet inside every band, and whether the rule is flagged.
	base := func() map[string]float64 {
		m := checklistBase()
		for k, v := range map[string]float64{
			"cruise.mach": 0.8, "fuselage.fineness": 9, "aero.ld_cruise": 14, "engine.tsfc_cruise": 2.1e-5,
			"mass.empty": 12000, "mass.crew": 190, "mass.takeoff": 22000, "cabin.passengers": 10, "mass.fuel": 8000, "mass.fuel_capacity": 9000,
			"wing.area": 60, "engine.count": 2, "engine.thrust_takeoff": 40000,
		} {
			m[k] = v
		}
		return m
	}
	transport := map[string]float64{"cabin.passengers": 320, "cabin.seats_abreast": 9, "cabin.aisles": 2,
		"mass.takeoff": 270000, "mass.empty": 134000, "mass.crew": 1500, "mass.fuel": 100000, "mass.fuel_capacity": 150000}
	tests := []struct {
		name string
		set  map[string]float64
		rule string
		flag bool
	}{
		{"subsonic business jet of fineness 9", nil, "fuselage fineness ratio", false},
		{"subsonic fineness 6", map[string]float64{"fuselage.fineness": 6}, "fuselage fineness ratio", true},
		{"subsonic fineness 16", map[string]float64{"fuselage.fineness": 16}, "fuselage fineness ratio", true},
		{"supersonic fineness 9", map[string]float64{"cruise.mach": 1.5, "aero.ld_cruise": 9, "engine.tsfc_cruise": 2.9e-5}, "fuselage fineness ratio", true},
		{"wide body of 419 kg a seat", transport, "operating empty mass per seat (twin-aisle jet transport)", false},
		{"wide body of 500 kg a seat", with2(transport, map[string]float64{"mass.empty": 160000}), "operating empty mass per seat (twin-aisle jet transport)", true},
		{"wide body of 300 kg a seat", with2(transport, map[string]float64{"mass.empty": 96000, "mass.takeoff": 200000}), "operating empty mass per seat (twin-aisle jet transport)", true},
		// wing loading and take-off T/W of a business jet: about
		// 200–550 kg/m² and 0.28–0.55 (from memory, no source)
		{"business jet of 367 kg/m²", nil, "wing loading at take-off (business jet)", false},
		{"business jet of 733 kg/m²", map[string]float64{"wing.area": 30}, "wing loading at take-off (business jet)", true},
		{"business jet of T/W 0.37", nil, "take-off thrust over weight (business jet)", false},
		{"business jet of T/W 0.14", map[string]float64{"engine.thrust_takeoff": 15000}, "take-off thrust over weight (business jet)", true},
		{"wide body of 675 kg/m², T/W 0.30", with2(transport, map[string]float64{"wing.area": 400, "engine.count": 4, "engine.thrust_takeoff": 200000}),
			"wing loading at take-off (jet transport)", false},
		{"wide body of T/W 0.30", with2(transport, map[string]float64{"wing.area": 400, "engine.count": 4, "engine.thrust_takeoff": 200000}),
			"take-off thrust over weight (jet transport)", false},
		{"wide body of 900 kg/m²", with2(transport, map[string]float64{"wing.area": 300, "engine.count": 4, "engine.thrust_takeoff": 200000}),
			"wing loading at take-off (jet transport)", true},
		{"single aisle of 419 kg a seat", with2(transport, map[string]float64{"cabin.aisles": 1, "cabin.seats_abreast": 6}), "operating empty mass per seat (jet transport)", true},
		{"single aisle of 222 kg a seat", with2(transport, map[string]float64{"cabin.passengers": 189, "cabin.aisles": 1, "cabin.seats_abreast": 6,
			"mass.takeoff": 79000, "mass.empty": 42000, "mass.fuel": 20000, "mass.fuel_capacity": 21000}), "operating empty mass per seat (jet transport)", false},
		{"single aisle of 206 kg a seat", with2(transport, map[string]float64{"cabin.passengers": 189, "cabin.aisles": 1, "cabin.seats_abreast": 6,
			"mass.takeoff": 75000, "mass.empty": 39000, "mass.fuel": 20000, "mass.fuel_capacity": 21000}), "operating empty mass per seat (jet transport)", true},
		{"light business jet of 520 kg a seat", map[string]float64{"cabin.passengers": 9, "mass.empty": 4680, "mass.takeoff": 8000,
			"mass.fuel": 2500, "mass.fuel_capacity": 2700, "wing.area": 28, "engine.thrust_takeoff": 28000}, "operating empty mass per seat (business jet)", false},
		{"business jet of 420 kg a seat", map[string]float64{"cabin.passengers": 9, "mass.empty": 3780, "mass.takeoff": 8000,
			"mass.fuel": 2500, "mass.fuel_capacity": 2700, "wing.area": 28, "engine.thrust_takeoff": 28000}, "operating empty mass per seat (business jet)", true},
	}
	for _, c := range tests {
		m := base()
		for k, v := range c.set {
			m[k] = v
		}
		var row *ChecklistRow
		cl := DesignChecklist(mapGetter(m))
		for i := range cl {
			if cl[i].Rule == c.rule {
				row = &cl[i]
			}
		}
		if row == nil {
			t.Errorf("%s: no row %q in\n%s", c.name, c.rule, cl)
			continue
		}
		if row.Pass == c.flag {
			t.Errorf("%s: %s, want flagged %v", c.name, row.Line(), c.flag)
		}
	}
}

// with2 returns a copy of a with b's values over it.
func with2(a, b map[string]float64) map[string]float64 {
	c := copyMap(a)
	for k, v := range b {
		c[k] = v
	}
	return c
}
