package sensitivity

import (
	"context"
	"math"
	"strings"
	"testing"

	"couplet/mdo/plot"
)

// ishigami is the Ishigami–Homma (1990) function on [−π, π]^3.
func ishigami(a, b float64) func(x []float64) float64 {
	return func(x []float64) float64 {
		return math.Sin(x[0]) + a*math.Sin(x[1])*math.Sin(x[1]) + b*math.Pow(x[2], 4)*math.Sin(x[0])
	}
}

// gFunction is the Sobol' G-function on [0, 1]^d with coefficients a.
func gFunction(a []float64) func(x []float64) float64 {
	return func(x []float64) float64 {
		g := 1.0
		for i, ai := range a {
			g *= (math.Abs(4*x[i]-2) + ai) / (1 + ai)
		}
		return g
	}
}

// TestSobolSequenceFirstPoints checks the first points of the first two
// dimensions, in Gray-code order: Bratley and Fox (1988), table of the
// first Sobol' points (from memory).
func TestSobolSequenceFirstPoints(t *testing.T) {
	q, err := NewSobolSequence(2)
	if err != nil {
		t.Fatal(err)
	}
	want := [][2]float64{{0, 0}, {0.5, 0.5}, {0.75, 0.25}, {0.25, 0.75}, {0.375, 0.375}, {0.875, 0.875}, {0.625, 0.125}, {0.125, 0.625}}
	for i, w := range want {
		p := q.Next(make([]float64, 2))
		if p[0] != w[0] || p[1] != w[1] {
			t.Errorf("point %d = %v, want %v", i, p, w)
		}
	}
}

// TestSobolSequenceNet checks the defining properties of a Sobol'
// sequence (Sobol' 1967; Niederreiter 1992, ch. 4): in every dimension the
// first 2^m points put exactly one point in each interval [k/2^m,
// (k+1)/2^m); in the first two dimensions they form a (0, m, 2)-net, one
// point in each dyadic box of area 2^−m.
func TestSobolSequenceNet(t *testing.T) {
	const m = 10
	q, err := NewSobolSequence(MaxSobolDim)
	if err != nil {
		t.Fatal(err)
	}
	pts := q.Points(1 << m)
	for j := 0; j < MaxSobolDim; j++ {
		seen := make([]int, 1<<m)
		for _, p := range pts {
			seen[int(p[j]*(1<<m))]++
		}
		for k, c := range seen {
			if c != 1 {
				t.Fatalf("dimension %d: interval %d holds %d points, want 1", j+1, k, c)
			}
		}
	}
	for bx := 0; bx <= m; bx++ {
		by := m - bx
		seen := map[[2]int]int{}
		for _, p := range pts {
			seen[[2]int{int(p[0] * float64(int(1)<<bx)), int(p[1] * float64(int(1)<<by))}]++
		}
		if len(seen) != 1<<m {
			t.Fatalf("boxes 2^-%d x 2^-%d: %d of %d hold a point", bx, by, len(seen), 1<<m)
		}
	}
	// Direction numbers: each m_k odd and below 2^k (Joe and Kuo 2008).
	for j, p := range directionNumbers {
		if int(p.s) != len(p.m) {
			t.Errorf("dimension %d: degree %d but %d direction numbers", j+2, p.s, len(p.m))
		}
		for k, mk := range p.m {
			if mk%2 != 1 || mk >= 1<<(k+1) {
				t.Errorf("dimension %d: m_%d = %d, want odd and below %d", j+2, k+1, mk, 1<<(k+1))
			}
		}
	}
}

func TestSobolSequenceBadDim(t *testing.T) {
	for _, d := range []int{0, -1, MaxSobolDim + 1} {
		if _, err := NewSobolSequence(d); err == nil {
			t.Errorf("dimension %d accepted", d)
		}
	}
}

