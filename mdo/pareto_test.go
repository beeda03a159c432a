package mdo

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// bruteFront is the reference: the feasible evaluations no other one
// dominates, the first of equal objective vectors, sorted by the first
// objective (stable in the order offered). It is the definition of the
// Pareto set (Deb et al., 2002, section II), checked pair by pair.
func bruteFront(evs []*Evaluation) []*Evaluation {
	var out []*Evaluation
	for i, a := range evs {
		if !a.Feasible {
			continue
		}
		keep := true
		for j, b := range evs {
			if !b.Feasible || i == j {
				continue
			}
			if Dominates(b, a) || (j < i && sameF(a, b)) {
				keep = false
				break
			}
		}
		if keep {
			out = append(out, a)
		}
	}
	slices.SortStableFunc(out, func(a, b *Evaluation) int {
		switch {
		case a.F[0] < b.F[0]:
			return -1
		case a.F[0] > b.F[0]:
			return 1
		}
		return 0
	})
	return out
}

// linearArchive is the archive update the Evaluator used before
// paretoArchive: a scan of the whole archive per evaluation. Kept as the
// reference and the "before" of BenchmarkParetoArchive.
func linearArchive(archive []*Evaluation, ev *Evaluation) []*Evaluation {
	for _, a := range archive {
		if Dominates(a, ev) || sameF(a, ev) {
			return archive
		}
	}
	kept := archive[:0]
	for _, a := range archive {
		if !Dominates(ev, a) {
			kept = append(kept, a)
		}
	}
	pos := len(kept)
	for i, a := range kept {
		if ev.F[0] < a.F[0] {
			pos = i
			break
		}
	}
	kept = append(kept, nil)
	copy(kept[pos+1:], kept[pos:])
	kept[pos] = ev
	return kept
}

// randomEvals draws n seeded evaluations with m objectives. With grid > 0
// the objectives are rounded to multiples of 1/grid, so that equal first
// objectives, equal vectors and weak dominance occur; a tenth are
// infeasible. The points scatter about the front f₂ = 1 − f₁² (ZDT2-like)
// so that the archive grows large.
func randomEvals(n, m, grid int, seed uint64) []*Evaluation {
	r := rand.New(rand.NewPCG(seed, 7))
	evs := make([]*Evaluation, n)
	for i := range evs {
		f := make([]float64, m)
		sum := 0.0
		for k := 0; k < m-1; k++ {
			f[k] = r.Float64()
			sum += f[k] * f[k]
		}
		f[m-1] = math.Max(0, 1-sum/float64(m-1)) + 0.3*r.Float64()*r.Float64()
		if grid > 0 {
			for k := range f {
				f[k] = math.Round(f[k]*float64(grid)) / float64(grid)
			}
		}
		feasible := r.IntN(10) != 0
		evs[i] = &Evaluation{ID: i, F: f, Feasible: feasible}
		if !feasible {
			evs[i].Violation = 1
		}
	}
	return evs
}

func TestParetoArchiveIsTheNonDominatedSet(t *testing.T) {
	cases := []struct {
		n, m, grid int
		seed       uint64
	}{
		{n: 2000, m: 2, grid: 0, seed: 1},
		{n: 2000, m: 2, grid: 20, seed: 2},
		{n: 3000, m: 2, grid: 200, seed: 3},
		{n: 500, m: 2, grid: 3, seed: 4},
		{n: 1500, m: 3, grid: 0, seed: 5},
		{n: 1500, m: 3, grid: 10, seed: 6},
		{n: 800, m: 4, grid: 6, seed: 7},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("m=%d/grid=%d/seed=%d", c.m, c.grid, c.seed), func(t *testing.T) {
			evs := randomEvals(c.n, c.m, c.grid, c.seed)
			var p paretoArchive
			var lin []*Evaluation
			for i, ev := range evs {
				if ev.Feasible {
					p.add(ev)
					lin = linearArchive(lin, ev)
				}
				// check along the way, not only at the end
				if i%97 == 0 || i == len(evs)-1 {
					got, want := p.members(), bruteFront(evs[:i+1])
					if c.m > 2 && len(want) >= manyObjectiveLimit {
						t.Fatalf("case too large for an exact check: %d members", len(want))
					}
					if !slices.Equal(got, want) {
						t.Fatalf("after %d evaluations: archive has %d members, the non-dominated set %d", i+1, len(got), len(want))
					}
					if !slices.Equal(lin, want) {
						t.Fatalf("after %d evaluations: the former linear archive has %d members, the non-dominated set %d", i+1, len(lin), len(want))
					}
				}
			}
		})
	}
}

func TestParetoArchiveBoundedForManyObjectives(t *testing.T) {
	// A front of 3 objectives on the simplex f₁+f₂+f₃ = 1: every point is
	// non-dominated, so the archive would grow without a bound.
	r := rand.New(rand.NewPCG(11, 3))
	var p paretoArchive
	var all []*Evaluation
	for i := 0; i < 5*manyObjectiveLimit; i++ {
		a, b := r.Float64(), r.Float64()
		if a+b > 1 {
			a, b = 1-a, 1-b
		}
		ev := &Evaluation{ID: i, F: []float64{a, b, 1 - a - b}, Feasible: true}
		all = append(all, ev)
		p.add(ev)
		if len(p.many) >= 2*manyObjectiveLimit {
			t.Fatalf("archive reached %d members, the bound is %d", len(p.many), 2*manyObjectiveLimit)
		}
	}
	got := p.members()
	if len(got) < manyObjectiveLimit {
		t.Fatalf("archive has %d members, want at least %d after pruning", len(got), manyObjectiveLimit)
	}
	for i, a := range got {
		for j, b := range got {
			if i != j && Dominates(a, b) {
				t.Fatalf("member %d dominates member %d", a.ID, b.ID)
			}
		}
		if i > 0 && got[i-1].F[0] > a.F[0] {
			t.Fatalf("members not sorted by the first objective at %d", i)
		}
	}
	// the extremes of each objective over all points offered since the
	// last pruning are members; the overall extremes were too when they came
	for k := 0; k < 3; k++ {
		lo := got[0]
		for _, a := range got {
			if a.F[k] < lo.F[k] {
				lo = a
			}
		}
		best := all[0]
		for _, a := range all {
			if a.F[k] < best.F[k] {
				best = a
			}
		}
		if lo != best {
			t.Errorf("objective %d: smallest member %v, smallest offered %v (an extreme has infinite crowding distance and must stay)", k, lo.F, best.F)
		}
	}
}

// BenchmarkParetoArchive offers 20 000 random two-objective evaluations
// about a ZDT2-like front to the archive: "linear" is the scan the
// Evaluator used before, "tree" is paretoArchive.
func BenchmarkParetoArchive(b *testing.B) {
	evs := randomEvals(20000, 2, 0, 9)
	b.Run("linear", func(b *testing.B) {
		for b.Loop() {
			var a []*Evaluation
			for _, ev := range evs {
				if ev.Feasible {
					a = linearArchive(a, ev)
				}
			}
		}
	})
	b.Run("tree", func(b *testing.B) {
		for b.Loop() {
			var p paretoArchive
			for _, ev := range evs {
				if ev.Feasible {
					p.add(ev)
				}
			}
		}
	})
}
