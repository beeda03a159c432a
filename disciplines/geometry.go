package disciplines

import (
	"fmt"
	"math"

	"couplet/mdo"
)

// Geometry of the aircraft: a trapezoidal wing and tails, a fuselage laid
// out from its cabin, nacelles, and the cross-section area distribution
// along the aircraft used by the area rule. Lengths in metres, areas in
// m2, sweep angles in degrees (negative = forward sweep). x runs aft from
// the fuselage nose, y to starboard.

// MaxSweep is the largest quarter-chord sweep magnitude accepted [deg].
const MaxSweep = 70.0

// Wing is a straight-tapered (trapezoidal) lifting surface, symmetric
// about the aircraft's plane of symmetry. Sweep is the quarter-chord
// sweep in degrees, negative for forward sweep.
type Wing struct {
	Area           float64 // reference (trapezoidal) area S [m2]
	AspectRatio    float64 // A = b²/S
	Taper          float64 // λ = tip chord / root chord
	Sweep          float64 // quarter-chord sweep [deg]
	ThicknessRatio float64 // t/c

	Span      float64 // b [m]
	RootChord float64 // centre-line chord [m]
	TipChord  float64 // [m]
	MAC       float64 // mean aerodynamic chord [m]
	MACY      float64 // spanwise station of the MAC [m]
	MACX      float64 // leading edge of the MAC aft of the apex [m]
	SweepLE   float64 // leading-edge sweep [deg]

	tanLE float64 // tan of the leading-edge sweep
}

// NewWing lays out a trapezoidal wing from its area, aspect ratio, taper,
// quarter-chord sweep [deg] and thickness ratio. Errors name the wing.*
// variable refused.
func NewWing(area, aspectRatio, taper, sweep, thicknessRatio float64) (Wing, error) {
	return newSurface("wing", area, aspectRatio, taper, sweep, thicknessRatio)
}

// newSurface is NewWing with a variable prefix for the error messages.
func newSurface(prefix string, area, ar, taper, sweep, tc float64) (Wing, error) {
	w, err := surfacePlanform(prefix, area, ar, taper, sweep, tc)
	if err != nil {
		return Wing{}, err
	}
	w.MAC = 2.0 / 3.0 * w.RootChord * (1 + taper + taper*taper) / (1 + taper)
	w.MACY = w.Span / 6 * (1 + 2*taper) / (1 + taper)
	w.SweepLE = math.Atan(w.tanLE) * 180 / math.Pi
	w.MACX = w.MACY * w.tanLE
	return w, nil
}

// surfacePlanform checks a surface's parameters as newSurface does and
// lays out its span, chords and leading-edge slope (the same values); the
// mean aerodynamic chord, its position and the leading-edge sweep angle
// are left zero. It serves the coupled loop's aerodynamics, which places
// the pods under the wing with it outside the transonic fairing.
func surfacePlanform(prefix string, area, ar, taper, sweep, tc float64) (Wing, error) {
	switch {
	case !(area > 0) || math.IsInf(area, 0):
		return Wing{}, inputErr(prefix+".area", area, "m2", "> 0")
	case !(ar > 0 && ar <= 30):
		return Wing{}, inputErr(prefix+".aspect_ratio", ar, "", "(0, 30]")
	case !(taper >= 0 && taper <= 1.5):
		return Wing{}, inputErr(prefix+".taper", taper, "", "[0, 1.5]")
	case !(math.Abs(sweep) <= MaxSweep):
		return Wing{}, inputErr(prefix+".sweep", sweep, "deg", "[-70, 70] (negative = forward sweep)")
	case !(tc > 0 && tc <= 0.3):
		return Wing{}, inputErr(prefix+".thickness_ratio", tc, "", "(0, 0.3]")
	}
	w := Wing{Area: area, AspectRatio: ar, Taper: taper, Sweep: sweep, ThicknessRatio: tc}
	w.Span = math.Sqrt(area * ar)
	w.RootChord = 2 * area / (w.Span * (1 + taper))
	w.TipChord = taper * w.RootChord
	w.tanLE = math.Tan(sweep*math.Pi/180) + (1-taper)/(ar*(1+taper))
	return w, nil
}

// SweepAt returns the sweep [deg] of the line at chord fraction f (0 =
// leading edge, 0.25 = quarter chord, 1 = trailing edge):
// tan Λf = tan Λc/4 − (4/A)(f − ¼)(1 − λ)/(1 + λ).
func (w Wing) SweepAt(f float64) float64 {
	return math.Atan(w.tanSweepAt(f)) * 180 / math.Pi
}

// tanSweepAt returns the tangent of the sweep at chord fraction f.
func (w *Wing) tanSweepAt(f float64) float64 {
	return w.tanLE - 4/w.AspectRatio*f*(1-w.Taper)/(1+w.Taper)
}

// ChordAt returns the chord at spanwise station y [m] (|y| <= b/2).
func (w Wing) ChordAt(y float64) float64 {
	return w.RootChord * (1 - (1-w.Taper)*2*math.Abs(y)/w.Span)
}

// LeadingEdgeX returns the leading edge at spanwise station y, aft of the
// apex [m].
func (w Wing) LeadingEdgeX(y float64) float64 {
	return math.Abs(y) * w.tanLE
}

// ExposedArea returns the planform area outside a fuselage of the given
// diameter [m2].
func (w Wing) ExposedArea(fuselageDiameter float64) float64 {
	r := math.Min(0.5*fuselageDiameter, 0.5*w.Span)
	return (0.5*w.Span - r) * (w.ChordAt(r) + w.TipChord)
}

// WettedArea returns the wetted area of the exposed wing [m2],
// S_wet = S_exposed·(1.977 + 0.52 t/c) (conceptual-design textbooks,
// Raymer; from memory).
func (w Wing) WettedArea(fuselageDiameter float64) float64 {
	return w.ExposedArea(fuselageDiameter) * (1.977 + 0.52*w.ThicknessRatio)
}

// Volume returns the volume of the whole wing with parabolic-arc
// (biconvex) sections of area (2/3)(t/c)c² [m3].
func (w Wing) Volume() float64 {
	cr, l := w.RootChord, w.Taper
	return 2.0 / 3.0 * w.ThicknessRatio * w.Span * cr * cr * (1 + l + l*l) / 3
}

// FuelVolume returns the fuel volume of the wing box,
// V = 0.54 (S²/b)(t/c)(1 + λ√τ + λ²τ)/(1 + λ)² with τ = 1 (equal root
// and tip thickness ratio) (Torenbeek, from memory) [m3].
func (w Wing) FuelVolume() float64 {
	l := w.Taper
	return 0.54 * w.Area * w.Area / w.Span * w.ThicknessRatio * (1 + l + l*l) / ((1 + l) * (1 + l))
}

// Cabin describes the passenger cabin a fuselage is laid out around.
type Cabin struct {
	Passengers   int     // number of passenger seats
	SeatsAbreast int     // seats in one row
	Aisles       int     // 0 = the fewest aisles 14 CFR 25.817 allows; else 1 or 2
	SeatPitch    float64 // [m]
	SeatWidth    float64 // seat width with armrests [m]; 0 = 0.50 m
}

// Aisle widths of 14 CFR 25.815 [m]: below and above 25 in from the floor.
const inch = 0.0254

// AisleWidth returns the minimum aisle width of 14 CFR 25.815 for a
// passenger count, below 25 in from the floor and at 25 in and above [m]:
// 12/15 in for 10 passengers or fewer, 12/20 in for 11 to 19, 15/20 in for
// 20 or more.
func AisleWidth(passengers int) (low, high float64) {
	switch {
	case passengers <= 10:
		return 12 * inch, 15 * inch
	case passengers <= 19:
		return 12 * inch, 20 * inch
	default:
		return 15 * inch, 20 * inch
	}
}

