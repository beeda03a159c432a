package disciplines

import (
	"fmt"
	"math"
	"strings"
	"text/tabwriter"

	"couplet/mdo"
)

// The designer's checklist: the rules of thumb a designer reads a solved
// aircraft against, each with the design's value, its band and a flag
// when the value lies outside. The rows are flags, not constraints: a
// study decides what to constrain (LayoutConstraints, or its own).

// Sources of the checklist rows.
const (
	commonPractice = "common practice (no source)"
	seatRule       = "14 CFR 25.817"
	roskamSource   = "Roskam, Airplane Design Part I, Table 2.15 (from memory)"
	divergenceRule = "14 CFR 25.629(b) (from memory)"
)

// DivergenceEnvelopeFactor is the least ratio of the wing's divergence
// dynamic pressure to the dive dynamic pressure the checklist asks for:
// 14 CFR 25.629(b) asks for freedom from aeroelastic instability up to
// the dive speed increased by 15 % in equivalent airspeed (from memory),
// a dynamic pressure 1.15² = 1.3225 times the dive's.
const DivergenceEnvelopeFactor = 1.15 * 1.15

// ChecklistRow is one rule of thumb of the designer's checklist.
type ChecklistRow struct {
	// Rule names what is checked.
	Rule string
	// Value is the design's value, in Unit.
	Value float64
	Unit  string
	// Band is the rule's band as text (e.g. "5–15 (about 10 typical)").
	Band string
	// Pass is true when Value lies within the band.
	Pass bool
	// Note says what a flag means or how the value is estimated.
	Note string
	// Source is the rule's source, or "common practice (no source)".
	Source string
}

// Checklist is the designer's checklist of one design.
type Checklist []ChecklistRow

// Flagged returns the rows outside their bands.
func (c Checklist) Flagged() Checklist {
	var out Checklist
	for _, r := range c {
		if !r.Pass {
			out = append(out, r)
		}
	}
	return out
}

// Line returns the row as one line of text: the rule, the value, the band,
// "ok" or "FLAG", the note and the source.
func (r ChecklistRow) Line() string {
	mark := "ok"
	if !r.Pass {
		mark = "FLAG"
	}
	v := formatValue(r.Value)
	if r.Unit != "" {
		v += " " + r.Unit
	}
	s := fmt.Sprintf("%s: %s, %s: %s", r.Rule, v, r.Band, mark)
	if r.Note != "" && !r.Pass {
		s += " (" + r.Note + ")"
	}
	return s + " [" + r.Source + "]"
}

// formatValue writes a checklist value with three significant digits.
func formatValue(v float64) string {
	if math.Abs(v) >= 1000 {
		return fmt.Sprintf("%.0f", v)
	}
	return fmt.Sprintf("%.3g", v)
}

// String returns the checklist as a table, flagged rows marked.
func (c Checklist) String() string {
	var b strings.Builder
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "rule\tvalue\tband\t\tsource")
	for _, r := range c {
		mark := "ok"
		if !r.Pass {
			mark = "FLAG"
		}
		fmt.Fprintf(tw, "%s\t%s %s\t%s\t%s\t%s\n", r.Rule, formatValue(r.Value), r.Unit, r.Band, mark, r.Source)
	}
	tw.Flush()
	fmt.Fprintf(&b, "%d of %d rules flagged; flags, not constraints (conceptual estimates, not for certification, flight or airworthiness decisions)\n", len(c.Flagged()), len(c))
	return b.String()
}

// checklistClass infers the aircraft class of the empty-mass statistics
// from the cruise Mach number and the seats: supersonic with 20 seats or
// more a supersonic airliner, supersonic with fewer a business jet,
// subsonic with 20 or more a jet transport, else a business jet.
func checklistClass(mach, seats float64) AircraftClass {
	switch {
	case mach > 1 && seats >= 20:
		return ClassSupersonicCruise
	case mach > 1:
		return ClassBusinessJet
	case seats >= 20:
		return ClassJetTransport
	}
	return ClassBusinessJet
}

