package disciplines

// Static aeroelastic limit: torsional divergence of a swept, root-clamped
// wing modelled as a uniform beam along its elastic axis with strip-theory
// aerodynamics (the swept-beam model of the structural dynamics and
// aeroelasticity textbooks, e.g. Bisplinghoff, Ashley & Halfman; the
// bending–torsion coupling of swept wings after Diederich & Budiansky,
// NACA TN 1680, 1948; from memory).
//
// Beam of length ℓ along the elastic axis, swept Λ (positive aft), chord c
// and aerodynamic centre a distance e ahead of the elastic axis, both
// normal to the axis, section lift slope a0. The flow normal to the axis
// has dynamic pressure q·cos²Λ and sees the angle of attack θ − w'·tanΛ
// (twist θ, bending slope w'), so the lift per unit length is
// L' = q·c·a0·cos²Λ·(θ − tanΛ·w'):
//
//	GJ·θ'' + e·L' = 0,   EI·w'''' = L'.
//
// Aft sweep (tanΛ > 0): upward bending washes the tips out and relieves
// the load, raising q_D, beyond some sweep to no divergence at all;
// forward sweep washes them in and lowers q_D. The equations are solved
// by a four-term Rayleigh–Ritz/Galerkin method: twist sin(πη/2) (the
// exact straight-wing mode, so an unswept wing gives the classical
// q_D = π²·GJ/(4·ℓ²·c·e·a0) exactly) and bending η², η³, η⁴ (η = y/ℓ;
// the torsionally rigid forward-swept beam comes within 0.05 % of its
// exact eigenvalue). The divergence dynamic pressure is the smallest
// positive real q of det(K − q·A) = 0, continued through a complex pair
// of roots by its real part (largestPositiveEigen4) where a few degrees
// of aft sweep make the lowest two meet.

import "math"

// Integrals of the Ritz shapes f = sin(aη), a = π/2, and g = η², η³, η⁴
// over η in [0, 1]: ∫η·f = 1/a², ∫η²·f = 2/a² − 2/a³,
// ∫η³·f = 3/a² − 6/a⁴, ∫η⁴·f = 4/a² − 12·(∫η²·f)/a².
const (
	ritzA  = math.Pi / 2
	ritzI1 = 1 / (ritzA * ritzA)
	ritzI2 = 2/(ritzA*ritzA) - 2/(ritzA*ritzA*ritzA)
	ritzI3 = 3/(ritzA*ritzA) - 6/(ritzA*ritzA*ritzA*ritzA)
	ritzI4 = 4/(ritzA*ritzA) - 12*ritzI2/(ritzA*ritzA)
)

// NoDivergence is the divergence dynamic pressure [Pa] reported when the
// wing does not diverge at any dynamic pressure (a cap that keeps the
// value finite for the optimiser).
const NoDivergence = 1e9

// SweptBeam is the uniform swept-beam model of a wing.
type SweptBeam struct {
	Length    float64 // ℓ, along the elastic axis [m]
	Chord     float64 // c, normal to the elastic axis [m]
	Offset    float64 // e, aerodynamic centre ahead of the elastic axis [m] (negative: behind)
	LiftSlope float64 // a0, section lift slope normal to the axis [1/rad]
	Sweep     float64 // Λ, elastic-axis sweep [rad], positive aft
	GJ, EI    float64 // torsional and bending stiffness [N m2]
}

// ClassicalDivergence returns the torsional divergence dynamic pressure
// of a uniform, straight, root-clamped wing by strip theory,
// q_D = π²·GJ/(4·ℓ²·c·e·a0) [Pa] (structural dynamics and aeroelasticity
// textbooks, from memory); +Inf when e ≤ 0 (aerodynamic centre on or
// behind the elastic axis).
func ClassicalDivergence(gj, length, chord, offset, a0 float64) float64 {
	if offset <= 0 {
		return math.Inf(1)
	}
	return math.Pi * math.Pi * gj / (4 * length * length * chord * offset * a0)
}

// validate checks the beam data.
func (b SweptBeam) validate() error {
	switch {
	case !(b.Length > 0) || math.IsInf(b.Length, 0):
		return inputErr("wing.span", b.Length, "m", "a structural semispan > 0")
	case !(b.Chord > 0) || math.IsInf(b.Chord, 0):
		return inputErr("wing.mac", b.Chord, "m", "a chord > 0")
	case !(b.LiftSlope > 0) || math.IsInf(b.LiftSlope, 0):
		return inputErr("aeroelastic.lift_slope", b.LiftSlope, "1/rad", "> 0")
	case !(math.Abs(b.Sweep) < 80*math.Pi/180):
		return inputErr("wing.sweep", b.Sweep*180/math.Pi, "deg", "(-80, 80)")
	case !(b.GJ > 0) || math.IsInf(b.GJ, 0):
		return inputErr("wing.box_torsional_stiffness", b.GJ, "N m2", "> 0")
	case !(b.EI > 0) || math.IsInf(b.EI, 0):
		return inputErr("wing.box_bending_stiffness", b.EI, "N m2", "> 0")
	case math.IsNaN(b.Offset) || math.IsInf(b.Offset, 0):
		return inputErr("aeroelastic.offset", b.Offset, "m", "finite")
	}
	return nil
}

