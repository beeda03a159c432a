package disciplines

import (
	"math"

	"couplet/mdo"
)

// WingBoxSizing is the "wing_box" discipline: the root wing box sized for
// the ultimate bending moment and shear of the converged masses
// (SizeWingBox: lift Nz·(W0 − wing mass)·g, covers thickened by the
// forward-sweep factor kfs), giving the torsional and bending stiffness
// that the divergence analysis uses. Nothing inside the coupled loop reads
// the box, so it runs once after the loop. It reads the assumptions
// (material, ultimate load factor, forward-sweep stiffening) of the
// Weights it was made from.
type WingBoxSizing struct {
	w *Weights
}

// NewWingBoxSizing returns the wing_box discipline of w.
func NewWingBoxSizing(w *Weights) *WingBoxSizing { return &WingBoxSizing{w: w} }

// Name implements mdo.Discipline.
func (b *WingBoxSizing) Name() string { return "wing_box" }

// Indices of the wing_box discipline's variables.
const (
	wbInTakeoff = iota
	wbInWingMass
	wbInSpan
	wbInSweep
	wbInRootChord
	wbInTC
	wbInFusDiameter
	wbNumIn
)

const (
	wbOutGJ = iota
	wbOutEI
	wbOutCoverThickness
	wbNumOut
)

// Inputs implements mdo.Discipline.
func (b *WingBoxSizing) Inputs() []mdo.Var {
	wt := b.w.Inputs()
	wo := b.w.Outputs()
	in := make([]mdo.Var, wbNumIn)
	in[wbInTakeoff] = massTakeoffVar()
	in[wbInWingMass] = wo[wtOutWing]
	in[wbInSpan] = wingSpanVar()
	in[wbInSweep] = wt[wtInSweep]
	in[wbInRootChord] = wingRootChordVar()
	in[wbInTC] = wingThicknessVar()
	in[wbInFusDiameter] = wt[wtInFusDiameter]
	return in
}

// wingBoxOutputs returns the specifications of the wing_box outputs.
func wingBoxOutputs() []mdo.Var {
	out := make([]mdo.Var, wbNumOut)
	out[wbOutGJ] = mdo.Var{Name: "wing.box_torsional_stiffness", Unit: "N m2", Description: "torsional stiffness GJ of the sized wing box at the root", Default: 1e8, Min: 0, Max: 1e13, Scale: 1e8}
	out[wbOutEI] = mdo.Var{Name: "wing.box_bending_stiffness", Unit: "N m2", Description: "bending stiffness EI of the sized wing box at the root", Default: 1e8, Min: 0, Max: 1e13, Scale: 1e8}
	out[wbOutCoverThickness] = mdo.Var{Name: "wing.box_cover_thickness", Unit: "m", Description: "root cover skin thickness of the sized wing box", Default: 0.005, Min: 0, Max: 1, Scale: 0.001}
	return out
}

// Outputs implements mdo.Discipline.
func (b *WingBoxSizing) Outputs() []mdo.Var { return wingBoxOutputs() }

// Compute implements mdo.Discipline. It allocates nothing.
func (b *WingBoxSizing) Compute(in, out []float64) error {
	if len(in) != wbNumIn || len(out) != wbNumOut {
		return inputErr("wing_box.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	w := b.w
	sweep := in[wbInSweep] * math.Pi / 180
	kfs := w.forwardSweepFactor(sweep)
	w0, wing := in[wbInTakeoff], in[wbInWingMass]
	box := SizeWingBox(w.Material, w.UltimateLoadFactor*(w0-wing)*G0, in[wbInSpan], sweep, in[wbInRootChord], in[wbInTC], in[wbInFusDiameter], kfs)
	out[wbOutGJ] = box.TorsionalStiffness
	out[wbOutEI] = box.BendingStiffness
	out[wbOutCoverThickness] = box.CoverThickness
	return nil
}
