package disciplines

// Propulsion: parametric (on-design) cycle analysis of the turbojet and
// the low-bypass mixed-flow turbofan after J. D. Mattingly, "Elements of
// Gas Turbine Propulsion" (McGraw-Hill, 1996), chapters 5 (ideal cycles)
// and 7 (cycles with component losses; edition and chapter numbers from
// memory), inlet recovery per MIL-E-5007D,
// engine sizing against the hardest thrust requirement, and engine mass
// and nacelle size from the sized mass flow.
//
// Throttle model (documented simplification): the analysis is the
// parametric "rubber engine" of Mattingly: at every flight condition the
// cycle is evaluated with the design compressor pressure ratio and bypass
// ratio, and throttling is a reduced turbine-entry temperature Tt4. The
// engine's air mass flow follows the compressor-face corrected flow, held
// at its sea-level-static value:
//
//	ṁ0 / ṁ0,SLS = δ0·πr·ηr / sqrt(θ0·τr),  δ0 = p0/101325 Pa, θ0 = T0/288.15 K,
//
// so thrust lapses with altitude and Mach through ṁ0 and the specific
// thrust. Off-design matching of the turbomachinery (pressure ratio
// falling with corrected speed) is not modelled.

import (
	"math"
	"strconv"

	"couplet/mdo"
)

// CycleComponents are the gas properties and component figures of merit
// of a cycle analysis (Mattingly's notation in brackets).
type CycleComponents struct {
	GammaC float64 // ratio of specific heats, cold section (γc)
	CpC    float64 // specific heat, cold section [J/(kg K)] (cpc)
	GammaT float64 // ratio of specific heats, hot section (γt)
	CpT    float64 // specific heat, hot section [J/(kg K)] (cpt)

	HeatingValue float64 // fuel lower heating value [J/kg] (hPR)

	InletRecoveryMax     float64 // diffuser pressure ratio without ram losses (πd,max)
	MilSpecRecovery      bool    // multiply πd,max by the MIL-E-5007D ram recovery ηr
	FanPolytropic        float64 // fan polytropic efficiency (ef)
	CompressorPolytropic float64 // compressor polytropic efficiency (ec)
	BurnerEfficiency     float64 // combustion efficiency (ηb)
	BurnerPressureRatio  float64 // burner total-pressure ratio (πb)
	TurbinePolytropic    float64 // turbine polytropic efficiency (et)
	MechanicalEfficiency float64 // shaft mechanical efficiency (ηm)
	MixerPressureRatio   float64 // mixer total-pressure ratio (πM)
	NozzlePressureRatio  float64 // nozzle total-pressure ratio (πn)

	// NeglectFuelMass is the ideal-cycle assumption ṁf ≪ ṁ0: the fuel
	// adds heat but no mass, f = cpc·T0·(τλ − τr·τc)/(ηb·hPR). With it and
	// IdealComponents the analysis is the textbook closed form.
	NeglectFuelMass bool
}

// IdealComponents returns the ideal cycle of Mattingly chapter 5: one
// calorically perfect gas (γ = 1.4, cp = 1004 J/(kg K)), hPR = 42.8 MJ/kg,
// every efficiency and pressure ratio 1, fuel mass neglected.
func IdealComponents() CycleComponents {
	return CycleComponents{
		GammaC: 1.4, CpC: 1004, GammaT: 1.4, CpT: 1004,
		HeatingValue:     42.8e6,
		InletRecoveryMax: 1, FanPolytropic: 1, CompressorPolytropic: 1,
		BurnerEfficiency: 1, BurnerPressureRatio: 1, TurbinePolytropic: 1,
		MechanicalEfficiency: 1, MixerPressureRatio: 1, NozzlePressureRatio: 1,
		NeglectFuelMass: true,
	}
}

// TypicalComponents returns component losses of a current military
// low-bypass engine of the order of Mattingly's technology table (from
// memory): γc 1.4, cpc 1004, γt 1.3, cpt 1239 J/(kg K), hPR 42.8 MJ/kg,
// πd,max 0.97 with MIL-E-5007D recovery, ef 0.89, ec 0.90, ηb 0.99,
// πb 0.96, et 0.89, ηm 0.99, πM 0.97, πn 0.98, fuel mass included.
func TypicalComponents() CycleComponents {
	return CycleComponents{
		GammaC: 1.4, CpC: 1004, GammaT: 1.3, CpT: 1239,
		HeatingValue:     42.8e6,
		InletRecoveryMax: 0.97, MilSpecRecovery: true,
		FanPolytropic: 0.89, CompressorPolytropic: 0.90,
		BurnerEfficiency: 0.99, BurnerPressureRatio: 0.96, TurbinePolytropic: 0.89,
		MechanicalEfficiency: 0.99, MixerPressureRatio: 0.97, NozzlePressureRatio: 0.98,
	}
}

// validate checks the component figures.
func (c *CycleComponents) validate() error {
	type chk struct {
		name     string
		v, lo, h float64
	}
	for _, k := range [...]chk{
		{"cycle.gamma_cold", c.GammaC, 1.01, 1.7},
		{"cycle.gamma_hot", c.GammaT, 1.01, 1.7},
		{"cycle.cp_cold", c.CpC, 500, 2000},
		{"cycle.cp_hot", c.CpT, 500, 2000},
		{"cycle.heating_value", c.HeatingValue, 1e6, 2e8},
		{"cycle.inlet_recovery_max", c.InletRecoveryMax, 0.5, 1},
		{"cycle.fan_polytropic_efficiency", c.FanPolytropic, 0.5, 1},
		{"cycle.compressor_polytropic_efficiency", c.CompressorPolytropic, 0.5, 1},
		{"cycle.burner_efficiency", c.BurnerEfficiency, 0.5, 1},
		{"cycle.burner_pressure_ratio", c.BurnerPressureRatio, 0.5, 1},
		{"cycle.turbine_polytropic_efficiency", c.TurbinePolytropic, 0.5, 1},
		{"cycle.mechanical_efficiency", c.MechanicalEfficiency, 0.5, 1},
		{"cycle.mixer_pressure_ratio", c.MixerPressureRatio, 0.5, 1},
		{"cycle.nozzle_pressure_ratio", c.NozzlePressureRatio, 0.5, 1},
	} {
		if !(k.v >= k.lo && k.v <= k.h) {
			return inputErr(k.name, k.v, "", rangeText(k.lo, k.h))
		}
	}
	return nil
}

// rangeText formats a closed interval for error messages (error path only).
func rangeText(lo, hi float64) string {
	return "[" + fmtG(lo) + ", " + fmtG(hi) + "]"
}

// CycleResult is the outcome of one cycle analysis, per unit of total
// inlet air mass flow ṁ0 (core plus bypass).
type CycleResult struct {
	SpecificThrust   float64 // F/ṁ0 [N s/kg]
	FuelAirRatio     float64 // ṁf/ṁ0 (per total inlet air)
	TSFC             float64 // S = ṁf/F [kg/(N s)]
	FanPressureRatio float64 // πf = πc·πb·πt that balances the mixer (Pt16 = Pt6); for a turbojet its limit α → 0
	TurbineTempRatio float64 // τt
	ExitVelocity     float64 // V9 [m/s]
	ExitTemperature  float64 // T9 [K]
	InletRecovery    float64 // πd = πd,max·ηr
	//lint:ignore ST1003 "ram" is the ram compression of the inlet, not the initialism RAM
	RamTempRatio float64 // τr
	//lint:ignore ST1003 "ram" is the ram compression of the inlet, not the initialism RAM
	RamPressureRatio float64 // πr
	FlightVelocity   float64 // V0 [m/s]
}

