package disciplines

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// sizingCase is one converged aircraft analysis for the sizing-diagram
// tests: a scenario with some parameters changed.
type sizingCase struct {
	name   string
	scen   Scenario
	change map[string]float64
}

func sizingCases() []sizingCase {
	return []sizingCase{
		{"Swiftlet", Swiftlet(), nil},
		{"Swiftlet, larger wing", Swiftlet(), map[string]float64{"wing.area": 150, "wing.aspect_ratio": 2.2}},
		{"Swiftlet, oversized engines", Swiftlet(), map[string]float64{"engine.thrust_scale": 1.1}},
		{"Swiftlet, hot day (ISA+15)", Swiftlet(), map[string]float64{"airport.temperature_offset": 15}},
		{"Swiftlet S12-F", SwiftletForwardSwept(), nil},
		{"Kestrel", Kestrel(), nil},
	}
}

// analyse converges a sizing case and returns its variable lookup.
func (c sizingCase) analyse(t *testing.T) func(string) (float64, bool) {
	t.Helper()
	w, err := c.scen.Workspace()
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range sortedKeys(c.change) {
		if err := w.Set(k, c.change[k]); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Analyze(context.Background()); err != nil {
		t.Fatalf("%s: %v", c.name, err)
	}
	return func(name string) (float64, bool) {
		x, err := w.Lookup(name)
		return x, err == nil
	}
}

// boundaryNamed returns the boundary whose name starts with prefix.
func boundaryNamed(t *testing.T, d SizingDiagram, prefix string) SizingBoundary {
	t.Helper()
	for _, b := range d.Boundaries {
		if strings.HasPrefix(b.Name, prefix) {
			return b
		}
	}
	t.Fatalf("no boundary %q among %v", prefix, d.Boundaries)
	return SizingBoundary{}
}

func mustGet(t *testing.T, get func(string) (float64, bool), name string) float64 {
	t.Helper()
	x, ok := get(name)
	if !ok {
		t.Fatalf("analysis has no %s", name)
	}
	return x
}

// With each requirement set to the design's own performance, the
// boundary passes through the design: the diagram uses the mission
// discipline's methods (Roskam take-off parameter, 25.121(b) gradient at
// V2, 121.195(b) landing field length).
func TestSizingDiagramThroughDesign(t *testing.T) {
	for _, c := range sizingCases() {
		t.Run(c.name, func(t *testing.T) {
			get := c.analyse(t)
			lim := SizingLimits{
				TakeoffFieldLength:    mustGet(t, get, "perf.takeoff_field_length"),
				LandingFieldLength:    mustGet(t, get, "perf.landing_field_length"),
				SecondSegmentGradient: mustGet(t, get, "perf.climb_gradient_second_segment"),
			}
			d, err := NewSizingDiagram(get, lim)
			if err != nil {
				t.Fatal(err)
			}
			m0, s := mustGet(t, get, "mass.takeoff"), mustGet(t, get, "wing.area")
			n, tsls := mustGet(t, get, "engine.count"), mustGet(t, get, "engine.thrust_sea_level")
			if ws := m0 * G0 / s; math.Abs(d.WingLoading-ws) > 1e-9*ws {
				t.Errorf("design W/S %g, want m·g/S = %g", d.WingLoading, ws)
			}
			if tw := n * tsls / (m0 * G0); math.Abs(d.ThrustToWeight-tw) > 1e-9*tw {
				t.Errorf("design T/W %g, want n·T/(m·g) = %g", d.ThrustToWeight, tw)
			}
			for _, p := range []string{"take-off field length", "second segment"} {
				b := boundaryNamed(t, d, p)
				if got := b.ThrustToWeight(d.WingLoading); math.Abs(got-d.ThrustToWeight) > 0.01*d.ThrustToWeight {
					t.Errorf("%s at the design's own value: T/W %g at the design W/S, design %g", b.Name, got, d.ThrustToWeight)
				}
			}
			if len(d.Limits) != 1 {
				t.Fatalf("limits %v, want the landing field length", d.Limits)
			}
			if got := d.Limits[0].WingLoading; math.Abs(got-d.WingLoading) > 0.01*d.WingLoading {
				t.Errorf("%s at the design's own value: W/S %g, design %g", d.Limits[0].Name, got, d.WingLoading)
			}
		})
	}
}

// With the requirements of the business-jet study, the design lies on
// the side of each boundary that its own perf.* outputs say: above a
// thrust boundary when it meets the requirement, left of the landing
// limit when its landing field length is shorter.
func TestSizingDiagramSides(t *testing.T) {
	const tofl, lfl, grad = 2400, 1950, 0.024 // studies/business_jet.study; 25.121(b) twin minimum
	for _, c := range sizingCases() {
		t.Run(c.name, func(t *testing.T) {
			get := c.analyse(t)
			d, err := NewSizingDiagram(get, SizingLimits{TakeoffFieldLength: tofl, LandingFieldLength: lfl, SecondSegmentGradient: grad})
			if err != nil {
				t.Fatal(err)
			}
			n := mustGet(t, get, "engine.count")
			gApp, err := ApproachClimbMinGradient(n)
			if err != nil {
				t.Fatal(err)
			}
			tests := []struct {
				boundary string
				meets    bool // what the design's own output says
			}{
				{"take-off field length", mustGet(t, get, "perf.takeoff_field_length") <= tofl},
				{"second segment", mustGet(t, get, "perf.climb_gradient_second_segment") >= grad},
				// 14 CFR 25.121(d) and 25.119 minima
				{"approach climb", mustGet(t, get, "perf.climb_gradient_approach") >= gApp},
				{"landing climb", mustGet(t, get, "perf.climb_gradient_landing") >= LandingClimbMinGradient},
			}
			for _, tc := range tests {
				b := boundaryNamed(t, d, tc.boundary)
				req := b.ThrustToWeight(d.WingLoading)
				if math.Abs(d.ThrustToWeight-req) <= 1e-9*req {
					continue // on the boundary: an active requirement, met to rounding
				}
				above := d.ThrustToWeight > req
				if above != tc.meets {
					t.Errorf("%s: design T/W %g, boundary %g at W/S %g: above = %v, but the design's output says meets = %v",
						b.Name, d.ThrustToWeight, req, d.WingLoading, above, tc.meets)
				}
			}
			left := d.WingLoading <= d.Limits[0].WingLoading
			if meets := mustGet(t, get, "perf.landing_field_length") <= lfl; left != meets {
				t.Errorf("landing: design W/S %g, limit %g: left = %v, but field length meets = %v", d.WingLoading, d.Limits[0].WingLoading, left, meets)
			}
		})
	}
}

// With the default limits (the engine-sizing field length, the 25.121(b)
// minimum) the take-off, second-segment, top-of-climb and cruise
// boundaries are the four requirements the propulsion discipline sizes
// the engines to: the highest of them at the design's wing loading, times
// engine.thrust_scale, is the design's T/W, and it is the sizing case.
func TestSizingDiagramEngineSizing(t *testing.T) {
	cases := []string{"take-off field length", "second segment", "top of climb", "cruise"} // engine.sizing_case 0..3
	for _, c := range sizingCases() {
		t.Run(c.name, func(t *testing.T) {
			get := c.analyse(t)
			d, err := NewSizingDiagram(get, SizingLimits{})
			if err != nil {
				t.Fatal(err)
			}
			best, kase := 0.0, -1
			for k, p := range cases {
				if tw := boundaryNamed(t, d, p).ThrustToWeight(d.WingLoading); tw > best {
					best, kase = tw, k
				}
			}
			scale := mustGet(t, get, "engine.thrust_scale")
			if want := d.ThrustToWeight / scale; math.Abs(best-want) > 1e-6*want {
				t.Errorf("highest sizing boundary T/W %g (%s), want the design's %g / thrust scale %g = %g", best, cases[kase], d.ThrustToWeight, scale, want)
			}
			if want := int(mustGet(t, get, "engine.sizing_case")); kase != want {
				t.Errorf("highest boundary %s, engine.sizing_case says %s", cases[kase], cases[want])
			}
		})
	}
}

// The landing limit is the largest wing loading of the field length: the
// landing distance at the stall speed it implies is 0.60 of the length
// (14 CFR 121.195(b)); and boundaries rise with wing loading where they
// should (take-off, landing-speed climbs) in the usual diagram shape.
func TestSizingDiagramShape(t *testing.T) {
	get := sizingCases()[0].analyse(t)
	d, err := NewSizingDiagram(get, SizingLimits{LandingFieldLength: 1950})
	if err != nil {
		t.Fatal(err)
	}
	ml, m0 := mustGet(t, get, "mass.landing"), mustGet(t, get, "mass.takeoff")
	clL := mustGet(t, get, "aero.cl_max_landing")
	ws := d.Limits[0].WingLoading
	vs0 := StallSpeed(ml, SeaLevelDensity, m0*G0/ws, clL)
	if got := LandingFieldLength(DefaultLandingSettings().LandingDistance(VRefMinRatio * vs0)); math.Abs(got-1950) > 1e-6 {
		t.Errorf("landing field length at the limit W/S %g: %g m, want 1950 m", ws, got)
	}
	to := boundaryNamed(t, d, "take-off field length")
	if r := to.ThrustToWeight(2*d.WingLoading) / to.ThrustToWeight(d.WingLoading); math.Abs(r-2) > 1e-12 {
		t.Errorf("take-off boundary not proportional to W/S (Roskam TOP): ratio %g at twice W/S", r)
	}
	// the cruise boundary has its minimum at the W/S where parasite and
	// induced drag are equal, q·CD0 = K·(βW/S)²/q: lower on both sides
	cr := boundaryNamed(t, d, "cruise")
	lo, mid, hi := cr.ThrustToWeight(0.3*d.WingLoading), cr.ThrustToWeight(d.WingLoading), cr.ThrustToWeight(20*d.WingLoading)
	if !(lo > mid && hi > mid) {
		t.Errorf("cruise boundary %g, %g, %g at 0.3, 1, 20 × design W/S: want a minimum between", lo, mid, hi)
	}
}

func TestSizingDiagramBadInput(t *testing.T) {
	get := sizingCases()[0].analyse(t)
	without := func(name string) func(string) (float64, bool) {
		return func(n string) (float64, bool) {
			if n == name {
				return 0, false
			}
			return get(n)
		}
	}
	with := func(name string, v float64) func(string) (float64, bool) {
		return func(n string) (float64, bool) {
			if n == name {
				return v, true
			}
			return get(n)
		}
	}
	tests := []struct {
		name string
		get  func(string) (float64, bool)
		lim  SizingLimits
		want string
	}{
		{"missing mass", without("mass.takeoff"), SizingLimits{}, "mass.takeoff"},
		{"missing cruise polar", without("aero.k_cruise"), SizingLimits{}, "aero.k_cruise"},
		{"zero area", with("wing.area", 0), SizingLimits{}, "wing.area = 0 m2"},
		{"NaN thrust", with("engine.thrust_sea_level", math.NaN()), SizingLimits{}, "engine.thrust_sea_level = NaN"},
		{"one engine", with("engine.count", 1), SizingLimits{}, "engine.count = 1"},
		{"landing length shorter than the air distance", get, SizingLimits{LandingFieldLength: 300}, "perf.landing_field_length = 300 m"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := NewSizingDiagram(tc.get, tc.lim)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one naming %q", err, tc.want)
			}
		})
	}
	if _, err := NewSizingDiagram(nil, SizingLimits{}); err == nil {
		t.Error("nil lookup accepted")
	}
	var ie *InputError
	if _, err := NewSizingDiagram(with("wing.area", -1), SizingLimits{}); !errors.As(err, &ie) || ie.Var != "wing.area" {
		t.Errorf("error %v, want an *InputError for wing.area", err)
	}
}
