package disciplines

import (
	"context"
	"strings"
	"testing"

	"couplet/mdo"
)

// A layout the model cannot build is refused by geometry as an invalid
// input naming the parameter to change, its value and what is allowed,
// not reported as a design that does not close through a derived
// variable (wing.mac_x, fuselage.length, htail.arm, aero.cla_cruise, a
// tail area) outside a later discipline's range.
func TestGeometryRefusesImpossibleLayouts(t *testing.T) {
	runRefusals(t, []refusalCase{
		{"wing inside the fuselage", Swiftlet(), map[string]float64{"wing.area": 1},
			mdo.InvalidInput, []string{"wing.area = 1 m2", "larger than the fuselage diameter"}},
		{"forward-swept MAC ahead of the nose", SwiftletForwardSwept(), map[string]float64{"wing.position": 0.05},
			mdo.InvalidInput, []string{"wing.position = 0.05 is not allowed", "at least 0.1", "ahead of the nose"}},
		{"wing behind the tails", Kestrel(), map[string]float64{"wing.position": 0.9},
			mdo.InvalidInput, []string{"wing.position = 0.9 is not allowed", "below 0.7", "ahead of the tails"}},
		{"wing too large for the fuselage", Condor(), map[string]float64{"wing.area": 2000},
			mdo.InvalidInput, []string{"wing.area = 2000 m2", "smaller wing or a longer fuselage"}},
		{"fuselage too long", Kestrel(), map[string]float64{"cabin.passengers": 800},
			mdo.InvalidInput, []string{"cabin.passengers = 800", "at most 150 m", "196 m"}},
		{"tailless", Swiftlet(), map[string]float64{"htail.volume": 0},
			mdo.InvalidInput, []string{"htail.volume", "[0.01, 3]"}},
	})
}

// refusalCase is a scenario with parameters changed whose analysis must
// fail with the given class and a message holding every want.
type refusalCase struct {
	name  string
	scen  Scenario
	set   map[string]float64
	class mdo.FailureClass
	want  []string // substrings of the message
}

// runRefusals analyses each case through a study (vtail.volume its one
// design variable, at the scenario's value) and checks the failure.
func runRefusals(t *testing.T, cases []refusalCase) {
	t.Helper()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sys, err := c.scen.NewSystem()
			if err != nil {
				t.Fatal(err)
			}
			fixed := copyMap(c.scen.Parameters)
			delete(fixed, "vtail.volume")
			for k, v := range c.set {
				fixed[k] = v
			}
			st := &mdo.Study{Name: c.name, System: sys, Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")},
				Design: []mdo.DesignVar{mdo.Continuous("vtail.volume", 0.01, 0.1)}, Fixed: fixed, Workers: 1}
			ev, err := st.NewEvaluator()
			if err != nil {
				// a value outside the declared range is refused when the study is built
				if c.class == mdo.InvalidInput && strings.Contains(err.Error(), c.want[0]) && strings.Contains(err.Error(), c.want[1]) {
					return
				}
				t.Fatal(err)
			}
			e, err := ev.EvaluateOne(context.Background(), ev.ToUnit([]float64{c.scen.Parameters["vtail.volume"]}))
			if err != nil {
				t.Fatal(err)
			}
			if e.Converged || mdo.ClassOf(e) != c.class {
				t.Fatalf("converged %v, class %q, want %q: %s", e.Converged, mdo.ClassOf(e), c.class, e.Err)
			}
			for _, w := range c.want {
				if !strings.Contains(e.Err, w) {
					t.Errorf("message %q does not contain %q", e.Err, w)
				}
			}
		})
	}
}

// Lift outputs of airframe_aero the disciplines reading them would
// refuse (the lift slopes of neutral_point, the maximum lift coefficients
// of propulsion and mission) are refused as invalid inputs naming the
// calibration factor or high-lift increment that drives them, not as a
// design that does not close through aero.cla_cruise or
// aero.cl_max_takeoff.
func TestAirframeAeroRefusesLiftOutOfRange(t *testing.T) {
	runRefusals(t, []refusalCase{
		{"lift-slope factor", Kestrel(), map[string]float64{"aero.factor_lift_slope": 3},
			mdo.InvalidInput, []string{"aero.factor_lift_slope = 3 is not allowed", "exceeds the 10 /rad"}},
		{"take-off flaps", Kestrel(), map[string]float64{"flap.cl_increment_takeoff": 3, "wing.sweep": 0},
			mdo.InvalidInput, []string{"flap.cl_increment_takeoff = 3 is not allowed", "at most 2.59", "exceeds the 4"}},
		{"landing flaps", Kestrel(), map[string]float64{"flap.cl_increment_landing": 3, "wing.sweep": 0, "wing.thickness_ratio": 0.18},
			mdo.InvalidInput, []string{"flap.cl_increment_landing = 3 is not allowed", "exceeds the 4.5"}},
		// a wing whose span barely exceeds the fuselage diameter exposes
		// almost none of itself: the wing-body lift slope falls below the
		// neutral point's 0.1 /rad and the wing area is named
		{"tiny wing", Swiftlet(), map[string]float64{"wing.area": 1.21},
			mdo.InvalidInput, []string{"wing.area = 1.21 m2 is not allowed", "a larger wing", "below the 0.1 /rad"}},
		{"lift-slope factor too low", Swiftlet(), map[string]float64{"wing.area": 1.3, "aero.factor_lift_slope": 0.2},
			mdo.InvalidInput, []string{"aero.factor_lift_slope = 0.2 is not allowed", "at least", "below the 0.1 /rad"}},
		{"no take-off flaps on a highly swept wing", Swiftlet(), map[string]float64{"flap.cl_increment_takeoff": 0, "wing.sweep": 70, "wing.thickness_ratio": 0.01, "wing.position": 0.3, "htail.volume": 0.1},
			mdo.InvalidInput, []string{"flap.cl_increment_takeoff = 0 is not allowed", "at least", "below the 0.3"}},
	})
}

// A tail larger than the model accepts (1000 m2, the range of htail.area
// and vtail.area in the disciplines that read them) is refused naming its
// volume coefficient and the largest that fits.
func TestGeometryRefusesOversizedTail(t *testing.T) {
	w, err := NewWing(1800, 2, 0.2, 50, 0.03)
	if err != nil {
		t.Fatal(err)
	}
	f, err := FuselageFromDimensions(140, 5, 20, 30)
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewConfiguration(ConfigurationSpec{Wing: w, WingPosition: 0.2, Fuselage: f, HTailVolume: 1.5, VTailVolume: 0.05}, DefaultGeometryOptions())
	if err == nil || !strings.Contains(err.Error(), "htail.volume = 1.5 is not allowed") || !strings.Contains(err.Error(), "at most about 1.2 with this wing") {
		t.Fatalf("err = %v, want the refusal of htail.volume naming the 1000 m2 limit", err)
	}
	c, err := NewConfiguration(ConfigurationSpec{Wing: w, WingPosition: 0.2, Fuselage: f, HTailVolume: 1, VTailVolume: 0.05}, DefaultGeometryOptions())
	if err != nil || !(c.HTail.Area > 0 && c.HTail.Area <= 1000) {
		t.Fatalf("volume 1: area %g, err %v", c.HTail.Area, err)
	}
}
