package repl

import (
	"context"
	"path/filepath"
	"testing"

	"couplet/optimizers"
)

// TestCalibrationStudyRecoversFactors: the calibration of
// studies/business_jet_calibration.study finds each factor its invented
// data were made with (the data file's header: lift slope 1.06, zero-lift
// drag 1.12, induced drag 0.93) within its reported two-standard-error
// interval.
func TestCalibrationStudyRecoversFactors(t *testing.T) {
	s := studySession(t, "business_jet_calibration.study", 2)
	c := s.Exec(context.Background(), "calib")
	res, ok := c.Value.(*optimizers.CalibrationResult)
	if c.Err != nil || !ok {
		t.Fatalf("calib is %T (%v), want *optimizers.CalibrationResult", c.Value, c.Err)
	}
	truth := map[string]float64{"aero.factor_lift_slope": 1.06, "aero.factor_zero_lift_drag": 1.12, "aero.factor_induced_drag": 0.93}
	for j, name := range res.Fit.Names {
		within, err := res.Within(name, truth[name], 2)
		if err != nil {
			t.Fatal(err)
		}
		if !within {
			t.Errorf("%s = %.4f ± %.4f: the invented data's %g lies outside the two-standard-error interval", name, res.Fit.Params[j], res.Fit.StdErr[j], truth[name])
			continue
		}
		t.Logf("%s = %.4f ± %.4f recovers the invented %g within two standard errors", name, res.Fit.Params[j], res.Fit.StdErr[j], truth[name])
	}
	if len(res.Fit.Names) != len(truth) {
		t.Errorf("fitted %v, want the three factors", res.Fit.Names)
	}
}

// studySession returns a session that has run the first n cells of the
// example study name (closed when the test ends).
func studySession(t *testing.T, name string, n int) *Session {
	t.Helper()
	f, err := ReadStudy(filepath.Join("..", "studies", name))
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSession(Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	for _, c := range f.Cells[:n] {
		if r := s.Exec(context.Background(), c.Source); r.Err != nil {
			t.Fatal(r.Err)
		}
	}
	return s
}
