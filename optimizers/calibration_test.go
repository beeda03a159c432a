package optimizers

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

var updateCalibration = flag.Bool("update-calibration", false, "rewrite disciplines/swiftlet_polars_invented.csv")

// inventedFactors are the calibration factors the invented polars of the
// Swiftlet were made with (invented for the demonstration).
var inventedFactors = map[string]float64{
	"aero.factor_lift_slope":     1.06,
	"aero.factor_zero_lift_drag": 1.12,
	"aero.factor_induced_drag":   0.93,
}

// inventedConditions are the (Mach, altitude) points of the invented data.
var inventedConditions = [][2]float64{
	{0.6, 11000}, {0.8, 11000}, {0.9, 11000}, {0.9, 14000}, {1.1, 14000},
	{1.2, 14000}, {1.4, 17000}, {1.6, 17000}, {1.8, 17000}, {2.0, 17000},
}

// testRange is the mission range of the analyses at the measured
// conditions: the polars do not depend on the mission, but the coupled
// analysis sizes the aircraft for one, and at 2 000 km it closes at every
// condition of the data (the 7 000 km design mission does not close at
// low altitude or off its cruise Mach).
const testRange = 2e6

// inventedUncertainty is the relative standard uncertainty of each invented
// quantity (of the order a careful wind-tunnel entry quotes; common
// practice, no source).
var inventedUncertainty = map[string]float64{"aero.cla_cruise": 0.01, "aero.cd0_cruise": 0.02, "aero.k_cruise": 0.02}

// makeInventedPolars runs the Swiftlet at each invented condition with the
// invented factors and adds Gaussian noise of the stated uncertainties
// from a fixed seed, giving the CSV text of the invented data.
func makeInventedPolars(t *testing.T) string {
	t.Helper()
	sc := disciplines.Swiftlet()
	sys, err := sc.NewSystem()
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(2026, 17))
	quantities := []string{"aero.cla_cruise", "aero.cd0_cruise", "aero.k_cruise"}
	var b bytes.Buffer
	b.WriteString("# INVENTED data for the calibration example: made by the Couplet model of the\n")
	b.WriteString("# invented Swiftlet S12 (disciplines.Swiftlet) with aero.factor_lift_slope 1.06,\n")
	b.WriteString("# aero.factor_zero_lift_drag 1.12 and aero.factor_induced_drag 0.93, plus Gaussian\n")
	b.WriteString("# noise of the stated standard uncertainties (seed 2026), the aircraft analysed\n")
	b.WriteString("# on a 2 000 km mission. Not a measurement.\n")
	b.WriteString("# Written by: go test ./optimizers -run TestCalibrationExampleData -update-calibration\n")
	b.WriteString("cruise.mach [-],cruise.altitude [m]")
	for _, q := range quantities {
		v, _ := sys.Var(q)
		fmt.Fprintf(&b, ",%s [%s],u(%s) [%s]", q, v.Unit, q, v.Unit)
	}
	b.WriteString("\n")
	for _, c := range inventedConditions {
		params := map[string]float64{}
		for k, v := range sc.Parameters {
			params[k] = v
		}
		for k, v := range inventedFactors {
			params[k] = v
		}
		params["mission.range"] = testRange
		params["cruise.mach"], params["cruise.altitude"] = c[0], c[1]
		sol, err := sys.Analyze(context.Background(), params)
		if err != nil {
			t.Fatalf("Mach %g, %g m: %v", c[0], c[1], err)
		}
		fmt.Fprintf(&b, "%g,%g", c[0], c[1])
		for _, q := range quantities {
			x := sol.Get(q)
			u := inventedUncertainty[q] * x
			fmt.Fprintf(&b, ",%.5g,%.2g", x+u*rng.NormFloat64(), u)
		}
		b.WriteString("\n")
	}
	return b.String()
}

