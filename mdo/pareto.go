package mdo

import (
	"math"
	"sort"

	"github.com/google/btree"
)

// manyObjectiveLimit bounds the archive of a study with three or more
// objectives: when it holds twice this many points it is pruned back to
// this many (see paretoArchive).
const manyObjectiveLimit = 1000

// paretoArchive keeps the feasible non-dominated evaluations of a study
// with two or more objectives.
//
// With two objectives it is exact: it holds exactly the non-dominated set
// of every feasible evaluation offered (the first of several with equal
// objective vectors), unbounded, in a B-tree ordered by the first
// objective. On that front the second objective strictly decreases as the
// first increases, so the only member that can dominate a new point is
// its predecessor in the first objective, and the members the new point
// dominates follow it in one run: an update costs O(log n) plus the
// members it removes. The tree's items hold the two objectives beside the
// evaluation (its comparisons read no record), and the nodes of removed
// members go to a free list for the next insertions.
//
// With three or more objectives it keeps the mutually non-dominated
// points in a slice sorted by the first objective (ties in the order they
// came) and is bounded: when it reaches 2·manyObjectiveLimit members it is
// pruned back to manyObjectiveLimit by the crowding distance of Deb et al.
// (2002), computed once over the archive with each objective normalised
// by its range in the archive. The members with the smallest distance go,
// the latest evaluation first among equal distances; a member holding the
// smallest or largest value of an objective has infinite distance and
// stays. After a pruning the archive is non-dominated among its members
// but a later point dominated only by a pruned one may enter. An update
// costs O(limit·m), bounded, and the pruning O(m·limit·log limit) once per
// limit insertions.
type paretoArchive struct {
	two  *btree.BTreeG[paretoItem]
	gone []paretoItem // add2's scratch
	many []*Evaluation
}

// paretoItem is a member of a two-objective archive.
type paretoItem struct {
	f0, f1 float64
	ev     *Evaluation
}

// lessF0 orders two-objective members by their first objective.
func lessF0(a, b paretoItem) bool { return a.f0 < b.f0 }

// add offers a feasible evaluation with m ≥ 2 objectives to the archive.
func (p *paretoArchive) add(ev *Evaluation) {
	if len(ev.F) == 2 {
		p.add2(ev)
		return
	}
	p.addMany(ev)
}

// add2 is add for two objectives.
func (p *paretoArchive) add2(ev *Evaluation) {
	if p.two == nil {
		p.two = btree.NewG(32, lessF0) // with a free list of btree.DefaultFreeListSize nodes
	}
	it := paretoItem{f0: ev.F[0], f1: ev.F[1], ev: ev}
	// The member with the largest first objective ≤ ev's has the smallest
	// second objective among those that could dominate ev.
	dominated := false
	p.two.DescendLessOrEqual(it, func(a paretoItem) bool {
		dominated = a.f1 <= it.f1
		return false
	})
	if dominated {
		return
	}
	// ev dominates the members from its first objective on whose second
	// objective is not below its own (the members' second objectives
	// decrease along the tree).
	gone := p.gone[:0]
	p.two.AscendGreaterOrEqual(it, func(a paretoItem) bool {
		if a.f1 < it.f1 {
			return false
		}
		gone = append(gone, a)
		return true
	})
	for _, a := range gone {
		p.two.Delete(a)
	}
	clear(gone)
	p.gone = gone[:0]
	p.two.ReplaceOrInsert(it)
}

// addMany is add for three or more objectives.
func (p *paretoArchive) addMany(ev *Evaluation) {
	for _, a := range p.many {
		if Dominates(a, ev) || sameF(a, ev) {
			return
		}
	}
	kept := p.many[:0]
	for _, a := range p.many {
		if !Dominates(ev, a) {
			kept = append(kept, a)
		}
	}
	pos := sort.Search(len(kept), func(i int) bool { return ev.F[0] < kept[i].F[0] })
	kept = append(kept, nil)
	copy(kept[pos+1:], kept[pos:])
	kept[pos] = ev
	p.many = kept
	if len(p.many) >= 2*manyObjectiveLimit {
		p.prune(manyObjectiveLimit)
	}
}

// prune keeps the keep least crowded members of a many-objective archive
// (the rule in paretoArchive's doc), in their order.
func (p *paretoArchive) prune(keep int) {
	n := len(p.many)
	if n <= keep {
		return
	}
	dist := make([]float64, n)
	order := make([]int, n)
	for k := range p.many[0].F {
		for i := range order {
			order[i] = i
		}
		sort.SliceStable(order, func(i, j int) bool { return p.many[order[i]].F[k] < p.many[order[j]].F[k] })
		lo, hi := p.many[order[0]].F[k], p.many[order[n-1]].F[k]
		dist[order[0]], dist[order[n-1]] = math.Inf(1), math.Inf(1)
		if hi <= lo {
			continue
		}
		for i := 1; i < n-1; i++ {
			dist[order[i]] += (p.many[order[i+1]].F[k] - p.many[order[i-1]].F[k]) / (hi - lo)
		}
	}
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(i, j int) bool {
		a, b := order[i], order[j]
		if dist[a] != dist[b] {
			return dist[a] < dist[b]
		}
		return p.many[a].ID > p.many[b].ID
	})
	drop := make([]bool, n)
	for _, i := range order[:n-keep] {
		drop[i] = true
	}
	kept := p.many[:0]
	for i, a := range p.many {
		if !drop[i] {
			kept = append(kept, a)
		}
	}
	clear(p.many[len(kept):])
	p.many = kept
}

// members returns the archive sorted by the first objective.
func (p *paretoArchive) members() []*Evaluation {
	if p.two != nil {
		out := make([]*Evaluation, 0, p.two.Len())
		p.two.Ascend(func(a paretoItem) bool {
			out = append(out, a.ev)
			return true
		})
		return out
	}
	return append([]*Evaluation(nil), p.many...)
}

// sameF reports equal objective vectors.
func sameF(a, b *Evaluation) bool {
	for k := range a.F {
		if a.F[k] != b.F[k] {
			return false
		}
	}
	return true
}