// DivergenceDynamicPressure returns the divergence dynamic pressure [Pa]
// of the swept beam, +Inf when it does not diverge.
func (b SweptBeam) DivergenceDynamicPressure() (float64, error) {
	if err := b.validate(); err != nil {
		return 0, err
	}
	cs := math.Cos(b.Sweep)
	t := math.Tan(b.Sweep)
	k := b.Chord * b.LiftSlope * cs * cs
	l := b.Length
	se := k * l * l * b.Offset / b.GJ // torsion-row factor [1/Pa]
	sb := k * l * l * l / b.EI        // bending-row factor [1/Pa]
	// A (generalised aerodynamic stiffness per unit q) in rows θ, b2, b3,
	// b4 (bending shapes η^k): ∫f·g′ = k·∫η^(k−1)·f, ∫g_j·g_l′ = k_l/(k_j + k_l)
	fi := [3]float64{2 * ritzI1, 3 * ritzI2, 4 * ritzI3} // ∫f·g′
	gi := [3]float64{ritzI2, ritzI3, ritzI4}             // ∫g·f
	var a [4][4]float64
	a[0][0] = se / 2
	for l := 0; l < 3; l++ {
		a[0][l+1] = -se * t * fi[l]
	}
	for j := 0; j < 3; j++ {
		kj := float64(j + 2)
		a[j+1][0] = sb * gi[j]
		for l := 0; l < 3; l++ {
			kl := float64(l + 2)
			a[j+1][l+1] = -sb * t * kl / (kj + kl)
		}
	}
	// K⁻¹: torsion 8/π²; bending ∫g_j″g_l″ = [[4, 6, 8], [6, 12, 18], [8, 18, 28.8]],
	// whose inverse is [[9/4, −3, 5/4], [−3, 16/3, −5/2], [5/4, −5/2, 5/4]]
	kinv := [3][3]float64{{2.25, -3, 1.25}, {-3, 16.0 / 3, -2.5}, {1.25, -2.5, 1.25}}
	var m [4][4]float64
	kt := 8 / (math.Pi * math.Pi)
	for c := 0; c < 4; c++ {
		m[0][c] = kt * a[0][c]
		for r := 0; r < 3; r++ {
			m[r+1][c] = kinv[r][0]*a[1][c] + kinv[r][1]*a[2][c] + kinv[r][2]*a[3][c]
		}
	}
	// largest positive real eigenvalue μ of M; q_D = 1/μ
	mu := largestPositiveEigen4(m)
	if !(mu > 0) {
		return math.Inf(1), nil
	}
	return 1 / mu, nil
}

// cubicRealRoots returns the real roots, ascending, of x³ + b·x² + c·x + d
// (Cardano's formula or the trigonometric form, each polished by Newton).
func cubicRealRoots(b, c, d float64) (roots [3]float64, n int) {
	p := c - b*b/3
	q := 2*b*b*b/27 - b*c/3 + d
	disc := q*q/4 + p*p*p/27
	switch {
	case disc > 0:
		sq := math.Sqrt(disc)
		roots[0] = math.Cbrt(-q/2+sq) + math.Cbrt(-q/2-sq) - b/3
		n = 1
	case p == 0:
		roots[0] = -b / 3
		n = 1
	default:
		rho := 2 * math.Sqrt(-p/3)
		th := math.Acos(math.Max(-1, math.Min(1, 3*q/(p*rho)))) / 3
		// cos(th − 2πk/3) for k = 2, 1, 0 ascends for th in [0, π/3]
		roots[0] = rho*math.Cos(th-4*math.Pi/3) - b/3
		roots[1] = rho*math.Cos(th-2*math.Pi/3) - b/3
		roots[2] = rho*math.Cos(th) - b/3
		n = 3
	}
	for k := 0; k < n; k++ {
		x := roots[k]
		for it := 0; it < 2; it++ {
			f := ((x+b)*x+c)*x + d
			df := (3*x+2*b)*x + c
			if df == 0 {
				break
			}
			x -= f / df
		}
		roots[k] = x
	}
	return roots, n
}

