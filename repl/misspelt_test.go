package repl

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A misspelt name inside a scripted constraint of the regional-jet study
// is refused when cell 1 attaches the study, with the closest name, and
// nothing is evaluated. Before, the run began and ended "best objective
// NaN (infeasible)" with exit 0 (and, once Values.Get panicked, stopped at
// its first evaluation in cell 2).
func TestMisspeltNameRefusedAtAttach(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "studies", "regional_jet.study"))
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(src), `v.Get("mass.fuel_capacity")`, `v.Get("mass.fuel_capcity")`, 1)
	if text == string(src) {
		t.Fatal("the study no longer reads mass.fuel_capacity in a scripted constraint")
	}
	dir := t.TempDir()
	study := filepath.Join(dir, "typo.study")
	if err := os.WriteFile(study, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	_, err = Run(context.Background(), RunOptions{File: study, OutDir: out})
	if err == nil {
		t.Fatal("the run with a misspelt name succeeded")
	}
	for _, w := range []string{"cell 1", `constraint fuel_volume_margin`, `no variable "mass.fuel_capcity"`, "similar: mass.fuel_capacity"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("error %q lacks %q", err, w)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "results.db")); !os.IsNotExist(err) {
		t.Errorf("a store was made for a study refused at attach: %v", err)
	}
}
