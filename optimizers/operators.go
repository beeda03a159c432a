package optimizers

import (
	"fmt"
	"math"
	"math/rand"
)

// Repair says how an evolutionary method brings a point that left the
// unit box back into it before it is evaluated.
type Repair int

const (
	// Clip sets a coordinate outside [0, 1] to the nearer bound (optima on
	// a bound are then reached exactly). The default.
	Clip Repair = iota
	// Reflect mirrors a coordinate at the bound it crossed.
	Reflect
)

// String returns "clip" or "reflect".
func (r Repair) String() string {
	switch r {
	case Clip:
		return "clip"
	case Reflect:
		return "reflect"
	}
	return fmt.Sprintf("repair(%d)", int(r))
}

// validate checks the repair mode.
func (r Repair) validate(method string) error {
	if r != Clip && r != Reflect {
		return settingError(method, "Repair", int(r), "must be Clip or Reflect")
	}
	return nil
}

// apply repairs coordinate u; it reports whether u was outside the box.
func (r Repair) apply(u float64) (float64, bool) {
	if u >= 0 && u <= 1 {
		return u, false
	}
	if math.IsNaN(u) {
		return 0.5, true
	}
	if r == Reflect {
		// fold onto [0, 2) then mirror (0,1] back.
		u = math.Mod(math.Abs(u), 2)
		if u > 1 {
			u = 2 - u
		}
		return u, true
	}
	return clip01(u), true
}

// repairAll repairs every coordinate of x in place.
func (r Repair) repairAll(x []float64) {
	for k := range x {
		x[k], _ = r.apply(x[k])
	}
}

// sbx is simulated binary crossover (Deb & Agrawal, 1995) in its bounded
// form on [0, 1] (Deb's NSGA-II code): each coordinate is crossed with
// probability 1/2 and the children stay inside the box.
func sbx(c1, c2 []float64, eta float64, rng *rand.Rand) {
	for k := range c1 {
		if rng.Float64() > 0.5 {
			continue
		}
		y1, y2 := c1[k], c2[k]
		if math.Abs(y1-y2) < 1e-14 {
			continue
		}
		if y1 > y2 {
			y1, y2 = y2, y1
		}
		r := rng.Float64()
		child := func(beta float64) float64 {
			alpha := 2 - math.Pow(beta, -(eta+1))
			var bq float64
			if r <= 1/alpha {
				bq = math.Pow(r*alpha, 1/(eta+1))
			} else {
				bq = math.Pow(1/(2-r*alpha), 1/(eta+1))
			}
			return bq
		}
		bq := child(1 + 2*y1/(y2-y1))
		a := 0.5 * ((y1 + y2) - bq*(y2-y1))
		bq = child(1 + 2*(1-y2)/(y2-y1))
		b := 0.5 * ((y1 + y2) + bq*(y2-y1))
		a, b = clip01(a), clip01(b)
		if rng.Float64() <= 0.5 {
			a, b = b, a
		}
		c1[k], c2[k] = a, b
	}
}

// polynomialMutation is Deb's bounded polynomial mutation on [0, 1]: each
// coordinate is mutated with probability rate, with distribution index eta.
func polynomialMutation(x []float64, rate, eta float64, rng *rand.Rand) {
	for k := range x {
		if rng.Float64() >= rate {
			continue
		}
		y := x[k]
		d1, d2 := y, 1-y
		r := rng.Float64()
		p := 1 / (eta + 1)
		var dq float64
		if r < 0.5 {
			v := 2*r + (1-2*r)*math.Pow(1-d1, eta+1)
			dq = math.Pow(v, p) - 1
		} else {
			v := 2*(1-r) + 2*(r-0.5)*math.Pow(1-d2, eta+1)
			dq = 1 - math.Pow(v, p)
		}
		x[k] = clip01(y + dq)
	}
}

// uniformPoint draws a point of the unit box.
func uniformPoint(d int, rng *rand.Rand) []float64 {
	x := make([]float64, d)
	for k := range x {
		x[k] = rng.Float64()
	}
	return x
}

// newRand returns eaopt's random source (math/rand) seeded from the study
// seed and a stream number, so that separate uses draw separate streams.
func newRand(seed uint64, stream uint64) *rand.Rand {
	return rand.New(rand.NewSource(int64(mix(seed, stream))))
}

// mix scrambles a seed and a stream number (SplitMix64 finaliser).
func mix(seed, stream uint64) uint64 {
	z := seed + 0x9e3779b97f4a7c15*(stream+1)
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}
