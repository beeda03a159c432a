package optimizers

import (
	"bufio"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"couplet/mdo"
)

// strd is one NIST StRD nonlinear regression dataset as stored in
// testdata/nist-strd (see its README for the provenance).
type strd struct {
	starts      [2][]float64
	certified   []float64
	certifiedSD []float64
	rss, sd     float64
	dof         int
	x, y        []float64
	names       []string
	model       func(b []float64, x float64) float64
}

// readSTRD parses a dataset file from testdata/nist-strd.
func readSTRD(t *testing.T, name string, model func(b []float64, x float64) float64) *strd {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", "nist-strd", name+".txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	d := &strd{model: model}
	nums := func(fields []string) []float64 {
		var v []float64
		for _, s := range fields {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("%s: %q: %v", name, s, err)
			}
			v = append(v, x)
		}
		return v
	}
	certified, data := false, false
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case strings.HasPrefix(line, "# start1:"), strings.HasPrefix(line, "# start2:"):
			k := int(line[7] - '1')
			fs := strings.Fields(line[9:])
			for i := 1; i < len(fs); i += 2 {
				d.starts[k] = append(d.starts[k], nums(fs[i : i+1])[0])
			}
		case strings.HasPrefix(line, "# certified"):
			certified = true
		case certified && strings.HasPrefix(line, "#   b"):
			fs := strings.Fields(line[1:])
			d.names = append(d.names, fs[0])
			v := nums(fs[1:3])
			d.certified = append(d.certified, v[0])
			d.certifiedSD = append(d.certifiedSD, v[1])
		case strings.HasPrefix(line, "# residual sum of squares"):
			certified = false
			parts := strings.Split(line, ";")
			d.rss = nums(strings.Fields(parts[0])[5:6])[0]
			d.sd = nums(strings.Fields(parts[1])[3:4])[0]
			d.dof = int(nums(strings.Fields(parts[2])[3:4])[0])
		case line == "y x":
			data = true
		case data && strings.TrimSpace(line) != "":
			v := nums(strings.Fields(line))
			d.y, d.x = append(d.y, v[0]), append(d.x, v[1])
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(d.certified) == 0 || len(d.starts[0]) != len(d.certified) || len(d.starts[1]) != len(d.certified) || len(d.x) == 0 || d.dof != len(d.x)-len(d.certified) {
		t.Fatalf("%s: could not parse the dataset (%d parameters, starts %d/%d, %d points, dof %d)", name, len(d.certified), len(d.starts[0]), len(d.starts[1]), len(d.x), d.dof)
	}
	return d
}

func (d *strd) problem(start []float64) FitProblem {
	return FitProblem{
		Names: d.names, Start: start, Observed: d.y,
		Predict: func(_ context.Context, b, pred []float64) error {
			for i, x := range d.x {
				pred[i] = d.model(b, x)
			}
			return nil
		},
	}
}

// checkCertified fails unless every parameter matches its certified value
// to 6 significant digits and its standard deviation to 4.
func (d *strd) checkCertified(t *testing.T, res *FitResult) {
	t.Helper()
	for j := range d.certified {
		if g := sigDigits(res.Params[j], d.certified[j]); g < 6 {
			t.Errorf("%s = %.10g, certified %.10g: %.1f significant digits, want ≥ 6", d.names[j], res.Params[j], d.certified[j], g)
		}
		if g := sigDigits(res.StdErr[j], d.certifiedSD[j]); g < 4 {
			t.Errorf("sd(%s) = %.10g, certified %.10g: %.1f significant digits, want ≥ 4", d.names[j], res.StdErr[j], d.certifiedSD[j], g)
		}
	}
}

// sigDigits returns the number of matching significant digits of got
// against want (the log relative error, as NIST's LRE).
func sigDigits(got, want float64) float64 {
	if got == want {
		return 16
	}
	return -math.Log10(math.Abs(got-want) / math.Abs(want))
}

var (
	misra1a = func(b []float64, x float64) float64 { return b[0] * (1 - math.Exp(-b[1]*x)) }
	thurber = func(b []float64, x float64) float64 {
		x2, x3 := x*x, x*x*x
		return (b[0] + b[1]*x + b[2]*x2 + b[3]*x3) / (1 + b[4]*x + b[5]*x2 + b[6]*x3)
	}
	mgh09 = func(b []float64, x float64) float64 { return b[0] * (x*x + x*b[1]) / (x*x + x*b[2] + b[3]) }
)

