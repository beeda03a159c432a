package disciplines_test

import (
	"context"
	"fmt"
	"math"

	"couplet/disciplines"
	"couplet/mdo"
)

// The jet Breguet range.
func ExampleBreguetRange() {
	r, _ := disciplines.BreguetRange(250, 1.6e-5, 15, 1/0.75)
	fmt.Printf("%.1f km\n", r/1000)
	// Output:
	// 6875.5 km
}

// Fuel for a range and range for a fuel load with the default reserves.
func ExampleMissionProfile_FuelFractions() {
	p := disciplines.DefaultMissionProfile()
	fr := p.FuelFractions(6e6, 1.5, 443, 3.2e-5, 7.5)
	fmt.Printf("fuel %.3f of take-off mass, of which reserves %.3f\n", fr.Total, fr.Reserve)
	r := p.RangeForFuel(fr.Total*45000, (1-fr.Total)*45000, 1.5, 443, 3.2e-5, 7.5)
	fmt.Printf("range back: %.0f km\n", r/1000)
	// Output:
	// fuel 0.537 of take-off mass, of which reserves 0.062
	// range back: 6000 km
}

// Divergence of a straight and a forward-swept wing of the same span.
func ExampleSweptBeam_DivergenceDynamicPressure() {
	for _, deg := range []float64{0, -30} {
		sw := deg * math.Pi / 180
		c := math.Cos(sw)
		b := disciplines.SweptBeam{Length: 9 / c, Chord: 3 * c, Offset: 0.375 * c, LiftSlope: 6, Sweep: sw, GJ: 3e7, EI: 8e7}
		q, _ := b.DivergenceDynamicPressure()
		fmt.Printf("sweep %3.0f°: q_D = %.0f Pa\n", deg, q)
	}
	// Output:
	// sweep   0°: q_D = 135386 Pa
	// sweep -30°: q_D = 48383 Pa
}

// The refined empty-mass-fraction regression, jet-fighter row.
func ExampleEmptyFractionRow_EmptyMassFraction() {
	f := disciplines.EmptyFractionJetFighter().EmptyMassFraction(20000*0.45359237, 5, 0.6, 25*47.880258980336, 2)
	fmt.Printf("We/W0 = %.4f\n", f)
	// Output:
	// We/W0 = 0.8109
}

// The mission discipline on its own: fuel for the design range and the
// field performance of an invented supersonic business jet.
func ExampleNewMission() {
	sys, err := mdo.NewSystem(disciplines.NewFlightConditions(), disciplines.NewMission())
	if err != nil {
		fmt.Println(err)
		return
	}
	ws := sys.NewWorkspace()
	for _, p := range []struct {
		name  string
		value float64
	}{
		{"mass.takeoff", 45000}, {"mass.landing", 25500}, {"mass.zero_fuel", 23500}, {"mass.fuel_capacity", 22000},
		{"aero.ld_cruise", 7.8}, {"engine.tsfc_cruise", 3.2e-5}, {"cruise.mach", 1.5}, {"cruise.altitude", 15500},
		{"mission.range", 6.5e6}, {"engine.thrust_takeoff", 85000}, {"engine.thrust_climb", 78000},
		{"wing.area", 120}, {"aero.cl_max_takeoff", 1.5}, {"aero.cl_max_landing", 1.7},
	} {
		if err := ws.Set(p.name, p.value); err != nil {
			fmt.Println(err)
			return
		}
	}
	if err := ws.Analyze(context.Background()); err != nil {
		fmt.Println(err)
		return
	}
	for _, n := range []string{"mass.fuel", "perf.range_full_fuel", "perf.takeoff_field_length", "perf.landing_field_length", "perf.v2"} {
		v, _ := ws.Lookup(n)
		fmt.Printf("%-26s %.4g\n", n, v)
	}
	// Output:
	// mass.fuel                  2.466e+04
	// perf.range_full_fuel       5.169e+06
	// perf.takeoff_field_length  1519
	// perf.landing_field_length  1322
	// perf.v2                    71.49
}
