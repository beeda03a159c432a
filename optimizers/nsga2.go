package optimizers

import (
	"context"
	"math"
	"sort"

	"couplet/mdo"
)

// NSGA2 is the elitist non-dominated sorting genetic algorithm of Deb,
// Pratap, Agarwal & Meyarivan (2002): fast non-dominated sorting with Deb's
// constrained domination (mdo.Dominates), crowding distance, binary
// tournament by (rank, crowding), simulated binary crossover and
// polynomial mutation in the unit box, and (μ + λ) survival front by
// front. Each generation is evaluated as one batch, of points the run has
// not asked for before (an offspring repeating a point is moved by the
// rule of the single-objective methods, see GA). The Result's Front is
// the Evaluator's archive: every feasible non-dominated point evaluated
// during the run (a superset of the final population's first front, never
// worse; bounded for three or more objectives, see mdo.Evaluator.Front). Integer design variables are searched as continuous coordinates
// that the Evaluator rounds. Zero values take the defaults.
type NSGA2 struct {
	// Evolution: Population is the number of individuals (rounded up to
	// even), default 100.
	Evolution
	Variation
}

// Name implements Optimizer.
func (NSGA2) Name() string { return "NSGA-II" }

// validate checks the settings.
func (o NSGA2) validate() error {
	const m = "NSGA2"
	return firstError(o.Evolution.validate(m, 4), o.Variation.validate(m))
}

// Minimize implements Optimizer.
func (o NSGA2) Minimize(ctx context.Context, s *mdo.Study) (*mdo.Result, error) {
	if err := o.validate(); err != nil {
		return nil, err
	}
	r, err := begin(ctx, s, o.Name(), o)
	if err != nil {
		return nil, err
	}
	r.maxEvals = o.MaxEvaluations
	dim := r.ev.Dim()
	n := or(o.Population, 100)
	n += n % 2
	vary := o.Variation.resolved(dim)
	rng := newRand(r.ev.Seed(), 4)
	fresh := newFreshPoints(r.ev, freshStream+4)

	xs := make([][]float64, n)
	for i := range xs {
		xs[i] = uniformPoint(dim, rng)
		fresh.fresh(xs[i])
	}
	evs, stop, err := r.evaluate(xs)
	if stop != mdo.NotStopped || err != nil {
		return r.finish(stop, err)
	}
	pop := make([]nsgaInd, n)
	for i := range pop {
		pop[i] = nsgaInd{x: xs[i], ev: evs[i]}
	}
	var sc nsgaScratch
	sc.rank(pop)
	r.iteration()
	gens := or(o.Generations, 200)
	stop = mdo.StopIterations
	// the generations reuse their slices: the offspring take the points
	// of the individuals the last survival dropped
	off := make([][]float64, 0, n)
	all := make([]nsgaInd, 0, 2*n)
	next := make([]nsgaInd, 0, n)
	watch := infeasibleStall{window: stallWindow(gens)}
	watch.reset()
	var spare [][]float64
	child := func(parent []float64) []float64 {
		if k := len(spare) - 1; k >= 0 {
			c := spare[k]
			spare = spare[:k]
			return append(c[:0], parent...)
		}
		return append([]float64(nil), parent...)
	}
	for g := 0; g < gens; g++ {
		if watch.stalled(r.ev.Best()) {
			// no feasible point, and the least violation stalled
			r.detail = watch.stallDetail("generations")
			stop = mdo.StopStalled
			break
		}
		off = off[:0]
		for len(off) < n {
			a, b := tournament(pop, rng), tournament(pop, rng)
			c1 := child(pop[a].x)
			c2 := child(pop[b].x)
			vary.pair(c1, c2, rng)
			fresh.fresh(c1)
			fresh.fresh(c2)
			off = append(off, c1, c2)
		}
		oevs, st, err := r.evaluate(off)
		if st != mdo.NotStopped || err != nil {
			stop = st
			if err != nil {
				return r.finish(mdo.NotStopped, err)
			}
			break
		}
		all = append(all[:0], pop...)
		for i := range off {
			all = append(all, nsgaInd{x: off[i], ev: oevs[i]})
		}
		next = sc.selectNext(next[:0], all, n)
		pop, next = next, pop
		for i, kept := range sc.kept[:len(all)] {
			if !kept {
				spare = append(spare, all[i].x)
			}
		}
		clear(all)
		r.iteration()
	}
	return r.finish(stop, nil)
}

// nsgaInd is an individual of NSGA-II.
type nsgaInd struct {
	x     []float64
	ev    *mdo.Evaluation
	rank  int
	crowd float64
}

// tournament picks the better of two random individuals by (rank, crowding).
func tournament(pop []nsgaInd, rng interface{ Intn(int) int }) int {
	a, b := rng.Intn(len(pop)), rng.Intn(len(pop))
	switch {
	case pop[a].rank < pop[b].rank:
		return a
	case pop[b].rank < pop[a].rank:
		return b
	case pop[a].crowd > pop[b].crowd:
		return a
	case pop[b].crowd > pop[a].crowd:
		return b
	}
	return min(a, b)
}

