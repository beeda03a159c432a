package optimizers

import (
	"context"
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"
	"strings"
	"text/tabwriter"

	"couplet/mdo"
)

// Calibration fits factors of a model to measured data: the factors
// (parameters of the system, such as aero.factor_lift_slope) are chosen by
// weighted nonlinear least squares (LeastSquares, Levenberg–Marquardt) so
// that the coupled analysis, run at each measured condition, reproduces
// the measured quantities, each point weighted by 1/u² of its standard
// uncertainty.
type Calibration struct {
	// Name names the calibration in its result and notes.
	Name string
	// System is the model.
	System *mdo.System
	// Fixed holds the model's parameter values other than the defaults
	// (the aircraft's, for example); the data's conditions override them
	// at each row, the factors at each trial.
	Fixed map[string]float64
	// Factors are the parameters to fit. Each starts from its value in
	// Fixed, or its default.
	Factors []string
	// Data are the measurements (mdo.ReadMeasurements).
	Data *mdo.Measurements
	// Quantities are the measured columns to fit; nil fits them all.
	Quantities []string
	// Fit holds the least-squares settings. Its Step defaults here to
	// 1e-4 (relative), large enough for the coupled analysis's solver
	// tolerance, and its RankTol to 1e-6.
	Fit LeastSquares
}

// CalibrationPoint is one fitted measurement.
type CalibrationPoint struct {
	// Line is the data file's line of the point.
	Line int
	// Quantity is the measured variable.
	Quantity string
	// Conditions are the row's conditions, in the order of Data.Conditions.
	Conditions []float64
	// Measured, Predicted and Residual (measured − predicted) are in the
	// quantity's unit; Uncertainty is the point's standard uncertainty
	// (NaN when the data give none).
	Measured, Predicted, Residual, Uncertainty float64
	// Before is the prediction with the starting factors, before the fit.
	Before float64
}

// CalibrationResult is the outcome of Calibration.Run.
type CalibrationResult struct {
	// Name is the calibration's name; Source the data's source.
	Name, Source string
	// Fit is the least-squares result: the fitted factors with their
	// standard errors and correlation.
	Fit *FitResult
	// Points holds each fitted measurement with its residual.
	Points []CalibrationPoint
	// Conditions names the data's condition columns.
	Conditions []string
	// Units gives the unit of each condition and measured quantity.
	Units map[string]string
}

// defaults returns the least-squares settings of a calibration.
func (c Calibration) settings() LeastSquares {
	o := c.Fit
	if o.Step == 0 {
		o.Step = 1e-4
	}
	if o.RankTol == 0 {
		o.RankTol = 1e-6
	}
	return o
}

// Run fits the factors. It returns the result whenever the fit ran
// (with an *IndistinctError when the data cannot tell some factors
// apart); other errors are bad declarations, data that do not fit the
// model, or an analysis that fails at a measured condition.
func (c Calibration) Run(ctx context.Context) (*CalibrationResult, error) {
	name := c.Name
	if name == "" {
		name = "calibration"
	}
	fail := func(format string, a ...any) error {
		return fmt.Errorf("optimizers: calibration %q: "+format, append([]any{name}, a...)...)
	}
	start, qi, err := c.check(fail)
	if err != nil {
		return nil, err
	}
	res := &CalibrationResult{Name: name, Source: c.Data.Source, Units: map[string]string{}}
	for _, v := range c.Data.Conditions {
		res.Conditions = append(res.Conditions, v.Name)
		res.Units[v.Name] = v.Unit
	}
	for _, v := range c.Data.Quantities {
		res.Units[v.Name] = v.Unit
	}
	type at struct{ row, q int }
	var where []at
	var observed, sigma []float64
	given, missing := 0, 0
	for r, row := range c.Data.Rows {
		for _, k := range qi {
			if math.IsNaN(row.Values[k]) {
				continue
			}
			where = append(where, at{r, k})
			observed = append(observed, row.Values[k])
			sigma = append(sigma, row.Uncertainty[k])
			if math.IsNaN(row.Uncertainty[k]) {
				missing++
			} else {
				given++
			}
		}
	}
	if given > 0 && missing > 0 {
		return nil, fail("%d of the %d points of %s have an uncertainty and %d have none; give u() for every point or for none", given, given+missing, c.Data.Source, missing)
	}
	if given == 0 {
		sigma = nil
	}
	// The analysis at each row, reusing one workspace.
	w := c.System.NewWorkspace()
	condIdx := make([]int, len(c.Data.Conditions))
	for i, v := range c.Data.Conditions {
		condIdx[i] = c.System.Index(v.Name)
	}
	qIdx := make([]int, len(c.Data.Quantities))
	for k, v := range c.Data.Quantities {
		qIdx[k] = c.System.Index(v.Name)
	}
	fixedNames := slices.Sorted(maps.Keys(c.Fixed))
	rowVals := make([][]float64, len(c.Data.Rows))
	predict := func(ctx context.Context, p, pred []float64) error {
		for r, row := range c.Data.Rows {
			w.Reset()
			for _, n := range fixedNames {
				if err := w.Set(n, c.Fixed[n]); err != nil {
					return err
				}
			}
			for j, f := range c.Factors {
				if err := w.Set(f, p[j]); err != nil {
					return err
				}
			}
			for i, x := range row.Conditions {
				w.SetIndex(condIdx[i], x)
			}
			if err := w.Analyze(ctx); err != nil {
				return fmt.Errorf("analysis at line %d of %s: %w", row.Line, c.Data.Source, err)
			}
			if rowVals[r] == nil {
				rowVals[r] = make([]float64, len(qIdx))
			}
			for k, i := range qIdx {
				rowVals[r][k] = w.At(i)
			}
		}
		for i, a := range where {
			pred[i] = rowVals[a.row][a.q]
		}
		return nil
	}
	before := make([]float64, len(observed))
	if err := predict(ctx, start, before); err != nil {
		return nil, fmt.Errorf("optimizers: calibration %q: with the starting factors: %w", name, err)
	}
	fit, err := c.settings().Fit(ctx, FitProblem{Names: c.Factors, Start: start, Observed: observed, Sigma: sigma, Predict: predict})
	if fit == nil {
		return nil, fmt.Errorf("optimizers: calibration %q: %w", name, err)
	}
	res.Fit = fit
	for i, a := range where {
		row := c.Data.Rows[a.row]
		u := math.NaN()
		if sigma != nil {
			u = sigma[i]
		}
		res.Points = append(res.Points, CalibrationPoint{
			Line: row.Line, Quantity: c.Data.Quantities[a.q].Name, Conditions: row.Conditions,
			Measured: observed[i], Predicted: fit.Predicted[i], Residual: fit.Residuals[i], Uncertainty: u, Before: before[i],
		})
	}
	var ind *IndistinctError
	if errors.As(err, &ind) {
		return res, fmt.Errorf("optimizers: calibration %q: %w", name, err)
	}
	return res, err
}

