package store

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// appendFloats appends xs as little-endian float64 values.
func appendFloats(b []byte, xs []float64) []byte {
	for _, x := range xs {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(x))
	}
	return b
}

// readFloats decodes n float64 values from b at offset off into dst.
func readFloats(b []byte, off, n int) ([]float64, int, error) {
	if off+8*n > len(b) {
		return nil, off, fmt.Errorf("vectors blob holds %d bytes, need %d", len(b), off+8*n)
	}
	out := make([]float64, n)
	for k := range out {
		out[k] = math.Float64frombits(binary.LittleEndian.Uint64(b[off+8*k:]))
	}
	return out, off + 8*n, nil
}

// appendSQLJSONFloat appends x as a JSON number that SQLite's
// json_extract reads back exactly as a REAL: NaN as null (SQL NULL), ±Inf
// as ±9e999 (which overflows to ±Inf).
func appendSQLJSONFloat(b []byte, x float64) []byte {
	switch {
	case math.IsNaN(x):
		return append(b, "null"...)
	case math.IsInf(x, 1):
		return append(b, "9e999"...)
	case math.IsInf(x, -1):
		return append(b, "-9e999"...)
	case x == math.Trunc(x) && x > -1e6 && x < 1e6 && (x != 0 || !math.Signbit(x)):
		// an integer below a million, which 'g' writes as its digits (a
		// larger one with an exponent, -0 as "-0"): the same text, faster
		return strconv.AppendInt(b, int64(x), 10)
	}
	return strconv.AppendFloat(b, x, 'g', -1, 64)
}

// appendNumbers appends xs as a JSON array written with
// appendSQLJSONFloat.
func appendNumbers(b []byte, xs ...[]float64) []byte {
	b = append(b, '[')
	first := true
	for _, v := range xs {
		for _, x := range v {
			if !first {
				b = append(b, ',')
			}
			first = false
			b = appendSQLJSONFloat(b, x)
		}
	}
	return append(b, ']')
}

// parseNumbers reads the JSON array column what of n numbers written
// with appendNumbers (null is NaN, ±9e999 is ±Inf).
func parseNumbers(what, s string, n int) ([]float64, error) {
	body, ok1 := strings.CutPrefix(s, "[")
	body, ok2 := strings.CutSuffix(body, "]")
	if !ok1 || !ok2 {
		return nil, fmt.Errorf("%s is not a JSON array: %.40q", what, s)
	}
	out := make([]float64, 0, n)
	for body != "" {
		item, rest, _ := strings.Cut(body, ",")
		body = rest
		item = strings.TrimSpace(item)
		if item == "null" {
			out = append(out, math.NaN())
			continue
		}
		x, err := strconv.ParseFloat(item, 64)
		if err != nil && !(errors.Is(err, strconv.ErrRange) && math.IsInf(x, 0)) {
			return nil, fmt.Errorf("%s: %q is not a number", what, item)
		}
		out = append(out, x)
	}
	if len(out) != n {
		return nil, fmt.Errorf("%s holds %d values, the run has %d", what, len(out), n)
	}
	return out, nil
}

// parseFloat reads a number written by appendCSVFloat (or any Go float).
func parseFloat(s string) (float64, error) {
	switch s {
	case "NaN", "nan", "":
		return math.NaN(), nil
	case "Infinity", "+Infinity", "inf", "+inf", "Inf", "+Inf":
		return math.Inf(1), nil
	case "-Infinity", "-inf", "-Inf":
		return math.Inf(-1), nil
	}
	return strconv.ParseFloat(s, 64)
}
