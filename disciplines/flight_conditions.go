package disciplines

import "couplet/mdo"

// FlightConditions is the "flight_conditions" discipline: the air at the
// mission's fixed flight conditions, which depends on the design
// parameters only and is evaluated once before the coupled loop — the
// cruise true airspeed (cruise.mach times the speed of sound of the
// standard day at cruise.altitude) and the density and speed of sound at
// the airport (airport.elevation on a day airport.temperature_offset off
// standard), by OffsetAtmosphere (U.S. Standard Atmosphere 1976).
// Propulsion and mission read them inside the loop instead of
// evaluating the atmosphere at every sweep.
//
// Variables: inputs cruise.mach, cruise.altitude, airport.elevation,
// airport.temperature_offset; outputs cruise.true_airspeed,
// airport.density, airport.speed_of_sound.
type FlightConditions struct{}

// NewFlightConditions returns the flight_conditions discipline.
func NewFlightConditions() *FlightConditions { return &FlightConditions{} }

// Name implements mdo.Discipline.
func (f *FlightConditions) Name() string { return "flight_conditions" }

// Indices of the flight_conditions discipline's variables.
const (
	fcInMach = iota
	fcInAltitude
	fcInAirportElevation
	fcInAirportDT
	fcNumIn
)

const (
	fcOutCruiseSpeed = iota
	fcOutAirportDensity
	fcOutAirportSound
	fcNumOut
)

// Inputs implements mdo.Discipline.
func (f *FlightConditions) Inputs() []mdo.Var {
	in := make([]mdo.Var, fcNumIn)
	in[fcInMach] = cruiseMachVar()
	in[fcInAltitude] = cruiseAltitudeVar()
	in[fcInAirportElevation] = airportElevationVar()
	in[fcInAirportDT] = airportDTVar()
	return in
}

// Outputs implements mdo.Discipline.
func (f *FlightConditions) Outputs() []mdo.Var {
	out := make([]mdo.Var, fcNumOut)
	out[fcOutCruiseSpeed] = cruiseSpeedVar()
	out[fcOutAirportDensity] = airportDensityVar()
	out[fcOutAirportSound] = airportSoundVar()
	return out
}

// Specifications of the flight-condition variables (shared by the
// producer and its consumers). The ranges hold every value the ranges of
// the inputs allow.
func cruiseSpeedVar() mdo.Var {
	return mdo.Var{Name: "cruise.true_airspeed", Unit: "m/s", Description: "cruise true airspeed (cruise.mach at cruise.altitude, standard day)", Default: 442.6, Min: 10, Max: 1000, Scale: 100}
}

func airportDensityVar() mdo.Var {
	return mdo.Var{Name: "airport.density", Unit: "kg/m3", Description: "air density at the airport (elevation and temperature offset)", Default: 1.225, Min: 0.05, Max: 2}
}

func airportSoundVar() mdo.Var {
	return mdo.Var{Name: "airport.speed_of_sound", Unit: "m/s", Description: "speed of sound at the airport (elevation and temperature offset)", Default: 340.3, Min: 150, Max: 450, Scale: 100}
}

// Compute implements mdo.Discipline. It allocates nothing.
func (f *FlightConditions) Compute(in, out []float64) error {
	if len(in) != fcNumIn || len(out) != fcNumOut {
		return inputErr("flight_conditions.inputs", float64(len(in)), "", "the declared inputs and outputs")
	}
	cruise, err := OffsetAtmosphere(in[fcInAltitude], 0)
	if err != nil {
		return renameInput(err, "cruise.altitude")
	}
	apt, err := OffsetAtmosphere(in[fcInAirportElevation], in[fcInAirportDT])
	if err != nil {
		return renameInput(err, "airport.elevation")
	}
	out[fcOutCruiseSpeed] = in[fcInMach] * cruise.SpeedOfSound
	out[fcOutAirportDensity] = apt.Density
	out[fcOutAirportSound] = apt.SpeedOfSound
	return nil
}