// check refuses a bad declaration before any analysis runs, naming the
// field (Calibration.Field) with its value and what is allowed, and
// returns the factors' starting values and the indices of the measured
// columns to fit.
func (c Calibration) check(fail func(string, ...any) error) ([]float64, []int, error) {
	if c.System == nil {
		return nil, nil, fail("Calibration.System = nil, needs a System: the model whose factors are fitted")
	}
	if c.Data == nil {
		return nil, nil, fail("Calibration.Data = nil, needs Data: the measurements (mdo.ReadMeasurements)")
	}
	if err := c.Fit.checkSettings("Calibration.Fit"); err != nil {
		return nil, nil, fail("%w", err)
	}
	for _, n := range slices.Sorted(maps.Keys(c.Fixed)) {
		v, err := c.System.Var(n)
		if err != nil {
			return nil, nil, fail("Calibration.Fixed[%s] = %g, must name a parameter of the model: %w", n, c.Fixed[n], err)
		}
		if !c.System.IsParameter(n) {
			return nil, nil, fail("Calibration.Fixed[%s] = %g, must name a parameter of the model; %s is computed by discipline %s", n, c.Fixed[n], n, c.System.Producer(n))
		}
		if err := v.Check(c.Fixed[n]); err != nil {
			return nil, nil, fail("Calibration.Fixed[%s] = %g: %w", n, c.Fixed[n], err)
		}
	}
	if len(c.Factors) == 0 {
		return nil, nil, fail("Calibration.Factors = [], no factors to fit; list parameters of the model in Factors, e.g. aero.factor_lift_slope")
	}
	start := make([]float64, len(c.Factors))
	for j, f := range c.Factors {
		v, err := c.System.Var(f)
		if err != nil {
			return nil, nil, fail("Calibration.Factors[%d] = factor %s, must name a parameter of the model: %w", j, f, err)
		}
		if !c.System.IsParameter(f) {
			return nil, nil, fail("Calibration.Factors[%d] = factor %s is computed by discipline %s; only parameters of the model can be fitted", j, f, c.System.Producer(f))
		}
		if k := slices.Index(c.Factors, f); k < j {
			return nil, nil, fail("Calibration.Factors[%d] = factor %s, listed twice (also Factors[%d]); list each factor once", j, f, k)
		}
		for _, cv := range c.Data.Conditions {
			if cv.Name == f {
				return nil, nil, fail("Calibration.Factors[%d] = factor %s is also a condition of the data %s; a factor must be a parameter the data do not set", j, f, c.Data.Source)
			}
		}
		start[j] = v.Default
		if x, ok := c.Fixed[f]; ok {
			start[j] = x
		}
	}
	// The measured columns to fit.
	qi := []int{}
	if c.Quantities == nil {
		for k := range c.Data.Quantities {
			qi = append(qi, k)
		}
		return start, qi, nil
	}
	if len(c.Quantities) == 0 {
		return nil, nil, fail("Calibration.Quantities = [], nothing to fit; list measured columns, or leave it nil to fit them all")
	}
	for j, q := range c.Quantities {
		k := slices.IndexFunc(c.Data.Quantities, func(v mdo.Var) bool { return v.Name == q })
		if k < 0 {
			names := make([]string, len(c.Data.Quantities))
			for i, v := range c.Data.Quantities {
				names[i] = v.Name
			}
			return nil, nil, fail("Calibration.Quantities[%d] = quantity %s is not measured in %s (its measured columns: %s)", j, q, c.Data.Source, strings.Join(names, ", "))
		}
		if i := slices.Index(c.Quantities, q); i < j {
			return nil, nil, fail("Calibration.Quantities[%d] = quantity %s, listed twice (also Quantities[%d]); list each quantity once", j, q, i)
		}
		qi = append(qi, k)
	}
	return start, qi, nil
}

