package disciplines

import (
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

// mapGetter reads values from a map.
func mapGetter(m map[string]float64) func(string) (float64, bool) {
	return func(name string) (float64, bool) { v, ok := m[name]; return v, ok }
}

// checklistBase is a design inside every band of the checklist.
func checklistBase() map[string]float64 {
	return map[string]float64{
		"stability.static_margin_takeoff": 0.10, "stability.static_margin_cruise_start": 0.08, "stability.static_margin_cruise_end": 0.12,
		"fuselage.fineness": 12, "fuselage.diameter": 2, "fuselage.tail_length": 6, // upsweep atan(1/3) = 18.4°
		"cruise.mach": 1.5, "wing.sweep_le": 60, "aero.ld_takeoff": 5,
		"layout.wing_tail_clearance": 0.5, "layout.tail_span_ratio": 0.4, "layout.wing_overhang": -1, "layout.tail_overhang": -0.2,
		"cabin.seats_abreast": 2, "cabin.aisles": 1, "mass.fuel_capacity": 20000, "mass.fuel": 18000,
		"mass.empty": 19500, "mass.crew": 190, "mass.takeoff": 36000, "cabin.passengers": 12,
		"aero.cl_cruise": 0.15, "aero.cl_max_clean": 0.5,
		"stability.divergence_dynamic_pressure": 1e9, "dive.dynamic_pressure": 40000,
		"wing.thickness_ratio": 0.03, "aero.ld_cruise": 9, "engine.tsfc_cruise": 2.9e-5, "perf.takeoff_field_length": 2200, "perf.landing_field_length": 1800,
	}
}

func TestDesignChecklistFlags(t *testing.T) {
	// Each rule of thumb flags a value outside its band (static margin
	// 5–15 % MAC, fineness 10–15, upsweep 10–25°, subsonic leading edge,
	// take-off L/D about 5, supersonic wing t/c about 3–5 %, layout clearances, cruise CL at most
	// CLmax,clean/1.3: common practice, no source; 14 CFR 25.817; empty masses against their class).
	tests := []struct {
		name string
		set  map[string]float64
		rule string // the one rule flagged
	}{
		{"inside every band", nil, ""},
		{"too stable in cruise", map[string]float64{"stability.static_margin_cruise_start": 0.35}, "static margin at the start of cruise"},
		{"unstable at take-off", map[string]float64{"stability.static_margin_takeoff": -0.02}, "static margin at take-off"},
		{"stubby fuselage", map[string]float64{"fuselage.fineness": 8}, "fuselage fineness ratio"},
		{"long thin tail cone", map[string]float64{"fuselage.tail_length": 14}, "aft-fuselage upsweep for rotation clearance"},
		{"supersonic leading edge", map[string]float64{"wing.sweep_le": 30}, "leading edge behind the Mach cone (β·cot|Λ_LE|)"},
		{"take-off L/D of a fat wing", map[string]float64{"aero.ld_takeoff": 8}, "take-off lift-to-drag ratio of a slender supersonic wing"},
		{"thick supersonic wing", map[string]float64{"wing.thickness_ratio": 0.07}, "thickness ratio of a supersonic cruise wing"},
		{"tail over the wing", map[string]float64{"layout.wing_tail_clearance": -2}, "gap from the wing trailing edge to the tail leading edge"},
		{"tail as wide as the wing", map[string]float64{"layout.tail_span_ratio": 1.02}, "horizontal-tail span over wing span"},
		{"wing past the fuselage end", map[string]float64{"layout.wing_overhang": 1.2}, "wing behind the fuselage end"},
		{"tail tips past the fuselage end", map[string]float64{"layout.tail_overhang": 1.5}, "tail tips behind the fuselage end"},
		{"eight abreast, one aisle", map[string]float64{"cabin.seats_abreast": 8}, "seats abreast with 1 aisle(s)"},
		{"cruise near the clean maximum lift", map[string]float64{"aero.cl_cruise": 0.4}, "cruise lift coefficient over the clean maximum"},
		// 14 CFR 25.629(b): the dive speed + 15 %, q ratio 1.3225 (from memory)
		{"divergence inside the enlarged envelope", map[string]float64{"stability.divergence_dynamic_pressure": 52000}, "wing divergence dynamic pressure over the dive dynamic pressure"},
		{"fuel beyond the tanks", map[string]float64{"mass.fuel": 21000}, "tank capacity less mission fuel"},
		// 12 seats: 417 kg a seat, below the business jets' 450 (common practice, from memory)
		{"light empty mass", map[string]float64{"mass.empty": 5000}, "operating empty mass per seat (business jet)"},
		// the class's and the cruise regime's bands (common practice, from memory)
		{"heavy business jet", map[string]float64{"mass.takeoff": 60000, "mass.empty": 32000, "cabin.passengers": 16, "mass.fuel": 29000, "mass.fuel_capacity": 30000}, "take-off mass (business jet)"},
		{"fuel-heavy", map[string]float64{"mass.fuel": 19900}, "mission fuel over take-off mass (business jet)"},
		{"long take-off field", map[string]float64{"perf.takeoff_field_length": 3400}, "take-off field length (business jet)"},
		{"long landing field", map[string]float64{"perf.landing_field_length": 2500}, "landing field length (business jet)"},
		{"subsonic L/D at Mach 1.5", map[string]float64{"aero.ld_cruise": 14}, "cruise lift-to-drag ratio (supersonic cruise)"},
		{"high-bypass TSFC at Mach 1.5", map[string]float64{"engine.tsfc_cruise": 1.6e-5}, "cruise TSFC (supersonic cruise)"},
		{"subsonic business jet, supersonic L/D", map[string]float64{"cruise.mach": 0.85, "aero.ld_cruise": 9, "engine.tsfc_cruise": 2e-5}, "cruise lift-to-drag ratio (subsonic cruise)"},
	}
	for _, c := range tests {
		m := checklistBase()
		for k, v := range c.set {
			m[k] = v
		}
		cl := DesignChecklist(mapGetter(m))
		var flagged []string
		for _, r := range cl.Flagged() {
			flagged = append(flagged, r.Rule)
		}
		if c.rule == "" && len(flagged) != 0 || c.rule != "" && (len(flagged) == 0 || flagged[0] != c.rule) {
			t.Errorf("%s: flagged %q, want %q", c.name, flagged, c.rule)
		}
		for _, r := range cl {
			if r.Source == "" {
				t.Errorf("%s: row %q has no source", c.name, r.Rule)
			}
		}
	}
	// the upsweep estimate: atan(D/L_tail)
	for _, r := range DesignChecklist(mapGetter(checklistBase())) {
		if strings.HasPrefix(r.Rule, "aft-fuselage upsweep") && math.Abs(r.Value-math.Atan(1.0/3)*180/math.Pi) > 1e-12 {
			t.Errorf("upsweep %g°", r.Value)
		}
	}
	// a subsonic aircraft has no supersonic rows; a result that is not an
	// aircraft has no checklist
	m := checklistBase()
	m["cruise.mach"] = 0.78
	for _, r := range DesignChecklist(mapGetter(m)) {
		if strings.Contains(r.Rule, "Mach cone") || strings.Contains(r.Rule, "supersonic") {
			t.Errorf("subsonic aircraft has the row %q", r.Rule)
		}
	}
	if cl := DesignChecklist(mapGetter(map[string]float64{"y1": 3})); cl != nil {
		t.Errorf("non-aircraft checklist %v", cl)
	}
}

func TestScenarioChecklists(t *testing.T) {
	// Every demonstration aircraft has a full checklist; the regional jet
	// passes its cabin, mass and layout rules.
	for _, sc := range demonstrationAircraft() {
		w := solveScenario(t, sc, mdo.GaussSeidel)
		cl := DesignChecklist(func(name string) (float64, bool) {
			v, err := w.Lookup(name)
			return v, err == nil
		})
		if len(cl) < 15 && sc.Parameters["cruise.mach"] > 1 || len(cl) < 13 {
			t.Errorf("%s: %d rows", sc.Name, len(cl))
		}
		t.Logf("%s:\n%s", sc.Name, cl)
		if sc.Name == Kestrel().Name {
			for _, r := range cl.Flagged() {
				if strings.Contains(r.Rule, "seats") || strings.Contains(r.Rule, "mass") || strings.Contains(r.Rule, "wing") || strings.Contains(r.Rule, "tank") {
					t.Errorf("Kestrel flags %s", r.Line())
				}
			}
		}
	}
}

func TestResultChecklistsBestAndFront(t *testing.T) {
	// One checklist for the best design and one for each front design,
	// from the recorded outputs.
	base := checklistBase()
	var outs []mdo.Var
	var vals []float64
	for _, k := range sortedKeys(base) {
		outs = append(outs, mdo.Var{Name: k})
		vals = append(vals, base[k])
	}
	tight := append([]float64(nil), vals...)
	for i, v := range outs {
		if v.Name == "layout.wing_tail_clearance" {
			tight[i] = -1
		}
	}
	r := &mdo.Result{Outputs: outs, Best: &mdo.Evaluation{ID: 7, Outputs: vals},
		Front: []*mdo.Evaluation{{ID: 7, Outputs: vals}, {ID: 9, Outputs: tight}}}
	// a declared overhang of the tail tips from the study's constraint
	for i, v := range outs {
		if v.Name == "layout.tail_overhang" {
			vals[i] = 1.5
		}
	}
	if f := ResultChecklists(r)[0].Flagged(); len(f) != 1 || f[0].Rule != "tail tips behind the fuselage end" {
		t.Errorf("1.5 m overhang, none declared: flags %v", f)
	}
	r.Constraints = LayoutConstraints(2)
	if f := ResultChecklists(r)[0].Flagged(); len(f) != 0 {
		t.Errorf("1.5 m overhang, 2 m declared: flags %v", f)
	}
	got := ResultChecklists(r)
	if len(got) != 3 || got[0].Label != "best design #7" || got[2].Label != "front design #9" {
		t.Fatalf("checklists %v", got)
	}
	if len(got[0].Flagged()) != 0 || len(got[2].Flagged()) != 1 {
		t.Errorf("flags: best %v, front #9 %v", got[0].Flagged(), got[2].Flagged())
	}
	if ResultChecklists(nil) != nil {
		t.Error("nil result has checklists")
	}
}
