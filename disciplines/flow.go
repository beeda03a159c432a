package disciplines

import (
	"math"
)

// Compressible-flow relations of NACA Report 1135 (Ames Research Staff,
// "Equations, tables, and charts for compressible flow", 1953) for a
// perfect gas with γ = Gamma = 1.4. Angles are in radians.

// IsentropicTemperatureRatio returns T/T0 = (1 + (γ−1)/2·M²)^−1.
func IsentropicTemperatureRatio(mach float64) float64 {
	return 1 / (1 + 0.5*(Gamma-1)*mach*mach)
}

// IsentropicPressureRatio returns p/p0 = (T/T0)^(γ/(γ−1)).
func IsentropicPressureRatio(mach float64) float64 {
	return math.Pow(IsentropicTemperatureRatio(mach), Gamma/(Gamma-1))
}

// IsentropicDensityRatio returns ρ/ρ0 = (T/T0)^(1/(γ−1)).
func IsentropicDensityRatio(mach float64) float64 {
	return math.Pow(IsentropicTemperatureRatio(mach), 1/(Gamma-1))
}

// AreaRatio returns the isentropic area ratio A/A* at Mach number mach > 0.
func AreaRatio(mach float64) (float64, error) {
	if !(mach > 0) || math.IsInf(mach, 0) {
		return 0, inputErr("mach", mach, "", "> 0")
	}
	g := Gamma
	return math.Pow(2/(g+1)*(1+0.5*(g-1)*mach*mach), (g+1)/(2*(g-1))) / mach, nil
}

// NormalShockResult holds the ratios across a normal shock.
type NormalShockResult struct {
	Mach2              float64 // downstream Mach number
	PressureRatio      float64 // p2/p1
	TemperatureRatio   float64 // T2/T1
	DensityRatio       float64 // ρ2/ρ1
	TotalPressureRatio float64 // p02/p01
}

// NormalShock returns the state behind a normal shock for upstream Mach
// number mach1 >= 1.
func NormalShock(mach1 float64) (NormalShockResult, error) {
	if !(mach1 >= 1) || math.IsInf(mach1, 0) {
		return NormalShockResult{}, inputErr("mach", mach1, "", ">= 1 (a shock needs supersonic upstream flow)")
	}
	g := Gamma
	m2 := mach1 * mach1
	pr := 1 + 2*g/(g+1)*(m2-1)
	rr := (g + 1) * m2 / ((g-1)*m2 + 2)
	return NormalShockResult{
		Mach2:              math.Sqrt((1 + 0.5*(g-1)*m2) / (g*m2 - 0.5*(g-1))),
		PressureRatio:      pr,
		DensityRatio:       rr,
		TemperatureRatio:   pr / rr,
		TotalPressureRatio: math.Pow(rr, g/(g-1)) * math.Pow((g+1)/(2*g*m2-(g-1)), 1/(g-1)),
	}, nil
}

// ObliqueShockResult holds the weak-shock solution of an oblique shock.
type ObliqueShockResult struct {
	WaveAngle          float64 // shock angle β [rad]
	Mach2              float64 // downstream Mach number
	PressureRatio      float64 // p2/p1
	TemperatureRatio   float64 // T2/T1
	DensityRatio       float64 // ρ2/ρ1
	TotalPressureRatio float64 // p02/p01
}

// ObliqueDeflection returns the flow deflection θ [rad] of an oblique
// shock of wave angle beta [rad] at upstream Mach number mach1 (the
// θ–β–M relation).
func ObliqueDeflection(mach1, beta float64) float64 {
	m2 := mach1 * mach1
	s := math.Sin(beta)
	return math.Atan(2 / math.Tan(beta) * (m2*s*s - 1) / (m2*(Gamma+math.Cos(2*beta)) + 2))
}

// MaxDeflection returns the largest deflection [rad] an attached oblique
// shock can turn a flow of Mach number mach1 > 1 through, and the wave
// angle at which it occurs.
func MaxDeflection(mach1 float64) (theta, beta float64, err error) {
	if !(mach1 > 1) || math.IsInf(mach1, 0) {
		return 0, 0, inputErr("mach", mach1, "", "> 1")
	}
	g := Gamma
	m2 := mach1 * mach1
	s2 := ((g+1)*m2/4 - 1 + math.Sqrt((g+1)*(1+(g-1)*m2/2+(g+1)*m2*m2/16))) / (g * m2)
	beta = math.Asin(math.Sqrt(s2))
	return ObliqueDeflection(mach1, beta), beta, nil
}

// ObliqueShock returns the weak solution of the oblique shock that turns a
// flow of Mach number mach1 > 1 through deflection [rad] (0 <= deflection <
// maximum deflection; beyond it the shock detaches). The wave angle is
// found by bisection of the θ–β–M relation between the Mach angle and the
// wave angle of maximum deflection, then the normal-shock relations are
// applied to the normal Mach component.
func ObliqueShock(mach1, deflection float64) (ObliqueShockResult, error) {
	thMax, bMax, err := MaxDeflection(mach1)
	if err != nil {
		return ObliqueShockResult{}, err
	}
	if !(deflection >= 0 && deflection <= thMax) {
		return ObliqueShockResult{}, inputErr("deflection", deflection, "rad",
			"[0, maximum deflection] (beyond it the shock detaches)")
	}
	lo, hi := math.Asin(1/mach1), bMax
	for i := 0; i < 200 && hi-lo > 1e-15; i++ {
		mid := 0.5 * (lo + hi)
		if ObliqueDeflection(mach1, mid) < deflection {
			lo = mid
		} else {
			hi = mid
		}
	}
	beta := 0.5 * (lo + hi)
	mn1 := mach1 * math.Sin(beta)
	if mn1 < 1 {
		mn1 = 1
	}
	ns, err := NormalShock(mn1)
	if err != nil {
		return ObliqueShockResult{}, err
	}
	return ObliqueShockResult{
		WaveAngle:          beta,
		Mach2:              ns.Mach2 / math.Sin(beta-deflection),
		PressureRatio:      ns.PressureRatio,
		TemperatureRatio:   ns.TemperatureRatio,
		DensityRatio:       ns.DensityRatio,
		TotalPressureRatio: ns.TotalPressureRatio,
	}, nil
}

// PrandtlMeyer returns the Prandtl–Meyer angle ν(M) [rad] for mach >= 1.
func PrandtlMeyer(mach float64) (float64, error) {
	if !(mach >= 1) || math.IsInf(mach, 0) {
		return 0, inputErr("mach", mach, "", ">= 1")
	}
	g := Gamma
	b := math.Sqrt(mach*mach - 1)
	k := math.Sqrt((g + 1) / (g - 1))
	return k*math.Atan(b/k) - math.Atan(b), nil
}

// MachAngle returns the Mach angle μ = asin(1/M) [rad] for mach >= 1.
func MachAngle(mach float64) (float64, error) {
	if !(mach >= 1) || math.IsInf(mach, 0) {
		return 0, inputErr("mach", mach, "", ">= 1")
	}
	return math.Asin(1 / mach), nil
}

// SubsonicLeadingEdge reports whether a leading edge swept by sweepLE
// [rad] (either sign) lies inside the Mach cone at Mach number mach > 1,
// i.e. |Λ_LE| > 90° − μ, equivalently β·cot|Λ_LE| < 1. Below Mach 1 every
// edge is subsonic.
func SubsonicLeadingEdge(mach, sweepLE float64) bool {
	if mach <= 1 {
		return true
	}
	return math.Sqrt(mach*mach-1) < math.Tan(math.Abs(sweepLE))
}