// DesignChecklist reads a solved aircraft's values by name (get reports
// whether the value exists) and returns the designer's checklist: static
// margins at take-off and at the start and end of cruise (5–15 % MAC,
// about 10 % typical), fuselage fineness ratio (10–15 supersonic, 7–15
// subsonic), aft-fuselage
// upsweep for rotation clearance (10–25°), the cruise lift coefficient
// at most CLmax,clean/1.3 (CruiseManoeuvreMargin), the wing's divergence
// dynamic pressure at least 1.15² times the dive's (14 CFR 25.629(b),
// DivergenceEnvelopeFactor), and for a supersonic cruise the
// leading edge behind the Mach cone, a take-off lift-to-drag ratio of
// about 5 and a wing thickness ratio of about 3–5 % (all common
// practice, no source); the layout clearances of the
// wing and tails (layout.go); the seats abreast of 14 CFR 25.817; the fuel
// in the tanks; the operating empty mass per seat and the empty-mass
// fraction against the statistics of the aircraft's class (inferred from
// cruise Mach and seats, twin-aisle jet transports apart; mass_statistics.go), and the class's bands of
// take-off mass, mission fuel fraction, field lengths, wing loading and
// take-off thrust over weight and the cruise
// regime's bands of lift-to-drag ratio and TSFC (common practice, from
// memory; mass_statistics.go). A row whose variables the
// aircraft does not have is left out; a result without the static margins
// and the fuselage has no checklist (nil).
func DesignChecklist(get func(name string) (float64, bool)) Checklist {
	val := func(names ...string) ([]float64, bool) {
		out := make([]float64, len(names))
		for i, n := range names {
			v, ok := get(n)
			if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, false
			}
			out[i] = v
		}
		return out, true
	}
	if _, ok := val("stability.static_margin_takeoff", "fuselage.fineness"); !ok {
		return nil
	}
	var c Checklist
	band := func(rule string, v float64, unit string, lo, hi float64, text, note, source string) {
		c = append(c, ChecklistRow{Rule: rule, Value: v, Unit: unit, Band: text, Pass: v >= lo && v <= hi, Note: note, Source: source})
	}
	for _, sm := range []struct{ name, rule string }{
		{"stability.static_margin_takeoff", "static margin at take-off"},
		{"stability.static_margin_cruise_start", "static margin at the start of cruise"},
		{"stability.static_margin_cruise_end", "static margin at the end of cruise"},
	} {
		if v, ok := val(sm.name); ok {
			note := "too stable: a heavy trim load and its drag"
			if v[0] < 0.05 {
				note = "too little margin, or unstable"
			}
			band(sm.rule, 100*v[0], "% MAC", 5, 15, "5–15 (about 10 typical)", note, commonPractice)
		}
	}
	mach, okM := get("cruise.mach")
	if v, ok := val("fuselage.fineness"); ok {
		if okM && mach <= 1 {
			band("fuselage fineness ratio", v[0], "", subsonicFineness[0], subsonicFineness[1], "7–15 (subsonic)",
				"length over diameter", "common practice (no source; from memory)")
		} else {
			band("fuselage fineness ratio", v[0], "", 10, 15, "10–15", "length over diameter", commonPractice)
		}
	}
	if v, ok := val("fuselage.diameter", "fuselage.tail_length"); ok {
		up := math.Atan(v[0]/v[1]) * 180 / math.Pi
		band("aft-fuselage upsweep for rotation clearance", up, "deg", 10, 25, "10–25",
			"estimated as a tail cone whose lower line rises one diameter over its length; the model's cone is not upswept", commonPractice)
	}
	if okM && mach > 1 {
		if v, ok := val("wing.sweep_le"); ok {
			m := math.Sqrt(mach*mach-1) / math.Tan(math.Abs(v[0])*math.Pi/180)
			note := "supersonic leading edge: ahead of the Mach cone, no leading-edge suction"
			c = append(c, ChecklistRow{Rule: "leading edge behind the Mach cone (β·cot|Λ_LE|)", Value: m, Unit: "",
				Band: "< 1 (subsonic leading edge)", Pass: m < 1, Note: note, Source: commonPractice})
		}
		if v, ok := val("aero.ld_takeoff"); ok {
			band("take-off lift-to-drag ratio of a slender supersonic wing", v[0], "", 4, 6, "about 5 (4–6)",
				"far from the slender-wing value: look at the low-speed polar", commonPractice)
		}
		if v, ok := val("wing.thickness_ratio"); ok {
			band("thickness ratio of a supersonic cruise wing", 100*v[0], "%", 2.5, 5.5, "about 3–5 (2.5–5.5)",
				"a thick wing pays volume wave drag as (t/c)²; a thinner one than this is hard to build stiff", commonPractice)
		}
	}
	if v, ok := val("aero.cl_cruise", "aero.cl_max_clean"); ok && v[1] > 0 {
		band("cruise lift coefficient over the clean maximum", v[0]/v[1], "", math.Inf(-1), 1/CruiseManoeuvreMargin,
			fmt.Sprintf("<= %.3g (a %g g margin)", 1/CruiseManoeuvreMargin, CruiseManoeuvreMargin),
			"too little lift in hand at cruise: the wing nears its clean maximum (above 1 it cannot carry the cruise weight); fly lower or faster, or a larger wing",
			commonPractice)
	}
	if v, ok := val("stability.divergence_dynamic_pressure", "dive.dynamic_pressure"); ok && v[1] > 0 {
		band("wing divergence dynamic pressure over the dive dynamic pressure", v[0]/v[1], "", DivergenceEnvelopeFactor, math.Inf(1),
			fmt.Sprintf(">= %.4g (the dive speed + 15 %%)", DivergenceEnvelopeFactor),
			"the wing diverges inside the speed envelope enlarged by 15 %: a stiffer wing box or less forward sweep", divergenceRule)
	}
	if v, ok := val("layout.wing_tail_clearance"); ok {
		band("gap from the wing trailing edge to the tail leading edge", v[0], "m", 0, math.Inf(1), ">= 0",
			"the tail overlaps the wing in the top view", commonPractice)
	}
	if v, ok := val("layout.tail_span_ratio"); ok {
		band("horizontal-tail span over wing span", v[0], "", 0, MaxTailSpanRatio, fmt.Sprintf("<= %g", MaxTailSpanRatio),
			"a tail as wide as the wing", commonPractice)
	}
	if v, ok := val("layout.wing_overhang"); ok {
		band("wing behind the fuselage end", v[0], "m", math.Inf(-1), 0, "<= 0",
			"the wing reaches past the end of the fuselage", commonPractice)
	}
	if v, ok := val("layout.tail_overhang"); ok {
		limit, text := 0.0, "<= 0 (or a declared overhang)"
		if d, ok := val(DeclaredTailOverhang); ok {
			limit, text = d[0], fmt.Sprintf("<= %g (the declared overhang)", d[0])
		}
		band("tail tips behind the fuselage end", v[0], "m", math.Inf(-1), limit, text,
			"swept tail tips reach past the fuselage end: declare it or constrain it", commonPractice)
	}
	if v, ok := val("cabin.seats_abreast", "cabin.aisles"); ok {
		n, a := math.Round(v[0]), math.Round(v[1])
		c = append(c, ChecklistRow{Rule: fmt.Sprintf("seats abreast with %g aisle(s)", a), Value: n, Unit: "",
			Band: "<= 6 with one aisle", Pass: a >= 2 || n <= 6, Note: "at most 3 seats on each side of a single aisle", Source: seatRule})
	}
	if v, ok := val("mass.fuel_capacity", "mass.fuel"); ok {
		band("tank capacity less mission fuel", v[0]-v[1], "kg", 0, math.Inf(1), ">= 0",
			"the mission fuel does not fit in the tanks", "the mission itself")
	}
	if v, ok := val("mass.empty", "mass.takeoff", "cabin.passengers", "cruise.mach"); ok {
		class := checklistClass(v[3], v[2])
		lo, hi := class.EmptyMassPerSeatBand()
		name := class.String()
		if a, ok := val("cabin.aisles"); ok && class == ClassJetTransport && math.Round(a[0]) >= 2 {
			lo, hi, name = twinAisleEmptyMassPerSeat[0], twinAisleEmptyMassPerSeat[1], "twin-aisle "+name
		}
		band("operating empty mass per seat ("+name+")", v[0]/v[2], "kg", lo, hi, fmt.Sprintf("%g–%g", lo, hi),
			"outside the class's band", "common practice (no source; from memory)")
		if crew, ok := val("mass.crew"); ok {
			if reg, err := class.EmptyMassRegression(v[1]); err == nil {
				d := 100 * ((v[0]-crew[0])/reg - 1)
				band("empty mass against the "+class.String()+" regression", d, "%", -10, 10, "within ±10",
					"the statistics of the class disagree", roskamSource)
			}
		}
		classRows(band, class, v[1], v[3], val)
	}
	return c
}

