package disciplines

import (
	"strings"
	"testing"
)

// conceptLines returns the continuity lines of the concepts of other
// classes (concepts.go), as designLines does for the demonstration
// aircraft: every parameter over ±40 % of its value, and the regimes
// each concept crosses.
func conceptLines(t *testing.T) []designLine {
	var lines []designLine
	for _, sc := range []Scenario{Dunlin(), Godwit(), Sanderling()} {
		sys, err := sc.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range sys.Parameters() {
			lo, hi := nearDesign(sc, p, 0.6, 1.4)
			if p.Name == "cruise.mach" {
				// ±40 % of Mach 0.84 runs from Mach 0.5, where the
				// transport cannot lift its mass at 11 km, to 1.18:
				// ±15 % instead (the regime lines below go further)
				lo, hi = nearDesign(sc, p, 0.85, 1.15)
			}
			lines = append(lines, designLine{scen: sc, name: p.Name, lo: lo, hi: hi, points: 5, dense: 15, minConverged: 0.25})
		}
	}
	lines = append(lines,
		// the forward-swept jet from strong forward sweep to straight,
		// and into its drag rise
		designLine{scen: Dunlin(), name: "wing.sweep", lo: -40, hi: 0, points: 9, dense: 81, minConverged: 0.5},
		designLine{scen: Dunlin(), name: "cruise.mach", lo: 0.6, hi: 0.86, points: 8, dense: 53, minConverged: 0.5},
		// the long-range transport's sweep through the Oswald blend
		// (leading edge 25–35°) and its aspect ratio up to 16
		designLine{scen: Godwit(), name: "wing.sweep", lo: 15, hi: 42, points: 10, dense: 55, minConverged: 0.5},
		designLine{scen: Godwit(), name: "wing.aspect_ratio", lo: 7, hi: 16, points: 10, dense: 46, minConverged: 0.5},
		// the supersonic transport from Mach 1.3 to 2.2 and its sweep
		// through the Mach cone of its leading edge
		designLine{scen: Sanderling(), name: "cruise.mach", lo: 1.3, hi: 2.2, points: 10, dense: 46, minConverged: 0.5},
		designLine{scen: Sanderling(), name: "wing.sweep", lo: 50, hi: 68, points: 10, dense: 37, minConverged: 0.5},
	)
	return lines
}

func TestConceptLinesContinuous(t *testing.T) {
	// The jump bound, the exceptions and what a refusal must name are
	// those of TestDesignLinesContinuous (design_lines_test.go).
	checkLines(t, conceptLines(t), func(jump string) bool {
		// The Fourier coefficients of the area distribution's cuts
		// (geometry.area_rule_*) are the supersonic wave-drag
		// integral's inputs, not figures of the aircraft: the high
		// harmonics swing steeply with the sweep (a16 of the second
		// cut of the Sanderling by 4.3 a degree near 61.55°, smooth
		// at 0.002° spacing), which the refinement takes for a jump;
		// the wave drag they give (aero.wave_drag_cruise) is checked
		// as every other output.
		return strings.Contains(jump, ": geometry.area_rule_")
	})
}
