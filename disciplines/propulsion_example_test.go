package disciplines_test

import (
	"context"
	"fmt"

	"couplet/disciplines"
	"couplet/mdo"
)

// The ideal turbojet of Mattingly's chapter 5 at Mach 2 in the
// stratosphere.
func ExampleIdealTurbojet() {
	r, err := disciplines.IdealTurbojet(2, 216.7, 10, 1800, 1.4, 1004, 42.8e6)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("F/m = %.2f N s/kg, f = %.6f, S = %.3f mg/(N s)\n", r.SpecificThrust, r.FuelAirRatio, r.TSFC*1e6)
	// Output:
	// F/m = 768.45 N s/kg, f = 0.024558, S = 31.958 mg/(N s)
}

// A low-bypass mixed-flow turbofan with component losses in supersonic
// cruise.
func ExampleMixedFlowTurbofan() {
	atm, _ := disciplines.StandardAtmosphere(15000)
	r, err := disciplines.MixedFlowTurbofan(disciplines.TypicalComponents(), 1.5, atm.Temperature, 18, 0.6, 1700)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("πf = %.2f, F/m = %.0f N s/kg, TSFC = %.2e kg/(N s)\n", r.FanPressureRatio, r.SpecificThrust, r.TSFC)
	// Output:
	// πf = 3.80, F/m = 616 N s/kg, TSFC = 3.32e-05 kg/(N s)
}

// Engine sizing: the cycle deck (engine_cycle) and the sizing
// (propulsion) as a System of their own.
func ExampleNewPropulsion() {
	sys, err := mdo.NewSystem(disciplines.NewFlightConditions(), disciplines.NewEngineCycle(), disciplines.NewPropulsion())
	if err != nil {
		fmt.Println(err)
		return
	}
	ws := sys.NewWorkspace()
	for name, v := range map[string]float64{"mass.takeoff": 42000, "aero.drag_cruise": 48000, "wing.area": 120} {
		if err := ws.Set(name, v); err != nil {
			fmt.Println(err)
			return
		}
	}
	if err := ws.Analyze(context.Background()); err != nil {
		fmt.Println(err)
		return
	}
	t, _ := ws.Lookup("engine.thrust_sea_level")
	kase, _ := ws.Lookup("engine.sizing_case")
	fmt.Printf("SLS thrust per engine %.1f kN, sized by case %.0f\n", t/1000, kase)
	// Output:
	// SLS thrust per engine 88.2 kN, sized by case 3
}

// Thrust lapse of a sized engine with altitude at Mach 0.9.
func ExampleEngineAt() {
	c := disciplines.TypicalComponents()
	for _, h := range []float64{0, 6000, 11000} {
		p, err := disciplines.EngineAt(c, 0.8, 20, 1750, 100, 0.9, h, 0, 1)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("altitude %5.0f m: %5.1f kN, TSFC %.3g kg/(N s)\n", h, p.Thrust/1000, p.TSFC)
	}
	// Output:
	// altitude     0 m:  89.0 kN, TSFC 3.16e-05 kg/(N s)
	// altitude  6000 m:  50.4 kN, TSFC 3.05e-05 kg/(N s)
	// altitude 11000 m:  28.5 kN, TSFC 2.98e-05 kg/(N s)
}