// InletRecoveryMIL5007D returns the ram recovery ηr of MIL-E-5007D:
// 1 for M ≤ 1 and 1 − 0.075·(M − 1)^1.35 for 1 < M < 5.
func InletRecoveryMIL5007D(mach float64) (float64, error) {
	if !(mach >= 0 && mach < 5) {
		return 0, inputErr("mach", mach, "", "[0, 5) (MIL-E-5007D)")
	}
	if mach <= 1 {
		return 1, nil
	}
	return 1 - 0.075*math.Pow(mach-1, 1.35), nil
}

// IdealTurbojet is the closed-form ideal turbojet of Mattingly chapter 5:
// τr = 1 + (γ−1)M0²/2, τc = πc^((γ−1)/γ), τλ = Tt4/T0,
// τt = 1 − (τr/τλ)(τc − 1), V9/a0 = sqrt((2/(γ−1))(τλ/(τrτc))(τrτcτt − 1)),
// F/ṁ = a0(V9/a0 − M0), f = cp·T0(τλ − τrτc)/hPR, S = f/(F/ṁ).
// gamma, cp [J/(kg K)] and hPR [J/kg] are the gas and fuel properties.
func IdealTurbojet(mach, t0, pic, tt4, gamma, cp, hPR float64) (CycleResult, error) {
	c := IdealComponents()
	c.GammaC, c.GammaT, c.CpC, c.CpT, c.HeatingValue = gamma, gamma, cp, cp, hPR
	if err := c.validate(); err != nil {
		return CycleResult{}, err
	}
	if err := checkCycleInputs(mach, t0, pic, 0, tt4); err != nil {
		return CycleResult{}, err
	}
	r := (gamma - 1) / gamma * cp
	a0 := math.Sqrt(gamma * r * t0)
	taur := 1 + 0.5*(gamma-1)*mach*mach
	tauc := math.Pow(pic, (gamma-1)/gamma)
	taul := tt4 / t0
	if taul <= taur*tauc {
		return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "above the compressor exit total temperature "+fmtG(t0*taur*tauc)+" K")
	}
	taut := 1 - taur/taul*(tauc-1)
	v9a0sq := 2 / (gamma - 1) * taul / (taur * tauc) * (taur*tauc*taut - 1)
	if !(v9a0sq > mach*mach) {
		return CycleResult{}, inputErr("cruise.mach", mach, "", "a flight Mach number at which the ideal turbojet still gives thrust")
	}
	v9a0 := math.Sqrt(v9a0sq)
	fs := a0 * (v9a0 - mach)
	f := cp * t0 * (taul - taur*tauc) / hPR
	return CycleResult{
		SpecificThrust: fs, FuelAirRatio: f, TSFC: f / fs, FanPressureRatio: pic * math.Pow(taut, gamma/(gamma-1)),
		TurbineTempRatio: taut, ExitVelocity: v9a0 * a0, ExitTemperature: tt4 / (taur * tauc),
		InletRecovery: 1, RamTempRatio: taur, RamPressureRatio: math.Pow(taur, gamma/(gamma-1)),
		FlightVelocity: a0 * mach,
	}, nil
}

// checkCycleInputs validates the flight condition and design choices of a
// cycle analysis.
func checkCycleInputs(mach, t0, pic, alpha, tt4 float64) error {
	switch {
	case !(mach >= 0 && mach <= 3.5):
		return inputErr("cruise.mach", mach, "", "[0, 3.5] for the cycle analysis")
	case !(t0 >= 150 && t0 <= 350):
		return inputErr("cycle.ambient_temperature", t0, "K", "[150, 350]")
	case !(pic >= 1 && pic <= 80):
		return inputErr("engine.pressure_ratio", pic, "", "[1, 80]")
	case !(alpha >= 0 && alpha <= 12):
		return inputErr("engine.bypass_ratio", alpha, "", "[0, 12]")
	case !(tt4 >= 600 && tt4 <= 2600):
		return inputErr("engine.turbine_temperature", tt4, "K", "[600, 2600]")
	}
	return nil
}

// Turbojet is MixedFlowTurbofan with no bypass flow (Mattingly chapter 7).
func Turbojet(c CycleComponents, mach, t0, pic, tt4 float64) (CycleResult, error) {
	return MixedFlowTurbofan(c, mach, t0, pic, 0, tt4)
}

// MixedFlowTurbofan is the parametric analysis of the low-bypass
// mixed-flow turbofan with component losses (Mattingly chapter 7, without
// afterburner): a fan of pressure ratio πf compresses all the air, the
// core air (ṁ0/(1+α)) is further compressed to the overall pressure ratio
// πc, burnt to Tt4, and expanded through one turbine that drives fan and
// compressor; core and bypass streams meet at equal total pressure
// (Pt16 = Pt6, which fixes πf for the given bypass ratio α), mix by the
// energy balance with mass-weighted gas properties at that common total
// pressure less the mixer loss πM (no momentum analysis of a constant-area
// mixer), and leave through a perfectly expanded nozzle (P9 = P0). With
// α = 0 it is the turbojet.
//
// mach is the flight Mach number, t0 the ambient temperature [K], pic the
// overall compressor pressure ratio, alpha the bypass ratio and tt4 the
// turbine-entry total temperature [K].
func MixedFlowTurbofan(c CycleComponents, mach, t0, pic, alpha, tt4 float64) (CycleResult, error) {
	k, err := newCycleCondition(&c, mach, t0, pic, alpha)
	if err != nil {
		return CycleResult{}, err
	}
	return k.run(tt4)
}

// cycleCondition is the part of a cycle analysis fixed by the components,
// the flight condition and the design choices; run completes it for one
// turbine-entry temperature (so that throttle points share it).
type cycleCondition struct {
	c                               *CycleComponents
	mach, t0, pic, alpha            float64
	rc, rt, v0, taur, pir, pid      float64
	tauc, kf, mt, lnPcPb, hb, pinoz float64
}

// newCycleCondition validates and prepares a cycle analysis.
func newCycleCondition(c *CycleComponents, mach, t0, pic, alpha float64) (cycleCondition, error) {
	if err := c.validate(); err != nil {
		return cycleCondition{}, err
	}
	if err := checkCycleInputs(mach, t0, pic, alpha, 1500); err != nil {
		return cycleCondition{}, err
	}
	gc, gt := c.GammaC, c.GammaT
	k := cycleCondition{c: c, mach: mach, t0: t0, pic: pic, alpha: alpha}
	k.rc = (gc - 1) / gc * c.CpC
	k.rt = (gt - 1) / gt * c.CpT
	k.tauc = math.Pow(pic, (gc-1)/(gc*c.CompressorPolytropic))
	k.kf = (gc - 1) / (gc * c.FanPolytropic)
	k.mt = gt / ((gt - 1) * c.TurbinePolytropic)
	k.lnPcPb = math.Log(pic * c.BurnerPressureRatio)
	k.setFlight()
	return k, nil
}

