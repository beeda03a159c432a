package disciplines_test

import (
	"fmt"

	"couplet/disciplines"
)

// Neutral point of a wing–tail–fuselage layout at low speed and in
// supersonic cruise, where the aerodynamic centre has moved aft.
func ExampleLongitudinal_NeutralPoint() {
	fus, _ := disciplines.MunkFuselageTerm(34, 2.2)
	c := disciplines.Longitudinal{
		WingArea: 120, WingAspect: 3.2, MAC: 6.9, MACX: 16.5, CLaWing: 3.1,
		TailArea: 22, TailArm: 13, TailMAC: 2.8, CLaTail: 3.0, TailEfficiency: 0.9,
		FuselageTerm: fus, Mach: 0.2,
	}
	low, _ := c.NeutralPoint()
	c.Mach, c.CLaWing, c.CLaTail = 1.5, 2.6, 2.4
	cruise, _ := c.NeutralPoint()
	fmt.Printf("x_np %.2f m at take-off, %.2f m in cruise\n", low, cruise)
	fmt.Printf("static margin with the CG at 18.2 m: %.3f, %.3f\n",
		disciplines.StaticMargin(low, 18.2, 6.9), disciplines.StaticMargin(cruise, 18.2, 6.9))
	// Output:
	// x_np 18.53 m at take-off, 20.08 m in cruise
	// static margin with the CG at 18.2 m: 0.048, 0.272
}

// The root wing box sized for the ultimate bending moment, and its
// stiffness.
func ExampleSizeWingBox() {
	b := disciplines.SizeWingBox(disciplines.Aluminium7075(), 3.75*36000*9.80665, 19.6, 0.785, 10.2, 0.04, 2.2, 1)
	fmt.Printf("covers %.1f mm, webs %.1f mm, GJ %.3g N m2, EI %.3g N m2\n",
		b.CoverThickness*1000, b.WebThickness*1000, b.TorsionalStiffness, b.BendingStiffness)
	// Output:
	// covers 9.7 mm, webs 5.0 mm, GJ 1.87e+08 N m2, EI 1.53e+08 N m2
}
