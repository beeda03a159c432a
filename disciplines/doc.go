// Package disciplines holds the aircraft analyses of Couplet and the
// assembled aircraft built from them.
//
// Each analysis is written twice over, in two layers: the physics as plain
// exported functions and types (Wing, NewFuselage, LiftSlope, the engine
// cycle, the mission segments, the statistical masses, the neutral point),
// each naming the published method it implements, and a thin
// mdo.Discipline around them (Geometry, Aerodynamics, Propulsion, Mission,
// Weights, Stability, …) that declares its variables with units, defaults
// and validity ranges. AircraftDisciplines lists the disciplines of the
// whole aircraft in their order and NewAircraft couples them into one
// mdo.System; Scenarios returns invented demonstration aircraft with their
// parameters and starting guesses.
//
// Lengths are in metres with x aft from the fuselage nose, masses in kg,
// forces in N, sweep angles in degrees (negative = forward). Every result
// is a conceptual estimate, not for certification, flight or airworthiness
// decisions.
package disciplines