// MaxSeatsAbreast returns the most seats one row may hold with the given
// number of aisles. With one aisle 14 CFR 25.817 allows at most three seats
// on each side of it, so 6. The rule says nothing of cabins with two
// aisles; the 12 this layout allows there (3 + 6 + 3) is our own
// assumption of the widest twin-aisle row it lays out, not a rule.
func MaxSeatsAbreast(aisles int) int { return 6 * aisles }

// singleAisleRule is the refusal of 14 CFR 25.817 for a single-aisle row.
const singleAisleRule = "at most 6 with a single aisle: 14 CFR 25.817 allows at most 3 seats on each side of a single aisle (set cabin.aisles = 2 for a twin-aisle cabin)"

// Fuselage is a circular fuselage of a pointed nose cone, a cylindrical
// cabin section and a tail cone.
type Fuselage struct {
	Aisles      int     // aisles of the cabin
	AisleWidth  float64 // aisle width at shoulder height (25.815) [m]
	CabinWidth  float64 // inner width at shoulder height [m]
	CabinLength float64 // [m]
	Diameter    float64 // outer diameter [m]
	NoseLength  float64 // nose cone (with the flight deck) [m]
	TailLength  float64 // tail cone [m]
	Length      float64 // overall length [m]
	Fineness    float64 // length / diameter
	WettedArea  float64 // [m2]
	Volume      float64 // [m3]
}

// Shape constants of the fuselage cones: the nose cross-section grows as
// S = Smax(1 − (1 − ξ)²)^(3/2) (ξ = x/Ln) like the ends of a Sears–Haack
// body, the tail cone mirrors it. coneVolume = ∫₀¹(1 − u²)^(3/2)du = 3π/16,
// coneSurface = ∫₀¹(1 − u²)^(3/4)du = √π Γ(7/4)/(2Γ(9/4)).
const (
	coneVolume  = 3 * math.Pi / 16
	coneSurface = 0.71888414
)

// NewFuselage lays out the cabin (rows of seats at the seat pitch, aisles
// per 14 CFR 25.815/25.817, an allowance of 1.6 m + 0.03 m per passenger
// for doors, galleys and lavatories — common practice, no source) and
// closes it with nose and tail cones of the given fineness (length /
// diameter). The outer diameter is 1.045·w + 0.084 m with w the cabin
// width (Torenbeek, from memory).
func NewFuselage(c Cabin, noseFineness, tailFineness float64) (Fuselage, error) {
	if c.SeatWidth == 0 {
		c.SeatWidth = 0.50
	}
	switch {
	case c.Passengers < 1 || c.Passengers > 1000:
		return Fuselage{}, inputErr("cabin.passengers", float64(c.Passengers), "", "integer in [1, 1000]")
	case c.SeatsAbreast < 1 || c.SeatsAbreast > MaxSeatsAbreast(2):
		return Fuselage{}, inputErr("cabin.seats_abreast", float64(c.SeatsAbreast), "",
			"integer in [1, 12]: 14 CFR 25.817 allows at most 6 with one aisle; 12 with two aisles is this layout's own limit (an assumption, not a rule)")
	case c.Aisles < 0 || c.Aisles > 2:
		return Fuselage{}, inputErr("cabin.aisles", float64(c.Aisles), "", "0 (automatic), 1 or 2")
	case c.Aisles > 0 && c.SeatsAbreast > MaxSeatsAbreast(c.Aisles):
		return Fuselage{}, inputErr("cabin.seats_abreast", float64(c.SeatsAbreast), "", singleAisleRule)
	case !(c.SeatPitch >= 0.5 && c.SeatPitch <= 2.5):
		return Fuselage{}, inputErr("cabin.seat_pitch", c.SeatPitch, "m", "[0.5, 2.5]")
	case !(c.SeatWidth >= 0.35 && c.SeatWidth <= 1.2):
		return Fuselage{}, inputErr("cabin.seat_width", c.SeatWidth, "m", "[0.35, 1.2]")
	case !(noseFineness >= 0.5 && noseFineness <= 10):
		return Fuselage{}, inputErr("fuselage.nose_fineness", noseFineness, "", "[0.5, 10]")
	case !(tailFineness >= 0.5 && tailFineness <= 10):
		return Fuselage{}, inputErr("fuselage.tail_fineness", tailFineness, "", "[0.5, 10]")
	}
	aisles := c.Aisles
	if aisles == 0 {
		aisles = 1
		if c.SeatsAbreast > MaxSeatsAbreast(1) {
			aisles = 2
		}
	}
	_, aw := AisleWidth(c.Passengers)
	f := Fuselage{Aisles: aisles, AisleWidth: aw}
	const wallClearance = 0.05 // each side, shoulder height (common practice, no source)
	f.CabinWidth = float64(c.SeatsAbreast)*c.SeatWidth + float64(aisles)*aw + 2*wallClearance
	f.Diameter = 1.045*f.CabinWidth + 0.084
	rows := (c.Passengers + c.SeatsAbreast - 1) / c.SeatsAbreast
	f.CabinLength = float64(rows)*c.SeatPitch + 1.6 + 0.03*float64(c.Passengers)
	f.NoseLength = noseFineness * f.Diameter
	f.TailLength = tailFineness * f.Diameter
	f.finish()
	if f.Length > MaxFuselageLength {
		return Fuselage{}, inputErr("cabin.passengers", float64(c.Passengers), "", fmt.Sprintf("a cabin whose fuselage is at most %g m long (here %.4g m with %d abreast at %g m pitch): fewer passengers, more seats abreast, a shorter seat pitch or shorter nose and tail cones",
			MaxFuselageLength, f.Length, c.SeatsAbreast, c.SeatPitch))
	}
	return f, nil
}

// FuselageFromDimensions returns a fuselage of the given overall length,
// diameter and nose and tail cone lengths (no cabin data).
func FuselageFromDimensions(length, diameter, noseLength, tailLength float64) (Fuselage, error) {
	switch {
	case !(diameter > 0) || math.IsInf(diameter, 0):
		return Fuselage{}, inputErr("fuselage.diameter", diameter, "m", "> 0")
	case !(noseLength > 0 && tailLength > 0 && noseLength+tailLength <= length) || math.IsInf(length, 0):
		return Fuselage{}, inputErr("fuselage.length", length, "m", ">= nose length + tail length (both > 0)")
	}
	f := Fuselage{Diameter: diameter, NoseLength: noseLength, TailLength: tailLength, CabinLength: length - noseLength - tailLength}
	f.finish()
	return f, nil
}

// finish fills in the derived quantities from the four dimensions.
func (f *Fuselage) finish() {
	f.Length = f.NoseLength + f.CabinLength + f.TailLength
	f.Fineness = f.Length / f.Diameter
	smax := math.Pi / 4 * f.Diameter * f.Diameter
	f.Volume = smax * (f.CabinLength + coneVolume*(f.NoseLength+f.TailLength))
	f.WettedArea = math.Pi * f.Diameter * (f.CabinLength + coneSurface*(f.NoseLength+f.TailLength))
}

// CrossSection returns the fuselage cross-section area at x [m2].
func (f *Fuselage) CrossSection(x float64) float64 {
	smax := math.Pi / 4 * f.Diameter * f.Diameter
	switch {
	case x <= 0 || x >= f.Length:
		return 0
	case x < f.NoseLength:
		u := 1 - x/f.NoseLength
		v := 1 - u*u
		return smax * v * math.Sqrt(v)
	case x > f.Length-f.TailLength:
		u := (x - (f.Length - f.TailLength)) / f.TailLength
		v := 1 - u*u
		return smax * v * math.Sqrt(v)
	}
	return smax
}

