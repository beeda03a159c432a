package optimizers

import (
	"bytes"
	"context"
	"maps"
	"strings"
	"testing"

	"couplet/mdo/plot"
)

// TestCalibrationFigure: the calibration's figure draws a panel per
// quantity against the Mach number, the measured points with their
// error bars and the predictions before and after the fit, one series
// per altitude, as SVG and PNG; the predictions before the fit are the
// model's with the factors at 1.
func TestCalibrationFigure(t *testing.T) {
	c := swiftletCalibration(t)
	res, err := c.Run(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	p := res.Points[0]
	params := maps.Clone(c.Fixed)
	for i, n := range res.Conditions {
		params[n] = p.Conditions[i]
	}
	sol, err := c.System.Analyze(context.Background(), params)
	if err != nil {
		t.Fatal(err)
	}
	if want := sol.Get(p.Quantity); p.Before != want || p.Before == p.Predicted {
		t.Errorf("line %d %s: before %g, the model with factors 1 gives %g; after %g", p.Line, p.Quantity, p.Before, want, p.Predicted)
	}
	fig := res.Figure()
	svg, err := fig.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, err := plot.SVGText(svg)
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(texts, "\n")
	for _, w := range []string{
		"aero.cla_cruise: measured, predicted before and after calibration", "aero.k_cruise [-]", "cruise.mach [-]",
		"cruise.altitude 11000 m", "cruise.altitude 14000 m", "cruise.altitude 17000 m",
		"measured ± standard uncertainty", "predicted before calibration", "predicted after calibration",
	} {
		if !strings.Contains(all, w) {
			t.Errorf("the figure lacks %q", w)
		}
	}
	var png bytes.Buffer
	if err := fig.WritePNG(&png); err != nil || !bytes.HasPrefix(png.Bytes(), []byte("\x89PNG")) {
		t.Errorf("PNG: %v (%d bytes)", err, png.Len())
	}
	if left := (&CalibrationResult{}).Figure(); left.Reason == nil {
		t.Error("an empty calibration's figure is drawn")
	}
}