// TestCalibrationExampleData checks that the invented data file is the one
// makeInventedPolars writes (so its label says truly how it was made);
// -update-calibration rewrites it.
func TestCalibrationExampleData(t *testing.T) {
	text := makeInventedPolars(t)
	path := filepath.Join("..", "disciplines", "swiftlet_polars_invented.csv")
	if *updateCalibration {
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if got := disciplines.SwiftletInventedPolars(); got != text {
		t.Fatalf("%s is not what the model and the stated noise make; rerun with -update-calibration\n got:\n%s\nwant:\n%s", path, got, text)
	}
}

// swiftletCalibration is the calibration of the example study
// studies/business_jet_calibration.study.
func swiftletCalibration(t *testing.T) Calibration {
	t.Helper()
	sc := disciplines.Swiftlet()
	sys, err := sc.NewSystem()
	if err != nil {
		t.Fatal(err)
	}
	data, err := mdo.ReadMeasurements(strings.NewReader(disciplines.SwiftletInventedPolars()), "swiftlet_polars_invented.csv", sys)
	if err != nil {
		t.Fatal(err)
	}
	fixed := map[string]float64{}
	for k, v := range sc.Parameters {
		fixed[k] = v
	}
	fixed["mission.range"] = testRange
	return Calibration{
		Name: "Swiftlet polars", System: sys, Fixed: fixed, Data: data,
		Factors: []string{"aero.factor_lift_slope", "aero.factor_zero_lift_drag", "aero.factor_induced_drag"},
	}
}

// TestCalibrationRecoversInventedFactors: the example's calibration
// recovers each factor the invented data were made with within its
// reported two-standard-error interval.
func TestCalibrationRecoversInventedFactors(t *testing.T) {
	res, err := swiftletCalibration(t).Run(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	t.Log("\n" + res.String())
	if res.Fit.Stop != mdo.StopConverged {
		t.Fatalf("stopped: %v (%s)", res.Fit.Stop, res.Fit.Test)
	}
	for name, truth := range inventedFactors {
		ok, err := res.Within(name, truth, 2)
		if err != nil {
			t.Fatal(err)
		}
		j := indexOf(res.Fit.Names, name)
		if !ok {
			t.Errorf("%s = %.4f ± %.4f: the factor the data were made with, %g, is outside the two-standard-error interval", name, res.Fit.Params[j], res.Fit.StdErr[j], truth)
		}
		if !(res.Fit.StdErr[j] > 0 && res.Fit.StdErr[j] < 0.05) {
			t.Errorf("%s: standard error %g, want a positive error below 0.05 from %d points", name, res.Fit.StdErr[j], len(res.Points))
		}
	}
	if len(res.Points) != 3*len(inventedConditions) {
		t.Errorf("%d points, want %d", len(res.Points), 3*len(inventedConditions))
	}
	// Handing on: the next study gets the factors and says where they came from.
	st := &mdo.Study{Fixed: map[string]float64{"wing.area": 120}}
	res.Apply(st)
	if st.Fixed["wing.area"] != 120 || st.Fixed["aero.factor_lift_slope"] != res.Fit.Params[0] {
		t.Errorf("Apply: fixed %v", st.Fixed)
	}
	if len(st.Notes) != 1 || !strings.Contains(st.Notes[0], `calibration "Swiftlet polars"`) || !strings.Contains(st.Notes[0], "swiftlet_polars_invented.csv") {
		t.Errorf("Apply: notes %q", st.Notes)
	}
}

func indexOf(names []string, n string) int {
	for i, x := range names {
		if x == n {
			return i
		}
	}
	return -1
}

// TestCalibrationIndistinctFactors: fitting the zero-lift drag factor to
// lift-slope data alone leaves it undetermined, and the error names it.
func TestCalibrationIndistinctFactors(t *testing.T) {
	c := swiftletCalibration(t)
	c.Quantities = []string{"aero.cla_cruise"}
	c.Factors = []string{"aero.factor_lift_slope", "aero.factor_zero_lift_drag"}
	res, err := c.Run(context.Background())
	var ind *IndistinctError
	if !errors.As(err, &ind) {
		t.Fatalf("error %v, want an *IndistinctError", err)
	}
	if len(ind.Groups) != 1 || len(ind.Groups[0]) != 1 || ind.Groups[0][0] != "aero.factor_zero_lift_drag" {
		t.Errorf("groups %v, want [[aero.factor_zero_lift_drag]]", ind.Groups)
	}
	if res == nil || math.Abs(res.Fit.Params[0]-1.06) > 0.03 {
		t.Errorf("result %v: the lift slope factor is still fitted", res)
	}
}

func TestCalibrationRefusesBadDeclarations(t *testing.T) {
	cases := []struct {
		name string
		edit func(*Calibration)
		want string
	}{
		{"no factors", func(c *Calibration) { c.Factors = nil }, "no factors"},
		{"unknown factor", func(c *Calibration) { c.Factors = []string{"aero.factor_lift"} }, `"aero.factor_lift"`},
		{"computed factor", func(c *Calibration) { c.Factors = []string{"aero.k_cruise"} }, "computed by discipline airframe_aero"},
		{"condition factor", func(c *Calibration) { c.Factors = []string{"cruise.mach"} }, "also a condition"},
		{"unknown quantity", func(c *Calibration) { c.Quantities = []string{"aero.ld_cruise"} }, "not measured"},
	}
	for _, cs := range cases {
		t.Run(cs.name, func(t *testing.T) {
			c := swiftletCalibration(t)
			cs.edit(&c)
			_, err := c.Run(context.Background())
			if err == nil || !strings.Contains(err.Error(), cs.want) {
				t.Fatalf("error %v, want one containing %q", err, cs.want)
			}
		})
	}
}