// TailVolumeArea returns the area of a tail from its volume coefficient:
// S_tail = V·S·ℓref/arm, with ℓref the MAC for a horizontal tail and the
// span for a vertical tail (the tail-volume method of conceptual design).
func TailVolumeArea(volume, wingArea, refLength, arm float64) float64 {
	return volume * wingArea * refLength / arm
}

// Nacelles are the engine pods: Count pods of the given diameter and
// length, in pairs under the wing (an odd one on the centre line at the
// rear fuselage).
type Nacelles struct {
	Count    int
	Diameter float64 // maximum diameter [m]
	Length   float64 // [m]
	// positions: inlet x and spanwise y of each pod on the starboard side
	// (mirrored to port); the centre-line pod, if any, has y = 0.
	X, Y [3]float64
	n    int // number of distinct positions used in X, Y
}

// NacelleFromMassFlow sizes a pod for an engine of corrected mass flow
// mdot [kg/s]: the inlet captures mdot at Mach 0.5 at sea level (ρ·V =
// 1.225·170 kg/(m2 s), common practice, no source); the maximum diameter
// is the capture diameter over 0.80 and the length grows with the bypass
// ratio (length/diameter 6.5 for a turbojet falling to 3 at bypass 5 —
// common practice, no source).
func NacelleFromMassFlow(mdot, bypassRatio float64) (diameter, length float64, err error) {
	if !(mdot > 0) || math.IsInf(mdot, 0) {
		return 0, 0, inputErr("engine.mass_flow", mdot, "kg/s", "> 0")
	}
	if !(bypassRatio >= 0 && bypassRatio <= 20) {
		return 0, 0, inputErr("engine.bypass_ratio", bypassRatio, "", "[0, 20]")
	}
	capture := mdot / (SeaLevelDensity * 170)
	diameter = math.Sqrt(4*capture/math.Pi) / 0.80
	fineness := 3 + 3.5/(1+0.7*bypassRatio)
	return diameter, fineness * diameter, nil
}

// NacelleWettedArea returns the wetted area of one pod, π·d·l·0.9
// (taper of the cowl and the exhaust; common practice, no source) [m2].
func NacelleWettedArea(diameter, length float64) float64 {
	return 0.9 * math.Pi * diameter * length
}

// GeometryOptions are the layout choices that are not design parameters:
// tail planforms and positions, nacelle placement, seat width. They are
// fixed when a geometry or aerodynamics discipline is made.
type GeometryOptions struct {
	SeatWidth float64 // [m]

	HTailAspectRatio, HTailTaper, HTailSweep, HTailThickness float64
	VTailAspectRatio, VTailTaper, VTailSweep, VTailThickness float64 // aspect ratio h²/S_v
	// HTailPosition, VTailPosition: x of the tail's MAC quarter chord as a
	// fraction of the fuselage length, where the root fits on the
	// fuselage. HTailEnd, VTailEnd: the aft-most station of the tail's
	// root trailing edge as a fraction of the fuselage length (1 = the
	// fuselage end); a tail too large to fit at its position moves forward
	// to it (layout.go).
	HTailPosition, VTailPosition float64
	HTailEnd, VTailEnd           float64

	// NacelleSpan: spanwise station of the inner and outer pod pairs as
	// fractions of the semi-span. NacelleInlet: inlet x relative to the
	// local wing leading edge, in local chords (negative = ahead).
	NacelleSpan  [2]float64
	NacelleInlet float64

	// KornFactor is the aerofoil technology factor κA of the Korn
	// equation (0.87 conventional, 0.95 supercritical).
	KornFactor float64
	// MaxThicknessChord is the chordwise position of maximum thickness
	// (0.3 conventional, 0.5 biconvex).
	MaxThicknessChord float64
}

// DefaultGeometryOptions returns layout choices for a supersonic business
// jet: thin swept tails, pods under the wing near the trailing edge.
func DefaultGeometryOptions() GeometryOptions {
	return GeometryOptions{
		SeatWidth:        0.55,
		HTailAspectRatio: 3, HTailTaper: 0.3, HTailSweep: 45, HTailThickness: 0.04,
		VTailAspectRatio: 1.2, VTailTaper: 0.35, VTailSweep: 50, VTailThickness: 0.04,
		HTailPosition: 0.92, VTailPosition: 0.88, HTailEnd: 1, VTailEnd: 1,
		NacelleSpan: [2]float64{0.30, 0.55}, NacelleInlet: 0.25,
		KornFactor: 0.87, MaxThicknessChord: 0.5,
	}
}

// SubsonicGeometryOptions returns layout choices for a subsonic
// transport: supercritical sections, pods ahead of the wing.
func SubsonicGeometryOptions() GeometryOptions {
	return GeometryOptions{
		SeatWidth:        0.50,
		HTailAspectRatio: 4.5, HTailTaper: 0.4, HTailSweep: 30, HTailThickness: 0.10,
		VTailAspectRatio: 1.5, VTailTaper: 0.5, VTailSweep: 38, VTailThickness: 0.10,
		HTailPosition: 0.93, VTailPosition: 0.90, HTailEnd: 1, VTailEnd: 1,
		NacelleSpan: [2]float64{0.33, 0.62}, NacelleInlet: -0.9,
		KornFactor: 0.95, MaxThicknessChord: 0.35,
	}
}

// Configuration is the arrangement of the aircraft's components, from
// which wetted areas, volume and the cross-section area distribution
// follow. Build it with NewConfiguration.
type Configuration struct {
	Wing      Wing
	WingApex  float64 // x of the wing apex [m]
	Fuselage  Fuselage
	HTail     Wing // horizontal tail (both halves)
	HTailApex float64
	// VTail is the vertical tail stored as a mirrored pair: Area and
	// AspectRatio are those of the fin and its mirror image (2·S_v, 2·A_v);
	// only one half exists.
	VTail     Wing
	VTailApex float64
	Nacelles  Nacelles
}

// ConfigurationSpec holds the parameters of a configuration.
type ConfigurationSpec struct {
	Wing                           Wing
	WingPosition                   float64 // apex x / fuselage length
	Fuselage                       Fuselage
	HTailVolume, VTailVolume       float64
	EngineCount                    int
	NacelleDiameter, NacelleLength float64 // 0 = no nacelles
}

// MinHTailVolume is the smallest horizontal-tail volume coefficient the
// aircraft model accepts: it trims with a horizontal tail (the stability
// discipline's tail load, the aerodynamics' trim drag), so a tailless
// aircraft, which trims with its wing, is not modelled.
const MinHTailVolume = 0.01

// htailVolumeRange is the allowed range of htail.volume, as text.
const htailVolumeRange = "[0.01, 3]: the model trims with a horizontal tail (a tailless aircraft is not modelled)"

// MaxTailArea is the largest tail (horizontal tail, fin) the model
// accepts [m2].
const MaxTailArea = 1000.0

// MaxFuselageLength is the longest fuselage the model accepts [m].
const MaxFuselageLength = 150.0