// TestLeastSquaresNIST reproduces the certified values of NIST's
// Statistical Reference Datasets for nonlinear regression (NIST/ITL StRD,
// https://www.itl.nist.gov/div898/strd/nls/nls_main.shtml; the files and
// their provenance are in testdata/nist-strd): every parameter to at
// least 6 significant digits, its standard deviation to at least 4, and
// the residual sum of squares to 6, from the starting points the issue
// names.
func TestLeastSquaresNIST(t *testing.T) {
	cases := []struct {
		name  string
		model func([]float64, float64) float64
		start int // 0 = NIST's start 1, 1 = start 2
	}{
		{"Misra1a", misra1a, 0},
		{"Misra1a", misra1a, 1},
		{"Thurber", thurber, 0},
		{"Thurber", thurber, 1},
		{"MGH09", mgh09, 1},
	}
	for _, c := range cases {
		t.Run(c.name+"/start"+strconv.Itoa(c.start+1), func(t *testing.T) {
			d := readSTRD(t, c.name, c.model)
			res, err := LeastSquares{}.Fit(context.Background(), d.problem(d.starts[c.start]))
			if err != nil {
				t.Fatal(err)
			}
			if res.Stop != mdo.StopConverged {
				t.Fatalf("stopped: %v (%s)", res.Stop, res.Test)
			}
			t.Logf("%s after %d iterations, %d evaluations", res.Test, res.Iterations, res.Evaluations)
			least, leastSD := 16.0, 16.0
			for j := range d.certified {
				least = math.Min(least, sigDigits(res.Params[j], d.certified[j]))
				leastSD = math.Min(leastSD, sigDigits(res.StdErr[j], d.certifiedSD[j]))
			}
			t.Logf("least significant digits: parameters %.1f, standard deviations %.1f", least, leastSD)
			d.checkCertified(t, res)
			if g := sigDigits(res.RSS, d.rss); g < 6 {
				t.Errorf("RSS = %.10g, certified %.10g (%.1f digits)", res.RSS, d.rss, g)
			}
			if g := sigDigits(res.ResidualSD, d.sd); g < 6 {
				t.Errorf("residual sd = %.10g, certified %.10g (%.1f digits)", res.ResidualSD, d.sd, g)
			}
			if res.DoF != d.dof {
				t.Errorf("dof %d, certified %d", res.DoF, d.dof)
			}
			for a := range res.Correlation {
				if math.Abs(res.Correlation[a][a]-1) > 1e-12 {
					t.Errorf("correlation[%d][%d] = %g, want 1", a, a, res.Correlation[a][a])
				}
			}
		})
	}
}

// TestLeastSquaresMGH09FirstStart records what the solver does from NIST's
// first starting point of MGH09 (25, 39, 41.5, 39), which NIST's page says
// has been found difficult for some very good algorithms, with a local
// minimum at (+∞, −14.07…, −∞, −∞) and sum of squares 1.0273…e-3 (NIST/ITL
// StRD MGH09). With Moré's column scaling our solver does not head for
// infinity: it reaches the certified minimum, in about a hundred
// iterations (against 14 from the second start), to the same accuracy.
// This test fails if that changes, so the note can be kept true.
func TestLeastSquaresMGH09FirstStart(t *testing.T) {
	d := readSTRD(t, "MGH09", mgh09)
	res, err := LeastSquares{}.Fit(context.Background(), d.problem(d.starts[0]))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("stop %v (%s) after %d iterations, %d evaluations: b = %.10g, RSS %.10g",
		res.Stop, res.Test, res.Iterations, res.Evaluations, res.Params, res.RSS)
	if res.Stop != mdo.StopConverged {
		t.Fatalf("stopped: %v (%s)", res.Stop, res.Test)
	}
	d.checkCertified(t, res)
}

// TestLeastSquaresAnalyticJacobian fits Misra1a with its Jacobian given
// analytically: the same certified values (NIST/ITL StRD Misra1a).
func TestLeastSquaresAnalyticJacobian(t *testing.T) {
	d := readSTRD(t, "Misra1a", misra1a)
	pr := d.problem(d.starts[0])
	pr.Jacobian = func(b []float64, jac *mat.Dense) error {
		for i, x := range d.x {
			e := math.Exp(-b[1] * x)
			jac.Set(i, 0, 1-e)
			jac.Set(i, 1, b[0]*x*e)
		}
		return nil
	}
	res, err := LeastSquares{}.Fit(context.Background(), pr)
	if err != nil {
		t.Fatal(err)
	}
	d.checkCertified(t, res)
}

