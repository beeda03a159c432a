package external

import "fmt"

// unit is a unit known to Convert: its factor to the SI unit of its
// quantity.
type unit struct {
	quantity string
	toSI     float64
}

// units are the units Convert knows. The factors are exact definitions:
// the international foot (0.3048 m) and pound (0.45359237 kg) of the 1959
// yard and pound agreement, standard gravity 9.80665 m/s² for the
// pound-force (3rd CGPM, 1901) and the nautical mile of 1852 m (NIST SP
// 811, 2008, appendix B).
var units = map[string]unit{
	"-": {"ratio", 1}, "": {"ratio", 1}, "%": {"ratio", 0.01},
	"m": {"length", 1}, "mm": {"length", 1e-3}, "cm": {"length", 1e-2}, "km": {"length", 1e3},
	"ft": {"length", 0.3048}, "in": {"length", 0.0254}, "nmi": {"length", 1852},
	"m2": {"area", 1}, "ft2": {"area", 0.3048 * 0.3048}, "in2": {"area", 0.0254 * 0.0254},
	"m3": {"volume", 1}, "ft3": {"volume", 0.3048 * 0.3048 * 0.3048}, "l": {"volume", 1e-3},
	"kg": {"mass", 1}, "t": {"mass", 1000}, "lb": {"mass", 0.45359237},
	"N": {"force", 1}, "kN": {"force", 1e3}, "lbf": {"force", 0.45359237 * 9.80665},
	"Pa": {"pressure", 1}, "kPa": {"pressure", 1e3}, "bar": {"pressure", 1e5},
	"psi": {"pressure", 0.45359237 * 9.80665 / (0.0254 * 0.0254)},
	"rad": {"angle", 1}, "deg": {"angle", 3.141592653589793 / 180},
	"m/s": {"speed", 1}, "km/h": {"speed", 1000.0 / 3600}, "kt": {"speed", 1852.0 / 3600},
	"ft/s": {"speed", 0.3048}, "ft/min": {"speed", 0.3048 / 60},
	"s": {"time", 1}, "min": {"time", 60}, "h": {"time", 3600},
	"kg/s": {"mass flow", 1}, "lb/h": {"mass flow", 0.45359237 / 3600},
	"W": {"power", 1}, "kW": {"power", 1e3},
}

// Convert returns x, given in unit from, in unit to. The two must be
// units of the same quantity; equal unit strings always convert (x
// unchanged). Known units: - (or empty) and %, m mm cm km ft in nmi, m2
// ft2 in2, m3 ft3 l, kg t lb, N kN lbf, Pa kPa bar psi, rad deg, m/s km/h
// kt ft/s ft/min, s min h, kg/s lb/h, W kW. Temperatures are not
// converted (their scales have offsets).
func Convert(x float64, from, to string) (float64, error) {
	if from == to {
		return x, nil
	}
	f, okf := units[from]
	t, okt := units[to]
	switch {
	case !okf:
		return 0, fmt.Errorf("unit %q is not one Convert knows", from)
	case !okt:
		return 0, fmt.Errorf("unit %q is not one Convert knows", to)
	case f.quantity != t.quantity:
		return 0, fmt.Errorf("unit %q is a %s and %q a %s", from, f.quantity, to, t.quantity)
	}
	return x * f.toSI / t.toSI, nil
}