// checkWingOnFuselage refuses a wing that does not sit on the fuselage
// as the model lays it out, naming the input to change: a span no
// larger than the fuselage diameter (no exposed wing), a mean
// aerodynamic chord that begins ahead of the nose, or an aerodynamic
// centre (MAC quarter chord) at or behind a tail's position, which
// leaves that tail no arm.
func checkWingOnFuselage(s *ConfigurationSpec, o *GeometryOptions) error {
	w, f := &s.Wing, &s.Fuselage
	L := f.Length
	if !(w.Span > f.Diameter) {
		return inputErr("wing.area", w.Area, "m2", fmt.Sprintf("above %.3g m2 with aspect ratio %g: a span (here %.3g m) larger than the fuselage diameter %.3g m",
			f.Diameter*f.Diameter/w.AspectRatio, w.AspectRatio, w.Span, f.Diameter))
	}
	if lo := -w.MACX / L; s.WingPosition < lo {
		return inputErr("wing.position", s.WingPosition, "", fmt.Sprintf("at least %.3g with this wing and fuselage: the mean aerodynamic chord of the forward-swept wing would begin ahead of the nose (move the wing aft)", lo))
	}
	tail := math.Min(o.HTailPosition, o.VTailPosition) * L
	hi := (tail - w.MACX - 0.25*w.MAC) / L
	if hi <= 0.05 {
		return inputErr("wing.area", w.Area, "m2", fmt.Sprintf("a wing whose aerodynamic centre (MAC quarter chord, %.3g m behind its apex) can lie ahead of the tails' positions (%.3g m from the nose) at some wing.position in [0.05, 0.9]: a smaller wing or a longer fuselage",
			w.MACX+0.25*w.MAC, tail))
	}
	if !(s.WingPosition < hi) {
		return inputErr("wing.position", s.WingPosition, "", fmt.Sprintf("below %.3g with this wing and fuselage: the wing's aerodynamic centre (MAC quarter chord) must lie ahead of the tails' positions (move the wing forward)", hi))
	}
	return nil
}

// NewConfiguration places the wing, sizes the tails to their volume
// coefficients with their arms as they sit on the fuselage (each at its
// position of the options, or forward with its root trailing edge at the
// options' end station when it does not fit; TailAreaForVolume) and
// places the nacelles.
func NewConfiguration(s ConfigurationSpec, o GeometryOptions) (Configuration, error) {
	c := Configuration{Wing: s.Wing, Fuselage: s.Fuselage}
	L := s.Fuselage.Length
	if !(s.WingPosition >= 0.05 && s.WingPosition <= 0.9) {
		return c, inputErr("wing.position", s.WingPosition, "", "[0.05, 0.9] (apex x / fuselage length)")
	}
	if !(s.HTailVolume >= MinHTailVolume && s.HTailVolume <= 3) {
		return c, inputErr("htail.volume", s.HTailVolume, "", htailVolumeRange)
	}
	if !(s.VTailVolume > 0 && s.VTailVolume <= 1) {
		return c, inputErr("vtail.volume", s.VTailVolume, "", "(0, 1]")
	}
	if err := checkWingOnFuselage(&s, &o); err != nil {
		return c, err
	}
	xac := s.WingPosition*L + s.Wing.MACX + 0.25*s.Wing.MAC
	hUnit, err := newSurface("htail", 1, o.HTailAspectRatio, o.HTailTaper, o.HTailSweep, o.HTailThickness)
	if err != nil {
		return c, err
	}
	vUnit, err := newSurface("vtail", 2, 2*o.VTailAspectRatio, o.VTailTaper, o.VTailSweep, o.VTailThickness)
	if err != nil {
		return c, err
	}
	sh, _, err := TailAreaForVolume("htail.volume", s.HTailVolume, s.HTailVolume*s.Wing.Area*s.Wing.MAC, hUnit, o.HTailPosition*L, o.HTailEnd*L, xac)
	if err != nil {
		return c, err
	}
	sv, _, err := TailAreaForVolume("vtail.volume", s.VTailVolume, s.VTailVolume*s.Wing.Area*s.Wing.Span, vUnit, o.VTailPosition*L, o.VTailEnd*L, xac)
	if err != nil {
		return c, err
	}
	for _, t := range []struct {
		name         string
		volume, area float64
	}{{"htail.volume", s.HTailVolume, sh}, {"vtail.volume", s.VTailVolume, sv}} {
		if t.area > MaxTailArea {
			return c, inputErr(t.name, t.volume, "", fmt.Sprintf("at most about %.3g with this wing: the tail would need %.4g m2, more than the %g m2 the model accepts",
				t.volume*MaxTailArea/t.area, t.area, MaxTailArea))
		}
	}
	return AssembleConfiguration(s.Wing, s.WingPosition, s.Fuselage, sh, sv, s.EngineCount, s.NacelleDiameter, s.NacelleLength, o)
}

// AssembleConfiguration places a wing (apex at wingPosition × fuselage
// length), tails of the given areas [m2] (horizontal-tail area 0 = no
// horizontal tail) at the positions of the options, or forward with
// their root trailing edges at the options' end stations where they do
// not fit, and engineCount pods of the given size (diameter 0 = no pods).
func AssembleConfiguration(w Wing, wingPosition float64, f Fuselage, htailArea, vtailArea float64, engineCount int, nacelleDiameter, nacelleLength float64, o GeometryOptions) (Configuration, error) {
	c := Configuration{Wing: w, Fuselage: f}
	L := f.Length
	if !(wingPosition >= 0.05 && wingPosition <= 0.9) {
		return c, inputErr("wing.position", wingPosition, "", "[0.05, 0.9] (apex x / fuselage length)")
	}
	c.WingApex = wingPosition * L
	var err error
	if htailArea > 0 {
		if c.HTail, err = newSurface("htail", htailArea, o.HTailAspectRatio, o.HTailTaper, o.HTailSweep, o.HTailThickness); err != nil {
			return c, err
		}
		c.HTailApex = tailApex(&c.HTail, o.HTailPosition*L, o.HTailEnd*L)
	}
	if c.VTail, err = newSurface("vtail", 2*vtailArea, 2*o.VTailAspectRatio, o.VTailTaper, o.VTailSweep, o.VTailThickness); err != nil {
		return c, err
	}
	c.VTailApex = tailApex(&c.VTail, o.VTailPosition*L, o.VTailEnd*L)
	c.Nacelles, err = placeNacelles(&c.Wing, c.WingApex, &c.Fuselage, engineCount, nacelleDiameter, nacelleLength, &o)
	return c, err
}

// placeNacelles places engineCount pods of the given size on a wing with
// its apex at x = apex on fuselage f (diameter 0 or no engines = no pods).
func placeNacelles(w *Wing, apex float64, f *Fuselage, engineCount int, nacelleDiameter, nacelleLength float64, o *GeometryOptions) (Nacelles, error) {
	if !(nacelleDiameter > 0 && engineCount > 0) {
		return Nacelles{}, nil
	}
	if engineCount > 5 {
		return Nacelles{}, inputErr("engine.count", float64(engineCount), "", "integer in [1, 5]")
	}
	if !(nacelleLength > 0) {
		return Nacelles{}, inputErr("nacelle.length", nacelleLength, "m", "> 0")
	}
	n := Nacelles{Count: engineCount, Diameter: nacelleDiameter, Length: nacelleLength}
	for p := 0; p < engineCount/2; p++ {
		y := o.NacelleSpan[p] * 0.5 * w.Span
		n.Y[n.n] = y
		n.X[n.n] = apex + w.LeadingEdgeX(y) + o.NacelleInlet*w.ChordAt(y)
		n.n++
	}
	if engineCount%2 == 1 {
		n.Y[n.n] = 0
		n.X[n.n] = f.Length - f.TailLength - 0.5*nacelleLength
		n.n++
	}
	return n, nil
}

// HTailArm returns the distance from the wing's MAC quarter chord to the
// horizontal tail's [m].
func (c *Configuration) HTailArm() float64 {
	return c.HTailApex + c.HTail.MACX + 0.25*c.HTail.MAC - c.WingACX()
}

// VTailArm returns the distance from the wing's MAC quarter chord to the
// vertical tail's [m].
func (c *Configuration) VTailArm() float64 {
	return c.VTailApex + c.VTail.MACX + 0.25*c.VTail.MAC - c.WingACX()
}

// WingACX returns x of the wing's MAC quarter chord [m].
func (c *Configuration) WingACX() float64 { return c.WingApex + c.Wing.MACX + 0.25*c.Wing.MAC }

// HTailArea and VTailArea return the tail planform areas [m2].
func (c *Configuration) HTailArea() float64 { return c.HTail.Area }

