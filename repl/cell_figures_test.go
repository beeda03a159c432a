package repl

import (
	"bytes"
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// cellFiguresScript runs a design of experiments of the Sellar problem,
// saves a carpet it draws itself under its own name, and asks for a map
// interpolated from the run's analyses and a carpet in the result's
// report (cell.AddFigures, the generic report.FigureSource hook).
const cellFiguresScript = `//~ couplet-study 1 (couplet 0.1.0)

//~ cell 1
import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/optimizers/designmap"
	"couplet/repl/cell"
)

study, err := mdo.SellarStudy(mdo.MDF)
if err != nil {
	panic(err)
}
study.Seed = 4
if err := cell.Attach(study); err != nil {
	panic(err)
}
doe, err := optimizers.LatinHypercube{Samples: 30}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(doe)

//~ cell 2
d, err := designmap.Carpet(cell.Context(), study, designmap.CarpetSpec{X: "z1", Y: "z2", Lines: 4})
if err != nil {
	panic(err)
}
f, err := designmap.CarpetFigure(d)
if err != nil {
	panic(err)
}
f.Name = "own_carpet"
if err := cell.SaveFigure(f); err != nil {
	panic(err)
}
if err := cell.AddFigures(doe, designmap.RecordedFigures(designmap.Spec{X: "z1", Y: "z2"}), designmap.CarpetFigures(designmap.CarpetSpec{X: "z1", Y: "z2", Lines: 4})); err != nil {
	panic(err)
}
cell.WriteFile("forged.svg", []byte("<svg/>"))
`

// TestCellSavesAndAddsFigures: a cell saves a figure under its own name
// beside the result folders, its raw .svg is still refused, and the maps
// it asked for are in the result's report and folder.
func TestCellSavesAndAddsFigures(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "figures.study")
	if err := os.WriteFile(file, []byte(cellFiguresScript), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	var stderr bytes.Buffer
	if _, err := Run(context.Background(), RunOptions{File: file, OutDir: out, Stdout: io.Discard, Stderr: &stderr}); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	for _, f := range []string{"own_carpet.svg", "own_carpet.png"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("the cell's figure %s: %v", f, err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "forged.svg")); err == nil {
		t.Error("cell.WriteFile wrote forged.svg, a name of the tool's figures")
	}
	b, err := os.ReadFile(filepath.Join(out, "own_carpet.svg"))
	if err != nil {
		t.Fatal(err)
	}
	if text := validSVG(t, b); !strings.Contains(text, "carpet of f over z1 and z2") {
		t.Errorf("own_carpet.svg shows %q", text)
	}
	res := filepath.Join(out, "sellar")
	html, err := os.ReadFile(filepath.Join(res, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"f over z1 and z2, interpolated from 30 recorded analyses", "carpet of f over z1 and z2", "16 further analyses (4 values of each)"} {
		if !strings.Contains(string(html), want) {
			t.Errorf("report.html does not hold %q", want)
		}
	}
	for _, f := range []string{"recorded_map_f.svg", "recorded_map_f.png", "carpet_f.svg", "carpet_f.png"} {
		if _, err := os.Stat(filepath.Join(res, f)); err != nil {
			t.Errorf("result folder: %v", err)
		}
	}
	// a new run with Replace clears the cell's figures with the rest
	if _, err := Run(context.Background(), RunOptions{File: file, OutDir: out, Replace: true, Stdout: io.Discard, Stderr: io.Discard}); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(out, "own_carpet.svg")); err != nil {
		t.Errorf("after a replacing run: %v", err)
	}
}
