package surrogate

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
	"gonum.org/v1/gonum/stat/samplemv"

	"couplet/mdo"
)

// Kind chooses the model of a stand-in.
type Kind int

// The models of a stand-in.
const (
	// CubicRBF is the radial-basis-function interpolant (FitRBF); one
	// factorisation serves every output.
	CubicRBF Kind = iota
	// Kriging is the Gaussian process (FitGP), its mean as the
	// estimate; each output gets its own likelihood fit.
	Kriging
)

// String names the model.
func (k Kind) String() string {
	switch k {
	case CubicRBF:
		return "cubic radial-basis function"
	case Kriging:
		return "Kriging (Gaussian process)"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// Fit chooses how a stand-in is fitted. Zero values take the defaults.
type Fit struct {
	// Samples is the number of Latin-hypercube samples of the true
	// analysis; default 10 per sampled variable plus 10, at least the
	// sampled variables plus 2, and at most what keeps the fitted model
	// within 1 GiB: a CubicRBF model holds two dense matrices of
	// (Samples + variables + 1)² values (about 8000 samples at the
	// limit), a Kriging model (outputs + 2) matrices of Samples² values
	// (about 6700 samples for one output, 3300 for 10).
	Samples int
	// Ranges give the sampled interval of variables by name; a variable
	// not given is sampled over its validity range (Var.Min to Var.Max)
	// for a discipline, over its bounds for a study. An interval of one
	// value holds the variable there: it is no coordinate of the model,
	// whose estimates are then those at that value.
	Ranges map[string][2]float64
	// Model is the kind of model; default CubicRBF.
	Model Kind
	// Seed draws the samples (and the likelihood search's starts).
	Seed uint64
}

// estimator is a fitted model of one output.
type estimator interface {
	LOOError() float64
}

// Discipline is a surrogate stand-in for a discipline: the same name and
// variables (units, defaults) as the discipline it was fitted to
// (FitDiscipline), each output estimated by a model of the sampled
// inputs. The validity range of each sampled input is its sampled
// interval: a model is not asked beyond its samples, so a point outside
// them is an invalid input that names the variable, its value and the
// interval (a coupling variable is projected onto it while its group is
// solved, and a balance that closes only outside it does not close). It is an mdo.SurrogateDiscipline, so a study using it
// says which of its numbers are estimates.
type Discipline struct {
	name            string
	inputs, outputs []mdo.Var
	coords          []int // the inputs that are coordinates of the models
	models          []estimator
	// the models again by their type, so that Compute's scratch space
	// stays on the stack (an interface call would make it escape)
	rbfs  []*RBF
	gps   []*GP
	about string
}

// FitDiscipline samples discipline d over its inputs (Fit.Ranges, else
// their validity ranges, which must then be finite) by a seeded Latin
// hypercube, computes d at each sample, and fits a model of each output
// to the samples d answered (a sample it refuses is left out and
// counted). The result stands in for d in a System.
func FitDiscipline(ctx context.Context, d mdo.Discipline, fit Fit) (*Discipline, error) {
	if d == nil {
		return nil, fmt.Errorf("surrogate: FitDiscipline: the discipline is nil")
	}
	if ctx == nil {
		ctx = context.Background()
	}
	in, out := d.Inputs(), d.Outputs()
	if len(out) == 0 {
		return nil, fmt.Errorf("surrogate: FitDiscipline(%s): the discipline has no outputs", d.Name())
	}
	lo, hi, err := sampledBox("FitDiscipline("+d.Name()+")", "validity range", in, fit.Ranges)
	if err != nil {
		return nil, err
	}
	sd := &Discipline{name: d.Name(), inputs: sampledInputs(in, lo, hi), outputs: out}
	for k := range in {
		if hi[k] > lo[k] {
			sd.coords = append(sd.coords, k)
		}
	}
	if len(sd.coords) == 0 {
		return nil, fmt.Errorf("surrogate: FitDiscipline(%s): every input is held at one value: nothing to fit", d.Name())
	}
	n, err := fit.check("FitDiscipline("+d.Name()+")", "inputs", len(sd.coords), len(out))
	if err != nil {
		return nil, err
	}
	unit := latinHypercube(n, len(sd.coords), fit.Seed)
	var xs [][]float64
	ys := make([][]float64, len(out))
	x := make([]float64, len(in))
	y := make([]float64, len(out))
	refused := 0
	for _, u := range unit {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		for k := range in {
			x[k] = lo[k]
		}
		for c, k := range sd.coords {
			x[k] = lo[k] + u[c]*(hi[k]-lo[k])
		}
		if !computes(d, x, y) {
			refused++
			continue
		}
		p := make([]float64, len(sd.coords))
		for c, k := range sd.coords {
			p[c] = x[k]
		}
		xs = append(xs, p)
		for j := range out {
			ys[j] = append(ys[j], y[j])
		}
	}
	if err = sd.fit(xs, ys, fit); err != nil {
		return nil, fmt.Errorf("surrogate: FitDiscipline(%s): %d of %d samples answered: %w", d.Name(), len(xs), n, err)
	}
	var box []string
	for _, k := range sd.coords {
		box = append(box, fmt.Sprintf("%s in [%.4g, %.4g]", in[k].Name, lo[k], hi[k]))
	}
	for k := range in {
		if hi[k] == lo[k] {
			box = append(box, fmt.Sprintf("%s held at %.4g", in[k].Name, lo[k]))
		}
	}
	sd.about = fmt.Sprintf("%s fitted to %d samples of %s (%d refused) over %s; leave-one-out RMS error %s",
		fit.Model, len(xs), d.Name(), refused, strings.Join(box, ", "), looText(out, sd.models))
	return sd, nil
}

// sampledInputs returns the input declarations of a stand-in: vars with
// the validity range of each sampled input narrowed to its sampled
// interval [lo, hi], so that the system refuses (or, for an input solved
// inside a coupled group, projects onto the interval) a value outside
// it instead of letting the model extrapolate beyond its samples; a
// default outside the interval moves to its nearer end. An input held
// at one value keeps its declaration: the model does not depend on it.
func sampledInputs(vars []mdo.Var, lo, hi []float64) []mdo.Var {
	out := slices.Clone(vars)
	for k := range out {
		if hi[k] > lo[k] {
			out[k].Min, out[k].Max = lo[k], hi[k]
			out[k].Default = math.Max(lo[k], math.Min(hi[k], out[k].Default))
			out[k].Description = strings.TrimSpace(out[k].Description + " (the stand-in's sampled interval)")
		}
	}
	return out
}

// computes runs d at x into y, true when it answers with finite values
// (a panic is a refusal).
func computes(d mdo.Discipline, x, y []float64) (ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
	}()
	if err := d.Compute(x, y); err != nil {
		return false
	}
	for _, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// maxFitBytes bounds the memory of a fitted model's matrices.
const maxFitBytes = 1 << 30

// check refuses a Fit whose Model is unknown or whose Samples are too
// few for d sampled variables or too many for the memory of a model of
// outputs outputs, before any sample is analysed (who names the fit,
// vars the sampled variables); it returns the number of samples.
func (fit Fit) check(who, vars string, d, outputs int) (int, error) {
	if fit.Model != CubicRBF && fit.Model != Kriging {
		return 0, fmt.Errorf("surrogate: %s: Fit.Model = %v, allowed CubicRBF or Kriging", who, fit.Model)
	}
	n := fit.Samples
	if n == 0 {
		n = 10*d + 10
	}
	if n < d+2 {
		return 0, fmt.Errorf("surrogate: %s: Fit.Samples = %d, need at least %d for %d sampled %s", who, n, d+2, d, vars)
	}
	var bytes float64
	var most int
	var held string
	switch fit.Model {
	case CubicRBF:
		m := float64(n + d + 1)
		bytes = 2 * m * m * 8
		most = int(math.Sqrt(maxFitBytes/16)) - d - 1
		held = fmt.Sprintf("two dense matrices of (Samples + %d + 1)² values", d)
	case Kriging:
		bytes = float64(outputs+2) * float64(n) * float64(n) * 8
		most = int(math.Sqrt(maxFitBytes / 8 / float64(outputs+2)))
		held = fmt.Sprintf("%d + 2 matrices of Samples² values (one per output, two to fit)", outputs)
	}
	if bytes > maxFitBytes {
		return 0, fmt.Errorf("surrogate: %s: Fit.Samples = %d, allowed at most %d for %d sampled %s and %d outputs with %v: the model holds %s, %.3g GB, more than the limit of %.3g GB",
			who, n, most, d, vars, outputs, fit.Model, held, bytes/1e9, float64(maxFitBytes)/1e9)
	}
	return n, nil
}

// sampledBox returns the sampled interval of each variable: the range
// given, which must lie inside the variable's range (limit names it),
// else that range, which must be finite.
func sampledBox(who, limit string, vars []mdo.Var, ranges map[string][2]float64) (lo, hi []float64, err error) {
	known := map[string]bool{}
	for _, v := range vars {
		known[v.Name] = true
	}
	for name := range ranges {
		if !known[name] {
			return nil, nil, fmt.Errorf("surrogate: %s: Fit.Ranges names %q, which is no input of it", who, name)
		}
	}
	lo, hi = make([]float64, len(vars)), make([]float64, len(vars))
	for k, v := range vars {
		r, ok := ranges[v.Name]
		if !ok {
			r = [2]float64{v.Min, v.Max}
			if v.Min == 0 && v.Max == 0 || math.IsInf(v.Min, 0) || math.IsInf(v.Max, 0) {
				return nil, nil, fmt.Errorf("surrogate: %s: input %s has no finite validity range [%g, %g]: give its sampled range in Fit.Ranges", who, v.Name, v.Min, v.Max)
			}
		}
		if math.IsNaN(r[0]) || math.IsNaN(r[1]) || math.IsInf(r[0], 0) || math.IsInf(r[1], 0) || r[1] < r[0] {
			return nil, nil, fmt.Errorf("surrogate: %s: the sampled range of %s is [%g, %g], allowed a finite interval with lower ≤ upper", who, v.Name, r[0], r[1])
		}
		if ok && !v.Unbounded() && (r[0] < v.Min || r[1] > v.Max) {
			return nil, nil, fmt.Errorf("surrogate: %s: Fit.Ranges gives %s the interval [%g, %g]%s, not inside its %s [%g, %g]", who, v.Name, r[0], r[1], unitText(v.Unit), limit, v.Min, v.Max)
		}
		lo[k], hi[k] = r[0], r[1]
	}
	return lo, hi, nil
}

// unitText is " unit" for a unit other than none.
func unitText(unit string) string {
	if unit == "" || unit == "-" {
		return ""
	}
	return " " + unit
}

// latinHypercube returns n seeded Latin-hypercube points of the unit box
// of dimension d (gonum's stat/samplemv).
func latinHypercube(n, d int, seed uint64) [][]float64 {
	m := mat.NewDense(n, d, nil)
	samplemv.LatinHypercube{Q: distmv.NewUnitUniform(d, nil), Src: rand.NewPCG(seed, 0x7374616e64696e)}.Sample(m)
	out := make([][]float64, n)
	for i := range out {
		out[i] = append([]float64(nil), m.RawRowView(i)...)
	}
	return out
}

// fit fits one model of each output ys[j] at the points xs.
func (d *Discipline) fit(xs [][]float64, ys [][]float64, fit Fit) error {
	switch fit.Model {
	case CubicRBF:
		fits, err := FitRBFs(xs, ys)
		if err != nil {
			return err
		}
		d.rbfs = fits
		for _, f := range fits {
			d.models = append(d.models, f)
		}
	case Kriging:
		for j, y := range ys {
			g, err := FitGP(xs, y, fit.Seed+uint64(j))
			if err != nil {
				return err
			}
			d.gps = append(d.gps, g)
			d.models = append(d.models, g)
		}
	default:
		return fmt.Errorf("Fit.Model = %v, allowed CubicRBF or Kriging", fit.Model)
	}
	return nil
}

// looText lists the leave-one-out errors of the outputs with their units.
func looText(out []mdo.Var, models []estimator) string {
	var parts []string
	for j, v := range out {
		parts = append(parts, v.Name+" "+withUnit(models[j].LOOError(), v.Unit))
	}
	return strings.Join(parts, ", ")
}

// withUnit formats a value with its unit, if any.
func withUnit(v float64, unit string) string {
	if unit == "" || unit == "-" {
		return fmt.Sprintf("%.3g", v)
	}
	return fmt.Sprintf("%.3g %s", v, unit)
}

// Name implements mdo.Discipline: the name of the discipline it stands
// in for.
func (d *Discipline) Name() string { return d.name }

// Inputs implements mdo.Discipline: those of the discipline it stands in
// for.
func (d *Discipline) Inputs() []mdo.Var { return d.inputs }

// Outputs implements mdo.Discipline: those of the discipline it stands in
// for.
func (d *Discipline) Outputs() []mdo.Var { return d.outputs }

// maxStack is the largest number of model coordinates whose scratch
// space Compute keeps on the stack.
const maxStack = 32

// Compute implements mdo.Discipline: each output is its model's estimate
// at the inputs. It allocates nothing for up to 32 sampled inputs.
func (d *Discipline) Compute(in, out []float64) error {
	var xb, ub [maxStack]float64
	var x, u []float64
	if len(d.coords) > maxStack {
		x, u = make([]float64, 0, len(d.coords)), make([]float64, len(d.coords))
	} else {
		x, u = xb[:0], ub[:len(d.coords)]
	}
	for _, k := range d.coords {
		x = append(x, in[k])
	}
	for j := range d.models {
		var v float64
		if d.rbfs != nil {
			v = d.rbfs[j].estimate(x, u)
		} else {
			v = d.gps[j].estimate(x, u)
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("surrogate of %s: the estimate of %s is %g", d.name, d.outputs[j].Name, v)
		}
		out[j] = v
	}
	return nil
}

// Surrogate implements mdo.SurrogateDiscipline: the model, its samples,
// the sampled box and the leave-one-out error of each output.
func (d *Discipline) Surrogate() string { return d.about }

// String describes the stand-in.
func (d *Discipline) String() string { return "stand-in for " + d.name + ": " + d.about }
