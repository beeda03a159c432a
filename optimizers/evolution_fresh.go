package optimizers

import (
	"crypto/sha256"
	"encoding/binary"
	"math"
	"math/rand"

	"couplet/mdo"
)

// freshPoints keeps every design point an evolutionary run has asked for,
// as the Evaluator's cache keys it (physical values, integers rounded), so
// that the run only sends points it has not asked for before: a repeat
// costs no analysis but teaches the search nothing, and a population that
// has collapsed onto a point (or a particle whose velocity has died out)
// would otherwise spend its generations on repeats.
//
// The rule, the same for GA, DifferentialEvolution, ParticleSwarm and
// NSGA2: a candidate whose physical point was asked for before, in an
// earlier batch or earlier in its own batch, is moved by a polynomial
// mutation (Deb's, index 20) of one coordinate drawn at random; an integer
// coordinate so mutated moves by at least one whole step (towards the
// inside at a bound). The move is repeated from the moved point until the
// point is new, at most freshTries times; then the candidate is drawn
// uniformly in the box, at most freshTries times; a space so small that
// this still repeats (a few integer variables, nearly all asked for)
// keeps the repeat, which costs nothing. The moves draw from a random
// stream of their own, so a run that asks for no repeat draws exactly the
// numbers it drew before the rule existed.
//
// The set is the run's own, not the Evaluator's cache, so a run picked up
// from its store asks for the same points as the first session did. It
// keeps each point as the first 128 bits of the SHA-256 digest of its
// physical values' bits (16 bytes a point instead of 8 a coordinate): two
// different points share a digest with probability about n²/2¹²⁹ among n
// points, below 10⁻²⁶ for a million.
type freshPoints struct {
	ev    *mdo.Evaluator
	specs []mdo.DesignSpec
	seen  map[pointDigest]struct{}
	rng   *rand.Rand
	// moved counts the candidates moved because they repeated a point.
	moved int
	buf   []byte
	phys  []float64
}

// pointDigest is the key of a point in freshPoints.
type pointDigest [16]byte

// freshTries bounds the mutations, then the uniform draws, tried to make a
// repeated candidate new.
const freshTries = 16

// freshIndex is the polynomial-mutation index of the moves.
const freshIndex = 20

// newFreshPoints returns an empty set for the evaluator's design space,
// its moves drawing from stream of the study's seed.
func newFreshPoints(ev *mdo.Evaluator, stream uint64) *freshPoints {
	return &freshPoints{ev: ev, specs: ev.DesignSpecs(), seen: map[pointDigest]struct{}{}, rng: newRand(ev.Seed(), stream)}
}

// key returns the key of unit-box point x: the digest of its physical
// values' bits (as the Evaluator's cache compares them).
func (f *freshPoints) key(x []float64) pointDigest {
	f.buf = f.buf[:0]
	f.phys = f.ev.AppendPhysical(f.phys[:0], x)
	for _, v := range f.phys {
		f.buf = binary.LittleEndian.AppendUint64(f.buf, math.Float64bits(v))
	}
	sum := sha256.Sum256(f.buf)
	return pointDigest(sum[:16])
}

// add records x unless it was asked for before; it reports whether it
// was new.
func (f *freshPoints) add(x []float64) bool {
	k := f.key(x)
	if _, ok := f.seen[k]; ok {
		return false
	}
	f.seen[k] = struct{}{}
	return true
}

// record adds x to the points asked for, without moving it (points whose
// place matters, such as the Newton steps of the gradient repair).
func (f *freshPoints) record(x []float64) { f.add(x) }

// fresh makes x, in place, a point not asked for before by the rule of
// the type, and records it; it reports whether x was moved.
func (f *freshPoints) fresh(x []float64) bool {
	if f.add(x) {
		return false
	}
	f.moved++
	for t := 0; t < 2*freshTries; t++ {
		if t < freshTries {
			f.nudge(x)
		} else {
			for k := range x {
				x[k] = f.rng.Float64()
			}
		}
		if f.add(x) {
			return true
		}
	}
	return true
}

// nudge mutates one coordinate of x drawn at random (polynomial mutation;
// an integer coordinate moves by at least one step).
func (f *freshPoints) nudge(x []float64) {
	k := f.rng.Intn(len(x))
	u := clip01(x[k])
	v := u
	polynomialMutation(x[k:k+1], 1, freshIndex, f.rng)
	if s := f.specs[k]; s.Integer {
		span := s.Upper - s.Lower
		if span < 1 {
			return
		}
		i0 := math.Round(u * span)
		i1 := math.Round(x[k] * span)
		if i1 == i0 {
			switch {
			case i0 <= 0:
				i1 = 1
			case i0 >= span:
				i1 = span - 1
			case x[k] < v:
				i1 = i0 - 1
			default:
				i1 = i0 + 1
			}
		}
		x[k] = i1 / span
	}
}
