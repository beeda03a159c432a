package disciplines_test

import (
	"context"
	"fmt"

	"couplet/disciplines"
)

// A script converges the invented business jet and draws up its sizing
// diagram against the field lengths of its study: each thrust boundary
// at the design's wing loading and whether the design is above it.
func ExampleNewSizingDiagram() {
	sc := disciplines.Swiftlet()
	w, err := sc.Workspace()
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := w.Analyze(context.Background()); err != nil {
		fmt.Println(err)
		return
	}
	get := func(name string) (float64, bool) {
		x, err := w.Lookup(name)
		return x, err == nil
	}
	d, err := disciplines.NewSizingDiagram(get, disciplines.SizingLimits{TakeoffFieldLength: 2400, LandingFieldLength: 1950})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, b := range d.Boundaries {
		fmt.Printf("%-45s met: %v\n", b.Name, d.ThrustToWeight >= b.ThrustToWeight(d.WingLoading))
	}
	for _, l := range d.Limits {
		fmt.Printf("%-45s met: %v\n", l.Name, d.WingLoading <= l.WingLoading)
	}
	// Output:
	// take-off field length 2400 m                  met: true
	// second segment 2.4 % OEI (25.121(b))          met: true
	// approach climb 2.1 % OEI (25.121(d))          met: true
	// landing climb 3.2 % (25.119)                  met: true
	// cruise Mach 1.5 at 17000 m (10 % margin)      met: true
	// top of climb 1.52 m/s                         met: true
	// landing field length 1950 m (121.195(b))      met: true
}
