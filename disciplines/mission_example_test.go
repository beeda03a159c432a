package disciplines_test

import (
	"fmt"
	"math"

	"couplet/disciplines"
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
	// sweep -30°: q_D = 47721 Pa
}

// The refined empty-mass-fraction regression, jet-fighter row.
func ExampleEmptyFractionRow_EmptyMassFraction() {
	f := disciplines.EmptyFractionJetFighter().EmptyMassFraction(20000*0.45359237, 5, 0.6, 25*47.880258980336, 2)
	fmt.Printf("We/W0 = %.4f\n", f)
	// Output:
	// We/W0 = 0.8109
}
