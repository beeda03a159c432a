package surrogate

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"

	"couplet/mdo"
)

// StandIn fits a surrogate of study s's whole analysis and returns a
// study that searches it in the true one's place: the same design
// variables, objectives and constraints (functions included), its system
// one surrogate discipline whose inputs are the design variables (with
// their units and ranges) and whose outputs are every other variable of
// the true system, each estimated by a model fitted to a seeded
// Latin hypercube of true analyses over the design bounds (Fit.Ranges
// may narrow them: the stand-in study's bounds are then the narrowed
// ones, so that its search never asks the model beyond its samples). Failed analyses are left out and counted. The true
// analyses go to no recorder. The stand-in's result says that its
// numbers are estimates (mdo.Result.Surrogates); Confirm analyses its
// best design with the true study.
func StandIn(ctx context.Context, s *mdo.Study, fit Fit) (*mdo.Study, error) {
	if s == nil || s.System == nil {
		return nil, fmt.Errorf("surrogate: StandIn: the study or its system is nil")
	}
	if ctx == nil {
		ctx = context.Background()
	}
	if s.Formulation != mdo.MDF {
		return nil, fmt.Errorf("surrogate: StandIn(%s): formulation %s, allowed MDF (a stand-in has no coupling to close)", s.Name, s.Formulation)
	}
	quiet := *s
	quiet.Recorder, quiet.Progress = nil, nil
	ev, err := quiet.NewEvaluator()
	if err != nil {
		return nil, fmt.Errorf("surrogate: StandIn: %w", err)
	}
	names, specs := ev.DesignNames(), ev.DesignSpecs()
	inputs := make([]mdo.Var, len(names))
	for k, n := range names {
		v, err := s.System.Var(n)
		if err != nil {
			return nil, fmt.Errorf("surrogate: StandIn: %w", err)
		}
		v.Min, v.Max = specs[k].Lower, specs[k].Upper
		inputs[k] = v
	}
	lo, hi, err := sampledBox("StandIn("+s.Name+")", "design bounds", inputs, fit.Ranges)
	if err != nil {
		return nil, err
	}
	sd := &Discipline{name: "surrogate of " + s.Name, inputs: sampledInputs(inputs, lo, hi)}
	for k := range inputs {
		if hi[k] > lo[k] {
			sd.coords = append(sd.coords, k)
		}
	}
	if len(sd.coords) == 0 {
		return nil, fmt.Errorf("surrogate: StandIn(%s): every design variable is held at one value: nothing to fit", s.Name)
	}
	var keep []int // indices into the evaluator's outputs
	for i, v := range ev.OutputVars() {
		if !slices.Contains(names, v.Name) {
			keep = append(keep, i)
			sd.outputs = append(sd.outputs, v)
		}
	}
	n, err := fit.check("StandIn("+s.Name+")", "design variables", len(sd.coords), len(sd.outputs))
	if err != nil {
		return nil, err
	}
	var us [][]float64
	for _, u := range latinHypercube(n, len(sd.coords), fit.Seed) {
		p := make([]float64, len(inputs))
		for k := range inputs {
			p[k] = lo[k]
		}
		for c, k := range sd.coords {
			p[k] = lo[k] + u[c]*(hi[k]-lo[k])
		}
		us = append(us, ev.ToUnit(p))
	}
	if err := ev.Begin("surrogate sampling", map[string]string{"Samples": fmt.Sprint(n)}); err != nil {
		return nil, fmt.Errorf("surrogate: StandIn: %w", err)
	}
	evs, err := ev.Evaluate(ctx, us)
	if err != nil {
		return nil, fmt.Errorf("surrogate: StandIn(%s): %w", s.Name, err)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	var xs [][]float64
	ys := make([][]float64, len(keep))
	failed := 0
	for _, e := range evs {
		if !e.Converged || len(e.Outputs) == 0 {
			failed++
			continue
		}
		p := make([]float64, len(sd.coords))
		for c, k := range sd.coords {
			p[c] = e.Design[k]
		}
		xs = append(xs, p)
		for j, i := range keep {
			ys[j] = append(ys[j], e.Outputs[i])
		}
	}
	if err = sd.fit(xs, ys, fit); err != nil {
		return nil, fmt.Errorf("surrogate: StandIn(%s): %d of %d analyses converged: %w", s.Name, len(xs), n, err)
	}
	var box []string
	for _, k := range sd.coords {
		box = append(box, fmt.Sprintf("%s in [%.4g, %.4g]", inputs[k].Name, lo[k], hi[k]))
	}
	sd.about = fmt.Sprintf("%s fitted to %d converged of %d true analyses of study %s (%d failed) over %s; leave-one-out RMS error %s",
		fit.Model, len(xs), n, s.Name, failed, strings.Join(box, ", "), looText(quantities(s, sd.outputs), modelsOf(s, sd.outputs, sd.models)))
	sys, err := mdo.NewSystem(sd)
	if err != nil {
		return nil, fmt.Errorf("surrogate: StandIn(%s): %w", s.Name, err)
	}
	ns := *s
	ns.Name = s.Name + "_surrogate"
	ns.System = sys
	// the search stays inside the sampled box: no extrapolation
	ns.Design = slices.Clone(s.Design)
	for k := range ns.Design {
		if hi[k] > lo[k] {
			ns.Design[k].Lower, ns.Design[k].Upper = lo[k], hi[k]
			if ns.Design[k].Integer {
				ns.Design[k].Lower, ns.Design[k].Upper = math.Ceil(lo[k]), math.Floor(hi[k])
			}
		}
	}
	ns.Fixed, ns.CouplingBounds = nil, nil
	ns.Recorder, ns.Progress = nil, nil
	ns.Notes = append(slices.Clone(s.Notes), "Every number of this study is the estimate of a surrogate of study "+s.Name+": "+sd.about+".")
	if err := ns.Check(); err != nil {
		return nil, fmt.Errorf("surrogate: StandIn(%s): %w", s.Name, err)
	}
	return &ns, nil
}

// quantities returns the outputs that are objectives or constrained
// variables of s, the ones whose leave-one-out error the description
// gives (all of them if none is).
func quantities(s *mdo.Study, out []mdo.Var) []mdo.Var {
	var q []mdo.Var
	for _, v := range out {
		if isQuantity(s, v.Name) {
			q = append(q, v)
		}
	}
	if len(q) == 0 {
		return out
	}
	return q
}

// modelsOf returns the models of quantities(s, out), in that order.
func modelsOf(s *mdo.Study, out []mdo.Var, models []estimator) []estimator {
	var m []estimator
	for j, v := range out {
		if isQuantity(s, v.Name) {
			m = append(m, models[j])
		}
	}
	if len(m) == 0 {
		return models
	}
	return m
}

// isQuantity reports whether name is an objective or a constrained
// variable of s.
func isQuantity(s *mdo.Study, name string) bool {
	for _, o := range s.Objectives {
		if o.Func == nil && o.Name == name {
			return true
		}
	}
	for _, c := range s.Constraints {
		if c.Func == nil && c.Name == name {
			return true
		}
	}
	return false
}

// Confirm analyses the best design of a result found on a stand-in (or
// any result of a study with the same design variables) with the true
// study: a run of one evaluation whose result states the true answer.
func Confirm(ctx context.Context, truth *mdo.Study, r *mdo.Result) (*mdo.Result, error) {
	if truth == nil || r == nil || r.Best == nil {
		return nil, fmt.Errorf("surrogate: Confirm: needs the true study and a result with a best design")
	}
	if ctx == nil {
		ctx = context.Background()
	}
	ev, err := truth.NewEvaluator()
	if err != nil {
		return nil, fmt.Errorf("surrogate: Confirm: %w", err)
	}
	names := ev.DesignNames()
	if len(names) != len(r.Design) {
		return nil, fmt.Errorf("surrogate: Confirm: study %s has %d design variables, the result of %s has %d", truth.Name, len(names), r.Study, len(r.Design))
	}
	for k, d := range r.Design {
		if d.Name != names[k] {
			return nil, fmt.Errorf("surrogate: Confirm: design variable %d is %s in study %s but %s in the result of %s", k+1, names[k], truth.Name, d.Name, r.Study)
		}
	}
	if err := ev.Begin("confirmation of "+r.Study+"'s best design", nil); err != nil {
		return nil, fmt.Errorf("surrogate: Confirm: %w", err)
	}
	if _, err := ev.Evaluate(ctx, [][]float64{ev.ToUnit(r.Best.Design)}); err != nil {
		return nil, fmt.Errorf("surrogate: Confirm: %w", err)
	}
	return ev.Finish(mdo.StopComplete)
}