// Fixed returns the fitted factors as parameter values, to hand to the
// next study's Fixed (Apply does that and records where they came from).
func (r *CalibrationResult) Fixed() map[string]float64 {
	out := map[string]float64{}
	for j, n := range r.Fit.Names {
		out[n] = r.Fit.Params[j]
	}
	return out
}

// Note is the provenance line of the fitted factors: the calibration, its
// data and each factor with its standard error.
func (r *CalibrationResult) Note() string {
	parts := make([]string, len(r.Fit.Names))
	for j, n := range r.Fit.Names {
		parts[j] = fmt.Sprintf("%s = %.4g ± %.2g", n, r.Fit.Params[j], r.Fit.StdErr[j])
	}
	return fmt.Sprintf("Fixed from calibration %q to the data %s (%d points, residual SD %.3g): %s (± one standard error).",
		r.Name, r.Source, len(r.Points), r.Fit.ResidualSD, strings.Join(parts, ", "))
}

// Apply hands the fitted factors to a study as fixed parameters (a copy of
// its Fixed map with the factors set) and adds the calibration's Note to
// the study's Notes, so its result, summary and report say where they
// came from.
func (r *CalibrationResult) Apply(s *mdo.Study) {
	fixed := maps.Clone(s.Fixed)
	if fixed == nil {
		fixed = map[string]float64{}
	}
	maps.Copy(fixed, r.Fixed())
	s.Fixed = fixed
	s.Notes = append(slices.Clone(s.Notes), r.Note())
}

// Within reports whether value lies within k standard errors of the
// fitted factor name.
func (r *CalibrationResult) Within(name string, value, k float64) (bool, error) {
	j := slices.Index(r.Fit.Names, name)
	if j < 0 {
		return false, fmt.Errorf("optimizers: calibration %q fitted no factor %q (it fitted %s)", r.Name, name, strings.Join(r.Fit.Names, ", "))
	}
	return math.Abs(r.Fit.Params[j]-value) <= k*r.Fit.StdErr[j], nil
}

// String tabulates the fitted factors, their correlation and the
// residual of every point.
func (r *CalibrationResult) String() string {
	var b strings.Builder
	f := r.Fit
	fmt.Fprintf(&b, "calibration %q to %s: %v (%s), %d iterations, %d evaluations\n", r.Name, r.Source, f.Stop, f.Test, f.Iterations, f.Evaluations)
	fmt.Fprintf(&b, "weighted RSS %.4g on %d degrees of freedom, residual SD %.4g\n", f.RSS, f.DoF, f.ResidualSD)
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprint(tw, "factor\tvalue\tstd error\t")
	for _, n := range f.Names {
		fmt.Fprintf(tw, "corr %s\t", n)
	}
	fmt.Fprintln(tw)
	for j, n := range f.Names {
		fmt.Fprintf(tw, "%s\t%.5g\t%.3g\t", n, f.Params[j], f.StdErr[j])
		for k := range f.Names {
			fmt.Fprintf(tw, "%.3f\t", f.Correlation[j][k])
		}
		fmt.Fprintln(tw)
	}
	tw.Flush()
	fmt.Fprintln(&b)
	tw = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprint(tw, "line\t")
	for _, c := range r.Conditions {
		fmt.Fprintf(tw, "%s\t", c)
	}
	fmt.Fprintln(tw, "quantity\tmeasured\tpredicted\tresidual\tresidual/u\t")
	for _, p := range r.Points {
		fmt.Fprintf(tw, "%d\t", p.Line)
		for _, x := range p.Conditions {
			fmt.Fprintf(tw, "%.4g\t", x)
		}
		fmt.Fprintf(tw, "%s\t%.5g\t%.5g\t%.3g\t%.2f\t\n", p.Quantity, p.Measured, p.Predicted, p.Residual, p.Residual/p.Uncertainty)
	}
	tw.Flush()
	return b.String()
}