// nsgaScratch holds the slices NSGA-II's ranking and survival reuse from
// one generation to the next.
type nsgaScratch struct {
	evs       []*mdo.Evaluation
	dominated [][]int // per individual, those it dominates
	count     []int   // per individual, how many dominate it
	fronts    [][]int
	frontBuf  []int // the fronts' storage
	order     []int
	dist      []float64
	kept      []bool // per individual of the last survival, whether it was kept
}

// nonDominatedSort returns the fronts of evs (indices), best first, by the
// fast non-dominated sort of Deb et al. (2002) with mdo.Dominates.
func nonDominatedSort(evs []*mdo.Evaluation) [][]int {
	var s nsgaScratch
	return s.sort(evs)
}

// sort is nonDominatedSort; the fronts it returns live in s until the
// next call.
func (s *nsgaScratch) sort(evs []*mdo.Evaluation) [][]int {
	n := len(evs)
	for len(s.dominated) < n {
		s.dominated = append(s.dominated, nil)
	}
	dominated := s.dominated[:n]
	for p := range dominated {
		dominated[p] = dominated[p][:0]
	}
	s.count = append(s.count[:0], make([]int, n)...)
	count := s.count
	// every index enters one front once: the fronts' storage never grows
	// past n, so the fronts may be slices of it
	if cap(s.frontBuf) < n {
		s.frontBuf = make([]int, 0, n)
	}
	buf := s.frontBuf[:0]
	for p := 0; p < n; p++ {
		for q := 0; q < n; q++ {
			if p == q {
				continue
			}
			switch {
			case mdo.Dominates(evs[p], evs[q]):
				dominated[p] = append(dominated[p], q)
			case mdo.Dominates(evs[q], evs[p]):
				count[p]++
			}
		}
		if count[p] == 0 {
			buf = append(buf, p)
		}
	}
	fronts := s.fronts[:0]
	front := buf
	for len(front) > 0 {
		fronts = append(fronts, front)
		from := len(buf)
		for _, p := range front {
			for _, q := range dominated[p] {
				count[q]--
				if count[q] == 0 {
					buf = append(buf, q)
				}
			}
		}
		front = buf[from:]
		sort.Ints(front)
	}
	s.fronts = fronts
	return fronts
}

// crowdingDistance returns the crowding distance of each member of a front
// (Deb et al., 2002): per objective, the normalised gap between its two
// neighbours, infinite at the ends.
func crowdingDistance(evs []*mdo.Evaluation, front []int) []float64 {
	var s nsgaScratch
	return s.crowding(evs, front)
}

// crowding is crowdingDistance; the distances it returns live in s until
// the next call.
func (s *nsgaScratch) crowding(evs []*mdo.Evaluation, front []int) []float64 {
	s.dist = append(s.dist[:0], make([]float64, len(front))...)
	d := s.dist
	if len(front) == 0 {
		return d
	}
	no := len(evs[front[0]].F)
	s.order = append(s.order[:0], make([]int, len(front))...)
	order := s.order
	for m := 0; m < no; m++ {
		for i := range order {
			order[i] = i
		}
		sort.SliceStable(order, func(i, j int) bool { return evs[front[order[i]]].F[m] < evs[front[order[j]]].F[m] })
		lo, hi := evs[front[order[0]]].F[m], evs[front[order[len(order)-1]]].F[m]
		d[order[0]], d[order[len(order)-1]] = math.Inf(1), math.Inf(1)
		span := hi - lo
		if !(span > 0) || math.IsInf(span, 0) {
			continue
		}
		for k := 1; k+1 < len(order); k++ {
			d[order[k]] += (evs[front[order[k+1]]].F[m] - evs[front[order[k-1]]].F[m]) / span
		}
	}
	return d
}

// rank is NSGA-II's ranking: it sets the rank (front number) and the
// crowding distance within its front of every individual and returns the
// fronts, best first (living in s until the next call).
func (s *nsgaScratch) rank(pop []nsgaInd) [][]int {
	s.evs = s.evs[:0]
	for i := range pop {
		s.evs = append(s.evs, pop[i].ev)
	}
	fronts := s.sort(s.evs)
	for r, f := range fronts {
		cd := s.crowding(s.evs, f)
		for k, i := range f {
			pop[i].rank, pop[i].crowd = r, cd[k]
		}
	}
	clear(s.evs)
	return fronts
}

// selectNext keeps n of all front by front, the last front cut by
// decreasing crowding distance.
func selectNext(all []nsgaInd, n int) []nsgaInd {
	var s nsgaScratch
	return s.selectNext(make([]nsgaInd, 0, n), all, n)
}

// selectNext is selectNext appending to next; s.kept then says which of
// all were kept.
func (s *nsgaScratch) selectNext(next, all []nsgaInd, n int) []nsgaInd {
	s.kept = append(s.kept[:0], make([]bool, len(all))...)
	keep := func(i int) {
		next = append(next, all[i])
		s.kept[i] = true
	}
	for _, f := range s.rank(all) {
		if len(next)+len(f) <= n {
			for _, i := range f {
				keep(i)
			}
			if len(next) == n {
				break
			}
			continue
		}
		order := append(s.order[:0], f...)
		sort.SliceStable(order, func(a, b int) bool { return all[order[a]].crowd > all[order[b]].crowd })
		for _, i := range order[:n-len(next)] {
			keep(i)
		}
		s.order = order
		break
	}
	// crowding within the kept population, for the next tournaments
	s.rank(next)
	return next
}
