package drawings

import (
	"context"
	"fmt"
	"math"
	"strings"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/plot"
)

// aircraftGeometry are the outputs that mark a result as an aircraft
// study: without all of them no aircraft figure is drawn.
var aircraftGeometry = []string{
	"wing.span", "wing.root_chord", "wing.tip_chord", "wing.sweep_le", "wing.apex_x",
	"fuselage.length", "fuselage.diameter",
}

// Figures returns the figures of the best design of an aircraft study:
// wing planform, top view, sizing diagram and the coupling-solver
// residuals of one re-analysis of the best design (its parameters on the
// study's Fixed values). A result without the aircraft geometry outputs
// gets none. A figure that cannot be drawn is its stand-in
// (plot.LeftOut) with the reason, so that the rest of the run's output is
// still written; st may be nil (then there are no residuals). Its signature is that of
// report.FigureSource, the hook through which a run folder gets a
// study's further figures.
func Figures(ctx context.Context, r *mdo.Result, st *mdo.Study) (figs []*plot.Figure, notes []string) {
	if r == nil || r.Best == nil || len(r.Best.Outputs) != len(r.Outputs) {
		return nil, nil
	}
	get := func(name string) (float64, bool) {
		x, err := r.Lookup(name)
		return x, err == nil && !math.IsNaN(x) && !math.IsInf(x, 0)
	}
	for _, name := range aircraftGeometry {
		if _, ok := get(name); !ok {
			return nil, nil
		}
	}
	var sys *mdo.System
	if st != nil {
		sys = st.System
	}
	label := fmt.Sprintf("best design #%d", r.Best.ID)
	add := func(name, what string, f *plot.Figure, err error) {
		if err != nil {
			f = plot.LeftOut(name, what+" of the "+label, err)
		}
		figs = append(figs, f)
	}
	a := aircraftOf(get, geometryOptions(sys))
	a.Name = label
	f, err := Planform(a)
	add("planform", "wing planform", f, err)
	f, err = TopView(a)
	add("top_view", "top view", f, err)
	f, note, err := sizingDiagram(get, r, label)
	add("sizing_diagram", "sizing diagram", f, err)
	if err == nil {
		notes = append(notes, note)
	}
	if st != nil && sys != nil {
		f, err := plot.BestResiduals(ctx, r, st)
		add("residuals", "coupling-solver residuals", f, err)
	}
	return figs, notes
}

// geometryOptions returns the layout options of the system's geometry
// discipline (tail taper and sweep are options, not variables), or the
// defaults when there is none.
func geometryOptions(sys *mdo.System) disciplines.GeometryOptions {
	if sys != nil {
		for _, d := range sys.Disciplines() {
			if g, ok := d.(*disciplines.Geometry); ok {
				return g.Options()
			}
		}
	}
	return disciplines.DefaultGeometryOptions()
}

// aircraftOf assembles the plotted geometry from the outputs: the wing
// from its own variables, the tails (when their area and span are there)
// as straight-tapered surfaces of the layout options' taper and sweep,
// placed by their arms from the wing's MAC quarter chord as the geometry
// discipline places them.
func aircraftOf(get func(string) (float64, bool), o disciplines.GeometryOptions) Aircraft {
	v := func(name string) float64 { x, _ := get(name); return x }
	a := Aircraft{
		WingSpan: v("wing.span"), WingRootChord: v("wing.root_chord"), WingTipChord: v("wing.tip_chord"),
		WingSweepLE: v("wing.sweep_le"), WingApex: v("wing.apex_x"),
		FuselageLength: v("fuselage.length"), FuselageDiameter: v("fuselage.diameter"),
		CG: v("cg.takeoff"),
	}
	mac, okMAC := get("wing.mac")
	macX, okX := get("wing.mac_x")
	if !okMAC || !okX {
		return a
	}
	wingAC := macX + 0.25*mac
	if s, ok := get("htail.area"); ok && s > 0 {
		b, okB := get("htail.span")
		arm, okA := get("htail.arm")
		if okB && okA && b > 0 {
			if t, err := disciplines.NewWing(s, b*b/s, o.HTailTaper, o.HTailSweep, o.HTailThickness); err == nil {
				a.HTailSpan, a.HTailRootChord, a.HTailTipChord, a.HTailSweepLE = t.Span, t.RootChord, t.TipChord, t.SweepLE
				a.HTailApex = wingAC + arm - t.MACX - 0.25*t.MAC
			}
		}
	}
	if s, ok := get("vtail.area"); ok && s > 0 {
		h, okH := get("vtail.height")
		arm, okA := get("vtail.arm")
		if okH && okA && h > 0 {
			// the fin as one half of a mirrored surface of twice its area
			if t, err := disciplines.NewWing(2*s, 4*h*h/(2*s), o.VTailTaper, o.VTailSweep, o.VTailThickness); err == nil {
				a.VTailHeight, a.VTailRootChord, a.VTailTipChord, a.VTailSweepLE = h, t.RootChord, t.TipChord, t.SweepLE
				a.VTailApex = wingAC + arm - t.MACX - 0.25*t.MAC
			}
		}
	}
	return a
}

// sizingLimits takes the field-length and second-segment requirements
// from the study's constraints on those outputs; the field lengths the
// study does not constrain are the design's own, and a second-segment
// gradient it does not constrain stays zero (NewSizingDiagram's default,
// the 25.121(b) minimum). fromStudy lists the requirements taken from
// the study.
func sizingLimits(get func(string) (float64, bool), r *mdo.Result) (lim disciplines.SizingLimits, fromStudy []string) {
	for _, c := range r.Constraints {
		if c.Func != nil {
			continue
		}
		upper := c.Kind == mdo.LessEqual || c.Kind == mdo.InBand
		lower := c.Kind == mdo.GreaterEqual || c.Kind == mdo.InBand
		switch {
		case c.Name == "perf.takeoff_field_length" && upper:
			lim.TakeoffFieldLength = c.Upper
		case c.Name == "perf.landing_field_length" && upper:
			lim.LandingFieldLength = c.Upper
		case c.Name == "perf.climb_gradient_second_segment" && lower:
			lim.SecondSegmentGradient = c.Lower
		default:
			continue
		}
		fromStudy = append(fromStudy, c.Name)
	}
	if lim.TakeoffFieldLength == 0 {
		lim.TakeoffFieldLength, _ = get("perf.takeoff_field_length")
	}
	if lim.LandingFieldLength == 0 {
		lim.LandingFieldLength, _ = get("perf.landing_field_length")
	}
	return lim, fromStudy
}

// sizingDiagram draws the sizing diagram of the best design and returns
// a note on where its requirements come from.
func sizingDiagram(get func(string) (float64, bool), r *mdo.Result, label string) (*plot.Figure, string, error) {
	lim, fromStudy := sizingLimits(get, r)
	sd, err := disciplines.NewSizingDiagram(get, lim)
	if err != nil {
		return nil, "", err
	}
	src := "no requirement from the study's constraints"
	if len(fromStudy) > 0 {
		src = "the study's constraints on " + strings.Join(fromStudy, ", ")
	}
	note := "Sizing diagram: requirements from " + src + "; field lengths the study does not constrain are the design's own, " +
		"climb gradients the 14 CFR 25.121/25.119 minima. The boundaries hold the best design's mass ratios, polars and thrust lapses " +
		"fixed as the wing loading varies: a first-order picture around the design, not a re-analysis at each wing loading."
	f, err := SizingDiagram(sd, SizingView{Title: "sizing diagram of the " + label, Design: label})
	return f, note, err
}