// classRows adds the rows of the class's common-practice bands (classBands,
// cruiseBands) for a design of take-off mass mto [kg] cruising at mach.
func classRows(band func(rule string, v float64, unit string, lo, hi float64, text, note, source string),
	class AircraftClass, mto, mach float64, val func(names ...string) ([]float64, bool)) {
	const memory = "common practice (no source; from memory)"
	b := class.bands()
	name := " (" + class.String() + ")"
	band("take-off mass"+name, mto, "kg", b.takeoffMass[0], b.takeoffMass[1],
		fmt.Sprintf("%g–%g t", b.takeoffMass[0]/1e3, b.takeoffMass[1]/1e3), "outside the class's band", memory)
	if f, ok := val("mass.fuel"); ok {
		band("mission fuel over take-off mass"+name, f[0]/mto, "", b.fuelFraction[0], b.fuelFraction[1],
			fmt.Sprintf("%g–%g", b.fuelFraction[0], b.fuelFraction[1]), "outside the class's band", memory)
	}
	if f, ok := val("perf.takeoff_field_length"); ok {
		band("take-off field length"+name, f[0], "m", b.takeoffField[0], b.takeoffField[1],
			fmt.Sprintf("%g–%g", b.takeoffField[0], b.takeoffField[1]), "outside the class's band", memory)
	}
	if f, ok := val("perf.landing_field_length"); ok {
		band("landing field length"+name, f[0], "m", b.landingField[0], b.landingField[1],
			fmt.Sprintf("%g–%g", b.landingField[0], b.landingField[1]), "outside the class's band", memory)
	}
	if f, ok := val("wing.area"); ok && f[0] > 0 {
		band("wing loading at take-off"+name, mto/f[0], "kg/m2", b.wingLoading[0], b.wingLoading[1],
			fmt.Sprintf("%g–%g", b.wingLoading[0], b.wingLoading[1]), "outside the class's band", memory)
	}
	if f, ok := val("engine.count", "engine.thrust_takeoff"); ok && mto > 0 {
		band("take-off thrust over weight"+name, math.Round(f[0])*f[1]/(mto*G0), "", b.thrustWeight[0], b.thrustWeight[1],
			fmt.Sprintf("%g–%g", b.thrustWeight[0], b.thrustWeight[1]), "outside the class's band", memory)
	}
	ld, tsfc := cruiseBands(mach)
	regime := " (subsonic cruise)"
	if mach > 1 {
		regime = " (supersonic cruise)"
	}
	if f, ok := val("aero.ld_cruise"); ok {
		band("cruise lift-to-drag ratio"+regime, f[0], "", ld[0], ld[1], fmt.Sprintf("%g–%g", ld[0], ld[1]),
			"outside the band of the regime: look at the polar", memory)
	}
	if f, ok := val("engine.tsfc_cruise"); ok {
		band("cruise TSFC"+regime, 1e6*f[0], "mg/(N s)", 1e6*tsfc[0], 1e6*tsfc[1], fmt.Sprintf("%g–%g", 1e6*tsfc[0], 1e6*tsfc[1]),
			"outside the band of the regime's engines", memory)
	}
}