// at returns the cycle condition of the same components and design
// choices at flight Mach number mach and ambient temperature t0 [K],
// reusing the parts that depend on neither (the same values as
// newCycleCondition would give).
func (k *cycleCondition) at(mach, t0 float64) (cycleCondition, error) {
	if err := checkCycleInputs(mach, t0, k.pic, k.alpha, 1500); err != nil {
		return cycleCondition{}, err
	}
	n := *k
	n.mach, n.t0 = mach, t0
	n.setFlight()
	return n, nil
}

// setFlight fills the parts of k that depend on the flight Mach number
// and the ambient temperature.
func (k *cycleCondition) setFlight() {
	c := k.c
	gc, mach, t0 := c.GammaC, k.mach, k.t0
	k.v0 = math.Sqrt(gc*k.rc*t0) * mach
	k.taur = 1 + 0.5*(gc-1)*mach*mach
	k.pir = math.Pow(k.taur, gc/(gc-1))
	k.pid = c.InletRecoveryMax
	if c.MilSpecRecovery && mach > 1 {
		k.pid *= 1 - 0.075*math.Pow(mach-1, 1.35)
	}
	k.hb = c.BurnerEfficiency * c.HeatingValue / (c.CpC * t0)
	k.pinoz = k.pir * k.pid * k.pic * c.BurnerPressureRatio * c.MixerPressureRatio * c.NozzlePressureRatio
}

// run completes the cycle at turbine-entry temperature tt4 [K].
func (k *cycleCondition) run(tt4 float64) (CycleResult, error) {
	c := k.c
	if !(tt4 >= 600 && tt4 <= 2600) {
		return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "[600, 2600]")
	}
	t0, taur, tauc, alpha := k.t0, k.taur, k.tauc, k.alpha
	taul := c.CpT * tt4 / (c.CpC * t0)
	if taul <= taur*tauc {
		return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "above the compressor exit total temperature "+fmtG(t0*taur*tauc)+" K")
	}
	var f, massf float64 // fuel-air ratio of the core; hot-gas mass per core air
	if c.NeglectFuelMass {
		f = (taul - taur*tauc) / k.hb
		massf = 1
	} else {
		if k.hb <= taul {
			return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "below the stoichiometric limit of the fuel")
		}
		f = (taul - taur*tauc) / (k.hb - taul)
		massf = 1 + f
	}
	// Turbine power balance per unit core air:
	// τt = 1 − A − B(πf^kf − 1), A = τr(τc − 1)/(ηm·massf·τλ), B = α·τr/(ηm·massf·τλ).
	den := c.MechanicalEfficiency * massf * taul
	A := taur * (tauc - 1) / den
	B := alpha * taur / den
	if A >= 1 {
		return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "high enough for the turbine to drive the compressor")
	}
	pif, tauf := 1.0, 1.0
	taut := 1 - A
	var pit float64
	if alpha > 0 {
		x, e, ok := solveMixer(k.lnPcPb, A, B, k.kf, k.mt)
		if !ok {
			return CycleResult{}, inputErr("engine.bypass_ratio", alpha, "", "low enough for the core to balance the bypass stream at the mixer (Pt16 = Pt6)")
		}
		pif = math.Exp(x)
		tauf = e
		taut = 1 - A - B*(tauf-1)
		pit = pif / (k.pic * c.BurnerPressureRatio) // the mixer condition Pt16 = Pt6
	} else {
		pit = math.Pow(taut, k.mt)
		// the mixer identity's limit α → 0: the pressure ratio a vanishing
		// bypass stream would need (it was 1, a jump at α = 0)
		pif = k.pic * c.BurnerPressureRatio * pit
	}
	// mixing by the energy balance with mass-weighted properties
	mix := massf + alpha
	cp6 := (massf*c.CpT + alpha*c.CpC) / mix
	r6 := (massf*k.rt + alpha*k.rc) / mix
	g6 := cp6 / (cp6 - r6)
	tt6 := (massf*c.CpT*tt4*taut + alpha*c.CpC*t0*taur*tauf) / (mix * cp6)
	prt := k.pinoz * pit // Pt9/P9
	if prt <= 1 {
		return CycleResult{}, inputErr("engine.pressure_ratio", k.pic, "", "high enough for a nozzle pressure ratio above 1")
	}
	t9 := tt6 * math.Pow(prt, -(g6-1)/g6)
	v9 := math.Sqrt(2 * cp6 * (tt6 - t9))
	fs := mix/(1+alpha)*v9 - k.v0
	if fs <= 0 {
		return CycleResult{}, inputErr("engine.turbine_temperature", tt4, "K", "high enough for net thrust at Mach "+fmtG(k.mach))
	}
	f0 := f / (1 + alpha)
	return CycleResult{
		SpecificThrust: fs, FuelAirRatio: f0, TSFC: f0 / fs, FanPressureRatio: pif,
		TurbineTempRatio: taut, ExitVelocity: v9, ExitTemperature: t9, InletRecovery: k.pid,
		RamTempRatio: taur, RamPressureRatio: k.pir, FlightVelocity: k.v0,
	}, nil
}

// solveMixer solves the mixer condition for x = ln πf:
// h(x) = x − lnPc − mt·ln τt(x) = 0, τt(x) = 1 − A − B(e^{kf·x} − 1),
// with lnPc = ln(πc·πb). h is increasing and convex, so a Newton iteration
// safeguarded by bisection inside [0, x(α=0)] converges in a few steps.
// It returns x and e^{kf·x}.
func solveMixer(lnPc, A, B, kf, mt float64) (x, e float64, ok bool) {
	lo := 0.0
	// at x = 0, τt = 1 − A exactly (e^0 = 1); ln(1 − A) also bounds the
	// solution from above
	t0 := 1 - A
	if t0 <= 0 {
		return 0, 0, false // h(0) = +Inf
	}
	ln0 := math.Log(t0)
	if lo-lnPc-mt*ln0 > 0 {
		return 0, 0, false // even πf = 1 leaves the core below the bypass pressure
	}
	hi := lnPc + mt*ln0 // solution without bypass work
	x = hi
	for i := 0; i < 60; i++ {
		e = math.Exp(kf * x)
		t := 1 - A - B*(e-1)
		hx := math.Inf(1)
		if t > 0 {
			hx = x - lnPc - mt*math.Log(t)
		}
		if hx > 0 {
			hi = x
		} else {
			lo = x
		}
		if math.Abs(hx) < 1e-13 || hi-lo < 1e-14 {
			return x, e, true
		}
		next := 0.5 * (lo + hi)
		if t > 0 {
			d := 1 + mt*B*kf*e/t
			if n := x - hx/d; n > lo && n < hi {
				next = n
			}
		}
		x = next
	}
	return x, math.Exp(kf * x), true
}

// CorrectedFlowLapse returns ṁ0/ṁ0,SLS = δ0·πr·ηr/sqrt(θ0·τr) for an
// engine held at its sea-level-static corrected flow at the compressor
// face, at ambient pressure p0 [Pa], temperature t0 [K] and Mach number
// (cold-gas γ = 1.4; ηr by MIL-E-5007D when milSpec is set).
func CorrectedFlowLapse(p0, t0, mach float64, milSpec bool) float64 {
	taur := 1 + 0.2*mach*mach
	pir := taur * taur * taur * math.Sqrt(taur) // τr^3.5
	eta := 1.0
	if milSpec && mach > 1 {
		eta = 1 - 0.075*math.Pow(mach-1, 1.35)
	}
	return p0 / SeaLevelPressure * pir * eta / math.Sqrt(t0/SeaLevelTemperature*taur)
}