// TestLeastSquaresIndistinct fits y = a·b·x, where only the product a·b is
// determined: the error names both parameters (and no other).
func TestLeastSquaresIndistinct(t *testing.T) {
	x := []float64{1, 2, 3, 4, 5}
	y := []float64{2.1, 3.9, 6.2, 7.9, 10.1}
	pr := FitProblem{
		Names: []string{"a", "c", "b"}, Start: []float64{1, 0, 1}, Observed: y,
		Predict: func(_ context.Context, p, pred []float64) error {
			for i, xi := range x {
				pred[i] = p[0]*p[2]*xi + p[1]
			}
			return nil
		},
	}
	res, err := LeastSquares{}.Fit(context.Background(), pr)
	var ind *IndistinctError
	if !errors.As(err, &ind) {
		t.Fatalf("error %v, want an *IndistinctError", err)
	}
	if len(ind.Groups) != 1 || strings.Join(ind.Groups[0], ",") != "a,b" {
		t.Fatalf("groups %v, want [[a b]]", ind.Groups)
	}
	if !strings.Contains(err.Error(), "a and b") {
		t.Errorf("error %q does not name a and b", err)
	}
	if res == nil || !math.IsNaN(res.StdErr[0]) {
		t.Errorf("result %+v: want the result with undefined standard errors", res)
	}
	// The product is still fitted: least squares slope of y on x.
	if g := sigDigits(res.Params[0]*res.Params[2], 2.0); g < 1.5 {
		t.Errorf("a·b = %g, want about 2", res.Params[0]*res.Params[2])
	}
}

// TestLeastSquaresWeighted: with uncertainties σᵢ the fit is the
// unweighted fit of the residuals divided by σᵢ; a straight line through
// three points with one point given a large σ follows the other two.
func TestLeastSquaresWeighted(t *testing.T) {
	x := []float64{0, 1, 2, 3}
	y := []float64{0, 1, 2, 10}
	pr := FitProblem{
		Names: []string{"slope", "offset"}, Start: []float64{1, 1}, Observed: y,
		Sigma: []float64{0.01, 0.01, 0.01, 1e4},
		Predict: func(_ context.Context, p, pred []float64) error {
			for i, xi := range x {
				pred[i] = p[0]*xi + p[1]
			}
			return nil
		},
	}
	res, err := LeastSquares{}.Fit(context.Background(), pr)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Params[0]-1) > 1e-6 || math.Abs(res.Params[1]) > 1e-6 {
		t.Errorf("fit %v, want slope 1 offset 0 (the far point weighs nothing)", res.Params)
	}
	if math.Abs(res.Residuals[3]-7) > 1e-4 {
		t.Errorf("residual of the last point %g, want 10 − 3 = 7 (unweighted)", res.Residuals[3])
	}
}

func TestLeastSquaresRefusesBadProblems(t *testing.T) {
	pred := func(_ context.Context, p, out []float64) error { return nil }
	cases := []struct {
		name string
		o    LeastSquares
		pr   FitProblem
		want string
	}{
		{"no predict", LeastSquares{}, FitProblem{Names: []string{"a"}, Start: []float64{1}, Observed: []float64{1, 2}}, "no Predict"},
		{"too few points", LeastSquares{}, FitProblem{Names: []string{"a", "b"}, Start: []float64{1, 1}, Observed: []float64{1, 2}, Predict: pred}, "2 observations for 2 parameters"},
		{"names", LeastSquares{}, FitProblem{Names: []string{"a"}, Start: []float64{1, 1}, Observed: []float64{1, 2, 3}, Predict: pred}, "1 names for 2"},
		{"sigma", LeastSquares{}, FitProblem{Names: []string{"a"}, Start: []float64{1}, Observed: []float64{1, 2}, Sigma: []float64{1, 0}, Predict: pred}, "uncertainty of point 2 is 0"},
		{"start", LeastSquares{}, FitProblem{Names: []string{"a"}, Start: []float64{math.NaN()}, Observed: []float64{1, 2}, Predict: pred}, "start of a is NaN"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.o.Fit(context.Background(), c.pr)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

// TestLeastSquaresCancel: a cancelled context stops the fit with
// StopCancelled and the best point so far.
func TestLeastSquaresCancel(t *testing.T) {
	d := readSTRD(t, "Thurber", thurber)
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	pr := d.problem(d.starts[0])
	inner := pr.Predict
	pr.Predict = func(c context.Context, p, out []float64) error {
		calls++
		if calls == 40 {
			cancel()
		}
		return inner(c, p, out)
	}
	res, err := LeastSquares{}.Fit(ctx, pr)
	if res == nil {
		t.Fatal(err)
	}
	if res.Stop != mdo.StopCancelled {
		t.Errorf("stop %v, want cancelled", res.Stop)
	}
	if res.Evaluations != 40 {
		t.Errorf("%d evaluations, want 40 (the call that cancelled is the last)", res.Evaluations)
	}
}
