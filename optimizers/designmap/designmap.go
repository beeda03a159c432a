// Package designmap draws maps of a study's design space: over two design
// variables, the others fixed at a chosen design, a filled contour of an
// objective or output with every constraint's boundary drawn and
// labelled, the infeasible side shaded, failed analyses marked by their
// class (mdo.FailureClass) and the best feasible point marked. The map is
// sampled on demand on a grid through the study's Evaluator (worker pool
// and cache). Figures are built with mdo/plot's builder, so they save as
// SVG and PNG and go into a run folder through a report.FigureSource.
// A map can also be drawn from a run's recorded analyses without a
// further one (FromEvaluations, RecordedFigures): then it is interpolated
// and says so. The carpet plot (Carpet, CarpetFigure) draws a quantity
// against two parameters as a staggered grid of lines with the
// constraints' boundaries over it.
//
// A map is a picture of a conceptual model, not of the aircraft: its
// boundaries are where the model's constraints change sign.
package designmap

import (
	"context"
	"fmt"
	"math"
	"slices"

	"couplet/mdo"
	"couplet/optimizers/sensitivity"
)

// Spec chooses a map. Zero values take the defaults.
type Spec struct {
	// X and Y are the design variables along the axes.
	X, Y string
	// Quantity is the mapped objective, constrained quantity or output;
	// default the study's first objective.
	Quantity string
	// At fixes the other design variables (physical values by name,
	// each inside the variable's bounds); those not given sit at the
	// study's baseline (Evaluator.Start).
	At map[string]float64
	// Points is the number of grid points along each axis; default 21,
	// allowed 2 to 201 (the Points² analyses are held together: 40 401
	// evaluations, each with every output of the system, at the limit).
	Points int
}

// Data is a sampled map.
type Data struct {
	// X, Y and Quantity name the axes and the mapped quantity; XUnit,
	// YUnit and QuantityUnit their units when known.
	X, Y, Quantity             string
	XUnit, YUnit, QuantityUnit string
	// Xs and Ys are the physical grid values along each axis.
	Xs, Ys []float64
	// Z[j][i] is the quantity at (Xs[i], Ys[j]); NaN where the analysis
	// failed.
	Z [][]float64
	// Constraints name the study's constraints; Margins[c][j][i] is how
	// far constraint c lies inside its bound (negative when violated),
	// NaN where the analysis failed.
	Constraints []string
	Margins     [][][]float64
	// Failures[j][i] is the failure class at the grid point.
	Failures [][]mdo.FailureClass
	// Best is the grid index (i, j) of the best feasible point by the
	// first objective, or (−1, −1) when no grid point is feasible (or the
	// map is interpolated).
	Best [2]int
	// BestAt is, on a map interpolated from a run (FromEvaluations), the
	// place of the run's best design, with its analysed value of the
	// quantity (BestValue) and feasibility; NaN otherwise.
	BestAt       [2]float64
	BestValue    float64
	BestFeasible bool
	// Samples are the recorded analyses of an interpolated map.
	Samples []Recorded
	// Interpolated, when not empty, says how the map was interpolated
	// from recorded analyses: its values are estimates, not analyses.
	Interpolated string
	// Analyses counts the analyses made for the map (0 for one
	// interpolated from a run).
	Analyses int
}