// VTailArea returns the fin area [m2].
func (c *Configuration) VTailArea() float64 { return 0.5 * c.VTail.Area }

// WettedAreas returns the wetted areas of the exposed wing, fuselage,
// horizontal tail, vertical tail and all nacelles [m2].
func (c *Configuration) WettedAreas() (wing, fuselage, htail, vtail, nacelles float64) {
	wing = c.Wing.WettedArea(c.Fuselage.Diameter)
	fuselage = c.Fuselage.WettedArea
	if c.HTail.Area > 0 {
		htail = c.HTail.WettedArea(0.3 * c.Fuselage.Diameter)
	}
	vtail = 0.5 * c.VTail.WettedArea(0)
	nacelles = float64(c.Nacelles.Count) * NacelleWettedArea(c.Nacelles.Diameter, c.Nacelles.Length)
	return
}

// Volume returns the enclosed volume of fuselage, exposed wing, tails and
// nacelles (net of the engine stream tube) [m3].
func (c *Configuration) Volume() float64 {
	w := c.Wing
	v := c.Fuselage.Volume + w.Volume()*exposedVolumeFraction(w, 0.5*c.Fuselage.Diameter)
	if c.HTail.Area > 0 {
		v += c.HTail.Volume() * exposedVolumeFraction(c.HTail, 0.15*c.Fuselage.Diameter)
	}
	v += 0.5 * c.VTail.Volume()
	n := c.Nacelles
	v += float64(n.Count) * nacelleNetArea(n.Diameter) * 8.0 / 15.0 * n.Length
	return v
}

// exposedVolumeFraction is the share of a surface's volume outside y = r.
func exposedVolumeFraction(w Wing, r float64) float64 {
	// ∫ c² dy from r to b/2 over ∫ c² dy from 0 to b/2, c linear in y.
	h := 0.5 * w.Span
	if r >= h {
		return 0
	}
	c0, c1, cr := w.ChordAt(r), w.TipChord, w.RootChord
	num := (h - r) * (c0*c0 + c0*c1 + c1*c1)
	den := h * (cr*cr + cr*c1 + c1*c1)
	return num / den
}

// nacelleNetArea is the maximum cross-section of a flow-through pod net
// of its captured stream tube (capture diameter 0.8·d; common practice,
// no source).
func nacelleNetArea(d float64) float64 { return math.Pi / 4 * d * d * (1 - 0.64) }

// Strips per semi-span used to integrate the lifting surfaces' volume
// into the cross-section area distribution (midpoint rule).
const (
	wingStrips = 6
	tailStrips = 3
)

// CutRange returns the range of the cut parameter x0 over which planes
// x = x0 + k·y meet the aircraft (k = 0: normal cuts from nose to tail).
func (c *Configuration) CutRange(k float64) (lo, hi float64) {
	ak := math.Abs(k)
	lo, hi = 0, c.Fuselage.Length
	// (the built-in min and max treat NaN and signed zeros as math.Min
	// and math.Max do)
	surf := func(w *Wing, apex float64, yscale float64) {
		h := 0.5 * w.Span * yscale
		tipLE := apex + math.Abs(0.5*w.Span)*w.tanLE // LeadingEdgeX
		tipTE := tipLE + w.TipChord
		lo = min(lo, min(apex, tipLE-ak*h))
		hi = max(hi, max(apex+w.RootChord, tipTE+ak*h))
	}
	surf(&c.Wing, c.WingApex, 1)
	if c.HTail.Area > 0 {
		surf(&c.HTail, c.HTailApex, 1)
	}
	surf(&c.VTail, c.VTailApex, 0) // the fin lies in the plane of symmetry
	n := &c.Nacelles
	for i := 0; i < n.n; i++ {
		lo = min(lo, n.X[i]-ak*n.Y[i])
		hi = max(hi, n.X[i]+n.Length+ak*n.Y[i])
	}
	return lo, hi
}

// AreaDistribution writes into s[i] the cross-section area [m2] cut from
// the aircraft by the plane x = x[i] + k·y, projected on the plane normal
// to the flight direction: k = 0 gives the normal cuts of the transonic
// area rule, k = β·cos θ the Mach-plane cuts of the supersonic area rule
// at roll angle θ. If planform is not nil, planform[i] receives the lift
// density of the wing along the cut (for the equivalent area due to
// lift: the exposed planform's width along the cut weighted by a
// parabolic chordwise loading 6ξ(1 − ξ), whose integral over x is the
// exposed planform area [m]). The fuselage, the exposed wing and tails
// (parabolic-arc sections integrated over spanwise strips) and the pods
// (net of the captured
// stream tube, podSection) contribute; the fin is taken in the plane of
// symmetry. Nothing is allocated.
func (c *Configuration) AreaDistribution(k float64, x, s, planform []float64) {
	f := &c.Fuselage
	for i, xi := range x {
		s[i] = f.CrossSection(xi)
	}
	for i := range planform {
		planform[i] = 0
	}
	r := 0.5 * f.Diameter
	addSurface(&c.Wing, c.WingApex, r, wingStrips, k, x, s, planform)
	if c.HTail.Area > 0 {
		addSurface(&c.HTail, c.HTailApex, 0.15*f.Diameter, tailStrips, k, x, s, nil)
	}
	addFin(&c.VTail, c.VTailApex, tailStrips, x, s)
	n := &c.Nacelles
	if n.Count == 0 {
		return
	}
	amax := nacelleNetArea(n.Diameter)
	for p := 0; p < n.n; p++ {
		for side := -1.0; side <= 1; side += 2 {
			x0, share := n.cutInlet(p, side, k)
			for i := firstAbove(x, x0); i < len(x) && x[i] < x0+n.Length; i++ {
				s[i] += share * n.podSection(amax, x0, x[i])
			}
		}
	}
}

// cutInlet returns where the cut x = x0 + k·y meets the inlet of pod
// position p on the given side (−1 port, +1 starboard), and the share of
// the pod that side carries: 1, or ½ for a centre-line pod, which both
// sides count.
func (n *Nacelles) cutInlet(p int, side, k float64) (x0, share float64) {
	share = 1
	if n.Y[p] == 0 {
		share = 0.5
	}
	return n.X[p] - k*side*n.Y[p], share
}

// podSection returns the net area cut from a pod of net maximum section
// amax [m2] with its inlet at x0, at x inside the pod: the profile
// Amax·16ξ²(1 − ξ)², ξ = (x − x0)/length (smooth at both ends; mean
// 8/15 Amax).
func (n *Nacelles) podSection(amax, x0, x float64) float64 {
	xi := (x - x0) / n.Length
	b := xi * (1 - xi)
	return amax * 16 * b * b
}

