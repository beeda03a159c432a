package disciplines_test

import (
	"context"
	"fmt"
	"strings"

	"couplet/disciplines"
	"couplet/mdo"
)

// A script builds the invented supersonic business jet, converges its
// coupled analysis and prints the design structure matrix.
func ExampleNewAircraft() {
	sc := disciplines.Swiftlet()
	sys, err := disciplines.NewAircraft(sc.Config)
	if err != nil {
		fmt.Println(err)
		return
	}
	w := sys.NewWorkspace()
	if err := sc.Apply(w); err != nil {
		fmt.Println(err)
		return
	}
	if err := w.Analyze(context.Background()); err != nil {
		fmt.Println(err)
		return
	}
	dsm := sys.DSM()
	fmt.Print(dsm[:strings.Index(dsm, "couplings")])
	mto, _ := w.Lookup("mass.takeoff")
	ld, _ := w.Lookup("aero.ld_cruise")
	fmt.Printf("converged: %v, take-off mass about %.0f t, cruise L/D about %.0f\n", w.CouplingReports()[0].Converged, mto/1000, ld)
	// Output:
	// design structure matrix: 13 disciplines, 9 groups (row feeds column)
	//                           1  2  3  4  5  6  7  8  9 10 11 12 13   group
	//   1 geometry              ■  >  >  >  .  .  >  .  .  >  >  >  >   A
	//   2 airframe_aero         .  ■  >  .  .  .  >  >  >  >  >  .  .   B
	//   3 neutral_point         .  .  ■  .  .  .  .  .  .  .  >  .  .   C
	//   4 airframe_masses       .  .  .  ■  .  .  .  .  .  >  .  .  .   D
	//   5 flight_conditions     .  .  .  .  ■  .  .  >  >  .  .  .  .   E
	//   6 engine_cycle          .  .  .  .  .  ■  .  >  .  .  .  .  .   F
	//   7 aerodynamics          .  .  .  .  .  .  ■  >  >  .  .  .  .   G coupled, anderson-gauss-seidel
	//   8 propulsion            .  .  .  .  .  .  <  ■  >  >  .  .  .   G coupled, anderson-gauss-seidel
	//   9 mission               .  .  .  .  .  .  .  .  ■  >  .  .  .   G coupled, anderson-gauss-seidel
	//  10 weights               .  .  .  .  .  .  <  <  <  ■  >  >  .   G coupled, anderson-gauss-seidel
	//  11 stability             .  .  .  .  .  .  <  .  .  .  ■  .  .   G coupled, anderson-gauss-seidel
	//  12 wing_box              .  .  .  .  .  .  .  .  .  .  .  ■  >   H
	//  13 wing_divergence       .  .  .  .  .  .  .  .  .  .  .  .  ■   I
	// converged: true, take-off mass about 38 t, cruise L/D about 10
}

// Newton's method converges the same coupled group from the scenario's
// guesses.
func ExampleScenario_Workspace() {
	w, err := disciplines.Kestrel().Workspace()
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := w.SetSolver(mdo.SolverSettings{Method: mdo.Newton}); err != nil {
		fmt.Println(err)
		return
	}
	if err := w.Analyze(context.Background()); err != nil {
		fmt.Println(err)
		return
	}
	seats, _ := w.Lookup("cabin.passengers")
	fl, _ := w.Lookup("fuselage.length")
	fmt.Printf("%.0f seats, fuselage %.1f m, converged: %v\n", seats, fl, w.CouplingReports()[0].Converged)
	// Output:
	// 76 seats, fuselage 31.3 m, converged: true
}

func ExampleNewWing() {
	w, err := disciplines.NewWing(100, 8, 0.5, 25, 0.12)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("span %.2f m, root %.3f m, tip %.3f m, MAC %.3f m, LE sweep %.2f°\n",
		w.Span, w.RootChord, w.TipChord, w.MAC, w.SweepLE)
	_, err = disciplines.NewWing(100, 8, 0.5, 75, 0.12)
	fmt.Println(err)
	// Output:
	// span 28.28 m, root 4.714 m, tip 2.357 m, MAC 3.666 m, LE sweep 26.93°
	// disciplines: wing.sweep = 75 deg is not allowed (allowed: [-70, 70] (negative = forward sweep))
}

func ExampleStandardAtmosphere() {
	a, err := disciplines.StandardAtmosphere(11000)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("T %.2f K, p %.0f Pa, rho %.4f kg/m3, a %.1f m/s\n", a.Temperature, a.Pressure, a.Density, a.SpeedOfSound)
	_, err = disciplines.StandardAtmosphere(90000)
	fmt.Println(err)
	// Output:
	// T 216.77 K, p 22700 Pa, rho 0.3648 kg/m3, a 295.2 m/s
	// disciplines: altitude = 90000 m is not allowed (allowed: [-5000, 86000] geometric (U.S. Standard Atmosphere 1976))
}

func ExampleAeroModel_Polar() {
	w, _ := disciplines.NewWing(115, 3, 0.12, 58, 0.028)
	f, _ := disciplines.NewFuselage(disciplines.Cabin{Passengers: 12, SeatsAbreast: 2, SeatPitch: 0.95, SeatWidth: 0.55}, 6, 6.5)
	o := disciplines.DefaultGeometryOptions()
	c, err := disciplines.NewConfiguration(disciplines.ConfigurationSpec{
		Wing: w, WingPosition: 0.44, Fuselage: f, HTailVolume: 0.25, VTailVolume: 0.045,
		EngineCount: 2, NacelleDiameter: 1.2, NacelleLength: 5.2,
	}, o)
	if err != nil {
		fmt.Println(err)
		return
	}
	m := disciplines.NewAeroModel(o, disciplines.DefaultAeroOptions())
	for _, mach := range []float64{0.8, 1.0, 1.5, 2.0} {
		p, err := m.Polar(&c, disciplines.FlightCondition{Mach: mach, Altitude: 17000}, 0.19)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("M %.1f: CD0 %.4f (wave %.4f), K %.3f, CLα %.2f /rad\n", mach, p.CD0, p.CDWave, p.K, p.CLAlpha)
	}
	// Output:
	// M 0.8: CD0 0.0123 (wave 0.0000), K 0.169, CLα 2.62 /rad
	// M 1.0: CD0 0.0195 (wave 0.0079), K 0.162, CLα 2.74 /rad
	// M 1.5: CD0 0.0137 (wave 0.0050), K 0.155, CLα 2.57 /rad
	// M 2.0: CD0 0.0120 (wave 0.0046), K 0.227, CLα 2.17 /rad
}