// Sample evaluates the map's grid for study s.
func Sample(ctx context.Context, s *mdo.Study, spec Spec) (*Data, error) {
	if s == nil {
		return nil, fmt.Errorf("designmap: the study is nil")
	}
	if ctx == nil {
		ctx = context.Background()
	}
	n := spec.Points
	if n == 0 {
		n = 21
	}
	if n < 2 || n > 201 {
		return nil, fmt.Errorf("designmap: Spec.Points = %d, allowed 2 to 201", spec.Points)
	}
	ev, err := s.NewEvaluator()
	if err != nil {
		return nil, fmt.Errorf("designmap: %w", err)
	}
	names := ev.DesignNames()
	ix, iy := slices.Index(names, spec.X), slices.Index(names, spec.Y)
	if ix < 0 || iy < 0 || ix == iy {
		return nil, fmt.Errorf("designmap: axes X = %q and Y = %q must be two different design variables of study %q, which has %v", spec.X, spec.Y, s.Name, names)
	}
	q := spec.Quantity
	if q == "" {
		if on := ev.ObjectiveNames(); len(on) > 0 {
			q = on[0]
		}
	}
	read, err := sensitivity.QuantityReader(ev, q)
	if err != nil {
		return nil, fmt.Errorf("designmap: %w", err)
	}
	base := ev.ToPhysical(ev.Start())
	specs := ev.DesignSpecs()
	for name, v := range spec.At {
		k := slices.Index(names, name)
		if k < 0 {
			return nil, fmt.Errorf("designmap: Spec.At names %q, which is no design variable of study %q (%v)", name, s.Name, names)
		}
		if !(v >= specs[k].Lower && v <= specs[k].Upper) {
			return nil, fmt.Errorf("designmap: Spec.At[%q] = %g, allowed [%g, %g]", name, v, specs[k].Lower, specs[k].Upper)
		}
		base[k] = v
	}
	u0 := ev.ToUnit(base)
	d := &Data{X: spec.X, Y: spec.Y, Quantity: q, Best: [2]int{-1, -1}, BestAt: [2]float64{math.NaN(), math.NaN()}, BestValue: math.NaN()}
	d.XUnit, d.YUnit, d.QuantityUnit = unitOf(s, spec.X), unitOf(s, spec.Y), unitOf(s, q)
	var xs [][]float64
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			u := slices.Clone(u0)
			u[ix], u[iy] = float64(i)/float64(n-1), float64(j)/float64(n-1)
			xs = append(xs, u)
		}
	}
	evs, err := ev.Evaluate(ctx, xs)
	if err != nil {
		return nil, fmt.Errorf("designmap: %w", err)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for i := 0; i < n; i++ {
		d.Xs = append(d.Xs, evs[i].Design[ix])
		d.Ys = append(d.Ys, evs[i*n].Design[iy])
	}
	for _, c := range ev.Constraints() {
		d.Constraints = append(d.Constraints, c.Name)
	}
	d.allocate(n)
	var best *mdo.Evaluation
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			e := evs[j*n+i]
			if !e.Converged {
				d.Failures[j][i] = mdo.ClassOf(e)
				continue
			}
			d.Z[j][i] = read(e)
			for c := range d.Margins {
				if c < len(e.Margins) {
					d.Margins[c][j][i] = e.Margins[c]
				}
			}
			if e.Feasible && len(e.F) > 0 && (best == nil || e.F[0] < best.F[0]) {
				best, d.Best = e, [2]int{i, j}
			}
		}
	}
	d.Analyses = len(xs)
	return d, nil
}

// allocate makes the n × n layers of d (quantity, margins of each of
// d.Constraints and failure classes), the values NaN.
func (d *Data) allocate(n int) {
	nan := func() [][]float64 {
		g := make([][]float64, n)
		for j := range g {
			g[j] = make([]float64, n)
			for i := range g[j] {
				g[j][i] = math.NaN()
			}
		}
		return g
	}
	d.Z = nan()
	d.Margins = make([][][]float64, len(d.Constraints))
	for c := range d.Margins {
		d.Margins[c] = nan()
	}
	d.Failures = make([][]mdo.FailureClass, n)
	for j := range d.Failures {
		d.Failures[j] = make([]mdo.FailureClass, n)
	}
}

// unitOf returns the unit of a system variable, or "" when the name is no
// variable (a constraint computed by a function).
func unitOf(s *mdo.Study, name string) string {
	if s.System == nil {
		return ""
	}
	if v, err := s.System.Var(name); err == nil {
		return v.Unit
	}
	return ""
}