// addSurface adds the cross-section of a lifting surface's exposed part
// (|y| > root) cut by x = x[i] + k·y. Each spanwise strip is integrated
// exactly across its width with the chord held at its mid-strip value:
// along the cut the local chord position ξ varies linearly with y, so
// ∫ t dy = 20(t/c)c·Δy·[P(ξa) − P(ξb)]/(ξa − ξb) with P the integral of
// ξ²(1 − ξ)² (and likewise for the lift density with the integral of
// 6ξ(1 − ξ)). This keeps the sum smooth even when the cut is steep
// enough to separate neighbouring strips.
func addSurface(w *Wing, apex, root float64, strips int, k float64, x, s, planform []float64) {
	h := 0.5 * w.Span
	if root >= h {
		return
	}
	dy := (h - root) / float64(strips)
	tau := w.ThicknessRatio
	// the cuts of the two sides coincide when the slopes do (k = 0)
	slopeL, slopeR := w.tanLE+k, w.tanLE-k // side −1, +1
	mirror := slopeL == slopeR && math.Float64bits(slopeL) == math.Float64bits(slopeR)
	for j := 0; j < strips; j++ {
		ya := root + float64(j)*dy
		yb := ya + dy
		ch := w.ChordAt(0.5 * (ya + yb))
		a := 20 * tau * ch * dy
		for side := -1.0; side <= 1; side += 2 {
			// effective leading edge along the cut: x0 = apex + |y|(tanΛ − side·k)
			slope := slopeR
			if side < 0 {
				slope = slopeL
			}
			add := 1
			if mirror {
				add = 2 // both sides at once
			}
			xa := apex + ya*slope
			xb := apex + yb*slope
			lo, hi := min(xa, xb), max(xa, xb)+ch
			d := (xb - xa) / ch // ξa − ξb
			i := firstAbove(x, lo)
			if math.Abs(d) < 1e-9 {
				for ; i < len(x) && x[i] < hi; i++ {
					z := clamp01((x[i] - xa) / ch)
					q := z * (1 - z)
					v := a * q * q
					for n := 0; n < add; n++ {
						s[i] += v
					}
					if planform != nil {
						p := 6 * q * dy
						for n := 0; n < add; n++ {
							planform[i] += p
						}
					}
				}
			} else {
				addStripVolume(x, s, i, hi, xa, ch, d, a, mirror)
				if planform != nil {
					addStripLift(x, planform, i, hi, xa, ch, d, dy, mirror)
				}
			}
			if mirror {
				break
			}
		}
	}
}

// addStripVolume is the volume part of addSurface's sloped-cut loop for
// one strip side, from station i up to hi (twice: both sides at once).
func addStripVolume(x, s []float64, i int, hi, xa, ch, d, a float64, twice bool) {
	q1 := quintic(1)
	for ; i < len(x) && x[i] < hi; i++ {
		// quintic vanishes at z <= 0 and is constant at z >= 1
		za := (x[i] - xa) / ch
		zb := za - d
		pa, pb := q1, 0.0
		if za < 1 {
			pa = quintic(za)
		}
		if zb > 0 {
			pb = quintic(zb)
		}
		v := a * (pa - pb) / d
		s[i] += v
		if twice {
			s[i] += v
		}
	}
}

// addStripLift is the lift-density part of the same loop: 6·Δy·[C(ξa) −
// C(ξb)]/(ξa − ξb) with C the integral of ξ(1 − ξ) (cubic clamps ξ).
func addStripLift(x, planform []float64, i int, hi, xa, ch, d, dy float64, twice bool) {
	for ; i < len(x) && x[i] < hi; i++ {
		za := (x[i] - xa) / ch
		p := 6 * dy * (cubic(za) - cubic(za-d)) / d
		planform[i] += p
		if twice {
			planform[i] += p
		}
	}
}

// clamp01 clamps z to [0, 1] (z is finite here: plain comparisons, which
// unlike math.Max and math.Min need no NaN and signed-zero cases).
func clamp01(z float64) float64 {
	if z < 0 {
		return 0
	}
	if z > 1 {
		return 1
	}
	return z
}

// quintic is ∫₀^z ξ²(1 − ξ)² dξ = z³/3 − z⁴/2 + z⁵/5 with z clamped to [0, 1].
func quintic(z float64) float64 {
	z = clamp01(z)
	z3 := z * z * z
	return z3 * (1.0/3 - z/2 + z*z/5)
}

// cubic is ∫₀^z ξ(1 − ξ) dξ = z²/2 − z³/3 with z clamped to [0, 1].
func cubic(z float64) float64 {
	z = clamp01(z)
	return z * z * (0.5 - z/3)
}