// subsonicFineness is the common-practice band of the fuselage fineness
// ratio of subsonic transports and business jets (from memory, no
// source): the short business jets and the first short-haul jets about
// 7.5–9, the stretched single-aisle transports up to about 14.5. The
// 10–15 of the checklist is that of supersonic fuselages (area rule,
// wave drag) and flagged a legitimate subsonic business jet of 9.
var subsonicFineness = [2]float64{7, 15}

// twinAisleEmptyMassPerSeat is the common-practice band of the operating
// empty mass per seat [kg] of twin-aisle jet transports (from memory, no
// source): the wide bodies carry about 320–470 kg per seat (a 260-seat
// twin about 330, a 300-seat long-range twin about 420, a 365-seat one
// about 460), against the 220–320 of the single-aisle jets
// (EmptyMassPerSeatBand), which flagged every wide body.
var twinAisleEmptyMassPerSeat = [2]float64{320, 470}

// CruiseManoeuvreMargin is the load factor a cruising aircraft should
// reach before its clean maximum lift: the cruise lift coefficient at
// most CLmax,clean/1.3 (a 1.3 g margin, common practice, no source;
// buffet onset lies below the clean maximum, so this is the optimistic
// side of the usual buffet margin).
const CruiseManoeuvreMargin = 1.3

