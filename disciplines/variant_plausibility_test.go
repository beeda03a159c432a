package disciplines

import (
	"context"
	"fmt"
	"sort"
	"strings"
	"testing"
)

// Plausibility on invented variants: perturbed demonstration aircraft of
// the regional jet and the supersonic business jet (and the
// forward-swept and airliner variants), one or a few parameters changed,
// each analysed as a study would. Every variant converges; its take-off
// mass, empty mass against Roskam's regression of its class, mission fuel
// fraction, cruise L/D and TSFC, field lengths, wing loading and take-off
// thrust over weight are read by the
// designer's checklist against the class's and the cruise regime's bands
// (mass_statistics.go: Roskam's regressions, common-practice bands from
// memory). The mild variants lie inside every band; the far ones are
// flagged exactly on the figures that leave their bands, and on no other.
//
// The concepts of other classes (concepts.go: a forward-swept transonic
// business jet, a long-range four-engine transport, a Mach 1.9
// supersonic transport) are read the same way; they were built after the
// model and tuned for none of its figures.
//
// One finding stays flagged on mild variants: the supersonic business
// jet lies 7–10 % below Roskam's business-jet regression at its baseline
// (EmptyMassCalibration: its fuel fraction is larger than the subsonic
// business jets' of the regression, and a larger calibration makes its
// mass closure run away), and 12–17 % below it when the range, Mach
// number, wing or engine move the design toward a higher fuel fraction:
// those variants are flagged on the regression row.

// variantCase is one perturbed aircraft and the class rows it must flag.
type variantCase struct {
	base  Scenario
	set   map[string]float64
	flags []string // checklist rules (prefixes) flagged among the class rows
}

// classRulePrefixes are the checklist rows of the class's figures.
var classRulePrefixes = []string{
	"take-off mass (", "empty mass against the ", "mission fuel over take-off mass (", "take-off field length (",
	"landing field length (", "cruise lift-to-drag ratio (", "cruise TSFC (", "wing loading at take-off (", "take-off thrust over weight (",
}

