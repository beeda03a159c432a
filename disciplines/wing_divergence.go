package disciplines

import (
	"math"

	"couplet/mdo"
)

// WingDivergence is the "wing_divergence" discipline: the torsional
// divergence dynamic pressure of the wing (aeroelastic.go) and its margin
// over dive.dynamic_pressure. Nothing inside the coupled loop reads them,
// so it runs once after the loop, on the box stiffness of wing_box.
//
// Divergence model of the aircraft's wing: the exposed semispan
// (b − D)/2 along the quarter-chord sweep line (taken as the elastic axis
// sweep), the mean geometric chord S/b, both normal to the axis; the
// elastic axis at mid-box (37.5 % chord, spars at 15 and 60 %), the
// aerodynamic centre at a quarter chord (divergence is a subsonic, high-q
// case: the dive speed at low altitude), section lift slope
// SectionLiftSlope; the stiffness is the root GJ and EI of the sized box
// reduced to the Rayleigh-equivalent uniform beam
// (TaperedStiffnessFactors).
type WingDivergence struct {
	// SectionLiftSlope is a0 of the divergence strip theory [1/rad]; 0.95·2π.
	SectionLiftSlope float64
	// ElasticAxis is the elastic axis as a fraction of chord; 0.375.
	ElasticAxis float64
}

// NewWingDivergence returns the wing_divergence discipline with the
// documented defaults.
func NewWingDivergence() *WingDivergence {
	return &WingDivergence{SectionLiftSlope: 0.95 * 2 * math.Pi, ElasticAxis: 0.375}
}

// Name implements mdo.Discipline.
func (d *WingDivergence) Name() string { return "wing_divergence" }

// Indices of the wing_divergence discipline's variables.
const (
	wdInArea = iota
	wdInTaper
	wdInSweep
	wdInSpan
	wdInFusDiameter
	wdInGJ
	wdInEI
	wdInQDive
	wdNumIn
)

const (
	wdOutQD = iota
	wdOutMargin
	wdNumOut
)

// Inputs implements mdo.Discipline.
func (d *WingDivergence) Inputs() []mdo.Var {
	wt := NewWeights().Inputs()
	box := wingBoxOutputs()
	in := make([]mdo.Var, wdNumIn)
	in[wdInArea] = wt[wtInArea]
	in[wdInTaper] = wingTaperVar()
	in[wdInSweep] = wt[wtInSweep]
	in[wdInSpan] = wingSpanVar()
	in[wdInFusDiameter] = wt[wtInFusDiameter]
	in[wdInGJ] = box[wbOutGJ]
	in[wdInEI] = box[wbOutEI]
	in[wdInQDive] = mdo.Var{Name: "dive.dynamic_pressure", Unit: "Pa", Description: "design dive dynamic pressure", Default: 40000, Min: 1000, Max: 300000, Scale: 1e4}
	return in
}

// Outputs implements mdo.Discipline.
func (d *WingDivergence) Outputs() []mdo.Var {
	out := make([]mdo.Var, wdNumOut)
	out[wdOutQD] = mdo.Var{Name: "stability.divergence_dynamic_pressure", Unit: "Pa", Description: "wing divergence dynamic pressure (1e9 = no divergence)", Default: 1e5, Min: 0, Max: NoDivergence, Scale: 1e4}
	out[wdOutMargin] = mdo.Var{Name: "stability.divergence_margin", Unit: "-", Description: "q_D/dive.dynamic_pressure − 1, smoothly capped at 10", Default: 1, Min: -1, Max: DivergenceMarginCap}
	return out
}

// Compute implements mdo.Discipline. It allocates nothing.
func (d *WingDivergence) Compute(in, out []float64) error {
	if len(in) != wdNumIn || len(out) != wdNumOut {
		return inputErr("wing_divergence.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	area := in[wdInArea]
	sweep := in[wdInSweep] * math.Pi / 180
	cs := math.Cos(sweep)
	span := in[wdInSpan]
	exposed := math.Max(0.5*(span-in[wdInFusDiameter]), 0.05*span)
	fgj, fei := TaperedStiffnessFactors(in[wdInTaper])
	chordN := area / span * cs
	beam := SweptBeam{
		Length: exposed / cs, Chord: chordN, Offset: (d.ElasticAxis - 0.25) * chordN,
		LiftSlope: d.SectionLiftSlope, Sweep: sweep, GJ: in[wdInGJ] * fgj, EI: in[wdInEI] * fei,
	}
	qd, err := beam.DivergenceDynamicPressure()
	if err != nil {
		return err
	}
	out[wdOutQD] = math.Min(qd, NoDivergence)
	out[wdOutMargin] = DivergenceMargin(qd, in[wdInQDive])
	return nil
}
