package surrogate

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// RBF is a radial-basis-function interpolant s(x) = Σ w_i φ(|x − x_i|) +
// c_0 + Σ c_k x_k with the cubic kernel φ(r) = r³ and a linear tail
// (Powell 1992), on inputs scaled to the data's bounding box. It passes
// through every point.
type RBF struct {
	sc     scaler
	x      [][]float64
	w      []float64
	c      []float64
	looRMS float64
}

// FitRBF fits the interpolant to the values y at the points x (at least
// d + 2 points in d dimensions, not all on one hyperplane).
func FitRBF(x [][]float64, y []float64) (*RBF, error) {
	fits, err := FitRBFs(x, [][]float64{y})
	if err != nil {
		return nil, err
	}
	return fits[0], nil
}

// FitRBFs fits one interpolant to each set of values ys[k] at the same
// points x, sharing the factorisation of the interpolation system.
func FitRBFs(x [][]float64, ys [][]float64) ([]*RBF, error) {
	if len(x) == 0 {
		return nil, fmt.Errorf("surrogate: FitRBF: no points")
	}
	if len(ys) == 0 {
		return nil, fmt.Errorf("surrogate: FitRBF: no values")
	}
	for _, y := range ys {
		if _, err := checkData("FitRBF", x, y, len(x[0])+2); err != nil {
			return nil, err
		}
	}
	return fitScaled(x, ys, newScaler(x))
}

// fitScaled fits the interpolants with the given input scaling.
func fitScaled(x [][]float64, ys [][]float64, sc scaler) ([]*RBF, error) {
	n, d := len(x), len(x[0])
	var sx [][]float64
	for _, p := range x {
		sx = append(sx, sc.apply(p))
	}
	m := n + d + 1
	a := mat.NewDense(m, m, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, cubic(dist(sx[i], sx[j])))
		}
		a.Set(i, n, 1)
		a.Set(n, i, 1)
		for k := 0; k < d; k++ {
			a.Set(i, n+1+k, sx[i][k])
			a.Set(n+1+k, i, sx[i][k])
		}
	}
	var inv mat.Dense
	if err := inv.Inverse(a); err != nil {
		return nil, fmt.Errorf("surrogate: FitRBF: the interpolation system of %d points is singular (points repeated or on one hyperplane): %w", n, err)
	}
	var fits []*RBF
	for _, y := range ys {
		s := &RBF{sc: sc, x: sx}
		rhs := mat.NewVecDense(m, nil)
		for i, v := range y {
			rhs.SetVec(i, v)
		}
		var sol mat.VecDense
		sol.MulVec(&inv, rhs)
		s.w = make([]float64, n)
		for i := range s.w {
			s.w[i] = sol.AtVec(i)
		}
		s.c = make([]float64, d+1)
		for k := range s.c {
			s.c[k] = sol.AtVec(n + k)
		}
		// Rippa (1999): the leave-one-out residual of point i is a_i/(A⁻¹)_ii.
		var ss float64
		for i := 0; i < n; i++ {
			e := sol.AtVec(i) / inv.At(i, i)
			ss += e * e
		}
		s.looRMS = math.Sqrt(ss / float64(n))
		fits = append(fits, s)
	}
	return fits, nil
}

// cubic is the kernel φ(r) = r³.
func cubic(r float64) float64 { return r * r * r }

// dist returns the Euclidean distance of two points.
func dist(a, b []float64) float64 {
	var s float64
	for k := range a {
		s += (a[k] - b[k]) * (a[k] - b[k])
	}
	return math.Sqrt(s)
}

// Predict returns the interpolant at x.
func (s *RBF) Predict(x []float64) float64 {
	return s.estimate(x, make([]float64, len(x)))
}

// estimate returns the interpolant at x, with u (len(x)) as scratch
// space for the scaled point: it allocates nothing.
func (s *RBF) estimate(x, u []float64) float64 {
	s.sc.into(u, x)
	v := s.c[0]
	for k, uk := range u {
		v += s.c[1+k] * uk
	}
	for i, p := range s.x {
		v += s.w[i] * cubic(dist(u, p))
	}
	return v
}

// LOOError returns the root-mean-square leave-one-out cross-validation
// error, in output units.
func (s *RBF) LOOError() float64 { return s.looRMS }
