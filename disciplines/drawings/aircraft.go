package drawings

import (
	"fmt"
	"math"
)

// Aircraft is the geometry drawn by Planform and TopView, in metres and
// degrees, with x measured aft from the nose and y spanwise. Surfaces are
// straight-tapered: root chord on the centreline, tip chord at the tip,
// leading-edge sweep positive aft (negative for a forward-swept surface),
// apex the x of the root leading edge. A surface with zero span (or a
// fuselage with zero length) is not drawn.
type Aircraft struct {
	Name string

	WingSpan, WingRootChord, WingTipChord, WingSweepLE, WingApex float64

	FuselageLength, FuselageDiameter float64

	HTailSpan, HTailRootChord, HTailTipChord, HTailSweepLE, HTailApex float64

	// The vertical tail: height above the fuselage centreline.
	VTailHeight, VTailRootChord, VTailTipChord, VTailSweepLE, VTailApex float64

	// CG, if not zero, is the x of the centre of gravity, marked on the
	// top view.
	CG float64
}

// surface is one straight-tapered lifting surface.
type surface struct {
	name                       string
	span, root, tip, sweep, x0 float64
}

// check validates a surface that is present.
func (s surface) check() error {
	if s.span == 0 {
		return nil
	}
	switch {
	case !(s.span > 0) || !finite(s.span):
		return fmt.Errorf("drawings: %s span = %g m, must be > 0 (or 0 to leave it out)", s.name, s.span)
	case !(s.root > 0) || !finite(s.root):
		return fmt.Errorf("drawings: %s root chord = %g m, must be > 0", s.name, s.root)
	case !(s.tip >= 0) || !finite(s.tip):
		return fmt.Errorf("drawings: %s tip chord = %g m, must be >= 0", s.name, s.tip)
	case !(math.Abs(s.sweep) < 80):
		return fmt.Errorf("drawings: %s leading-edge sweep = %g deg, allowed (-80, 80)", s.name, s.sweep)
	case !finite(s.x0):
		return fmt.Errorf("drawings: %s apex = %g m, must be finite", s.name, s.x0)
	}
	return nil
}

// surfaces returns the wing, horizontal tail and vertical tail.
func (a Aircraft) surfaces() (wing, htail, vtail surface) {
	return surface{"wing", a.WingSpan, a.WingRootChord, a.WingTipChord, a.WingSweepLE, a.WingApex},
		surface{"horizontal tail", a.HTailSpan, a.HTailRootChord, a.HTailTipChord, a.HTailSweepLE, a.HTailApex},
		// the vertical tail's "span" is its height, on one side only
		surface{"vertical tail", a.VTailHeight, a.VTailRootChord, a.VTailTipChord, a.VTailSweepLE, a.VTailApex}
}

// Validate checks the geometry: the error names the field, its value and
// what is allowed.
func (a Aircraft) Validate() error {
	w, h, v := a.surfaces()
	for _, s := range []surface{w, h, v} {
		if err := s.check(); err != nil {
			return err
		}
	}
	if a.FuselageLength != 0 || a.FuselageDiameter != 0 {
		if !(a.FuselageLength > 0) || !finite(a.FuselageLength) {
			return fmt.Errorf("drawings: fuselage length = %g m, must be > 0 (or 0 to leave it out)", a.FuselageLength)
		}
		if !(a.FuselageDiameter > 0) || !(a.FuselageDiameter < a.FuselageLength) {
			return fmt.Errorf("drawings: fuselage diameter = %g m, must be > 0 and below the length %g m", a.FuselageDiameter, a.FuselageLength)
		}
	}
	if !finite(a.CG) {
		return fmt.Errorf("drawings: CG = %g m, must be finite", a.CG)
	}
	return nil
}

// WingArea returns the reference (trapezoidal) wing area b (c_r + c_t)/2 in m².
func (a Aircraft) WingArea() float64 { return a.WingSpan * (a.WingRootChord + a.WingTipChord) / 2 }

// AspectRatio returns b²/S of the wing.
func (a Aircraft) AspectRatio() float64 { return a.WingSpan * a.WingSpan / a.WingArea() }

// MAC returns the wing's mean aerodynamic chord, its spanwise station and
// the x of its leading edge, for a straight-tapered wing with taper ratio
// λ = c_t/c_r: c̄ = (2/3) c_r (1+λ+λ²)/(1+λ), ȳ = (b/6)(1+2λ)/(1+λ),
// x = apex + ȳ tan Λ_LE (Raymer, Aircraft Design: A Conceptual Approach,
// fig. 7.3 — from memory).
func (a Aircraft) MAC() (chord, y, xLE float64) {
	lam := a.WingTipChord / a.WingRootChord
	chord = 2.0 / 3 * a.WingRootChord * (1 + lam + lam*lam) / (1 + lam)
	y = a.WingSpan / 6 * (1 + 2*lam) / (1 + lam)
	xLE = a.WingApex + y*math.Tan(a.WingSweepLE*math.Pi/180)
	return chord, y, xLE
}

// outline returns the planform polygon of a surface (both halves unless
// oneSide), y spanwise and x aft.
func (s surface) outline(oneSide bool) (ys, xs []float64) {
	half := s.span / 2
	if oneSide {
		half = s.span
	}
	xt := s.x0 + half*math.Tan(s.sweep*math.Pi/180)
	if oneSide {
		return []float64{0, half, half, 0}, []float64{s.x0, xt, xt + s.tip, s.x0 + s.root}
	}
	return []float64{-half, 0, half, half, 0, -half}, []float64{xt, s.x0, xt, xt + s.tip, s.x0 + s.root, xt + s.tip}
}

// fuselageOutline returns the fuselage's top-view outline: an elliptic
// nose, a cylinder and a straight tail cone.
func (a Aircraft) fuselageOutline() (ys, xs []float64) {
	l, r := a.FuselageLength, a.FuselageDiameter/2
	ln := math.Min(2.5*a.FuselageDiameter, 0.3*l)
	lt := math.Min(3*a.FuselageDiameter, 0.35*l)
	rad := func(x float64) float64 {
		switch {
		case x < ln:
			u := 1 - x/ln
			return r * math.Sqrt(math.Max(0, 1-u*u))
		case x > l-lt:
			return r * (1 - 0.85*(x-(l-lt))/lt)
		}
		return r
	}
	const n = 60
	for i := 0; i <= n; i++ {
		x := l * float64(i) / n
		ys, xs = append(ys, rad(x)), append(xs, x)
	}
	for i := n; i >= 0; i-- {
		x := l * float64(i) / n
		ys, xs = append(ys, -rad(x)), append(xs, x)
	}
	return ys, xs
}

// finite reports whether x is a finite number.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