// TestSobolIshigami checks the indices of the Ishigami function with
// a = 7, b = 0.1 against the analytic values published by Saltelli et
// al. (2008, Global Sensitivity Analysis: The Primer, §4.8; also Marrel et
// al. 2009): within 0.01 with fewer than 10^5 model runs, and the
// bootstrap intervals cover them.
func TestSobolIshigami(t *testing.T) {
	lo, hi := []float64{-math.Pi, -math.Pi, -math.Pi}, []float64{math.Pi, math.Pi, math.Pi}
	model, err := FuncModel(ishigami(7, 0.1), lo, hi)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Sobol{N: 1 << 14}.Indices(context.Background(), model, []string{"x1", "x2", "x3"}, 1)
	if err != nil {
		t.Fatal(err)
	}
	if r.Runs > 100000 {
		t.Errorf("%d runs, want at most 10^5", r.Runs)
	}
	t.Log("\n" + r.String())
	tests := []struct {
		name       string
		got        []float64
		low, high  []float64
		i          int
		analytical float64
	}{
		{"S1", r.S1, r.S1Low, r.S1High, 0, 0.3139},
		{"S2", r.S1, r.S1Low, r.S1High, 1, 0.4424},
		{"S3", r.S1, r.S1Low, r.S1High, 2, 0},
		{"ST1", r.ST, r.STLow, r.STHigh, 0, 0.5576},
		{"ST2", r.ST, r.STLow, r.STHigh, 1, 0.4424},
		{"ST3", r.ST, r.STLow, r.STHigh, 2, 0.2437},
	}
	for _, tc := range tests {
		g := tc.got[tc.i]
		if math.Abs(g-tc.analytical) > 0.01 {
			t.Errorf("%s = %.4f, published %.4f", tc.name, g, tc.analytical)
		}
		// The published values are rounded to 4 decimals.
		if tc.low[tc.i] > tc.analytical+5e-5 || tc.high[tc.i] < tc.analytical-5e-5 {
			t.Errorf("%s interval [%.4f, %.4f] misses %.4f", tc.name, tc.low[tc.i], tc.high[tc.i], tc.analytical)
		}
		if !(tc.low[tc.i] < tc.high[tc.i]) {
			t.Errorf("%s interval [%g, %g] is empty", tc.name, tc.low[tc.i], tc.high[tc.i])
		}
	}
	// The same seed gives the same indices, bit for bit.
	r2, err := Sobol{N: 1 << 14}.Indices(context.Background(), model, []string{"x1", "x2", "x3"}, 1)
	if err != nil {
		t.Fatal(err)
	}
	for i := range r.S1 {
		if r.S1[i] != r2.S1[i] || r.STLow[i] != r2.STLow[i] {
			t.Errorf("variable %d differs between two runs with one seed", i)
		}
	}
}

// TestMorrisGFunction screens the Sobol' G-function with a = (0, 1, 4.5,
// 9, 99, 99, 99, 99): its variables' importance falls in that order, the
// last four being unimportant (Saltelli et al. 2008, §3.5, and Campolongo,
// Cariboni and Saltelli 2007, where μ* ranks them so).
func TestMorrisGFunction(t *testing.T) {
	a := []float64{0, 1, 4.5, 9, 99, 99, 99, 99}
	lo, hi := make([]float64, len(a)), make([]float64, len(a))
	for i := range hi {
		hi[i] = 1
	}
	model, err := FuncModel(gFunction(a), lo, hi)
	if err != nil {
		t.Fatal(err)
	}
	names := []string{"x1", "x2", "x3", "x4", "x5", "x6", "x7", "x8"}
	r, err := Morris{Trajectories: 50}.Screen(context.Background(), model, names, 7)
	if err != nil {
		t.Fatal(err)
	}
	t.Log("\n" + r.String())
	if r.Runs != 50*9 {
		t.Errorf("%d runs, want 50 trajectories of 9 points = 450", r.Runs)
	}
	for i := 0; i < 4; i++ {
		if !(r.MuStar[i] > r.MuStar[i+1]) {
			t.Errorf("mu*(x%d) = %.4g not above mu*(x%d) = %.4g", i+1, r.MuStar[i], i+2, r.MuStar[i+1])
		}
	}
	// A variable's effect scales as 1/(1 + a_i) (Saltelli et al. 2008,
	// §3.5), so mu* of the a = 99 variables should be about a tenth of
	// that of x4 (a = 9); allow twice that.
	for i := 4; i < 8; i++ {
		if r.MuStar[i] > 0.2*r.MuStar[3] {
			t.Errorf("mu*(x%d) = %.4g, want well below mu*(x4) = %.4g", i+1, r.MuStar[i], r.MuStar[3])
		}
	}
	rank := r.Ranking()
	for i := 0; i < 4; i++ {
		if rank[i] != i {
			t.Errorf("rank %d is x%d, want x%d", i+1, rank[i]+1, i+1)
		}
	}
}

