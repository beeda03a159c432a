package optimizers

import (
	"math"
	"sort"

	"couplet/mdo"
)

// compare orders two evaluations by Deb's feasibility rules on the first
// objective without the evaluation-number tie-break of mdo.Better: −1 when
// a is better, +1 when b is, 0 when they are equally good.
func compare(a, b *mdo.Evaluation) int {
	switch {
	case a == nil && b == nil:
		return 0
	case b == nil:
		return -1
	case a == nil:
		return 1
	case a.Feasible && !b.Feasible:
		return -1
	case !a.Feasible && b.Feasible:
		return 1
	case a.Feasible:
		return cmpFloat(a.F[0], b.F[0])
	}
	return cmpFloat(a.Violation, b.Violation)
}

// cmpFloat compares two floats.
func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// violation returns the violation of an evaluation (+Inf for none).
func violation(e *mdo.Evaluation) float64 {
	if e == nil {
		return math.Inf(1)
	}
	return e.Violation
}

// compareEps is the ε-level comparison (Takahama & Sakai, 2006): points
// whose violation is at most eps compare by objective as if feasible; the
// others by violation, after them. With eps = 0 it is compare.
func compareEps(a, b *mdo.Evaluation, eps float64) int {
	if eps <= 0 {
		return compare(a, b)
	}
	va, vb := violation(a), violation(b)
	aOK, bOK := va <= eps, vb <= eps
	switch {
	case aOK && bOK:
		if c := cmpFloat(a.F[0], b.F[0]); c != 0 {
			return c
		}
		return cmpFloat(va, vb)
	case aOK:
		return -1
	case bOK:
		return 1
	}
	return cmpFloat(va, vb)
}

// sortByDeb sorts indices of evs best first by the ε-level comparison
// (Deb's rules when eps = 0), stable.
func sortByDeb(idx []int, evs []*mdo.Evaluation, eps float64) {
	sort.SliceStable(idx, func(i, j int) bool { return compareEps(evs[idx[i]], evs[idx[j]], eps) < 0 })
}
