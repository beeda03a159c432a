package mdo

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/graph/topo"
)

// System is a set of disciplines coupled through the variables they
// declare. Its structure is fixed when it is built: variable names are
// resolved to indices, the dependency graph is derived from the
// declarations, the strongly connected components give the coupled groups
// and a condensed topological order gives the execution order.
//
// A System is read-only after NewSystem apart from its solver settings,
// and may be shared by many Workspaces, one per goroutine.
type System struct {
	discs    []Discipline
	fns      []ComputeFunc // discipline -> its computation (see computeFunc)
	vars     *VarTable
	producer []int   // variable -> producing discipline, or -1
	inIdx    [][]int // discipline -> input variable indices
	outIdx   [][]int // discipline -> output variable indices
	// outStart is, per discipline, the index of its first output: the
	// outputs of a discipline are numbered consecutively (they are
	// declared first, one discipline after the other), so that they are
	// the slice val[outStart[d]:outStart[d]+len(outIdx[d])] of the values.
	outStart []int
	inSpec   [][]Var     // discipline -> declared input specs (ranges checked)
	inLo     [][]float64 // discipline -> input lower bounds (−MaxFloat64 if open)
	inHi     [][]float64 // discipline -> input upper bounds (+MaxFloat64 if open)
	// inLoop lists, per discipline of a coupled group, the positions of
	// its inputs produced inside its own group: the only inputs that
	// change between coupling iterations.
	inLoop   [][]int
	loopIn   [][]bool // discipline -> input position -> produced inside its own group
	groups   []group  // execution order
	params   []int    // variables nobody produces
	settings []SolverSettings
}

// group is one step of the execution order.
type group struct {
	discs   []int     // disciplines in declared order
	coupled bool      // a cycle: needs a solver
	at      int       // its index in System.groups
	tear    []int     // coupling variables: produced and consumed inside the group
	scale   []float64 // residual scale of each coupling variable
	// inv holds 1/scale of each coupling variable; pow2 is true when
	// every scale is a power of two, whose reciprocal is exact: a
	// residual times inv is then the residual divided by scale, bit for
	// bit (both round the same real number), and costs a multiplication.
	inv  []float64
	pow2 bool
	// lo and hi bound each coupling variable by the intersection of the
	// validity ranges its consumers inside the group declare; loDisc and
	// hiDisc name the discipline whose range gives each bound.
	lo, hi         []float64
	loDisc, hiDisc []int
	names          []string
	tearNames      []string // names of the coupling variables
}

// nameOnly reports whether v declares a variable by its name alone: no
// unit, description, validity range or scale (its default aside), as
// Func and Specs declare one.
func nameOnly(v Var) bool {
	return v.Unit == "" && v.Description == "" && v.Unbounded() && v.Scale == 0
}

// scaled returns d, the change of coupling variable k, in units of its
// scale: d/scale, computed as d·(1/scale) when that is exact (pow2).
func (g *group) scaled(k int, d float64) float64 {
	if g.pow2 {
		return d * g.inv[k]
	}
	return d / g.scale[k]
}

// NewSystem builds a System from disciplines. Each variable must have
// exactly one producer; a second producer is an error naming both.
// Variables declared by several disciplines must agree on their unit,
// except that a variable one of them declares by its name alone (no
// unit, description, range or scale, as Func and Specs declare it)
// takes the specification another gives it: a discipline written in a
// few lines with Func reads and feeds the variables of a larger model.
func NewSystem(ds ...Discipline) (*System, error) {
	if len(ds) == 0 {
		return nil, fmt.Errorf("mdo: NewSystem needs at least one discipline")
	}
	s := &System{discs: ds}
	seenDisc := map[string]bool{}
	specs := []Var{}
	index := map[string]int{}
	declare := func(d Discipline, v Var, produced bool) (int, error) {
		if err := v.Validate(); err != nil {
			return 0, fmt.Errorf("mdo: discipline %s: %w", d.Name(), err)
		}
		i, ok := index[v.Name]
		if !ok {
			index[v.Name] = len(specs)
			specs = append(specs, v)
			s.producer = append(s.producer, -1)
			return len(specs) - 1, nil
		}
		if specs[i].Unit != v.Unit {
			switch {
			case nameOnly(v):
				return i, nil // the specification given elsewhere holds
			case nameOnly(specs[i]):
				specs[i] = v
				return i, nil
			}
			return 0, fmt.Errorf("mdo: variable %s declared in unit %q by discipline %s but in %q elsewhere", v.Name, v.Unit, d.Name(), specs[i].Unit)
		}
		if produced {
			specs[i] = v // the producer's specification wins
		}
		return i, nil
	}
	for di, d := range ds {
		if d == nil {
			return nil, fmt.Errorf("mdo: discipline %d is nil", di)
		}
		if seenDisc[d.Name()] {
			return nil, fmt.Errorf("mdo: two disciplines are named %s", d.Name())
		}
		seenDisc[d.Name()] = true
		var outs []int
		for _, v := range d.Outputs() {
			i, err := declare(d, v, true)
			if err != nil {
				return nil, err
			}
			if p := s.producer[i]; p >= 0 {
				return nil, fmt.Errorf("mdo: variable %s has two producers: disciplines %s and %s", v.Name, ds[p].Name(), d.Name())
			}
			s.producer[i] = di
			outs = append(outs, i)
		}
		s.outIdx = append(s.outIdx, outs)
		start := len(specs) - len(outs)
		for k, i := range outs {
			if i != start+k {
				return nil, fmt.Errorf("mdo: internal error: outputs of discipline %s are not numbered consecutively", d.Name())
			}
		}
		s.outStart = append(s.outStart, start)
	}
	for _, d := range ds {
		var ins []int
		for _, v := range d.Inputs() {
			i, err := declare(d, v, false)
			if err != nil {
				return nil, err
			}
			ins = append(ins, i)
		}
		s.inIdx = append(s.inIdx, ins)
		s.inSpec = append(s.inSpec, append([]Var(nil), d.Inputs()...))
		lo, hi := make([]float64, len(ins)), make([]float64, len(ins))
		for k, v := range d.Inputs() {
			lo[k], hi[k] = v.Min, v.Max
			if v.Unbounded() {
				lo[k], hi[k] = -math.MaxFloat64, math.MaxFloat64
			}
		}
		s.inLo = append(s.inLo, lo)
		s.inHi = append(s.inHi, hi)
	}
	vt, err := NewVarTable(specs...)
	if err != nil {
		return nil, err
	}
	s.vars = vt
	for _, d := range ds {
		s.fns = append(s.fns, computeFunc(d))
	}
	for i, p := range s.producer {
		if p < 0 {
			s.params = append(s.params, i)
		}
	}
	s.buildGroups()
	s.settings = make([]SolverSettings, len(s.groups))
	for i := range s.settings {
		s.settings[i] = DefaultSolver()
	}
	return s, nil
}

