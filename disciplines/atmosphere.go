package disciplines

import (
	"math"
)

// U.S. Standard Atmosphere 1976 constants (identical to ICAO / ISO 2533
// below 32 km).
const (
	// G0 is the standard acceleration of gravity [m/s2].
	G0 = 9.80665
	// RAir is the specific gas constant of dry air, R*/M0 [J/(kg K)] (ISO 2533).
	RAir = 287.05287
	// Gamma is the ratio of specific heats of air.
	Gamma = 1.4
	// EarthRadius is the effective earth radius r0 of the geopotential
	// conversion [m].
	EarthRadius = 6356766.0
	// SeaLevelTemperature is the standard sea-level temperature [K].
	SeaLevelTemperature = 288.15
	// SeaLevelPressure is the standard sea-level pressure [Pa].
	SeaLevelPressure = 101325.0
	// SeaLevelDensity is the standard sea-level density [kg/m3].
	SeaLevelDensity = SeaLevelPressure / (RAir * SeaLevelTemperature)

	// AtmosphereMinAltitude and AtmosphereMaxAltitude bound the geometric
	// altitude [m] the standard atmosphere is defined for.
	AtmosphereMinAltitude = -5000.0
	AtmosphereMaxAltitude = 86000.0

	// Sutherland's law constants: μ = SutherlandBeta·T^1.5/(T + SutherlandS).
	SutherlandBeta = 1.458e-6
	SutherlandS    = 110.4
)

// Atmosphere is the state of the air at one altitude.
type Atmosphere struct {
	Temperature  float64 // kinetic temperature T [K]
	Pressure     float64 // static pressure p [Pa]
	Density      float64 // density ρ [kg/m3]
	SpeedOfSound float64 // a [m/s]
	Viscosity    float64 // dynamic viscosity μ [Pa s]
	Geopotential float64 // geopotential altitude H [m]
}

// KinematicViscosity returns ν = μ/ρ [m2/s].
func (a Atmosphere) KinematicViscosity() float64 { return a.Viscosity / a.Density }

// DynamicPressure returns q = ½ρV² = ½γpM² [Pa] at Mach number mach.
func (a Atmosphere) DynamicPressure(mach float64) float64 {
	return 0.5 * Gamma * a.Pressure * mach * mach
}

// Reynolds returns the Reynolds number per metre at Mach number mach [1/m].
func (a Atmosphere) Reynolds(mach float64) float64 {
	return a.Density * mach * a.SpeedOfSound / a.Viscosity
}

// atmLayer is one layer of the 1976 standard below 84.852 km geopotential.
type atmLayer struct {
	h, t, p, lapse float64 // base geopotential altitude, base T, base p, dT/dH [K/m]
}

// stdLayer returns layer i (0…7) of the 1976 standard. The base
// pressures were integrated from the hydrostatic equation layer by layer
// from 101 325 Pa (a test checks the continuity of p at every boundary).
func stdLayer(i int) atmLayer {
	switch i {
	case 0:
		return atmLayer{0, 288.15, 101325, -6.5e-3}
	case 1:
		return atmLayer{11000, 216.65, 22632.040095007789, 0}
	case 2:
		return atmLayer{20000, 216.65, 5474.8774242810432, 1.0e-3}
	case 3:
		return atmLayer{32000, 228.65, 868.01577662021418, 2.8e-3}
	case 4:
		return atmLayer{47000, 270.65, 110.90577336731003, 0}
	case 5:
		return atmLayer{51000, 270.65, 66.938528121179729, -2.8e-3}
	case 6:
		return atmLayer{71000, 214.65, 3.956392160396605, -2.0e-3}
	}
	return atmLayer{84852, 186.946, 0.37338030188215005, 0}
}

// layerTP returns the molecular-scale temperature and the pressure at
// geopotential altitude h inside layer l.
func layerTP(l atmLayer, h float64) (float64, float64) {
	dh := h - l.h
	if l.lapse == 0 {
		return l.t, l.p * math.Exp(-G0*dh/(RAir*l.t))
	}
	t := l.t + l.lapse*dh
	return t, l.p * math.Pow(t/l.t, -G0/(RAir*l.lapse))
}

// molecularWeightRatio returns M/M0 of the 1976 standard from 80 to 86
// km geometric in 500 m steps (Table 8 of the standard, from memory). The
// kinetic temperature is the molecular-scale temperature times this ratio.
func molecularWeightRatio() [13]float64 {
	return [13]float64{
		1.000000, 0.999996, 0.999989, 0.999971, 0.999941, 0.999909, 0.999870,
		0.999829, 0.999786, 0.999741, 0.999694, 0.999641, 0.999579,
	}
}

// GeopotentialAltitude converts geometric altitude z [m] to geopotential
// altitude H = r0·z/(r0 + z) [m].
func GeopotentialAltitude(z float64) float64 { return EarthRadius * z / (EarthRadius + z) }

// GeometricAltitude converts geopotential altitude H [m] to geometric
// altitude z = r0·H/(r0 − H) [m].
func GeometricAltitude(h float64) float64 { return EarthRadius * h / (EarthRadius - h) }

// SutherlandViscosity returns the dynamic viscosity of air at temperature
// t [K] by Sutherland's law, μ = 1.458e-6·T^1.5/(T + 110.4) [Pa s].
func SutherlandViscosity(t float64) float64 {
	return SutherlandBeta * t * math.Sqrt(t) / (t + SutherlandS)
}

// StandardAtmosphere returns the U.S. Standard Atmosphere 1976 at
// geometric altitude z [m], valid for z in [-5 000, 86 000] m.
func StandardAtmosphere(z float64) (Atmosphere, error) {
	return OffsetAtmosphere(z, 0)
}

// OffsetAtmosphere returns the standard atmosphere at geometric altitude z
// [m] on a day dT [K] hotter (dT > 0) or colder than standard: the
// temperature is shifted by dT, the pressure is that of the standard at
// the same altitude, the density follows from the gas law and the speed
// of sound and viscosity from the shifted temperature. dT must lie in
// [-100, 100] K.
func OffsetAtmosphere(z, dT float64) (Atmosphere, error) {
	if !(z >= AtmosphereMinAltitude && z <= AtmosphereMaxAltitude) {
		return Atmosphere{}, inputErr("altitude", z, "m", "[-5000, 86000] geometric (U.S. Standard Atmosphere 1976)")
	}
	if !(dT >= -100 && dT <= 100) {
		return Atmosphere{}, inputErr("temperature_offset", dT, "K", "[-100, 100]")
	}
	h := GeopotentialAltitude(z)
	i := 6
	for i > 0 && h < stdLayer(i).h {
		i--
	}
	tm, p := layerTP(stdLayer(i), h)
	t := tm
	if z > 80000 {
		mw := molecularWeightRatio()
		f := (z - 80000) / 500
		k := int(f)
		if k >= len(mw)-1 {
			k = len(mw) - 2
		}
		r := mw[k] + (f-float64(k))*(mw[k+1]-mw[k])
		t = tm * r
	}
	// R*T/M = R0·Tm: density and speed of sound use the molecular-scale
	// temperature with the sea-level gas constant.
	tm += dT
	t += dT
	return Atmosphere{
		Temperature:  t,
		Pressure:     p,
		Density:      p / (RAir * tm),
		SpeedOfSound: math.Sqrt(Gamma * RAir * tm),
		Viscosity:    SutherlandViscosity(t),
		Geopotential: h,
	}, nil
}
