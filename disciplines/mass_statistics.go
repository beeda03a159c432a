package disciplines

import (
	"fmt"
	"math"
)

// AircraftClass is the class of an aircraft in the published empty-mass
// statistics.
type AircraftClass int

// The aircraft classes of the empty-mass statistics.
const (
	// ClassJetTransport: subsonic jet transports and regional jets.
	ClassJetTransport AircraftClass = iota + 1
	// ClassBusinessJet: business jets, subsonic or supersonic.
	ClassBusinessJet
	// ClassSupersonicCruise: supersonic cruise airliners.
	ClassSupersonicCruise
)

// String returns the class name.
func (c AircraftClass) String() string {
	switch c {
	case ClassJetTransport:
		return "jet transport"
	case ClassBusinessJet:
		return "business jet"
	case ClassSupersonicCruise:
		return "supersonic cruise airplane"
	}
	return fmt.Sprintf("AircraftClass(%d)", int(c))
}

// roskamRow holds A, B of log10 W_TO = A + B·log10 W_E (lb) of J. Roskam,
// "Airplane Design, Part I: Preliminary Sizing of Airplanes", Table 2.15
// (from memory).
func (c AircraftClass) roskamRow() (a, b float64, ok bool) {
	switch c {
	case ClassJetTransport:
		return 0.0833, 1.0383, true
	case ClassBusinessJet:
		return 0.2678, 0.9979, true
	case ClassSupersonicCruise:
		return 0.4221, 0.9876, true
	}
	return 0, 0, false
}

// EmptyMassRegression returns the empty mass [kg] of an aircraft of the
// class at take-off mass w0 [kg] by Roskam's regression,
// W_E = 10^((log10 W_TO − A)/B) in lb (Airplane Design Part I, Table 2.15;
// from memory): jet transports A = 0.0833, B = 1.0383; business jets
// 0.2678, 0.9979; supersonic cruise airplanes 0.4221, 0.9876. Roskam's
// empty mass excludes the crew and the trapped fuel and oil.
func (c AircraftClass) EmptyMassRegression(w0 float64) (float64, error) {
	a, b, ok := c.roskamRow()
	if !ok {
		return 0, inputErr("aircraft class", float64(c), "", "ClassJetTransport, ClassBusinessJet or ClassSupersonicCruise")
	}
	if !(w0 > 0) || math.IsInf(w0, 0) {
		return 0, inputErr("mass.takeoff", w0, "kg", "> 0")
	}
	return unitLb * math.Pow(10, (math.Log10(w0/unitLb)-a)/b), nil
}

// EmptyMassPerSeatBand returns the common-practice band of the operating
// empty mass per passenger seat [kg] of the class (from memory, no
// source): single-aisle and regional jet transports about 220–320 kg (a
// densely seated 189-seat single aisle about 220, regional jets of
// 76–100 seats about 240–290, a 200-seat single aisle about 290);
// business jets about 450–2 000 kg (light jets of 7–9 seats about
// 480–600, mid-size jets about 650–1 100, the large-cabin long-range
// jets about 1 300–1 700); supersonic airliners about 700–1 500 kg
// (Concorde about 790 kg, 78.7 t for 100 seats; fewer seats carry more
// per seat). The wide bodies have a band of their own in the checklist.
func (c AircraftClass) EmptyMassPerSeatBand() (lo, hi float64) {
	switch c {
	case ClassJetTransport:
		return 220, 320
	case ClassBusinessJet:
		return 450, 2000
	case ClassSupersonicCruise:
		return 700, 1500
	}
	return math.NaN(), math.NaN()
}

// Common-practice bands of the figures a designer reads a solved aircraft
// of the class against (from memory, no source; the designer's checklist
// flags a value outside them). Take-off mass: jet transports from the
// regional jets (the smallest about 19 t) to the wide bodies about 15–600 t; business jets about
// 5–55 t (the supersonic business-jet studies at the top); supersonic
// airliners about 30–400 t. Mission fuel over take-off mass: jet
// transports about 0.12–0.45 (regional to long range); business jets
// about 0.25–0.55 (supersonic ones near the top); supersonic airliners
// about 0.35–0.60 (one supersonic airliner in service carried about half
// its take-off mass as fuel). FAR 25 take-off field length: jet
// transports about 1 100–3 000 m; business jets about 900–3 000 m;
// supersonic airliners about 1 800–3 700 m. Landing field length
// (121.195(b)): jet transports about 1 000–2 200 m; business jets about
// 800–2 200 m; supersonic airliners about 1 400–2 600 m. Wing loading at
// take-off: jet transports about 350–820 kg/m² (regional jets about
// 430–550, long-range wide bodies 600–800); business jets about
// 200–550 kg/m² (light jets about 250, the largest about 530);
// supersonic airliners about 300–600 kg/m² (one in service about 520).
// Take-off thrust (all engines, static) over weight: jet transports
// about 0.22–0.40 (four-engine long range at the bottom, short-haul
// twins about 0.3); business jets about 0.28–0.55 (subsonic about
// 0.34–0.42, the supersonic business-jet studies near the top);
// supersonic airliners about 0.30–0.50 (one in service about 0.37 with
// reheat).
type classBands struct {
	takeoffMass, fuelFraction, takeoffField, landingField, wingLoading, thrustWeight [2]float64
}