// computeFunc returns the computation of d: the function of a
// FuncDiscipline (with or without partials) itself, one call instead of
// the method's two, else d's Compute method.
func computeFunc(d Discipline) ComputeFunc {
	switch f := d.(type) {
	case *FuncDiscipline:
		if f.fn != nil {
			return f.fn
		}
	case *FuncPartialsDiscipline:
		if f.FuncDiscipline != nil && f.fn != nil {
			return f.fn
		}
	}
	return d.Compute
}

// buildGroups derives the dependency graph, its strongly connected
// components and a deterministic topological order of the condensation
// (ties broken by the lowest discipline index).
func (s *System) buildGroups() {
	n := len(s.discs)
	g := simple.NewDirectedGraph()
	for i := 0; i < n; i++ {
		g.AddNode(simple.Node(i))
	}
	selfLoop := make([]bool, n)
	for to := 0; to < n; to++ {
		for _, v := range s.inIdx[to] {
			from := s.producer[v]
			if from < 0 {
				continue
			}
			if from == to {
				selfLoop[to] = true
				continue
			}
			if !g.HasEdgeFromTo(int64(from), int64(to)) {
				g.SetEdge(g.NewEdge(simple.Node(from), simple.Node(to)))
			}
		}
	}
	comp := make([]int, n)
	var members [][]int
	for ci, c := range topo.TarjanSCC(g) {
		var m []int
		for _, node := range c {
			comp[node.ID()] = ci
			m = append(m, int(node.ID()))
		}
		sort.Ints(m)
		members = append(members, m)
	}
	// Kahn's algorithm on the condensation, lowest first discipline first.
	nc := len(members)
	indeg := make([]int, nc)
	succ := make([]map[int]bool, nc)
	for i := range succ {
		succ[i] = map[int]bool{}
	}
	for to := 0; to < n; to++ {
		for _, v := range s.inIdx[to] {
			from := s.producer[v]
			if from < 0 || comp[from] == comp[to] || succ[comp[from]][comp[to]] {
				continue
			}
			succ[comp[from]][comp[to]] = true
			indeg[comp[to]]++
		}
	}
	done := make([]bool, nc)
	for len(s.groups) < nc {
		best := -1
		for c := 0; c < nc; c++ {
			if !done[c] && indeg[c] == 0 && (best < 0 || members[c][0] < members[best][0]) {
				best = c
			}
		}
		done[best] = true
		for c := range succ[best] {
			indeg[c]--
		}
		m := members[best]
		gr := group{discs: m, coupled: len(m) > 1 || selfLoop[m[0]], at: len(s.groups)}
		inGroup := map[int]bool{}
		for _, d := range m {
			inGroup[d] = true
			gr.names = append(gr.names, s.discs[d].Name())
		}
		if gr.coupled {
			seen := map[int]bool{}
			for _, d := range m {
				for _, v := range s.inIdx[d] {
					if p := s.producer[v]; p >= 0 && inGroup[p] && !seen[v] {
						seen[v] = true
						gr.tear = append(gr.tear, v)
					}
				}
			}
			sort.Ints(gr.tear)
			gr.pow2 = true
			for _, v := range gr.tear {
				gr.tearNames = append(gr.tearNames, s.vars.At(v).Name)
				sc := s.vars.At(v).scale()
				gr.scale = append(gr.scale, sc)
				gr.inv = append(gr.inv, 1/sc)
				if frac, _ := math.Frexp(sc); frac != 0.5 || math.IsInf(sc, 0) || math.IsInf(1/sc, 0) {
					gr.pow2 = false
				}
				lo, hi, ld, hd := -math.MaxFloat64, math.MaxFloat64, -1, -1
				for _, d := range m {
					for k, u := range s.inIdx[d] {
						if u != v {
							continue
						}
						if s.inLo[d][k] > lo {
							lo, ld = s.inLo[d][k], d
						}
						if s.inHi[d][k] < hi {
							hi, hd = s.inHi[d][k], d
						}
					}
				}
				gr.lo, gr.hi = append(gr.lo, lo), append(gr.hi, hi)
				gr.loDisc, gr.hiDisc = append(gr.loDisc, ld), append(gr.hiDisc, hd)
			}
		}
		s.groups = append(s.groups, gr)
	}
	s.inLoop = make([][]int, n)
	s.loopIn = make([][]bool, n)
	for d := range s.loopIn {
		s.loopIn[d] = make([]bool, len(s.inIdx[d]))
	}
	for _, g := range s.groups {
		if !g.coupled {
			continue
		}
		for _, d := range g.discs {
			for k, v := range s.inIdx[d] {
				if p := s.producer[v]; p >= 0 && comp[p] == comp[d] {
					s.inLoop[d] = append(s.inLoop[d], k)
					s.loopIn[d][k] = true
				}
			}
		}
	}
}

