package mdo

import "math"

// designMap maps physical designs, compared bit by bit (as designKey
// does), to values from which it reads the design back (design, which
// must give the design put with the value, unchanged). It keys them by a
// 64-bit hash of their bits, so an entry costs two words instead of a
// string of 8 bytes per coordinate; a design whose hash an earlier,
// different design holds goes to an overflow map keyed by its full bits,
// so the map is exact.
type designMap[V any] struct {
	design func(V) []float64
	first  map[uint64]V
	more   map[string]V
}

// hashDesign mixes the bits of a design into 64 bits.
func hashDesign(d []float64) uint64 {
	h := uint64(len(d)) * 0x9e3779b97f4a7c15
	for _, x := range d {
		h ^= math.Float64bits(x)
		h *= 0xbf58476d1ce4e5b9
		h ^= h >> 31
	}
	return h
}

// sameBits reports whether two designs are equal bit by bit.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if math.Float64bits(a[k]) != math.Float64bits(b[k]) {
			return false
		}
	}
	return true
}

// len returns the number of designs held.
func (m *designMap[V]) len() int { return len(m.first) + len(m.more) }

// get returns the value of design d.
func (m *designMap[V]) get(d []float64) (V, bool) {
	if v, ok := m.first[hashDesign(d)]; ok && sameBits(m.design(v), d) {
		return v, true
	}
	if len(m.more) > 0 {
		v, ok := m.more[designKey(d)]
		return v, ok
	}
	var zero V
	return zero, false
}

// put sets the value of design d (design(v) must be d).
func (m *designMap[V]) put(d []float64, v V) {
	if m.first == nil {
		m.first = map[uint64]V{}
	}
	h := hashDesign(d)
	old, ok := m.first[h]
	switch {
	case !ok || sameBits(m.design(old), d):
		m.first[h] = v
	default:
		if m.more == nil {
			m.more = map[string]V{}
		}
		m.more[designKey(d)] = v
	}
}

// reset empties the map, keeping its storage.
func (m *designMap[V]) reset() {
	clear(m.first)
	clear(m.more)
}
