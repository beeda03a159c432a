package store

import (
	"math"
	"strconv"
	"testing"
)

// TestSQLJSONFloat checks the JSON numbers of the numbers and outputs
// arrays: finite values exactly as strconv's shortest 'g' form (which
// ParseFloat reads back bit for bit), integers below a million by the
// fast path included; NaN as null and ±Inf as ±9e999 (see
// appendSQLJSONFloat).
func TestSQLJSONFloat(t *testing.T) {
	tests := []struct {
		x    float64
		want string // "" for strconv's 'g' form
	}{
		{0, ""}, {math.Copysign(0, -1), "-0"}, {1, "1"}, {-1, "-1"}, {2, "2"}, {999999, "999999"}, {-999999, "-999999"},
		{1e6, "1e+06"}, {-1e6, ""}, {1234567, "1.234567e+06"}, {0.5, ""}, {-2.5, ""}, {1.0 / 3, ""},
		{21000 + 1.0/7, ""}, {math.MaxFloat64, ""}, {math.SmallestNonzeroFloat64, ""}, {1 << 53, ""},
		{math.NaN(), "null"}, {math.Inf(1), "9e999"}, {math.Inf(-1), "-9e999"},
	}
	for _, tc := range tests {
		want := tc.want
		if want == "" {
			want = strconv.FormatFloat(tc.x, 'g', -1, 64)
		}
		if got := string(appendSQLJSONFloat(nil, tc.x)); got != want {
			t.Errorf("appendSQLJSONFloat(%v) = %q, want %q", tc.x, got, want)
		}
		if math.IsNaN(tc.x) || math.IsInf(tc.x, 0) {
			continue
		}
		back, err := strconv.ParseFloat(want, 64)
		if err != nil || math.Float64bits(back) != math.Float64bits(tc.x) {
			t.Errorf("%q reads back as %v (%v), want the bits of %v", want, back, err, tc.x)
		}
	}
}
