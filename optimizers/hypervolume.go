package optimizers

import (
	"fmt"
	"math"
	"sort"

	"couplet/mdo"
)

// Hypervolume2D returns the area dominated by the points (f1, f2), both
// minimised, and bounded by the reference point (r1, r2): the measure of
// the set {y : some point p has p ≤ y ≤ r}. Points not strictly better
// than the reference in both objectives add nothing; dominated points are
// allowed and add nothing either.
func Hypervolume2D(points [][2]float64, ref [2]float64) float64 {
	ps := make([][2]float64, 0, len(points))
	for _, p := range points {
		if p[0] < ref[0] && p[1] < ref[1] {
			ps = append(ps, p)
		}
	}
	sort.Slice(ps, func(i, j int) bool {
		if ps[i][0] != ps[j][0] {
			return ps[i][0] < ps[j][0]
		}
		return ps[i][1] < ps[j][1]
	})
	// sweep in increasing f1: each point that improves on the best f2
	// so far adds the rectangle [f1, r1] × [f2, best f2].
	hv, top := 0.0, ref[1]
	for _, p := range ps {
		if p[1] < top {
			hv += (ref[0] - p[0]) * (top - p[1])
			top = p[1]
		}
	}
	return hv
}

// FrontHypervolume returns the two-objective hypervolume of a Result's
// front (minimised-sense objectives F) to the reference point ref.
func FrontHypervolume(r *mdo.Result, ref [2]float64) (float64, error) {
	if r == nil {
		return 0, fmt.Errorf("optimizers: FrontHypervolume of a nil result")
	}
	if len(r.Objectives) != 2 {
		return 0, fmt.Errorf("optimizers: FrontHypervolume needs 2 objectives, study %q has %d", r.Study, len(r.Objectives))
	}
	pts := make([][2]float64, 0, len(r.Front))
	for _, e := range r.Front {
		if math.IsInf(e.F[0], 0) || math.IsInf(e.F[1], 0) {
			continue
		}
		pts = append(pts, [2]float64{e.F[0], e.F[1]})
	}
	return Hypervolume2D(pts, ref), nil
}
