package store

import (
	"encoding/binary"
	"encoding/json"
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

// appendJSONFloat appends x as a JSON value that round-trips exactly;
// non-finite values become the strings "NaN", "Infinity", "-Infinity".
func appendJSONFloat(b []byte, x float64) []byte {
	switch {
	case math.IsNaN(x):
		return append(b, `"NaN"`...)
	case math.IsInf(x, 1):
		return append(b, `"Infinity"`...)
	case math.IsInf(x, -1):
		return append(b, `"-Infinity"`...)
	}
	return strconv.AppendFloat(b, x, 'g', -1, 64)
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
	}
	return strconv.AppendFloat(b, x, 'g', -1, 64)
}

// parseNumbers reads a JSON array of n numbers written with
// appendSQLJSONFloat (null is NaN, ±9e999 is ±Inf).
func parseNumbers(s string, n int) ([]float64, error) {
	body, ok1 := strings.CutPrefix(s, "[")
	body, ok2 := strings.CutSuffix(body, "]")
	if !ok1 || !ok2 {
		return nil, fmt.Errorf("numbers is not a JSON array: %.40q", s)
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
			return nil, fmt.Errorf("numbers: %q is not a number", item)
		}
		out = append(out, x)
	}
	if len(out) != n {
		return nil, fmt.Errorf("numbers holds %d values, the run has %d", len(out), n)
	}
	return out, nil
}

// outputKeys returns the JSON-quoted keys `"name":` of the outputs.
func outputKeys(names []string) [][]byte {
	keys := make([][]byte, len(names))
	for i, n := range names {
		q, _ := json.Marshal(n)
		keys[i] = append(q, ':')
	}
	return keys
}

// appendOutputs appends the JSON object key → value.
func appendOutputs(b []byte, keys [][]byte, vals []float64) []byte {
	b = append(b, '{')
	for i, k := range keys {
		if i >= len(vals) {
			break
		}
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, k...)
		b = appendJSONFloat(b, vals[i])
	}
	return append(b, '}')
}

// parseOutputs decodes an outputs object into the values of names, in
// order; a name missing from the object is NaN.
func parseOutputs(s string, index map[string]int, n int) ([]float64, error) {
	out := make([]float64, n)
	for i := range out {
		out[i] = math.NaN()
	}
	if s == "" {
		return out, nil
	}
	dec := json.NewDecoder(strings.NewReader(s))
	dec.UseNumber()
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return nil, fmt.Errorf("outputs is not a JSON object: %.40q", s)
	}
	for dec.More() {
		t, err := dec.Token()
		if err != nil {
			return nil, fmt.Errorf("outputs: %w", err)
		}
		key, _ := t.(string)
		t, err = dec.Token()
		if err != nil {
			return nil, fmt.Errorf("outputs: value of %q: %w", key, err)
		}
		x, err := jsonFloat(t)
		if err != nil {
			return nil, fmt.Errorf("outputs: value of %q: %w", key, err)
		}
		if i, ok := index[key]; ok {
			out[i] = x
		}
	}
	return out, nil
}

// jsonFloat converts a decoded JSON token to a float.
func jsonFloat(t json.Token) (float64, error) {
	switch v := t.(type) {
	case json.Number:
		return strconv.ParseFloat(string(v), 64)
	case string:
		return parseFloat(v)
	case nil:
		return math.NaN(), nil
	}
	return 0, fmt.Errorf("%v is not a number", t)
}

// formatFloat formats x for CSV so that parseFloat gives it back exactly.
func formatFloat(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "Infinity"
	case math.IsInf(x, -1):
		return "-Infinity"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// parseFloat reads a number written by formatFloat (or any Go float).
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
