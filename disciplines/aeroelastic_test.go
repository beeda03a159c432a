package disciplines

import (
	"math"
	"testing"
)

// Straight-wing torsional divergence, q_D = π²GJ/(4ℓ²·c·e·a0) (structural
// dynamics and aeroelasticity textbooks, from memory; project reference).
// The swept-beam model at zero sweep must give it exactly, whatever EI.
func TestDivergenceStraightWingClassical(t *testing.T) {
	for _, c := range []struct{ gj, ei, l, ch, e, a0 float64 }{
		{2e7, 5e7, 8, 2.5, 0.3, 2 * math.Pi},
		{1.5e8, 1e8, 12, 4, 0.5, 5.7},
		{6e6, 3e8, 5, 1.5, 0.1, 6.0},
	} {
		b := SweptBeam{Length: c.l, Chord: c.ch, Offset: c.e, LiftSlope: c.a0, GJ: c.gj, EI: c.ei}
		got, err := b.DivergenceDynamicPressure()
		if err != nil {
			t.Fatal(err)
		}
		want := math.Pi * math.Pi * c.gj / (4 * c.l * c.l * c.ch * c.e * c.a0)
		if e := math.Abs(got-want) / want; e > 1e-12 {
			t.Errorf("%+v: q_D %g, classical %g", c, got, want)
		}
		if e := math.Abs(ClassicalDivergence(c.gj, c.l, c.ch, c.e, c.a0)-want) / want; e > 1e-15 {
			t.Errorf("ClassicalDivergence disagrees")
		}
	}
}

// q_D of a wing of given span and streamwise chord falls as it is swept
// forward, rises as it is swept aft (to no divergence at all) and rises
// with GJ at any sweep. Sweeping keeps the semispan: the beam is s/cosΛ
// long, its normal chord c·cosΛ.
func TestDivergenceSweepAndStiffness(t *testing.T) {
	const semispan, chord = 9.0, 3.0
	qAt := func(deg, gjScale float64) float64 {
		sw := deg * math.Pi / 180
		cs := math.Cos(sw)
		b := SweptBeam{Length: semispan / cs, Chord: chord * cs, Offset: 0.125 * chord * cs,
			LiftSlope: 0.95 * 2 * math.Pi, Sweep: sw, GJ: 3e7 * gjScale, EI: 8e7}
		q, err := b.DivergenceDynamicPressure()
		if err != nil {
			t.Fatal(err)
		}
		return q
	}
	prev := qAt(0, 1)
	for _, deg := range []float64{-5, -10, -20, -30, -45} {
		q := qAt(deg, 1)
		if !(q < prev) {
			t.Errorf("sweep %g°: q_D %g not below %g", deg, q, prev)
		}
		prev = q
	}
	prev = qAt(0, 1)
	sawInf := false
	for _, deg := range []float64{5, 10, 20, 30, 45} {
		q := qAt(deg, 1)
		if !(q > prev) && !(math.IsInf(q, 1) && math.IsInf(prev, 1)) {
			t.Errorf("sweep %g°: q_D %g not above %g", deg, q, prev)
		}
		sawInf = sawInf || math.IsInf(q, 1)
		prev = q
	}
	if !sawInf {
		t.Error("no aft sweep up to 45° removes divergence")
	}
	for _, deg := range []float64{-30, 0, 5} {
		if !(qAt(deg, 2) > qAt(deg, 1)) {
			t.Errorf("sweep %g°: doubling GJ does not raise q_D", deg)
		}
	}
}

// At a few degrees of aft sweep the torsion root of the swept beam meets
// a bending root and the two go complex; the divergence dynamic pressure
// is continued by their real part, so that μ = 1/q_D falls continuously
// to zero (q_D grows without bound) instead of jumping from a finite
// q_D to no divergence (the Kestrel wing jumped from 1.6 MPa to none at
// 2.417° of sweep). Where the two roots meet μ has a square-root branch
// point: continuous with an infinite slope. So the check refines: the
// largest change of μ between 0.001° steps from 0° to 20° is found, and
// over that step, cut in 100, no sub-step may carry more than a fifth of
// it (a square-root branch point keeps a tenth, a jump all of it).
func TestDivergenceContinuousThroughAftSweep(t *testing.T) {
	for _, c := range []struct{ semispan, chord, gj, ei float64 }{
		{9, 3, 3e7, 8e7}, {12.5, 3.2, 1.6e8, 2.2e8}, {6.5, 8.5, 1.5e8, 1.3e8},
	} {
		mu := func(deg float64) float64 {
			sw := deg * math.Pi / 180
			cs := math.Cos(sw)
			b := SweptBeam{Length: c.semispan / cs, Chord: c.chord * cs, Offset: 0.125 * c.chord * cs,
				LiftSlope: 0.95 * 2 * math.Pi, Sweep: sw, GJ: c.gj, EI: c.ei}
			q, err := b.DivergenceDynamicPressure()
			if err != nil {
				t.Fatal(err)
			}
			return 1 / q
		}
		const h = 1e-3
		prev, worst, at, gone := mu(0), 0.0, 0.0, false
		for i := 1; i <= 20000; i++ {
			x := float64(i) * h
			m := mu(x)
			if d := math.Abs(m - prev); d > worst {
				worst, at = d, x-h
			}
			gone = gone || m == 0
			prev = m
		}
		if !gone {
			t.Errorf("%+v: still diverges at 20° of aft sweep", c)
		}
		prev = mu(at)
		for k := 1; k <= 100; k++ {
			m := mu(at + float64(k)*h/100)
			if d := math.Abs(m - prev); d > 0.2*worst {
				t.Errorf("%+v: 1/q_D jumps from %g to %g at %.5f° of sweep (%g over the 0.001° step from %.3f°)", c, prev, m, at+float64(k)*h/100, worst, at)
			}
			prev = m
		}
	}
}