// largestPositiveEigen4 returns the largest real part of the eigenvalues
// of a 4×4 matrix if it is positive (0 otherwise): the largest real
// eigenvalue, or the real part of a complex pair where that is larger.
// The characteristic polynomial comes from the Faddeev–LeVerrier
// recursion; its real roots lie on the monotone pieces between the roots
// of its derivative (a cubic, solved in closed form), searched from the
// right by Newton's method safeguarded by bisection; the complex pairs
// come from its factorisation into two quadratics (Ferrari's resolvent
// cubic, complexPairRealPart).
//
// The complex pair matters on aft-swept wings: at a few degrees of aft
// sweep the torsion root (falling with sweep) meets a bending root
// (rising from zero) and the two go complex; their real part then falls
// through zero. Between the meeting and that zero the static problem has
// no real root, yet the largest real eigenvalue alone would jump there
// from a finite q_D straight to "no divergence". The real part continues
// the branch, so that q_D = 1/Re μ grows without bound as it does in the
// single-mode textbook estimate of the swept wing,
// q_D = q_D,0/(cos²Λ·(1 − r·tanΛ)) (structural dynamics and
// aeroelasticity textbooks, from memory: a few degrees of sweepback
// remove divergence), a conservative estimate between the meeting and the
// zero; wherever the largest real part is a real root the value is the
// real root as before.
func largestPositiveEigen4(m [4][4]float64) float64 {
	s := 0.0
	for i := range m {
		for j := range m[i] {
			if v := math.Abs(m[i][j]); v > s {
				s = v
			}
		}
	}
	if s == 0 {
		return 0
	}
	var a [4][4]float64
	inv := 1 / s
	for i := range m {
		for j := range m[i] {
			a[i][j] = m[i][j] * inv
		}
	}
	// Faddeev–LeVerrier: M1 = I, c3 = −tr(A); Mk = A·Mk−1 + c(5−k)·I,
	// c(4−k) = −tr(A·Mk)/k; the last step needs only the trace
	var c [4]float64 // p(μ) = μ⁴ + c[3]μ³ + c[2]μ² + c[1]μ + c[0]
	c[3] = -(a[0][0] + a[1][1] + a[2][2] + a[3][3])
	mk := a
	for i := 0; i < 4; i++ {
		mk[i][i] += c[3]
	}
	for k := 2; k <= 3; k++ {
		var am [4][4]float64
		tr := 0.0
		for i := 0; i < 4; i++ {
			ai := &a[i]
			for j := 0; j < 4; j++ {
				am[i][j] = ai[0]*mk[0][j] + ai[1]*mk[1][j] + ai[2]*mk[2][j] + ai[3]*mk[3][j]
			}
			tr += am[i][i]
		}
		c[4-k] = -tr / float64(k)
		mk = am
		for i := 0; i < 4; i++ {
			mk[i][i] += c[4-k]
		}
	}
	tr := 0.0
	for i := 0; i < 4; i++ {
		tr += a[i][0]*mk[0][i] + a[i][1]*mk[1][i] + a[i][2]*mk[2][i] + a[i][3]*mk[3][i]
	}
	c[0] = -tr / 4
	poly := func(x float64) (float64, float64) {
		f := (((x+c[3])*x+c[2])*x+c[1])*x + c[0]
		d := ((4*x+3*c[3])*x+2*c[2])*x + c[1]
		return f, d
	}
	bound := 1.0
	for _, v := range c {
		bound = math.Max(bound, 1+math.Abs(v)) // Cauchy bound on the roots
	}
	crit, nc := cubicRealRoots(0.75*c[3], 0.5*c[2], 0.25*c[1])
	// monotone pieces from the right: [crit[nc−1], bound], …, [−bound, crit[0]];
	// on the first with a sign change, Newton safeguarded by bisection
	hi := bound
	for k := nc; k >= 0; k-- {
		lo := -bound
		if k > 0 {
			lo = math.Max(-bound, crit[k-1])
		}
		if lo >= hi {
			continue
		}
		flo, _ := poly(lo)
		fhi, _ := poly(hi)
		if (flo <= 0) == (fhi <= 0) && flo != 0 {
			hi = lo
			continue
		}
		x := 0.5 * (lo + hi)
		for it := 0; it < 100; it++ {
			f, d := poly(x)
			if f == 0 {
				break
			}
			if (f <= 0) == (flo <= 0) {
				lo = x
			} else {
				hi = x
			}
			next := 0.5 * (lo + hi)
			if d != 0 {
				if n := x - f/d; n > lo && n < hi {
					next = n
				}
			}
			// the polynomial's coefficients are O(1): roots to 1e-12 relative
			// (1e-14 absolute) are at the round-off of its evaluation
			if tol := 1e-14 + 1e-12*math.Abs(x); math.Abs(next-x) <= tol || hi-lo <= tol {
				x = next
				break
			}
			x = next
		}
		if re, ok := complexPairRealPart(c); ok && re > x {
			x = re
		}
		return positiveOrZero(x * s)
	}
	if re, ok := complexPairRealPart(c); ok {
		return positiveOrZero(re * s)
	}
	return 0
}

