package optimizers

import (
	"math"
	"reflect"
	"testing"

	"couplet/mdo"
)

func evalF(id int, feasible bool, viol float64, f ...float64) *mdo.Evaluation {
	return &mdo.Evaluation{ID: id, F: f, Feasible: feasible, Violation: viol, Converged: true}
}

// Fast non-dominated sorting (Deb et al., 2002) on a hand-made set:
// (1,5), (2,2), (5,1) are non-dominated; (3,3) is dominated by (2,2);
// (4,4) by (3,3); an infeasible point ranks after every feasible one and
// two infeasible points rank by violation (constrained domination).
func TestNonDominatedSort(t *testing.T) {
	evs := []*mdo.Evaluation{
		evalF(0, true, 0, 3, 3),
		evalF(1, true, 0, 1, 5),
		evalF(2, true, 0, 4, 4),
		evalF(3, true, 0, 2, 2),
		evalF(4, false, 0.5, 0, 0),
		evalF(5, true, 0, 5, 1),
		evalF(6, false, 0.1, 9, 9),
	}
	got := nonDominatedSort(evs)
	want := [][]int{{1, 3, 5}, {0}, {2}, {6}, {4}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("fronts %v, want %v", got, want)
	}
}

// Crowding distance (Deb et al., 2002): the ends are infinite; an inner
// point sums, per objective, its neighbours' gap over the front's span.
func TestCrowdingDistance(t *testing.T) {
	evs := []*mdo.Evaluation{
		evalF(0, true, 0, 0, 4),
		evalF(1, true, 0, 1, 2),
		evalF(2, true, 0, 3, 1),
		evalF(3, true, 0, 4, 0),
	}
	d := crowdingDistance(evs, []int{0, 1, 2, 3})
	// point 1: (3 − 0)/4 + (4 − 1)/4 = 1.5; point 2: (4 − 1)/4 + (2 − 0)/4 = 1.25
	if !math.IsInf(d[0], 1) || !math.IsInf(d[3], 1) || math.Abs(d[1]-1.5) > 1e-15 || math.Abs(d[2]-1.25) > 1e-15 {
		t.Errorf("crowding %v, want [+Inf 1.5 1.25 +Inf]", d)
	}
}

// Survival keeps whole fronts, then the most crowded-apart of the last.
func TestSelectNext(t *testing.T) {
	var all []nsgaInd
	for i, f := range [][2]float64{{0, 4}, {1, 2}, {3, 1}, {4, 0}, {2, 3}, {5, 5}} {
		all = append(all, nsgaInd{x: []float64{float64(i)}, ev: evalF(i, true, 0, f[0], f[1])})
	}
	next := selectNext(all, 3)
	ids := []int{}
	for _, p := range next {
		ids = append(ids, p.ev.ID)
	}
	// first front {0,1,2,3}: the ends 0 and 3 (infinite) and 1 (1.5 > 1.25)
	want := []int{0, 3, 1}
	if !reflect.DeepEqual(ids, want) {
		t.Errorf("kept %v, want %v", ids, want)
	}
}
