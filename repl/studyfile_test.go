package repl

import (
	"strings"
	"testing"
)

func TestFirstChange(t *testing.T) {
	base := FormatStudy([]string{"x := 1", "y := x + 1", "y"})
	tests := []struct {
		name, now, want string
	}{
		{"same", base, ""},
		{"second cell edited", FormatStudy([]string{"x := 1", "y := x + 2", "y"}), "cell 2 (from line 7) differs"},
		{"cell added", FormatStudy([]string{"x := 1", "y := x + 1", "y", "y * 2"}), "cell 4 (from line 13) was added"},
		{"cell removed", FormatStudy([]string{"x := 1", "y := x + 1"}), "cell 3 was removed"},
		{"header", strings.Replace(base, "(couplet "+Version+")", "(couplet 0.0.9)", 1), "header line"},
		{"line endings", strings.ReplaceAll(base, "\n", "\r\n"), "line endings"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := firstChange(base, tc.now)
			if tc.want == "" && got != "" || !strings.Contains(got, tc.want) {
				t.Errorf("firstChange = %q, want it to say %q", got, tc.want)
			}
		})
	}
}

func TestParseStudyHeader(t *testing.T) {
	body := "\n//~ cell 1\nx := 1\n"
	tests := []struct {
		name, text string
		header     string // the header kept ("" for none)
		err        string // part of the error; "" when accepted
	}{
		{"written by this tool", Header() + "\n" + body, Header(), ""},
		{"without the tool version", "//~ couplet-study 1\n" + body, "//~ couplet-study 1", ""},
		{"byte-order mark", "\uFEFF" + Header() + "\n" + body, Header(), ""},
		{"byte-order mark, no header", "\uFEFFx := 1\n", "", ""},
		{"no header", "x := 1\n", "", ""},
		{"number spelt out", "//~ couplet-study one (couplet 0.1.0)\n" + body, "", `header line "//~ couplet-study one (couplet 0.1.0)" is garbled`},
		{"number missing", "//~ couplet-study\n" + body, "", "garbled"},
		{"glued number", "//~ couplet-study1\n" + body, "", "garbled"},
		{"trailing text", "//~ couplet-study 1 (couplet 0.1.0) draft\n" + body, "", "garbled"},
		{"format 0", "//~ couplet-study 0\n" + body, "", "garbled"},
		{"leading zero", "//~ couplet-study 01\n" + body, "", "garbled"},
		{"newer format", "//~ couplet-study 2 (couplet 9.0)\n" + body, "", "format 2, written by a newer couplet"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := ParseStudy(tc.text)
			if tc.err != "" {
				if err == nil || !strings.Contains(err.Error(), tc.err) {
					t.Errorf("error %v, want one saying %q", err, tc.err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if f.Header != tc.header || len(f.Cells) != 1 || f.Cells[0].Source != "x := 1" {
				t.Errorf("header %q, cells %+v; want header %q and the one cell x := 1", f.Header, f.Cells, tc.header)
			}
		})
	}
}