// DeclaredTailOverhang is the name under which DesignChecklist reads the
// declared overhang of the tail tips behind the fuselage end [m] (the
// tail-overhang row then flags only what exceeds it). ResultChecklists
// gives it the bound of the study's constraint on layout.tail_overhang
// (LayoutConstraints).
const DeclaredTailOverhang = "layout.declared_tail_overhang"

// LabelledChecklist is the checklist of one design of a result.
type LabelledChecklist struct {
	Label string // "best design #ID" or "front design #ID"
	Checklist
}

// String returns the label and the checklist's table.
func (l LabelledChecklist) String() string { return l.Label + "\n" + l.Checklist.String() }

// Checklists are the checklists of the designs of a result.
type Checklists []LabelledChecklist

// String returns every checklist, one after the other.
func (c Checklists) String() string {
	parts := make([]string, len(c))
	for i, l := range c {
		parts[i] = l.String()
	}
	return strings.Join(parts, "\n")
}

// ResultChecklists returns the designer's checklist of a result's best
// design and of each design on its front (values from the result's
// recorded outputs, and the tails' declared overhang from the result's
// upper bound on layout.tail_overhang, if it has one); nil for a result
// that is not of an aircraft. In a session,
// disciplines.ResultChecklists(result) shows them.
func ResultChecklists(r *mdo.Result) Checklists {
	if r == nil {
		return nil
	}
	declared, hasDeclared := 0.0, false
	for _, c := range r.Constraints {
		if c.Name == "layout.tail_overhang" && c.Func == nil && (c.Kind == mdo.LessEqual || c.Kind == mdo.InBand) {
			declared, hasDeclared = c.Upper, true
		}
	}
	of := func(e *mdo.Evaluation) Checklist {
		if e == nil || len(e.Outputs) != len(r.Outputs) {
			return nil
		}
		return DesignChecklist(func(name string) (float64, bool) {
			if name == DeclaredTailOverhang {
				return declared, hasDeclared
			}
			for i, v := range r.Outputs {
				if v.Name == name {
					return e.Outputs[i], true
				}
			}
			return 0, false
		})
	}
	var out Checklists
	if c := of(r.Best); c != nil {
		out = append(out, LabelledChecklist{Label: fmt.Sprintf("best design #%d", r.Best.ID), Checklist: c})
	}
	for _, e := range r.Front {
		if c := of(e); c != nil {
			out = append(out, LabelledChecklist{Label: fmt.Sprintf("front design #%d", e.ID), Checklist: c})
		}
	}
	return out
}