func TestBadSettings(t *testing.T) {
	model, _ := FuncModel(func(x []float64) float64 { return x[0] }, []float64{0}, []float64{1})
	ctx := context.Background()
	tests := []struct {
		name string
		run  func() error
	}{
		{"Morris odd levels", func() error { _, err := Morris{Levels: 3}.Screen(ctx, model, []string{"a"}, 1); return err }},
		{"Morris one trajectory", func() error { _, err := Morris{Trajectories: 1}.Screen(ctx, model, []string{"a"}, 1); return err }},
		{"Morris no names", func() error { _, err := Morris{}.Screen(ctx, model, nil, 1); return err }},
		{"Sobol N", func() error { _, err := Sobol{N: 1}.Indices(ctx, model, []string{"a"}, 1); return err }},
		{"Sobol confidence", func() error { _, err := Sobol{Confidence: 1}.Indices(ctx, model, []string{"a"}, 1); return err }},
		{"Sobol too many variables", func() error { _, err := Sobol{}.Indices(ctx, model, make([]string, 11), 1); return err }},
		{"FuncModel bounds", func() error {
			_, err := FuncModel(func([]float64) float64 { return 0 }, []float64{1}, []float64{0})
			return err
		}},
	}
	for _, tc := range tests {
		if err := tc.run(); err == nil {
			t.Errorf("%s: accepted", tc.name)
		}
	}
}

// TestFigures draws both charts: every variable is named on them and the
// files are written as SVG and PNG.
func TestFigures(t *testing.T) {
	model, err := FuncModel(ishigami(7, 0.1), []float64{-math.Pi, -math.Pi, -math.Pi}, []float64{math.Pi, math.Pi, math.Pi})
	if err != nil {
		t.Fatal(err)
	}
	names := []string{"alpha", "beta", "gamma"}
	s, err := Sobol{N: 256, Resamples: 50}.Indices(context.Background(), model, names, 3)
	if err != nil {
		t.Fatal(err)
	}
	m, err := Morris{}.Screen(context.Background(), model, names, 3)
	if err != nil {
		t.Fatal(err)
	}
	sf, err := SobolFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	mf, err := MorrisFigure(m)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, f := range []*plot.Figure{sf, mf} {
		doc, err := f.SVG()
		if err != nil {
			t.Fatal(err)
		}
		texts, err := plot.SVGText(doc)
		if err != nil {
			t.Fatal(err)
		}
		text := strings.Join(texts, "\n")
		for _, n := range names {
			if !strings.Contains(text, n) {
				t.Errorf("%s does not name %s", f.Name, n)
			}
		}
		files, err := plot.SaveAll(dir, f)
		if err != nil || len(files) != 2 {
			t.Errorf("%s: saved %v, %v", f.Name, files, err)
		}
	}
	if _, err := SobolFigure(nil); err == nil {
		t.Error("SobolFigure(nil) accepted")
	}
}