// SecondSegmentMinGradient returns the 14 CFR 25.121(b) minimum gross
// second-segment climb gradient with one engine inoperative: 0.024 for two
// engines, 0.027 for three, 0.030 for four (n is rounded; n < 2 has no
// one-engine-inoperative case and is an error).
func SecondSegmentMinGradient(n float64) (float64, error) {
	switch math.Round(n) {
	case 2:
		return 0.024, nil
	case 3:
		return 0.027, nil
	case 4:
		return 0.030, nil
	}
	return 0, inputErr("engine.count", n, "", "2, 3 or 4 (14 CFR 25.121)")
}

// Unit conversions used by the statistical equations (exact definitions).
const (
	unitLb  = 0.45359237      // kg per lb
	unitFt  = 0.3048          // m per ft
	unitLbf = 4.4482216152605 // N per lbf
	unitPsf = 47.880258980336 // Pa per lbf/ft2
	unitFt2 = unitFt * unitFt // m2 per ft2
	unitGal = 3.785411784e-3  // m3 per US gallon
	unitKt  = 1852.0 / 3600   // m/s per knot
)

// fmtG formats a number for error messages (error path only).
func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', 5, 64) }

// EngineMassRaymer returns the dry mass [kg] of a non-afterburning jet
// engine of sea-level-static thrust t [N] and bypass ratio bpr by the
// regression of D. P. Raymer, "Aircraft Design: A Conceptual Approach"
// (from memory): W[lb] = 0.084·T[lbf]^1.1·exp(−0.045·BPR).
func EngineMassRaymer(t, bpr float64) float64 {
	return engineMassRaymerLn(math.Log(t/unitLbf), bpr)
}

// engineMassRaymerLn is EngineMassRaymer with lnT = ln(T[lbf]) given.
func engineMassRaymerLn(lnT, bpr float64) float64 {
	return 0.084 * math.Exp(1.1*lnT-0.045*bpr) * unitLb
}

// EngineLengthRaymer returns the bare-engine length [m] by Raymer's
// regression (from memory): L[ft] = 0.185·T[lbf]^0.4·M^0.2, with the design
// Mach number taken as at least 0.5.
func EngineLengthRaymer(t, mach float64) float64 {
	return engineLengthRaymerLn(math.Log(t/unitLbf), mach)
}

// engineLengthRaymerLn is EngineLengthRaymer with lnT = ln(T[lbf]) given.
func engineLengthRaymerLn(lnT, mach float64) float64 {
	m := max(mach, 0.5)
	return 0.185 * math.Exp(0.4*lnT+0.2*math.Log(m)) * unitFt
}

// Nacelle sizing constants (common practice, no source): fan-face Mach
// number 0.55 at the sea-level-static flow, hub/tip ratio 0.35, nacelle
// maximum diameter 1.2 times the fan diameter.
const (
	fanFaceMach      = 0.55
	fanHubTip        = 0.35
	nacelleDiaFactor = 1.2
)

// NacelleSize returns the nacelle maximum diameter and length [m] of an
// engine of sea-level-static air mass flow mdot [kg/s], thrust t [N] and
// design Mach number: the fan face passes the flow at Mach 0.55 at
// standard sea-level total conditions (mass-flow parameter of NACA 1135),
// hub/tip 0.35, nacelle 1.2 fan diameters; length = 1.1 × Raymer's engine
// length plus an inlet of (0.5 + 1.5·max(0, M − 1)) nacelle diameters
// (common practice, no source).
func NacelleSize(mdot, t, mach float64) (diameter, length float64) {
	return nacelleSizeLn(mdot, math.Log(t/unitLbf), mach)
}

// nacelleSizeLn is NacelleSize with lnT = ln(T[lbf]) given.
func nacelleSizeLn(mdot, lnT, mach float64) (diameter, length float64) {
	// mass-flow parameter sqrt(γ/R)·M·(1 + (γ−1)M²/2)^(−(γ+1)/(2(γ−1))), γ = 1.4
	x := 1 + 0.2*fanFaceMach*fanFaceMach
	mfp := math.Sqrt(Gamma/RAir) * fanFaceMach / (x * x * x)
	flux := SeaLevelPressure / math.Sqrt(SeaLevelTemperature) * mfp // kg/(s m2)
	area := mdot / flux
	dfan := math.Sqrt(4 * area / (math.Pi * (1 - fanHubTip*fanHubTip)))
	diameter = nacelleDiaFactor * dfan
	length = 1.1*engineLengthRaymerLn(lnT, mach) + diameter*(0.5+1.5*max(0, mach-1))
	return diameter, length
}

// PartThrottle finds the turbine-entry temperature Tt4 ≤ tt4max at which
// the cycle gives the specific thrust target [N s/kg] at the flight
// condition (the throttle model of this file: reduced Tt4 at the design
// pressure ratio and bypass ratio) and returns the cycle there. A target
// above the maximum-Tt4 specific thrust is an error. The root is found by
// a secant iteration on (F/ṁ0 + V0)², which is nearly linear in Tt4.
func PartThrottle(c CycleComponents, mach, t0, pic, alpha, tt4max, target float64) (CycleResult, float64, error) {
	k, err := newCycleCondition(&c, mach, t0, pic, alpha)
	if err != nil {
		return CycleResult{}, 0, err
	}
	hi, err := k.run(tt4max)
	if err != nil {
		return CycleResult{}, 0, err
	}
	if !(target > 0) || target > hi.SpecificThrust*(1+1e-12) {
		return CycleResult{}, 0, inputErr("engine.thrust_required", target, "N s/kg", "(0, "+fmtG(hi.SpecificThrust)+"] (specific thrust at full throttle)")
	}
	v0 := hi.FlightVelocity
	w := func(fs float64) float64 { return (fs + v0) * (fs + v0) }
	goal := w(target)
	tt3 := t0 * hi.RamTempRatio * math.Pow(pic, (c.GammaC-1)/(c.GammaC*c.CompressorPolytropic))
	x0, y0 := tt4max, w(hi.SpecificThrust)-goal
	if math.Abs(y0) <= 1e-13*goal {
		return hi, tt4max, nil
	}
	// linear model through (Tt3, V0²) and the full-throttle point
	x1 := tt3 + (tt4max-tt3)*(goal-v0*v0)/(w(hi.SpecificThrust)-v0*v0)
	lo := 1.02 * tt3
	if x1 < lo {
		x1 = lo
	}
	var r CycleResult
	for i := 0; i < 40; i++ {
		r, err = k.run(x1)
		if err != nil {
			// below the running line of the cycle: move towards full throttle
			x1 = 0.5 * (x1 + x0)
			continue
		}
		y1 := w(r.SpecificThrust) - goal
		if math.Abs(y1) <= 1e-13*goal {
			return r, x1, nil
		}
		x2 := x1 - y1*(x1-x0)/(y1-y0)
		if !(x2 > lo) {
			x2 = 0.5 * (lo + x1)
		}
		if x2 > tt4max {
			x2 = tt4max
		}
		x0, y0, x1 = x1, y1, x2
	}
	return r, x1, nil
}