// bands returns the class's common-practice bands (NaN for no class).
func (c AircraftClass) bands() classBands {
	switch c {
	case ClassJetTransport:
		return classBands{[2]float64{15e3, 600e3}, [2]float64{0.12, 0.45}, [2]float64{1100, 3000}, [2]float64{1000, 2200},
			[2]float64{350, 820}, [2]float64{0.22, 0.40}}
	case ClassBusinessJet:
		return classBands{[2]float64{5e3, 55e3}, [2]float64{0.25, 0.55}, [2]float64{900, 3000}, [2]float64{800, 2200},
			[2]float64{200, 550}, [2]float64{0.28, 0.55}}
	case ClassSupersonicCruise:
		return classBands{[2]float64{30e3, 400e3}, [2]float64{0.35, 0.60}, [2]float64{1800, 3700}, [2]float64{1400, 2600},
			[2]float64{300, 600}, [2]float64{0.30, 0.50}}
	}
	n := [2]float64{math.NaN(), math.NaN()}
	return classBands{n, n, n, n, n, n}
}

// cruiseBands returns the common-practice bands of the cruise
// lift-to-drag ratio and TSFC [kg/(N s)] at cruise Mach number mach
// (from memory, no source): subsonic jets cruise at L/D about 12–20 on
// turbofans of 0.5–0.88 lb/(lbf h) (1.4e-5–2.5e-5 kg/(N s); high-bypass
// about 0.5, low-bypass about 0.8 in the conceptual-design textbooks'
// tables); supersonic cruise at L/D about 6–11 on low-bypass engines or
// turbojets of 0.8–1.3 lb/(lbf h) (2.3e-5–3.7e-5 kg/(N s)).
func cruiseBands(mach float64) (ld, tsfc [2]float64) {
	if mach > 1 {
		return [2]float64{6, 11}, [2]float64{2.3e-5, 3.7e-5}
	}
	return [2]float64{12, 20}, [2]float64{1.4e-5, 2.5e-5}
}

// EmptyMassCalibration returns the factor weights.calibration of the
// class: the statistical equations of weights.go (Raymer's
// cargo/transport group, Torenbeek's flight controls) assembled into the
// aircraft model fall short of, or exceed, the published statistics of
// the class, and this factor on every statistical component (not the
// engines, crew or payload) brings the demonstration aircraft of the class
// within them. Fitted to the scenarios (a calibration, not a published
// value):
//
//   - jet transport 1.3: the model's 76-seat regional jet weighed
//     187 kg of operating empty mass per seat against the 240–290 kg of
//     regional jets (common practice), 13 % below Roskam's empty-mass
//     regression; the furnishings, equipment and operator's items of a
//     passenger cabin that the cargo/transport equations leave out are
//     the most of it;
//   - business jet 1.0: the supersonic business jets lie within 10 % of
//     Roskam's business-jet regression (about 7–10 % below: a supersonic
//     business jet carries a larger fuel fraction than the subsonic
//     business jets of the regression); a higher factor makes the
//     7 000 km Swiftlet's mass closure run away (heavier engines need
//     more fuel, which needs more engine) for a 10 % thrust margin or a
//     hot day, so none is applied;
//   - supersonic cruise 0.85: the 30-seat supersonic airliner lay 15 %
//     above Roskam's supersonic-cruise regression, whose aircraft are
//     built lighter than the equations' subsonic transports.
func EmptyMassCalibration(c AircraftClass) float64 {
	switch c {
	case ClassJetTransport:
		return 1.3
	case ClassBusinessJet:
		return 1.0
	case ClassSupersonicCruise:
		return 0.85
	}
	return 1
}