// complexPairRealPart returns the largest real part of the complex roots
// of μ⁴ + c[3]μ³ + c[2]μ² + c[1]μ + c[0] (false when every root is real).
// With μ = y − c[3]/4 the depressed quartic y⁴ + p·y² + q·y + r factors
// as (y² + σy + u)(y² − σy + v), σ² the largest root of Ferrari's
// resolvent cubic S³ + 2pS² + (p² − 4r)S − q² = 0 (non-negative: the
// cubic is −q² ≤ 0 at S = 0), u, v = (p + σ² ∓ q/σ)/2; a quadratic
// factor with a negative discriminant holds a complex pair of real part
// ∓σ/2. With q = 0 the quartic is a quadratic in y².
func complexPairRealPart(c [4]float64) (float64, bool) {
	a3, a2, a1, a0 := c[3], c[2], c[1], c[0]
	sh := a3 / 4
	p := a2 - 6*sh*sh
	q := a1 - 2*a2*sh + 8*sh*sh*sh
	r := a0 - a1*sh + a2*sh*sh - 3*sh*sh*sh*sh
	roots, n := cubicRealRoots(2*p, p*p-4*r, -q*q)
	ss := math.Max(0, roots[n-1])
	best, found := math.Inf(-1), false
	if ss > 0 && q != 0 {
		sg := math.Sqrt(ss)
		u := 0.5 * (p + ss - q/sg)
		v := 0.5 * (p + ss + q/sg)
		if ss-4*u < 0 { // y² + σy + u
			best, found = -0.5*sg, true
		}
		if ss-4*v < 0 { // y² − σy + v
			best, found = 0.5*sg, true
		}
	} else if d := p*p - 4*r; d < 0 {
		// y² = z, z = (−p ± i√−d)/2: y = ±√z, real part ±√((|z| + Re z)/2)
		mod := math.Sqrt(r)
		best, found = math.Sqrt(math.Max(0, 0.5*(mod-0.5*p))), true
	}
	if !found {
		return 0, false
	}
	return best - sh, true
}

// positiveOrZero returns x if it is clearly positive (above the round-off
// of a zero eigenvalue), else 0.
func positiveOrZero(x float64) float64 {
	if x < 1e-12 {
		return 0
	}
	return x
}

// Rayleigh-equivalent uniform stiffness of a tapered box whose stiffness
// scales with chord³ (no source): the root stiffness times
// ∫(1 − (1−λ)η)³·w(η)dη/∫w(η)dη with w = cos²(πη/2) for torsion (the twist
// mode's strain energy) and w = 1 for bending (uniform curvature of η²).

// ∫η^k·cos²(πη/2)dη for k = 0..3: 1/(2(k+1)) + ½∫η^k·cos(πη)dη.
const (
	cosJ0 = 0.5
	cosJ1 = 0.25 - 1/(math.Pi*math.Pi)
	cosJ2 = 1.0/6 - 1/(math.Pi*math.Pi)
	cosJ3 = 0.125 - 1.5/(math.Pi*math.Pi) + 6/(math.Pi*math.Pi*math.Pi*math.Pi)
)

// TaperedStiffnessFactors returns the factors (torsion, bending) that turn
// the root stiffness of a box tapering with chord³ at taper ratio λ into
// the stiffness of the equivalent uniform beam.
func TaperedStiffnessFactors(taper float64) (torsion, bending float64) {
	d := 1 - taper
	// (1 − dη)³ = 1 − 3dη + 3d²η² − d³η³
	torsion = (cosJ0 - 3*d*cosJ1 + 3*d*d*cosJ2 - d*d*d*cosJ3) / cosJ0
	bending = 1 - 1.5*d + d*d - 0.25*d*d*d
	return torsion, bending
}

// DivergenceMarginCap is the saturation of the divergence margin.
const DivergenceMarginCap = 10.0

// DivergenceMargin returns the margin q_D/q_dive − 1 passed through the
// smooth saturation C·tanh(m/C), C = DivergenceMarginCap: equal to the
// margin to within 0.4 % for |m| ≤ 1, finite (→ C) for a wing that never
// diverges, monotone, so the sign — the constraint — is exact.
func DivergenceMargin(qD, qDive float64) float64 {
	if math.IsInf(qD, 1) {
		return DivergenceMarginCap
	}
	return DivergenceMarginCap * math.Tanh((qD/qDive-1)/DivergenceMarginCap)
}
