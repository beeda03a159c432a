package store

import (
	"bytes"
	"encoding/csv"
	"testing"
)

// TestCSVFieldAsEncodingCSV: a text field and a line of the export are
// written as encoding/csv's Writer (comma ',', LF line ends) writes them,
// byte for byte: quoted when the field holds a comma, a quote, CR or LF,
// begins with a space or is `\.`, each quote doubled.
func TestCSVFieldAsEncodingCSV(t *testing.T) {
	for _, rec := range [][]string{
		{""},
		{"", ""},
		{"plain", "two words"},
		{"a,b", `say "no"`, "line\nbreak", "cr\rhere", "crlf\r\nend"},
		{" leading space", "\tleading tab", "trailing space ", "\u00a0no-break space first"},
		{`\.`, `\..`, `"`, `""`, ","},
		{"does not close: the balance of mission.fuel_fraction in {aerodynamics, propulsion} leaves the region", "ünïcödé, too"},
	} {
		var want bytes.Buffer
		cw := csv.NewWriter(&want)
		if err := cw.Write(rec); err != nil {
			t.Fatal(err)
		}
		cw.Flush()
		var got []byte
		for i, f := range rec {
			if i > 0 {
				got = append(got, ',')
			}
			got = appendCSVField(got, f)
		}
		got = append(got, '\n')
		if string(got) != want.String() {
			t.Errorf("%q: wrote %q, encoding/csv writes %q", rec, got, want.String())
		}
	}
}