func variantCases() []variantCase {
	k, s := Kestrel(), Swiftlet()
	return []variantCase{
		// mild: inside every band
		{k, nil, nil},
		{k, map[string]float64{"mission.range": 1.5e6}, nil},
		{k, map[string]float64{"mission.range": 4.5e6}, nil},
		{k, map[string]float64{"mission.payload": 5000}, nil},
		{k, map[string]float64{"mission.payload": 9500}, nil},
		{k, map[string]float64{"wing.area": 70}, nil},
		{k, map[string]float64{"wing.area": 105}, nil},
		{k, map[string]float64{"wing.aspect_ratio": 7}, nil},
		{k, map[string]float64{"wing.aspect_ratio": 11.5}, nil},
		{k, map[string]float64{"cruise.mach": 0.7}, nil},
		{k, map[string]float64{"cruise.mach": 0.82}, nil},
		{k, map[string]float64{"cruise.altitude": 9000}, nil},
		{k, map[string]float64{"engine.sizing_field_length": 1350}, nil},
		{k, map[string]float64{"engine.sizing_field_length": 2100}, nil},
		{k, map[string]float64{"engine.bypass_ratio": 1.5}, nil},
		{k, map[string]float64{"wing.sweep": 10}, nil},
		{k, map[string]float64{"wing.sweep": 33}, nil},
		{k, map[string]float64{"cabin.passengers": 56, "mission.payload": 5600}, nil},
		{k, map[string]float64{"cabin.passengers": 96, "mission.payload": 9600}, nil},
		// engines sized for a 1 600 m field at 1 500 m: static T/W at the
		// airport 0.402, at the top of the jet transports' 0.22–0.40
		{k, map[string]float64{"airport.elevation": 1500}, []string{"take-off thrust over weight ("}},
		{k, map[string]float64{"airport.temperature_offset": 25}, nil},
		{s, nil, nil},
		{s, map[string]float64{"mission.range": 5e6}, nil},
		{s, map[string]float64{"mission.range": 7.8e6}, []string{"empty mass against the "}},
		{s, map[string]float64{"cruise.mach": 1.3}, nil},
		{s, map[string]float64{"cruise.mach": 1.8}, []string{"empty mass against the "}},
		{s, map[string]float64{"wing.area": 100}, []string{"empty mass against the "}},
		{s, map[string]float64{"wing.area": 135}, nil},
		{s, map[string]float64{"wing.aspect_ratio": 2.5}, []string{"empty mass against the "}},
		{s, map[string]float64{"wing.aspect_ratio": 3.4}, nil},
		{s, map[string]float64{"wing.sweep": 52}, []string{"empty mass against the ", "take-off thrust over weight ("}},
		{s, map[string]float64{"wing.thickness_ratio": 0.024}, nil},
		{s, map[string]float64{"wing.thickness_ratio": 0.036}, []string{"empty mass against the "}},
		{s, map[string]float64{"engine.sizing_field_length": 2100}, nil},
		{s, map[string]float64{"cabin.passengers": 8, "mission.payload": 900}, nil},
		{s, map[string]float64{"cabin.passengers": 16, "mission.payload": 1700}, []string{"empty mass against the "}},
		{s, map[string]float64{"cruise.altitude": 15500}, []string{"empty mass against the "}},
		{s, map[string]float64{"engine.bypass_ratio": 0.8}, []string{"empty mass against the "}},
		{s, map[string]float64{"engine.bypass_ratio": 2.2}, nil},
		{s, map[string]float64{"cruise.mach": 2.2, "cruise.altitude": 19000, "mission.range": 5e6}, nil},
		// the forward-sweep penalty needs engines of T/W 0.57–0.59, above
		// the business jets' 0.28–0.55 (as the 52° Swiftlet's 0.567)
		{SwiftletForwardSwept(), nil, []string{"take-off thrust over weight ("}},
		{SwiftletForwardSwept(), map[string]float64{"mission.range": 4.5e6}, []string{"take-off thrust over weight ("}},
		{Condor(), nil, nil},
		// at Mach 2 the airliner's engines reach T/W 0.514, above 0.30–0.50
		{Condor(), map[string]float64{"cruise.mach": 2.0}, []string{"take-off thrust over weight ("}},
		// the concepts of other classes (concepts.go)
		{Dunlin(), nil, nil},
		{Dunlin(), map[string]float64{"mission.range": 4.5e6}, nil},
		{Dunlin(), map[string]float64{"wing.sweep": -10}, nil},
		{Dunlin(), map[string]float64{"wing.aspect_ratio": 9}, nil},
		{Godwit(), nil, nil},
		{Godwit(), map[string]float64{"mission.range": 7e6}, nil},
		// A 11: cruise L/D 20.3, just above the band's 20 (the best
		// long-range twins of today reach about 20–21, from memory)
		{Godwit(), map[string]float64{"wing.aspect_ratio": 11}, []string{"cruise lift-to-drag ratio ("}},
		{Godwit(), map[string]float64{"wing.sweep": 28}, nil},
		{Sanderling(), nil, nil},
		// slower or shorter, the four-engine transport keeps the engines
		// and wing of Mach 1.9 on less fuel: 11–12 % above Roskam's
		// supersonic-cruise regression (its baseline 8 %)
		// (and, lighter on the same wing, a wing loading of 290–298 kg/m²,
		// below the supersonic airliners' 300–600)
		{Sanderling(), map[string]float64{"cruise.mach": 1.6}, []string{"empty mass against the ", "wing loading at take-off ("}},
		{Sanderling(), map[string]float64{"cruise.mach": 2.0, "cruise.altitude": 19000}, nil},
		{Sanderling(), map[string]float64{"mission.range": 5e6}, []string{"empty mass against the ", "wing loading at take-off ("}},
		// far: flagged where they leave the bands
		{k, map[string]float64{"engine.sizing_field_length": 950}, []string{"take-off field length (", "take-off thrust over weight ("}},
		{k, map[string]float64{"engine.bypass_ratio": 0.5}, []string{"cruise TSFC ("}},
		{k, map[string]float64{"cabin.passengers": 30, "mission.payload": 3000, "mission.range": 1.5e6},
			[]string{"take-off field length (", "landing field length (", "cruise lift-to-drag ratio (", "empty mass against the ", "wing loading at take-off ("}},
		{s, map[string]float64{"flap.cl_increment_landing": 0.3}, []string{"landing field length ("}},
	}
}

func TestVariantPlausibility(t *testing.T) {
	for _, c := range variantCases() {
		sc := with(c.base, c.base.Name+" variant", c.set)
		label := fmt.Sprintf("%s %v", c.base.Name, c.set)
		ev, idx, err := sweepEvaluator(sweepCase{label: label, scen: sc, box: []convBox{{"wing.taper", 0, 1}}}, 1)
		if err != nil {
			t.Fatal(err)
		}
		es, err := ev.Evaluate(context.Background(), [][]float64{ev.ToUnit([]float64{sc.Parameters["wing.taper"]})})
		if err != nil {
			t.Fatal(err)
		}
		e := es[0]
		if !e.Converged {
			t.Errorf("%s does not converge: %s", label, e.Err)
			continue
		}
		cl := DesignChecklist(func(name string) (float64, bool) {
			i, ok := idx[name]
			if !ok {
				return 0, false
			}
			return e.Outputs[i], true
		})
		var flagged []string
		for _, p := range classRulePrefixes {
			var row *ChecklistRow
			for i := range cl {
				if strings.HasPrefix(cl[i].Rule, p) {
					row = &cl[i]
				}
			}
			if row == nil {
				t.Errorf("%s: the checklist has no row %q…", label, p)
				continue
			}
			if !row.Pass {
				flagged = append(flagged, p)
				t.Logf("%s: %s", label, row.Line())
			}
		}
		want := append([]string(nil), c.flags...)
		sort.Strings(flagged)
		sort.Strings(want)
		if strings.Join(flagged, "|") != strings.Join(want, "|") {
			t.Errorf("%s: flagged %q, want %q", label, flagged, want)
		}
	}
}