// firstAbove returns the index of the first element of the ascending x
// greater than v (len(x) if none), by bisection.
func firstAbove(x []float64, v float64) int {
	lo, hi := 0, len(x)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if x[m] <= v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// addFin adds the vertical tail (one half of the mirrored pair stored in
// w), which lies in the plane of symmetry.
func addFin(w *Wing, apex float64, strips int, x, s []float64) {
	h := 0.5 * w.Span
	dy := h / float64(strips)
	tanLE := w.tanLE
	for j := 0; j < strips; j++ {
		y := (float64(j) + 0.5) * dy
		ch := w.ChordAt(y)
		lo := apex + y*tanLE
		a := 20 * w.ThicknessRatio * ch * dy
		for i := firstAbove(x, lo); i < len(x) && x[i] < lo+ch; i++ {
			xi := (x[i] - lo) / ch
			q := xi * (1 - xi)
			s[i] += a * q * q
		}
	}
}

// Geometry is the "geometry" discipline: it lays out the wing, fuselage
// and tails from the design parameters and outputs the dimensions the
// other disciplines use. The pods are sized by propulsion, so the volume,
// wetted area and maximum cross-section it reports are those of the
// airframe without pods (which keeps geometry out of the coupled loop);
// aerodynamics adds the pods. Beyond the names fixed for the aircraft it
// outputs wing.apex_x, wing.mac_y, wing.sweep_half_chord,
// wing.exposed_area, wing.fuel_volume, fuselage.nose_length,
// fuselage.tail_length, fuselage.cabin_length, fuselage.fineness,
// htail.span, htail.mac, htail.wetted_area, vtail.height, vtail.mac,
// vtail.wetted_area and aircraft.wetted_area, and the airframe's
// supersonic area rule at cruise.mach for aerodynamics: for each roll
// angle r of the average, geometry.area_rule_r_start and _length [m] (the
// Mach-plane cut range) and geometry.area_rule_r_a01 … a16 [m2] (Fourier
// coefficients ℓ·An of the area distribution; all zero below Mach 1).
type Geometry struct {
	opts GeometryOptions
	wave *WaveDragIntegrator
}

// NewGeometry returns the geometry discipline with the given layout
// options.
func NewGeometry(o GeometryOptions) *Geometry {
	return &Geometry{opts: o, wave: NewWaveDragIntegrator()}
}

// Options returns the layout options.
func (g *Geometry) Options() GeometryOptions { return g.opts }

// Name implements mdo.Discipline.
func (g *Geometry) Name() string { return "geometry" }

// Input indices of the geometry discipline.
const (
	geoInArea = iota
	geoInAspect
	geoInTaper
	geoInSweep
	geoInTC
	geoInPosition
	geoInHTailVolume
	geoInVTailVolume
	geoInPassengers
	geoInAbreast
	geoInPitch
	geoInAisles
	geoInNoseFineness
	geoInTailFineness
	geoInMach
	geoNumIn
)

// Output indices of the geometry discipline.
const (
	geoOutSpan = iota
	geoOutRootChord
	geoOutTipChord
	geoOutMAC
	geoOutMACX
	geoOutMACY
	geoOutApexX
	geoOutSweepLE
	geoOutSweepHalf
	geoOutWingWetted
	geoOutWingExposed
	geoOutFuelVolume
	geoOutFusLength
	geoOutFusDiameter
	geoOutFusWetted
	geoOutNoseLength
	geoOutTailLength
	geoOutCabinLength
	geoOutFineness
	geoOutHTailArea
	geoOutVTailArea
	geoOutHTailArm
	geoOutVTailArm
	geoOutHTailSpan
	geoOutHTailMAC
	geoOutHTailWetted
	geoOutVTailHeight
	geoOutVTailMAC
	geoOutVTailWetted
	geoOutVolume
	geoOutMaxSection
	geoOutWetted
	geoOutClearance
	geoOutTailSpanRatio
	geoOutWingOverhang
	geoOutTailOverhang
	geoOutWave // RollAngles × (start, length, waveHarmonics coefficients)
	geoNumOut  = geoOutWave + RollAngles*areaRulePerRoll
)

// areaRulePerRoll is the number of area-rule variables per roll angle.
const areaRulePerRoll = 2 + waveHarmonics

// areaRuleVars returns the specifications of the airframe area-rule
// variables, RollAngles × (start, length, coefficients).
func areaRuleVars() []mdo.Var {
	out := make([]mdo.Var, 0, RollAngles*areaRulePerRoll)
	for r := 1; r <= RollAngles; r++ {
		p := fmt.Sprintf("geometry.area_rule_%d_", r)
		out = append(out,
			mdo.Var{Name: p + "start", Unit: "m", Description: fmt.Sprintf("start of the Mach-plane cuts, roll angle %d, cruise Mach", r), Default: 0, Scale: 10},
			mdo.Var{Name: p + "length", Unit: "m", Description: fmt.Sprintf("length of the Mach-plane cut range, roll angle %d, cruise Mach", r), Default: 30, Scale: 10})
		for m := 1; m <= waveHarmonics; m++ {
			out = append(out, mdo.Var{Name: fmt.Sprintf("%sa%02d", p, m), Unit: "m2",
				Description: fmt.Sprintf("airframe area-rule Fourier coefficient %d (ℓ·A%d), roll angle %d", m, m, r), Default: 0, Scale: 1})
		}
	}
	return out
}

// packAreaRule writes aw into out in the order of areaRuleVars.
func packAreaRule(aw *AirframeWave, out []float64) {
	k := 0
	for r := 0; r < RollAngles; r++ {
		out[k], out[k+1] = aw.Start[r], aw.Length[r]
		k += 2
		k += copy(out[k:k+waveHarmonics], aw.A[r][:])
	}
}

// unpackAreaRule reads aw from in (order of areaRuleVars).
func unpackAreaRule(in []float64, mach float64, aw *AirframeWave) {
	aw.Mach = mach
	k := 0
	for r := 0; r < RollAngles; r++ {
		aw.Start[r], aw.Length[r] = in[k], in[k+1]
		k += 2
		k += copy(aw.A[r][:], in[k:k+waveHarmonics])
	}
}

// Parameter specifications shared by geometry and aerodynamics.
func wingParamVars() [6]mdo.Var {
	return [6]mdo.Var{
		{Name: "wing.area", Unit: "m2", Description: "wing reference (trapezoidal) area", Default: 110, Min: 1, Max: 2000, Scale: 100},
		{Name: "wing.aspect_ratio", Unit: "-", Description: "wing aspect ratio b²/S", Default: 3, Min: 0.5, Max: 20},
		{Name: "wing.taper", Unit: "-", Description: "wing taper ratio (tip / root chord)", Default: 0.15, Min: 0, Max: 1},
		{Name: "wing.sweep", Unit: "deg", Description: "wing quarter-chord sweep (negative = forward)", Default: 50, Min: -70, Max: 70, Scale: 10},
		{Name: "wing.thickness_ratio", Unit: "-", Description: "wing thickness / chord", Default: 0.035, Min: 0.01, Max: 0.25, Scale: 0.01},
		{Name: "wing.position", Unit: "-", Description: "wing apex x / fuselage length", Default: 0.40, Min: 0.05, Max: 0.9},
	}
}

// airframeShapeVars returns the fuselage and tail inputs that both
// aerodynamics disciplines take right after the wing parameters, in that
// order: fuselage length, diameter, nose and tail-cone lengths, tail areas.
func airframeShapeVars() [6]mdo.Var {
	return [6]mdo.Var{
		{Name: "fuselage.length", Unit: "m", Description: "fuselage length", Default: 22, Min: 0, Max: 200},
		{Name: "fuselage.diameter", Unit: "m", Description: "fuselage outer diameter", Default: 1.9, Min: 0, Max: 20},
		{Name: "fuselage.nose_length", Unit: "m", Description: "nose cone length", Default: 6.5, Min: 0, Max: 100},
		{Name: "fuselage.tail_length", Unit: "m", Description: "tail cone length", Default: 7.5, Min: 0, Max: 100},
		{Name: "htail.area", Unit: "m2", Description: "horizontal-tail area", Default: 20, Min: 0, Max: 1000},
		{Name: "vtail.area", Unit: "m2", Description: "vertical-tail (fin) area", Default: 15, Min: 0, Max: 1000},
	}
}

// Inputs implements mdo.Discipline.
func (g *Geometry) Inputs() []mdo.Var {
	in := make([]mdo.Var, geoNumIn)
	w := wingParamVars()
	copy(in, w[:])
	in[geoInHTailVolume] = mdo.Var{Name: "htail.volume", Unit: "-", Description: "horizontal-tail volume coefficient S_h·l_h/(S·c̄)", Default: 0.15, Min: MinHTailVolume, Max: 3}
	in[geoInVTailVolume] = mdo.Var{Name: "vtail.volume", Unit: "-", Description: "vertical-tail volume coefficient S_v·l_v/(S·b)", Default: 0.05, Min: 0.005, Max: 1}
	in[geoInPassengers] = mdo.Var{Name: "cabin.passengers", Unit: "-", Description: "passenger seats (rounded)", Default: 12, Min: 1, Max: 800, Scale: 10}
	in[geoInAbreast] = mdo.Var{Name: "cabin.seats_abreast", Unit: "-", Description: "seats per row (rounded; 14 CFR 25.817: at most 6 with one aisle; 12 with two is this layout's limit)", Default: 2, Min: 1, Max: 12}
	in[geoInAisles] = mdo.Var{Name: "cabin.aisles", Unit: "-", Description: "aisles of the cabin (rounded: 1 or 2)", Default: 1, Min: 1, Max: 2}
	in[geoInPitch] = mdo.Var{Name: "cabin.seat_pitch", Unit: "m", Description: "seat pitch", Default: 0.95, Min: 0.5, Max: 2.5}
	in[geoInNoseFineness] = mdo.Var{Name: "fuselage.nose_fineness", Unit: "-", Description: "nose cone length / fuselage diameter", Default: 3.5, Min: 0.5, Max: 10}
	in[geoInTailFineness] = mdo.Var{Name: "fuselage.tail_fineness", Unit: "-", Description: "tail cone length / fuselage diameter", Default: 4, Min: 0.5, Max: 10}
	in[geoInMach] = mdo.Var{Name: "cruise.mach", Unit: "-", Description: "cruise Mach number", Default: 1.5, Min: 0.3, Max: MaxMach}
	return in
}

// Outputs implements mdo.Discipline.
func (g *Geometry) Outputs() []mdo.Var {
	o := make([]mdo.Var, geoNumOut)
	m := func(i int, name, unit, desc string, def, lo, hi float64) {
		o[i] = mdo.Var{Name: name, Unit: unit, Description: desc, Default: def, Min: lo, Max: hi}
	}
	m(geoOutSpan, "wing.span", "m", "wing span", 18, 0, 200)
	m(geoOutRootChord, "wing.root_chord", "m", "wing centre-line chord", 10, 0, 100)
	m(geoOutTipChord, "wing.tip_chord", "m", "wing tip chord", 1.5, 0, 100)
	m(geoOutMAC, "wing.mac", "m", "wing mean aerodynamic chord", 7, 0, 100)
	m(geoOutMACX, "wing.mac_x", "m", "leading edge of the MAC from the nose", 14, 0, 300)
	m(geoOutMACY, "wing.mac_y", "m", "spanwise station of the MAC", 3.3, 0, 100)
	m(geoOutApexX, "wing.apex_x", "m", "wing apex from the nose", 9, 0, 300)
	m(geoOutSweepLE, "wing.sweep_le", "deg", "leading-edge sweep", 55, -90, 90)
	m(geoOutSweepHalf, "wing.sweep_half_chord", "deg", "half-chord sweep", 45, -90, 90)
	m(geoOutWingWetted, "wing.wetted_area", "m2", "wetted area of the exposed wing", 180, 0, 1e4)
	m(geoOutWingExposed, "wing.exposed_area", "m2", "wing planform outside the fuselage", 90, 0, 5000)
	m(geoOutFuelVolume, "wing.fuel_volume", "m3", "wing-box fuel volume (Torenbeek)", 20, 0, 2000)
	m(geoOutFusLength, "fuselage.length", "m", "fuselage length", 22, 0, 200)
	m(geoOutFusDiameter, "fuselage.diameter", "m", "fuselage outer diameter", 1.9, 0, 20)
	m(geoOutFusWetted, "fuselage.wetted_area", "m2", "fuselage wetted area", 105, 0, 1e4)
	m(geoOutNoseLength, "fuselage.nose_length", "m", "nose cone length", 6.5, 0, 100)
	m(geoOutTailLength, "fuselage.tail_length", "m", "tail cone length", 7.5, 0, 100)
	m(geoOutCabinLength, "fuselage.cabin_length", "m", "cylindrical cabin length", 7.7, 0, 150)
	m(geoOutFineness, "fuselage.fineness", "-", "fuselage length / diameter", 11.6, 0, 100)
	m(geoOutHTailArea, "htail.area", "m2", "horizontal-tail area", 20, 0, 1000)
	m(geoOutVTailArea, "vtail.area", "m2", "vertical-tail (fin) area", 15, 0, 1000)
	m(geoOutHTailArm, "htail.arm", "m", "wing to horizontal-tail MAC quarter chord", 6, 0, 200)
	m(geoOutVTailArm, "vtail.arm", "m", "wing to vertical-tail MAC quarter chord", 5, 0, 200)
	m(geoOutHTailSpan, "htail.span", "m", "horizontal-tail span", 7, 0, 100)
	m(geoOutHTailMAC, "htail.mac", "m", "horizontal-tail mean aerodynamic chord", 2.8, 0, 50)
	m(geoOutHTailWetted, "htail.wetted_area", "m2", "horizontal-tail wetted area", 35, 0, 2000)
	m(geoOutVTailHeight, "vtail.height", "m", "vertical-tail height", 4, 0, 50)
	m(geoOutVTailMAC, "vtail.mac", "m", "vertical-tail mean aerodynamic chord", 4, 0, 50)
	m(geoOutVTailWetted, "vtail.wetted_area", "m2", "vertical-tail wetted area", 30, 0, 2000)
	m(geoOutVolume, "aircraft.volume", "m3", "airframe volume without pods", 65, 0, 1e5)
	m(geoOutMaxSection, "aircraft.max_cross_section", "m2", "largest normal cross-section of the airframe without pods", 5, 0, 1000)
	m(geoOutWetted, "aircraft.wetted_area", "m2", "airframe wetted area without pods", 350, 0, 1e5)
	m(geoOutClearance, "layout.wing_tail_clearance", "m", "least gap from the wing trailing edge to the horizontal-tail leading edge (negative = overlap in the top view)", 2, -200, 200)
	m(geoOutTailSpanRatio, "layout.tail_span_ratio", "-", "horizontal-tail span over wing span", 0.4, 0, 10)
	m(geoOutWingOverhang, "layout.wing_overhang", "m", "wing's aft-most point behind the fuselage end (negative = inside)", -3, -200, 200)
	m(geoOutTailOverhang, "layout.tail_overhang", "m", "tails' aft-most point behind the fuselage end (negative = inside)", 1, -200, 200)
	copy(o[geoOutWave:], areaRuleVars())
	return o
}

// roundCount returns x rounded to the nearest integer.
func roundCount(x float64) int { return int(math.Round(x)) }

// Layout builds the airframe configuration (no pods) from the geometry
// discipline's inputs, in the order of Inputs.
func (g *Geometry) Layout(in []float64) (Configuration, error) {
	w, err := NewWing(in[geoInArea], in[geoInAspect], in[geoInTaper], in[geoInSweep], in[geoInTC])
	if err != nil {
		return Configuration{}, err
	}
	f, err := NewFuselage(Cabin{
		Passengers: roundCount(in[geoInPassengers]), SeatsAbreast: roundCount(in[geoInAbreast]),
		Aisles:    roundCount(in[geoInAisles]),
		SeatPitch: in[geoInPitch], SeatWidth: g.opts.SeatWidth,
	}, in[geoInNoseFineness], in[geoInTailFineness])
	if err != nil {
		return Configuration{}, err
	}
	return NewConfiguration(ConfigurationSpec{
		Wing: w, WingPosition: in[geoInPosition], Fuselage: f,
		HTailVolume: in[geoInHTailVolume], VTailVolume: in[geoInVTailVolume],
	}, g.opts)
}

// Compute implements mdo.Discipline. It allocates nothing.
func (g *Geometry) Compute(in, out []float64) error {
	c, err := g.Layout(in)
	if err != nil {
		return err
	}
	w := &c.Wing
	f := &c.Fuselage
	out[geoOutSpan] = w.Span
	out[geoOutRootChord] = w.RootChord
	out[geoOutTipChord] = w.TipChord
	out[geoOutMAC] = w.MAC
	out[geoOutMACX] = c.WingApex + w.MACX
	out[geoOutMACY] = w.MACY
	out[geoOutApexX] = c.WingApex
	out[geoOutSweepLE] = w.SweepLE
	out[geoOutSweepHalf] = w.SweepAt(0.5)
	sw, sf, sh, sv, _ := c.WettedAreas()
	out[geoOutWingWetted] = sw
	out[geoOutWingExposed] = w.ExposedArea(f.Diameter)
	out[geoOutFuelVolume] = w.FuelVolume()
	out[geoOutFusLength] = f.Length
	out[geoOutFusDiameter] = f.Diameter
	out[geoOutFusWetted] = sf
	out[geoOutNoseLength] = f.NoseLength
	out[geoOutTailLength] = f.TailLength
	out[geoOutCabinLength] = f.CabinLength
	out[geoOutFineness] = f.Fineness
	out[geoOutHTailArea] = c.HTailArea()
	out[geoOutVTailArea] = c.VTailArea()
	out[geoOutHTailArm] = c.HTailArm()
	out[geoOutVTailArm] = c.VTailArm()
	out[geoOutHTailSpan] = c.HTail.Span
	out[geoOutHTailMAC] = c.HTail.MAC
	out[geoOutHTailWetted] = sh
	out[geoOutVTailHeight] = 0.5 * c.VTail.Span
	out[geoOutVTailMAC] = c.VTail.MAC
	out[geoOutVTailWetted] = sv
	out[geoOutVolume] = c.Volume()
	out[geoOutMaxSection] = c.MaxCrossSection()
	out[geoOutWetted] = sw + sf + sh + sv
	out[geoOutClearance] = min(c.WingTailClearance(), 200)
	out[geoOutTailSpanRatio] = c.TailSpanRatio()
	out[geoOutWingOverhang] = c.WingOverhang()
	out[geoOutTailOverhang] = c.TailOverhang()
	mach := in[geoInMach]
	if !(mach >= 0 && mach <= MaxMach) {
		return inputErr("cruise.mach", mach, "", "[0, 2.5]")
	}
	aw := g.wave.AirframeWave(&c, mach)
	packAreaRule(&aw, out[geoOutWave:])
	return nil
}

// MaxCrossSection returns the largest normal cross-section area [m2] at
// WaveStations stations along the aircraft.
func (c *Configuration) MaxCrossSection() float64 {
	var x, s [WaveStations]float64
	lo, hi := c.CutRange(0)
	for i := range x {
		x[i] = lo + (hi-lo)*(float64(i)+0.5)/WaveStations
	}
	c.AreaDistribution(0, x[:], s[:], nil)
	m := 0.0
	for _, v := range s {
		m = math.Max(m, v)
	}
	return m
}
