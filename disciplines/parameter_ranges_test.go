package disciplines

import (
	"fmt"
	"testing"
)

// Every discipline that reads a parameter (an input nobody produces)
// declares the same validity range for it: the System shows the first
// declaration (VARIABLES.md, `couplet vars`, a study's bounds check),
// while the analysis enforces every consumer's, so a wider declaration
// beside a narrower one advertises values the analysis refuses.
func TestParameterRangesAgree(t *testing.T) {
	for _, cfg := range []AircraftConfig{DefaultAircraftConfig(), {Geometry: SubsonicGeometryOptions(), Aero: DefaultAeroOptions()}} {
		produced := map[string]bool{}
		ds := AircraftDisciplines(cfg)
		for _, d := range ds {
			for _, v := range d.Outputs() {
				produced[v.Name] = true
			}
		}
		first := map[string]string{}
		for _, d := range ds {
			for _, v := range d.Inputs() {
				if produced[v.Name] {
					continue
				}
				r := fmt.Sprintf("[%g, %g]", v.Min, v.Max)
				if f, ok := first[v.Name]; !ok {
					first[v.Name] = d.Name() + " " + r
				} else if f[len(f)-len(r):] != r {
					t.Errorf("%s: %s reads it in %s, %s", v.Name, d.Name(), r, f)
				}
			}
		}
	}
}
