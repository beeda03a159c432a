package disciplines

import (
	"math"
	"strconv"

	"couplet/mdo"
)

// Layout of the tails on the fuselage and the layout outputs a study can
// constrain.
//
// Each tail is attached to the fuselage by its root. It sits with its MAC
// quarter chord at its position of the layout options
// (GeometryOptions.HTailPosition, VTailPosition) when its root trailing
// edge then lies ahead of the end station (HTailEnd, VTailEnd: 1 = the
// end of the tail cone); a larger tail moves forward until its root
// trailing edge is at the end station. Its tips may reach beyond
// (layout.tail_overhang). It is sized to its volume coefficient
// V = S_tail·l/(S·ℓref) with the arm l measured from the wing's MAC
// quarter chord to the tail's as the tail actually sits. Where the root
// trailing edge is held at the end station a larger tail reaches further
// forward, so its arm shrinks as it grows: with the tail's shape fixed
// (aspect ratio, taper, sweep) every length of it scales with √S_tail,
// the arm is l = D − κ·√S_tail (D from the wing's aerodynamic centre to
// the end station, κ the distance from the root trailing edge forward to
// the tail's MAC quarter chord per √m²), and S_tail is the smaller root
// of S·(D − κ√S) = V·S·ℓref, which exists when the requirement is at most
// 4D³/(27κ²) (TailAreaForVolume). Both placements give the same tail
// where they meet.
//
// Layout outputs of the geometry discipline: layout.wing_tail_clearance,
// the least streamwise gap between the wing's trailing edge and the
// horizontal tail's leading edge over the span they share (negative =
// the tail overlaps the wing in the top view); layout.tail_span_ratio,
// horizontal-tail span over wing span; layout.wing_overhang and
// layout.tail_overhang, how far the aft-most point of the wing and of the
// tails lies behind the fuselage end (negative = inside). A study adds
// the ready-made constraints on them with LayoutConstraints.

// aftExtent returns the distance from a surface's apex to its aft-most
// point (root or tip trailing edge) [m].
func (w *Wing) aftExtent() float64 {
	return math.Max(w.RootChord, 0.5*w.Span*w.tanLE+w.TipChord)
}

// quarterMAC returns the distance from a surface's apex to its MAC
// quarter chord [m].
func (w *Wing) quarterMAC() float64 { return w.MACX + 0.25*w.MAC }

// tailApex returns the apex x [m] of a tail with its MAC quarter chord at
// xPos, or with its root trailing edge at xEnd where that lies further
// forward.
func tailApex(t *Wing, xPos, xEnd float64) float64 {
	return math.Min(xPos-t.quarterMAC(), xEnd-t.RootChord)
}

// TailAreaForVolume returns the area [m2] of a tail of the given shape
// (unit: the surface laid out for a tail of 1 m²; for a vertical tail the
// mirrored pair of twice the fin area) placed as tailApex places it (MAC
// quarter chord at xPos, or root trailing edge at xEnd where that is
// further forward) [m from the nose], sized so that S·l = q (q = V·S·ℓref
// [m3]) with the arm l from the wing's aerodynamic centre at xAC to the
// tail's MAC quarter chord, and that arm [m]. The error names the volume
// variable (volumeVar = volume) when the fuselage gives no arm long
// enough.
func TailAreaForVolume(volumeVar string, volume, q float64, unit Wing, xPos, xEnd, xAC float64) (area, arm float64, err error) {
	d0 := xPos - xAC
	if !(d0 > 0) {
		return 0, 0, inputErr("wing.position", d0, "m", "a wing aerodynamic centre ahead of the tail's position (move the wing forward)")
	}
	if q == 0 {
		return 0, d0, nil
	}
	kappa := unit.RootChord - unit.quarterMAC()
	d := xEnd - xAC
	// at its position: fits when the root trailing edge xPos + κ√S is
	// at or ahead of xEnd
	if s0 := q / d0; xPos+kappa*math.Sqrt(s0) <= xEnd {
		return s0, d0, nil
	}
	if !(kappa > 0) {
		return 0, 0, inputErr("geometry tail end station", xEnd, "m", "aft of the tail's position (layout options)")
	}
	// held at the end station
	g := func(u float64) float64 { return u*u*(d-kappa*u) - q }
	hi := 2 * d / (3 * kappa) // √S of the largest S·l
	if gmax := g(hi); !(gmax >= 0) {
		vmax := volume * (q + gmax) / q
		return 0, 0, inputErr(volumeVar, volume, "", "at most "+strconv.FormatFloat(vmax, 'g', 3, 64)+
			" with this wing and fuselage: a larger tail reaches too far forward to gain arm (lengthen the fuselage or move the wing forward)")
	}
	// bisection on g, increasing on [0, hi]
	lo, top := 0.0, hi
	for it := 0; it < 200 && hi-lo > 1e-14*top; it++ {
		m := 0.5 * (lo + hi)
		if g(m) < 0 {
			lo = m
		} else {
			hi = m
		}
	}
	u := 0.5 * (lo + hi)
	return u * u, d - kappa*u, nil
}

