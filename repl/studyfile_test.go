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