// Indices of the engine_cycle discipline's variables.
const (
	cycInBypass = iota
	cycInPressureRatio
	cycInTt4
	cycInMach
	cycInAltitude
	cycInAirportElevation
	cycInAirportDT
	cycNumIn
)

const (
	cycOutUnitSLS = iota
	cycOutUnitTakeoff
	cycOutUnitClimb
	cycOutUnitCruise
	cycOutTSFCTakeoff
	cycOutTSFCCruiseMax
	cycOutTSFCNode1
	cycOutTSFCNode2
	cycOutThrustNode1
	cycOutThrustNode2
	cycOutTt4Node1
	cycOutTt4Node2
	cycOutFanPressureRatio
	cycOutClimbMach
	cycNumOut
)

// EngineCycle is the "engine_cycle" discipline: the parametric cycle
// (MixedFlowTurbofan with its Components) at the four conditions the
// engine is sized and flown at — ISA sea-level static (the rating), static
// at the airport, the airport at Mach ClimbMach (second segment) and
// cruise at full throttle — plus two cruise part-throttle nodes. Its
// inputs are design parameters only, so it runs once per analysis outside
// the coupled group; "propulsion" sizes the engine from its outputs inside
// the group. Thrusts are per unit of sea-level-static air mass flow
// (specific thrust times the corrected-flow lapse).
type EngineCycle struct {
	// Components are the cycle's component losses (TypicalComponents).
	Components CycleComponents
	// ClimbMach is the Mach number of the second-segment thrust; 0.25.
	ClimbMach float64
}

// NewEngineCycle returns the engine_cycle discipline with
// TypicalComponents and ClimbMach 0.25.
func NewEngineCycle() *EngineCycle {
	return &EngineCycle{Components: TypicalComponents(), ClimbMach: 0.25}
}

// Name implements mdo.Discipline.
func (e *EngineCycle) Name() string { return "engine_cycle" }

// Inputs implements mdo.Discipline.
func (e *EngineCycle) Inputs() []mdo.Var {
	in := make([]mdo.Var, cycNumIn)
	in[cycInBypass] = mdo.Var{Name: "engine.bypass_ratio", Unit: "-", Description: "bypass ratio of the mixed-flow turbofan (0 = turbojet)", Default: 0.6, Min: 0, Max: 3}
	in[cycInPressureRatio] = mdo.Var{Name: "engine.pressure_ratio", Unit: "-", Description: "overall compressor pressure ratio", Default: 18, Min: 3, Max: 45}
	in[cycInTt4] = mdo.Var{Name: "engine.turbine_temperature", Unit: "K", Description: "maximum turbine-entry total temperature Tt4", Default: 1700, Min: 1100, Max: 2200, Scale: 100}
	in[cycInMach] = cruiseMachVar()
	in[cycInAltitude] = cruiseAltitudeVar()
	in[cycInAirportElevation] = airportElevationVar()
	in[cycInAirportDT] = airportDTVar()
	return in
}

// Outputs implements mdo.Discipline.
func (e *EngineCycle) Outputs() []mdo.Var {
	u := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "N s/kg", Description: desc, Default: def, Min: 0, Max: 5000, Scale: 100}
	}
	s := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "kg/(N s)", Description: desc, Default: def, Min: 1e-6, Max: 1e-3, Scale: 1e-5}
	}
	r := func(name, desc string, def float64) mdo.Var {
		return mdo.Var{Name: name, Unit: "-", Description: desc, Default: def, Min: 0, Max: 1}
	}
	out := make([]mdo.Var, cycNumOut)
	out[cycOutUnitSLS] = u("engine.unit_thrust_sea_level", "thrust per unit SLS air flow, ISA sea-level static (specific thrust)", 800)
	out[cycOutUnitTakeoff] = u("engine.unit_thrust_takeoff", "thrust per unit SLS air flow, static at the airport", 800)
	out[cycOutUnitClimb] = u("engine.unit_thrust_climb", "thrust per unit SLS air flow at the airport at the second-segment Mach number", 750)
	out[cycOutUnitCruise] = u("engine.unit_thrust_cruise", "full-throttle thrust per unit SLS air flow at cruise", 250)
	out[cycOutTSFCTakeoff] = s("engine.tsfc_takeoff", "thrust-specific fuel consumption at take-off (static, airport)", 2.2e-5)
	out[cycOutTSFCCruiseMax] = s("engine.tsfc_cruise_full", "TSFC at cruise at full throttle", 3.3e-5)
	out[cycOutTSFCNode1] = s("engine.tsfc_cruise_node1", "TSFC at cruise, first part-throttle node", 3.2e-5)
	out[cycOutTSFCNode2] = s("engine.tsfc_cruise_node2", "TSFC at cruise, second part-throttle node", 3.1e-5)
	out[cycOutThrustNode1] = r("engine.thrust_ratio_node1", "thrust over full-throttle thrust at the first cruise node", 0.8)
	out[cycOutThrustNode2] = r("engine.thrust_ratio_node2", "thrust over full-throttle thrust at the second cruise node", 0.6)
	out[cycOutTt4Node1] = r("engine.tt4_ratio_node1", "Tt4 over maximum Tt4 at the first cruise node", 0.9)
	out[cycOutTt4Node2] = r("engine.tt4_ratio_node2", "Tt4 over maximum Tt4 at the second cruise node", 0.8)
	out[cycOutFanPressureRatio] = mdo.Var{Name: "engine.fan_pressure_ratio", Unit: "-", Description: "fan pressure ratio balancing the mixer at sea-level static", Default: 3.5, Min: 1, Max: 45}
	out[cycOutClimbMach] = mdo.Var{Name: "engine.climb_mach", Unit: "-", Description: "Mach number of engine.unit_thrust_climb", Default: 0.25, Min: 0.05, Max: 0.6}
	return out
}