// WingTailClearance returns the least streamwise gap [m] between the
// wing's trailing edge and the horizontal tail's leading edge over the
// spanwise stations both surfaces cover (negative = overlap in the top
// view), and +Inf without a horizontal tail.
func (c *Configuration) WingTailClearance() float64 {
	if c.HTail.Area <= 0 {
		return math.Inf(1)
	}
	w, h := &c.Wing, &c.HTail
	ymax := 0.5 * math.Min(w.Span, h.Span)
	// both edges are straight over [0, ymax]: the least gap is at an end
	gap := func(y float64) float64 {
		te := c.WingApex + w.LeadingEdgeX(y) + w.ChordAt(y)
		le := c.HTailApex + h.LeadingEdgeX(y)
		return le - te
	}
	return math.Min(gap(0), gap(ymax))
}

// TailSpanRatio returns the horizontal tail's span over the wing's.
func (c *Configuration) TailSpanRatio() float64 { return c.HTail.Span / c.Wing.Span }

// WingOverhang returns how far the wing's aft-most point lies behind the
// fuselage end [m] (negative = inside the fuselage length).
func (c *Configuration) WingOverhang() float64 {
	return c.WingApex + c.Wing.aftExtent() - c.Fuselage.Length
}

// TailOverhang returns how far the aft-most point of the tails lies
// behind the fuselage end [m] (negative = inside the fuselage length).
func (c *Configuration) TailOverhang() float64 {
	x := c.VTailApex + c.VTail.aftExtent()
	if c.HTail.Area > 0 {
		x = math.Max(x, c.HTailApex+c.HTail.aftExtent())
	}
	return x - c.Fuselage.Length
}

// MaxTailSpanRatio is the common-practice limit of the horizontal tail's
// span over the wing's (no source): about 0.35–0.45 on transports, up to
// about 0.6 on supersonic aircraft (from memory).
const MaxTailSpanRatio = 0.6

// LayoutConstraints returns the layout constraints of the assembled
// aircraft, for a study to add in one line: the horizontal tail clear of
// the wing in the top view (layout.wing_tail_clearance >= 0), its span at
// most MaxTailSpanRatio of the wing's (layout.tail_span_ratio), the wing
// within the fuselage length (layout.wing_overhang <= 0) and the tail
// tips at most tailOverhang [m] behind it (layout.tail_overhang, the
// declared overhang).
func LayoutConstraints(tailOverhang float64) []mdo.Constraint {
	return []mdo.Constraint{
		mdo.AtLeast("layout.wing_tail_clearance", 0),
		mdo.AtMost("layout.tail_span_ratio", MaxTailSpanRatio),
		mdo.AtMost("layout.wing_overhang", 0),
		mdo.AtMost("layout.tail_overhang", tailOverhang),
	}
}
