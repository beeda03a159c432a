package sensitivity

import "fmt"

// directionNumbers holds, for dimensions 2, 3, …, the degree s, the
// coefficient a and the initial direction numbers m_1..m_s of the primitive
// polynomials of Joe and Kuo (2008), file new-joe-kuo-6.21201, first rows
// (from memory). Dimension 1 is the van der Corput sequence in base 2.
var directionNumbers = []struct {
	s, a uint32
	m    []uint32
}{
	{1, 0, []uint32{1}},
	{2, 1, []uint32{1, 3}},
	{3, 1, []uint32{1, 3, 1}},
	{3, 2, []uint32{1, 1, 1}},
	{4, 1, []uint32{1, 1, 3, 3}},
	{4, 4, []uint32{1, 3, 5, 13}},
	{5, 2, []uint32{1, 1, 5, 5, 17}},
	{5, 4, []uint32{1, 1, 5, 5, 5}},
	{5, 7, []uint32{1, 1, 7, 11, 19}},
	{5, 11, []uint32{1, 1, 5, 1, 1}},
	{5, 13, []uint32{1, 1, 1, 3, 11}},
	{5, 14, []uint32{1, 3, 5, 5, 31}},
	{6, 1, []uint32{1, 3, 3, 9, 7, 49}},
	{6, 13, []uint32{1, 1, 1, 15, 21, 21}},
	{6, 16, []uint32{1, 3, 1, 13, 27, 49}},
	{6, 19, []uint32{1, 1, 1, 15, 7, 5}},
	{6, 22, []uint32{1, 3, 1, 15, 13, 25}},
	{6, 25, []uint32{1, 1, 5, 5, 19, 61}},
	{7, 1, []uint32{1, 3, 7, 11, 23, 15, 103}},
	{7, 4, []uint32{1, 3, 7, 13, 13, 15, 69}},
}

// MaxSobolDim is the largest dimension SobolSequence supports.
const MaxSobolDim = 21

// sobolBits is the number of bits of each coordinate.
const sobolBits = 32

// SobolSequence is the Sobol' (1967) low-discrepancy sequence in the unit
// cube, in Gray-code order (Antonov and Saleev 1979), starting with the
// origin (kept, as Owen 2021 recommends: dropping it spoils the balance of
// the first 2^m points).
type SobolSequence struct {
	dim int
	v   [][sobolBits]uint32
	x   []uint32
	n   uint64
}

// NewSobolSequence returns the sequence in dim dimensions, 1 ≤ dim ≤
// MaxSobolDim.
func NewSobolSequence(dim int) (*SobolSequence, error) {
	if dim < 1 || dim > MaxSobolDim {
		return nil, fmt.Errorf("sensitivity: Sobol' sequence dimension %d, allowed 1 to %d", dim, MaxSobolDim)
	}
	q := &SobolSequence{dim: dim, v: make([][sobolBits]uint32, dim), x: make([]uint32, dim)}
	for i := 0; i < sobolBits; i++ {
		q.v[0][i] = 1 << (sobolBits - 1 - i)
	}
	for j := 1; j < dim; j++ {
		p := directionNumbers[j-1]
		s := int(p.s)
		v := &q.v[j]
		for i := 0; i < sobolBits; i++ {
			if i < s {
				v[i] = p.m[i] << (sobolBits - 1 - i)
				continue
			}
			v[i] = v[i-s] ^ (v[i-s] >> uint(s))
			for k := 1; k < s; k++ {
				v[i] ^= ((p.a >> uint(s-1-k)) & 1) * v[i-k]
			}
		}
	}
	return q, nil
}

// Dim returns the dimension of the sequence.
func (q *SobolSequence) Dim() int { return q.dim }

// Next writes the next point into dst (of length Dim) and returns it; the
// first point is the origin. It returns nil after 2^32 − 1 points.
func (q *SobolSequence) Next(dst []float64) []float64 {
	if q.n >= 1<<sobolBits {
		return nil
	}
	if q.n > 0 {
		c := 0
		for m := q.n - 1; m&1 == 1; m >>= 1 {
			c++
		}
		for j := range q.x {
			q.x[j] ^= q.v[j][c]
		}
	}
	q.n++
	for j, xj := range q.x {
		dst[j] = float64(xj) / (1 << sobolBits)
	}
	return dst
}

// Points returns the next n points.
func (q *SobolSequence) Points(n int) [][]float64 {
	out := make([][]float64, n)
	for i := range out {
		out[i] = q.Next(make([]float64, q.dim))
	}
	return out
}