// Compute implements mdo.Discipline.
func (e *EngineCycle) Compute(in, out []float64) error {
	if len(in) != cycNumIn || len(out) != cycNumOut {
		return inputErr("engine_cycle.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	bpr, pic, tt4, mach := in[cycInBypass], in[cycInPressureRatio], in[cycInTt4], in[cycInMach]
	c := &e.Components
	cruise, err := OffsetAtmosphere(in[cycInAltitude], 0)
	if err != nil {
		return renameInput(err, "cruise.altitude")
	}
	apt, err := OffsetAtmosphere(in[cycInAirportElevation], in[cycInAirportDT])
	if err != nil {
		return renameInput(err, "airport.elevation")
	}
	// the four flight conditions share the components and design choices
	slc, err := newCycleCondition(c, 0, SeaLevelTemperature, pic, bpr)
	if err != nil {
		return err
	}
	sls, err := slc.run(tt4)
	if err != nil {
		return err
	}
	to := sls
	if apt.Temperature != SeaLevelTemperature {
		toc, err := slc.at(0, apt.Temperature)
		if err != nil {
			return err
		}
		if to, err = toc.run(tt4); err != nil {
			return err
		}
	}
	clc, err := slc.at(e.ClimbMach, apt.Temperature)
	if err != nil {
		return err
	}
	cl, err := clc.run(tt4)
	if err != nil {
		return err
	}
	crc, err := slc.at(mach, cruise.Temperature)
	if err != nil {
		return err
	}
	cr, err := crc.run(tt4)
	if err != nil {
		return err
	}
	ms := c.MilSpecRecovery
	lapseCr := CorrectedFlowLapse(cruise.Pressure, cruise.Temperature, mach, ms)
	out[cycOutUnitSLS] = sls.SpecificThrust
	out[cycOutUnitTakeoff] = CorrectedFlowLapse(apt.Pressure, apt.Temperature, 0, ms) * to.SpecificThrust
	out[cycOutUnitClimb] = CorrectedFlowLapse(apt.Pressure, apt.Temperature, e.ClimbMach, ms) * cl.SpecificThrust
	out[cycOutUnitCruise] = lapseCr * cr.SpecificThrust
	out[cycOutTSFCTakeoff] = to.TSFC
	out[cycOutTSFCCruiseMax] = cr.TSFC
	out[cycOutFanPressureRatio] = sls.FanPressureRatio
	out[cycOutClimbMach] = e.ClimbMach
	// part-throttle nodes at cruise
	tt3 := cruise.Temperature * cr.RamTempRatio * crc.tauc // τc = πc^((γc−1)/(γc·ec))
	// throttle fractions of the two nodes, Tt4 = Tt3 + frac·(Tt4,max − Tt3),
	// tried in order until the cycle runs at both
	nodes := [...][2]float64{{0.8, 0.6}, {0.85, 0.7}, {0.9, 0.8}, {0.95, 0.9}}
	for _, fr := range nodes {
		t1 := tt3 + fr[0]*(tt4-tt3)
		t2 := tt3 + fr[1]*(tt4-tt3)
		n1, err1 := crc.run(t1)
		n2, err2 := crc.run(t2)
		if err1 != nil || err2 != nil {
			continue
		}
		out[cycOutTSFCNode1], out[cycOutTSFCNode2] = n1.TSFC, n2.TSFC
		out[cycOutThrustNode1] = n1.SpecificThrust / cr.SpecificThrust
		out[cycOutThrustNode2] = n2.SpecificThrust / cr.SpecificThrust
		out[cycOutTt4Node1], out[cycOutTt4Node2] = t1/tt4, t2/tt4
		return nil
	}
	return inputErr("engine.turbine_temperature", tt4, "K", "high enough above the compressor exit temperature for part-throttle cruise at Mach "+fmtG(mach))
}

// PartThrottleInterp returns the TSFC and the Tt4 ratio at cruise thrust
// ratio x (thrust over full-throttle thrust) by quadratic (Lagrange)
// interpolation through the full-throttle point (1, s0, 1) and the two
// part-throttle nodes (x1, s1, t1), (x2, s2, t2). x below 0.3 is taken as
// 0.3 (the deck is not extrapolated further).
func PartThrottleInterp(x, s0, x1, s1, t1, x2, s2, t2 float64) (tsfc, tt4ratio float64) {
	x = max(x, 0.3)
	l0 := (x - x1) * (x - x2) / ((1 - x1) * (1 - x2))
	l1 := (x - 1) * (x - x2) / ((x1 - 1) * (x1 - x2))
	l2 := (x - 1) * (x - x1) / ((x2 - 1) * (x2 - x1))
	return l0*s0 + l1*s1 + l2*s2, l0 + l1*t1 + l2*t2
}

// Indices of the propulsion discipline's variables.
const (
	propInCount = iota
	propInBypass
	propInMach
	propInCruiseSpeed
	propInMassTakeoff
	propInDragCruise
	propInLDTakeoff
	propInCLmaxTakeoff
	propInWingArea
	propInFieldLength
	propInThrustScale
	propInAirportDensity
	propInAirportSound
	propInUnitSLS
	propInUnitTakeoff
	propInUnitClimb
	propInUnitCruise
	propInTSFCCruiseMax
	propInTSFCNode1
	propInTSFCNode2
	propInThrustNode1
	propInThrustNode2
	propInTt4Node1
	propInTt4Node2
	propInClimbMach
	propNumIn
)

const (
	propOutThrustSLS = iota
	propOutMassFlow
	propOutMass
	propOutTSFCCruise
	propOutThrustCruise
	propOutNacelleDiameter
	propOutNacelleLength
	propOutThrustTakeoff
	propOutThrustClimb
	propOutCruiseThrottle
	propOutSizingCase
	propNumOut
)

// Sizing cases reported by engine.sizing_case.
const (
	SizingTakeoff       = 0 // take-off field length
	SizingSecondSegment = 1 // one-engine-inoperative second-segment climb, 14 CFR 25.121(b)
	SizingTopOfClimb    = 2 // residual rate of climb at the top of climb
	SizingCruise        = 3 // cruise drag with margin
)

// Propulsion is the "propulsion" discipline: it sizes the engines (air
// mass flow) to the hardest of four thrust requirements and reports their
// thrust, cruise fuel consumption, mass and nacelle size, from the
// per-unit-flow cycle results of "engine_cycle" and the air at cruise
// and at the airport of "flight_conditions" (all three belong in the
// aircraft System).
//
// Requirements, per engine, each divided by the thrust per unit SLS flow
// at its condition:
//
//   - take-off: the all-engines T/W for the field length
//     engine.sizing_field_length by the FAR 25 take-off parameter of
//     J. Roskam, "Airplane Design" Part I (from memory):
//     TOFL[ft] = 37.5·TOP, TOP = (W/S)[lbf/ft²]/(σ·CLmax,TO·T/W), static
//     thrust at the airport;
//   - second segment, one engine inoperative (14 CFR 25.121(b)): gradient
//     2.4/2.7/3.0 % for 2/3/4 engines: (n−1)·T = W·(γ + 1/(L/D)TO), thrust
//     at V2 = 1.13·VSR1 at the airport, linear in Mach between the static
//     thrust and that at engine.climb_mach (as in the mission discipline);
//   - top of climb: T = (D + W·ROC/V)/n at cruise Mach and altitude with
//     W the mass after take-off and climb (historical fractions);
//   - cruise: T = D·(1 + CruiseThrustMargin)/n.
//
// The sized flow is multiplied by engine.thrust_scale (≥ 1: a larger
// engine than the minimum). engine.tsfc_cruise is the TSFC at the part
// throttle giving exactly aero.drag_cruise/n, interpolated in the cruise
// part-throttle nodes of engine_cycle. engine.count is rounded. The
// engine mass is Raymer's dry-engine regression; nacelle, controls and
// starter are added by weights. Added variables: engine.sizing_field_length
// and engine.climb_mach (inputs); engine.thrust_takeoff, engine.thrust_climb,
// engine.cruise_throttle, engine.sizing_case (outputs).
type Propulsion struct {
	// TopOfClimbRate is the residual rate of climb required at the top of
	// climb [m/s]; 1.524 (300 ft/min, common practice, no source).
	TopOfClimbRate float64
	// CruiseThrustMargin is the thrust margin over cruise drag; 0.10
	// (common practice, no source).
	CruiseThrustMargin float64
}

// NewPropulsion returns the propulsion discipline with the default
// sizing settings.
func NewPropulsion() *Propulsion {
	return &Propulsion{TopOfClimbRate: 1.524, CruiseThrustMargin: 0.10}
}

// Name implements mdo.Discipline.
func (p *Propulsion) Name() string { return "propulsion" }

// Inputs implements mdo.Discipline.
func (p *Propulsion) Inputs() []mdo.Var {
	cyc := NewEngineCycle().Outputs()
	in := make([]mdo.Var, propNumIn)
	in[propInCount] = engineCountVar()
	in[propInBypass] = NewEngineCycle().Inputs()[cycInBypass]
	in[propInMach] = cruiseMachVar()
	in[propInCruiseSpeed] = cruiseSpeedVar()
	in[propInMassTakeoff] = massTakeoffVar()
	in[propInDragCruise] = mdo.Var{Name: "aero.drag_cruise", Unit: "N", Description: "aircraft drag at the start of cruise", Default: 50000, Min: 1, Max: 5e6, Scale: 1e4}
	in[propInLDTakeoff] = mdo.Var{Name: "aero.ld_takeoff", Unit: "-", Description: "lift-to-drag ratio in take-off configuration at V2", Default: 7, Min: 1, Max: 40}
	in[propInCLmaxTakeoff] = clMaxTakeoffVar()
	in[propInWingArea] = wingAreaVar()
	in[propInFieldLength] = mdo.Var{Name: "engine.sizing_field_length", Unit: "m", Description: "take-off field length the engines are sized for", Default: 1900, Min: 500, Max: 5000, Scale: 1000}
	in[propInThrustScale] = mdo.Var{Name: "engine.thrust_scale", Unit: "-", Description: "engine size over the sized minimum (>= 1)", Default: 1, Min: 1, Max: 3}
	in[propInAirportDensity] = airportDensityVar()
	in[propInAirportSound] = airportSoundVar()
	in[propInUnitSLS] = cyc[cycOutUnitSLS]
	in[propInUnitTakeoff] = cyc[cycOutUnitTakeoff]
	in[propInUnitClimb] = cyc[cycOutUnitClimb]
	in[propInUnitCruise] = cyc[cycOutUnitCruise]
	in[propInTSFCCruiseMax] = cyc[cycOutTSFCCruiseMax]
	in[propInTSFCNode1] = cyc[cycOutTSFCNode1]
	in[propInTSFCNode2] = cyc[cycOutTSFCNode2]
	in[propInThrustNode1] = cyc[cycOutThrustNode1]
	in[propInThrustNode2] = cyc[cycOutThrustNode2]
	in[propInTt4Node1] = cyc[cycOutTt4Node1]
	in[propInTt4Node2] = cyc[cycOutTt4Node2]
	in[propInClimbMach] = cyc[cycOutClimbMach]
	return in
}

// Outputs implements mdo.Discipline.
func (p *Propulsion) Outputs() []mdo.Var {
	out := make([]mdo.Var, propNumOut)
	out[propOutThrustSLS] = mdo.Var{Name: "engine.thrust_sea_level", Unit: "N", Description: "sea-level-static thrust per engine (ISA, sized)", Default: 60000, Min: 0, Max: 2e6, Scale: 1e5}
	out[propOutMassFlow] = mdo.Var{Name: "engine.mass_flow", Unit: "kg/s", Description: "sea-level-static air mass flow per engine", Default: 80, Min: 0, Max: 5000, Scale: 100}
	out[propOutMass] = engineMassVar()
	out[propOutTSFCCruise] = mdo.Var{Name: "engine.tsfc_cruise", Unit: "kg/(N s)", Description: "thrust-specific fuel consumption at cruise (part throttle, thrust = drag)", Default: 2.8e-5, Min: 1e-6, Max: 1e-3, Scale: 1e-5}
	out[propOutThrustCruise] = mdo.Var{Name: "engine.thrust_cruise_available", Unit: "N", Description: "maximum thrust per engine at cruise Mach and altitude", Default: 25000, Min: 0, Max: 2e6, Scale: 1e4}
	out[propOutNacelleDiameter] = nacelleDiameterVar()
	out[propOutNacelleLength] = nacelleLengthVar()
	out[propOutThrustTakeoff] = engineThrustTakeoffVar()
	out[propOutThrustClimb] = engineThrustClimbVar()
	out[propOutCruiseThrottle] = mdo.Var{Name: "engine.cruise_throttle", Unit: "-", Description: "cruise Tt4 over maximum Tt4", Default: 0.9, Min: 0, Max: 1}
	out[propOutSizingCase] = mdo.Var{Name: "engine.sizing_case", Unit: "-", Description: "sizing requirement: 0 take-off, 1 second segment, 2 top of climb, 3 cruise", Default: 0, Min: 0, Max: 3}
	return out
}

// Partials gives the propulsion's partial derivatives (mdo.Differentiable)
// by central differences (mdo.FDPartials, whatever the Differences of the
// caller), except that the row of engine.sizing_case is zero: the index of
// the hardest requirement is piecewise constant and jumps where two
// requirements tie, which is where an optimum that sizes its engines tends
// to lie (a constraint on the climb gradient meeting the field length the
// engines are sized for). There its finite difference was a jump over 2h
// (±1e6 per unit of every input) that made the coupled Jacobian look
// singular (condition 3.7e13): the Dunlin's Sextant run stopped with "no
// derivatives". Analyses never call it.
func (p *Propulsion) Partials(in, jac []float64) error {
	out := make([]float64, propNumOut)
	if err := p.Compute(in, out); err != nil {
		return err
	}
	if err := mdo.FDPartials(p, in, out, jac, mdo.Central); err != nil {
		return err
	}
	row := jac[propOutSizingCase*len(in) : (propOutSizingCase+1)*len(in)]
	for j := range row {
		row[j] = 0
	}
	return nil
}

// Compute implements mdo.Discipline.
func (p *Propulsion) Compute(in, out []float64) error {
	if len(in) != propNumIn || len(out) != propNumOut {
		return inputErr("propulsion.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	n := math.Round(in[propInCount])
	grad, err := SecondSegmentMinGradient(n)
	if err != nil {
		return err
	}
	mach := in[propInMach]
	drag := in[propInDragCruise]
	w := in[propInMassTakeoff] * G0
	availTO, availCl, availCr := in[propInUnitTakeoff], in[propInUnitClimb], in[propInUnitCruise]
	if !(availTO > 0 && availCl > 0 && availCr > 0) {
		return inputErr("engine.unit_thrust_cruise", availCr, "N s/kg", "> 0 at every sizing condition")
	}
	// density ratio at the airport
	rho, sound := in[propInAirportDensity], in[propInAirportSound]
	sigma := rho / SeaLevelDensity
	vCruise := in[propInCruiseSpeed]
	wsPsf := w / in[propInWingArea] / unitPsf
	tofFt := in[propInFieldLength] / unitFt
	tw := RoskamTakeoffParameter * wsPsf / (sigma * in[propInCLmaxTakeoff] * tofFt)
	// thrust at V2 = 1.13 VSR1: linear in Mach between static and the
	// second-segment Mach number (the model of the mission discipline)
	v2 := V2MinRatio * StallSpeed(in[propInMassTakeoff], rho, in[propInWingArea], in[propInCLmaxTakeoff])
	availV2 := availTO + (availCl-availTO)*v2/(sound*in[propInClimbMach])
	if !(availV2 > 0) {
		return inputErr("engine.unit_thrust_climb", availCl, "N s/kg", "a positive thrust at V2")
	}
	req := [4]float64{
		w * tw / n / availTO,
		w * (grad + 1/in[propInLDTakeoff]) / (n - 1) / availV2,
		(drag + w*WarmupTakeoffFraction*ClimbFraction(mach)*p.TopOfClimbRate/vCruise) / n / availCr,
		drag * (1 + p.CruiseThrustMargin) / n / availCr,
	}
	mreq, kase := req[0], 0
	for i := 1; i < len(req); i++ {
		if req[i] > mreq {
			mreq, kase = req[i], i
		}
	}
	mdot := mreq * in[propInThrustScale]
	tsls := mdot * in[propInUnitSLS]
	tCruiseMax := mdot * availCr
	tsfc, thr := PartThrottleInterp(drag/n/tCruiseMax, in[propInTSFCCruiseMax],
		in[propInThrustNode1], in[propInTSFCNode1], in[propInTt4Node1],
		in[propInThrustNode2], in[propInTSFCNode2], in[propInTt4Node2])
	// the engine's length and mass regressions share ln T
	lnT := math.Log(tsls / unitLbf)
	dn, ln := nacelleSizeLn(mdot, lnT, mach)
	out[propOutThrustSLS] = tsls
	out[propOutMassFlow] = mdot
	out[propOutMass] = engineMassRaymerLn(lnT, in[propInBypass])
	out[propOutTSFCCruise] = tsfc
	out[propOutThrustCruise] = tCruiseMax
	out[propOutNacelleDiameter] = dn
	out[propOutNacelleLength] = ln
	out[propOutThrustTakeoff] = mdot * availTO
	out[propOutThrustClimb] = mdot * availCl
	out[propOutCruiseThrottle] = thr
	out[propOutSizingCase] = float64(kase)
	return nil
}

// RoskamTakeoffParameter is the slope of the FAR 25 take-off field length
// against the take-off parameter, TOFL[ft] = 37.5·TOP[lbf/ft²] (J. Roskam,
// "Airplane Design" Part I, from memory).
const RoskamTakeoffParameter = 37.5

// Specifications of variables shared by several disciplines of this
// package (one definition, so that every consumer declares the same unit
// and validity range).

func cruiseMachVar() mdo.Var {
	return mdo.Var{Name: "cruise.mach", Unit: "-", Description: "cruise Mach number", Default: 1.5, Min: 0.3, Max: 2.5}
}

func cruiseAltitudeVar() mdo.Var {
	return mdo.Var{Name: "cruise.altitude", Unit: "m", Description: "cruise altitude (geometric)", Default: 15000, Min: 0, Max: 25000, Scale: 1000}
}

func airportElevationVar() mdo.Var {
	return mdo.Var{Name: "airport.elevation", Unit: "m", Description: "airport elevation", Default: 0, Min: -400, Max: 4500, Scale: 1000}
}

func airportDTVar() mdo.Var {
	return mdo.Var{Name: "airport.temperature_offset", Unit: "K", Description: "airport temperature above the standard day", Default: 0, Min: -50, Max: 50, Scale: 10}
}

func massTakeoffVar() mdo.Var {
	return mdo.Var{Name: "mass.takeoff", Unit: "kg", Description: "take-off (design gross) mass", Default: 45000, Min: 500, Max: 1e6, Scale: 1e4}
}

func clMaxTakeoffVar() mdo.Var {
	return mdo.Var{Name: "aero.cl_max_takeoff", Unit: "-", Description: "maximum lift coefficient, take-off configuration", Default: 1.4, Min: minCLMax, Max: maxCLMaxTakeoff}
}

func clMaxLandingVar() mdo.Var {
	return mdo.Var{Name: "aero.cl_max_landing", Unit: "-", Description: "maximum lift coefficient, landing configuration", Default: 1.7, Min: minCLMax, Max: maxCLMaxLanding}
}

func wingAreaVar() mdo.Var {
	return mdo.Var{Name: "wing.area", Unit: "m2", Description: "wing reference area", Default: 110, Min: 1, Max: 2000}
}

func engineCountVar() mdo.Var {
	return mdo.Var{Name: "engine.count", Unit: "-", Description: "number of engines (rounded)", Default: 2, Min: 2, Max: 4}
}

func engineMassVar() mdo.Var {
	return mdo.Var{Name: "engine.mass", Unit: "kg", Description: "dry mass per engine (installation added in weights)", Default: 2000, Min: 0, Max: 50000, Scale: 1000}
}

func nacelleDiameterVar() mdo.Var {
	return mdo.Var{Name: "nacelle.diameter", Unit: "m", Description: "nacelle maximum diameter", Default: 1.2, Min: 0, Max: 6}
}

func nacelleLengthVar() mdo.Var {
	return mdo.Var{Name: "nacelle.length", Unit: "m", Description: "nacelle length (inlet to nozzle)", Default: 6, Min: 0, Max: 30}
}

func engineThrustTakeoffVar() mdo.Var {
	return mdo.Var{Name: "engine.thrust_takeoff", Unit: "N", Description: "static thrust per engine at the airport", Default: 60000, Min: 0, Max: 2e6, Scale: 1e5}
}

func engineThrustClimbVar() mdo.Var {
	return mdo.Var{Name: "engine.thrust_climb", Unit: "N", Description: "thrust per engine at the airport at the second-segment Mach number", Default: 50000, Min: 0, Max: 2e6, Scale: 1e5}
}

// EngineOperatingPoint is the uninstalled performance of a sized
// engine at one flight condition.
type EngineOperatingPoint struct {
	Thrust   float64 // net thrust [N]
	TSFC     float64 // [kg/(N s)]
	MassFlow float64 // air mass flow [kg/s]
	FuelFlow float64 // [kg/s]
	Tt4      float64 // turbine-entry temperature [K]
}

// EngineAt returns the thrust and fuel consumption of an engine of
// sea-level-static air mass flow mdotSLS [kg/s] (bypass ratio bpr,
// overall pressure ratio pic, maximum turbine-entry temperature tt4max
// [K]) at Mach number mach, geometric altitude [m] on a day dT [K] off
// standard, and throttle = Tt4/Tt4,max in (0, 1] — the throttle model of
// this file (parametric cycle at reduced Tt4, corrected-flow lapse).
func EngineAt(c CycleComponents, bpr, pic, tt4max, mdotSLS, mach, altitude, dT, throttle float64) (EngineOperatingPoint, error) {
	if !(throttle > 0 && throttle <= 1) {
		return EngineOperatingPoint{}, inputErr("engine.throttle", throttle, "", "(0, 1] (Tt4 over maximum Tt4)")
	}
	if !(mdotSLS > 0) || math.IsInf(mdotSLS, 0) {
		return EngineOperatingPoint{}, inputErr("engine.mass_flow", mdotSLS, "kg/s", "> 0")
	}
	atm, err := OffsetAtmosphere(altitude, dT)
	if err != nil {
		return EngineOperatingPoint{}, renameInput(err, "altitude")
	}
	r, err := MixedFlowTurbofan(c, mach, atm.Temperature, pic, bpr, throttle*tt4max)
	if err != nil {
		return EngineOperatingPoint{}, err
	}
	mdot := mdotSLS * CorrectedFlowLapse(atm.Pressure, atm.Temperature, mach, c.MilSpecRecovery)
	t := mdot * r.SpecificThrust
	return EngineOperatingPoint{Thrust: t, TSFC: r.TSFC, MassFlow: mdot, FuelFlow: r.TSFC * t, Tt4: throttle * tt4max}, nil
}