// Vars returns the table of every variable of the system.
func (s *System) Vars() *VarTable { return s.vars }

// Index returns the index of a variable, or -1 if the system has none of
// that name.
func (s *System) Index(name string) int { return s.vars.Index(name) }

// Var returns the specification of a variable.
func (s *System) Var(name string) (Var, error) {
	v, ok := s.vars.Lookup(name)
	if !ok {
		return Var{}, s.unknown(name)
	}
	return v, nil
}

// unknown is the error for a name the system does not have.
func (s *System) unknown(name string) error {
	return unknownIn("the system", name, s.vars.All())
}

// Disciplines returns the disciplines in declared order.
func (s *System) Disciplines() []Discipline { return append([]Discipline(nil), s.discs...) }

// Producer returns the name of the discipline producing a variable, or ""
// for a parameter.
func (s *System) Producer(name string) string {
	i := s.Index(name)
	if i < 0 || s.producer[i] < 0 {
		return ""
	}
	return s.discs[s.producer[i]].Name()
}

// IsParameter reports whether the variable is an input nobody produces.
func (s *System) IsParameter(name string) bool {
	i := s.Index(name)
	return i >= 0 && s.producer[i] < 0
}

// Parameters returns the inputs nobody produces, in declaration order.
func (s *System) Parameters() []Var {
	out := make([]Var, len(s.params))
	for i, p := range s.params {
		out[i] = s.vars.At(p)
	}
	return out
}

// Groups returns the discipline names of each group in execution order.
func (s *System) Groups() [][]string {
	out := make([][]string, len(s.groups))
	for i, g := range s.groups {
		out[i] = append([]string(nil), g.names...)
	}
	return out
}

// CoupledGroups returns the discipline names of the groups that need a
// coupling solver, in execution order.
func (s *System) CoupledGroups() [][]string {
	var out [][]string
	for _, g := range s.groups {
		if g.coupled {
			out = append(out, append([]string(nil), g.names...))
		}
	}
	return out
}

// CouplingVars returns the coupling variables of every coupled group (the
// outputs consumed inside their own group), in execution order.
func (s *System) CouplingVars() []Var {
	var out []Var
	for _, g := range s.groups {
		for _, v := range g.tear {
			out = append(out, s.vars.At(v))
		}
	}
	return out
}

// SetSolver sets the solver of every coupled group. Call it before making
// workspaces; existing workspaces keep their settings.
func (s *System) SetSolver(set SolverSettings) error {
	set, err := set.normalized()
	if err != nil {
		return err
	}
	for i := range s.settings {
		s.settings[i] = set
	}
	return nil
}

// SetGroupSolver sets the solver of the group that contains the named
// discipline.
func (s *System) SetGroupSolver(discipline string, set SolverSettings) error {
	set, err := set.normalized()
	if err != nil {
		return err
	}
	for gi, g := range s.groups {
		for _, n := range g.names {
			if n == discipline {
				s.settings[gi] = set
				return nil
			}
		}
	}
	return fmt.Errorf("mdo: the system has no discipline %q", discipline)
}

// Solver returns the solver settings of the group holding discipline.
func (s *System) Solver(discipline string) (SolverSettings, error) {
	for gi, g := range s.groups {
		for _, n := range g.names {
			if n == discipline {
				return s.settings[gi], nil
			}
		}
	}
	return SolverSettings{}, fmt.Errorf("mdo: the system has no discipline %q", discipline)
}