// Bending divergence of a torsionally rigid forward-swept wing: with
// τ = q·c·a0·cos²Λ·tanΛ·ℓ³/EI the exact uniform-beam eigenvalue solves
// u‴ + τ·u = 0, u(0) = u′(1) = u″(1) = 0 (textbook value τD ≈ −6.33,
// from memory). The four-term Ritz model must be within 0.1 % of the exact
// value, found here by shooting with fourth-order Runge–Kutta.
func TestDivergenceTorsionallyRigidForwardSweep(t *testing.T) {
	exact := bisectShooting(-9, -4)
	if math.Abs(exact+6.33) > 0.01 {
		t.Fatalf("shooting gives τD = %g, textbook about −6.33", exact)
	}
	sweep := -30 * math.Pi / 180
	b := SweptBeam{Length: 10, Chord: 2, Offset: 0.25, LiftSlope: 2 * math.Pi, Sweep: sweep, GJ: 1e15, EI: 5e7}
	q, err := b.DivergenceDynamicPressure()
	if err != nil {
		t.Fatal(err)
	}
	tau := q * b.Chord * b.LiftSlope * math.Cos(sweep) * math.Cos(sweep) * math.Tan(sweep) * math.Pow(b.Length, 3) / b.EI
	if e := math.Abs(tau-exact) / math.Abs(exact); e > 1e-3 {
		t.Errorf("Ritz τD = %g, exact %g (%.1f %%)", tau, exact, 100*e)
	}
}

// shootingResidual integrates u‴ = −τu from η = 0 with u(0) = 0 for the
// two independent starts (u′, u″) = (1, 0) and (0, 1) and returns the
// determinant of the end conditions u′(1) = u″(1) = 0.
func shootingResidual(tau float64) float64 {
	run := func(y [3]float64) [3]float64 {
		f := func(y [3]float64) [3]float64 { return [3]float64{y[1], y[2], -tau * y[0]} }
		const n = 2000
		h := 1.0 / n
		for i := 0; i < n; i++ {
			k1 := f(y)
			k2 := f([3]float64{y[0] + h/2*k1[0], y[1] + h/2*k1[1], y[2] + h/2*k1[2]})
			k3 := f([3]float64{y[0] + h/2*k2[0], y[1] + h/2*k2[1], y[2] + h/2*k2[2]})
			k4 := f([3]float64{y[0] + h*k3[0], y[1] + h*k3[1], y[2] + h*k3[2]})
			for j := range y {
				y[j] += h / 6 * (k1[j] + 2*k2[j] + 2*k3[j] + k4[j])
			}
		}
		return y
	}
	a := run([3]float64{0, 1, 0})
	b := run([3]float64{0, 0, 1})
	return a[1]*b[2] - a[2]*b[1]
}

func bisectShooting(lo, hi float64) float64 {
	flo := shootingResidual(lo)
	for i := 0; i < 60; i++ {
		mid := 0.5 * (lo + hi)
		fm := shootingResidual(mid)
		if (fm > 0) == (flo > 0) {
			lo, flo = mid, fm
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

func TestTaperedStiffnessFactors(t *testing.T) {
	// closed forms against Simpson quadrature of the defining integrals
	for _, lam := range []float64{0, 0.25, 0.6, 1} {
		gt, gb := TaperedStiffnessFactors(lam)
		const n = 2000
		st, sb, sw := 0.0, 0.0, 0.0
		for i := 0; i <= n; i++ {
			x := float64(i) / n
			w := 2.0
			if i == 0 || i == n {
				w = 1
			} else if i%2 == 1 {
				w = 4
			}
			c3 := math.Pow(1-(1-lam)*x, 3)
			cc := math.Cos(math.Pi * x / 2)
			st += w * c3 * cc * cc
			sw += w * cc * cc
			sb += w * c3
		}
		wantT, wantB := st/sw, sb/(3*n)
		if math.Abs(gt-wantT) > 1e-10 || math.Abs(gb-wantB) > 1e-10 {
			t.Errorf("λ=%g: factors (%g, %g), quadrature (%g, %g)", lam, gt, gb, wantT, wantB)
		}
	}
}

func TestDivergenceMargin(t *testing.T) {
	if m := DivergenceMargin(math.Inf(1), 3e4); m != DivergenceMarginCap {
		t.Errorf("no divergence: margin %g", m)
	}
	for _, r := range []float64{0.5, 0.99, 1.01, 2} {
		m := DivergenceMargin(r*3e4, 3e4)
		if (m > 0) != (r > 1) || math.Abs(m-(r-1)) > 0.004*math.Abs(r-1)+1e-12 {
			t.Errorf("q_D/q_dive = %g: margin %g", r, m)
		}
	}
	if _, err := (SweptBeam{Length: 1, Chord: 1, LiftSlope: 6, GJ: -1, EI: 1}).DivergenceDynamicPressure(); err == nil {
		t.Error("negative GJ accepted")
	}
}

func BenchmarkDivergenceDynamicPressure(b *testing.B) {
	sw := -30 * math.Pi / 180
	beam := SweptBeam{Length: 9 / math.Cos(sw), Chord: 3 * math.Cos(sw), Offset: 0.375 * math.Cos(sw), LiftSlope: 6, Sweep: sw, GJ: 3e7, EI: 8e7}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := beam.DivergenceDynamicPressure(); err != nil {
			b.Fatal(err)
		}
	}
}
