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
// by a three-term Rayleigh–Ritz/Galerkin method: twist sin(πη/2) (the
// exact straight-wing mode, so an unswept wing gives the classical
// q_D = π²·GJ/(4·ℓ²·c·e·a0) exactly) and bending η², η³ (η = y/ℓ). The
// divergence dynamic pressure is the smallest positive real q of
// det(K − q·A) = 0.

import "math"

// Integrals of the Ritz shapes f = sin(aη), a = π/2, g1 = η², g2 = η³
// over η in [0, 1]: ∫η·f = 1/a², ∫η²·f = 2/a² − 2/a³, ∫η³·f = 3/a² − 6/a⁴.
const (
	ritzA  = math.Pi / 2
	ritzI1 = 1 / (ritzA * ritzA)
	ritzI2 = 2/(ritzA*ritzA) - 2/(ritzA*ritzA*ritzA)
	ritzI3 = 3/(ritzA*ritzA) - 6/(ritzA*ritzA*ritzA*ritzA)
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
	// A (generalised aerodynamic stiffness per unit q) in rows θ, b1, b2
	a := [3][3]float64{
		{se / 2, -se * t * 2 * ritzI1, -se * t * 3 * ritzI2},
		{sb * ritzI2, -sb * t / 2, -sb * t * 3 / 5},
		{sb * ritzI3, -sb * t * 2 / 5, -sb * t / 2},
	}
	// K⁻¹: torsion 8/π²; bending [[4, 6], [6, 12]]⁻¹ = [[1, −1/2], [−1/2, 1/3]]
	var m [3][3]float64
	kt := 8 / (math.Pi * math.Pi)
	for j := 0; j < 3; j++ {
		m[0][j] = kt * a[0][j]
		m[1][j] = a[1][j] - 0.5*a[2][j]
		m[2][j] = -0.5*a[1][j] + a[2][j]/3
	}
	// largest positive real eigenvalue μ of M; q_D = 1/μ
	mu := largestPositiveEigen3(m)
	if !(mu > 0) {
		return math.Inf(1), nil
	}
	return 1 / mu, nil
}

// largestPositiveEigen3 returns the largest real eigenvalue of a 3×3
// matrix if it is positive (0 otherwise), from its characteristic
// polynomial μ³ − c2·μ² + c1·μ − c0 solved in closed form (Cardano or the
// trigonometric form) and polished by Newton.
func largestPositiveEigen3(m [3][3]float64) float64 {
	s := 0.0
	for i := range m {
		for j := range m[i] {
			s = math.Max(s, math.Abs(m[i][j]))
		}
	}
	if s == 0 {
		return 0
	}
	var n [3][3]float64
	for i := range m {
		for j := range m[i] {
			n[i][j] = m[i][j] / s
		}
	}
	c2 := n[0][0] + n[1][1] + n[2][2]
	c1 := n[0][0]*n[1][1] - n[0][1]*n[1][0] + n[0][0]*n[2][2] - n[0][2]*n[2][0] + n[1][1]*n[2][2] - n[1][2]*n[2][1]
	c0 := n[0][0]*(n[1][1]*n[2][2]-n[1][2]*n[2][1]) - n[0][1]*(n[1][0]*n[2][2]-n[1][2]*n[2][0]) + n[0][2]*(n[1][0]*n[2][1]-n[1][1]*n[2][0])
	// depressed cubic x = μ − c2/3: x³ + p·x + r = 0
	p := c1 - c2*c2/3
	r := -2*c2*c2*c2/27 + c2*c1/3 - c0
	// largest real root: the single real root of Cardano's formula, or the
	// first of the trigonometric three
	var x float64
	disc := r*r/4 + p*p*p/27
	switch {
	case disc > 0:
		sq := math.Sqrt(disc)
		x = math.Cbrt(-r/2+sq) + math.Cbrt(-r/2-sq)
	case p == 0:
		x = 0
	default:
		rho := 2 * math.Sqrt(-p/3)
		arg := math.Max(-1, math.Min(1, 3*r/(p*rho)))
		x = rho * math.Cos(math.Acos(arg)/3)
	}
	best := x + c2/3
	for it := 0; it < 2; it++ { // Newton polish on the characteristic polynomial
		f := ((best-c2)*best+c1)*best - c0
		d := (3*best-2*c2)*best + c1
		if d == 0 {
			break
		}
		best -= f / d
	}
	// eigenvalues this small are round-off of a zero eigenvalue
	if best < 1e-12 {
		return 0
	}
	return best * s
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
