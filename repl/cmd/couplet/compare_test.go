package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"couplet/mdo/store"
)

// tableRow returns the cells of the row named name in the text of a
// comparison, split on runs of two or more blanks; nil if there is none.
func tableRow(text, name string) []string {
	for _, l := range strings.Split(text, "\n") {
		if !strings.HasPrefix(l, "  "+name+"  ") {
			continue
		}
		var cells []string
		for _, c := range strings.Split(strings.TrimSpace(l), "  ") {
			if c = strings.TrimSpace(c); c != "" {
				cells = append(cells, c)
			}
		}
		return cells[1:] // the unit, then one cell per result
	}
	return nil
}

// A script with two studies leaves two result folders; couplet compare
// of the script's folder, or of the two result folders, puts their
// summaries side by side, the sweep absent from the study without it,
// and writes the page with the overlays into a folder of its own.
func TestCompareTwoStudies(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	script := filepath.Join("..", "..", "testdata", "two_wings.study")
	if code, _, errs := runCmd("run", script, "--out", out, "--quiet"); code != 0 {
		t.Fatalf("couplet run: exit %d: %s", code, errs)
	}
	a, b := filepath.Join(out, "area-and-sweep"), filepath.Join(out, "area-only")
	sa, err := store.ReadSummary(filepath.Join(a, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	sb, err := store.ReadSummary(filepath.Join(b, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	num := func(m map[string]store.Number, name string) string {
		v, ok := m[name]
		if !ok {
			return "absent"
		}
		return strconv.FormatFloat(float64(v), 'g', 7, 64)
	}
	page := filepath.Join(dir, "cmp")
	code, text, errs := runCmd("compare", out, "--out", page)
	if code != 0 {
		t.Fatalf("couplet compare: exit %d: %s", code, errs)
	}
	code2, text2, errs2 := runCmd("compare", a, b)
	if code2 != 0 {
		t.Fatalf("couplet compare of the two result folders: exit %d: %s", code2, errs2)
	}
	if !strings.HasPrefix(text, text2) || text != text2+"wrote "+filepath.Join(page, "comparison.html")+"\n" {
		t.Errorf("the script's folder and its two result folders compare differently:\n%s\n---\n%s", text, text2)
	}
	// the values of the two summaries
	tests := []struct {
		row  string
		want []string
	}{
		{"study", []string{"-", sa.Study, sb.Study}},
		{"evaluations", []string{"-", strconv.Itoa(sa.Evaluations), strconv.Itoa(sb.Evaluations)}},
		{"stop", []string{"-", sa.Stop, sb.Stop}},
		{"wing.area", []string{"m2", num(sa.Best.Design, "wing.area"), num(sb.Best.Design, "wing.area")}},
		{"wing.sweep", []string{"deg", num(sa.Best.Design, "wing.sweep"), "absent"}},
		{"minimise mass.takeoff", []string{"kg", num(sa.Best.Objectives, "mass.takeoff"), num(sb.Best.Objectives, "mass.takeoff")}},
		{"perf.takeoff_field_length <= 2400", []string{"m", num(sa.Best.Constraints, "perf.takeoff_field_length"), num(sb.Best.Constraints, "perf.takeoff_field_length")}},
		{"perf.climb_gradient_second_segment >= 0.024", []string{"-", num(sa.Best.Constraints, "perf.climb_gradient_second_segment"), "absent"}},
		{"perf.landing_field_length", []string{"m", num(sa.Best.Margins, "perf.landing_field_length") + " ok", num(sb.Best.Margins, "perf.landing_field_length") + " ok"}},
	}
	for _, tc := range tests {
		t.Run(tc.row, func(t *testing.T) {
			got := tableRow(text, tc.row)
			if strings.Join(got, "|") != strings.Join(tc.want, "|") {
				t.Errorf("row %q: %q, want %q (from the summaries)", tc.row, got, tc.want)
			}
		})
	}
	if sa.Study != "Area and sweep" || sb.Study != "Area only" || sa.Evaluations != 16 || sb.Evaluations != 12 {
		t.Errorf("the script's studies: %q (%d evaluations), %q (%d)", sa.Study, sa.Evaluations, sb.Study, sb.Evaluations)
	}
	// the designer's checklist of each best design
	if row := tableRow(text, "fuselage fineness ratio"); len(row) != 3 || !strings.HasSuffix(row[1], "FLAG") && !strings.HasSuffix(row[1], "ok") {
		t.Errorf("the checklist's fineness row: %q", row)
	}
	b2, err := os.ReadFile(filepath.Join(page, "comparison.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"<title>Comparison of 2 results</title>", `href="../out/area-only/report.html"`, "airworthiness", "wing.sweep"} {
		if !strings.Contains(string(b2), w) {
			t.Errorf("the page lacks %q", w)
		}
	}
	for _, f := range []string{"overlay_history.svg", "overlay_planform.svg", "overlay_planform.png"} {
		if _, err := os.Stat(filepath.Join(page, f)); err != nil {
			t.Errorf("no overlay %s: %v", f, err)
		}
	}
	// usage errors: exit 2, naming the folder
	tests2 := []struct {
		name string
		args []string
		msg  string
	}{
		{"not a result", []string{"compare", a, dir}, dir + " is not a result folder: it holds no summary.json"},
		{"missing", []string{"compare", a, filepath.Join(dir, "none")}, filepath.Join(dir, "none") + " is not a result folder: it does not exist"},
		{"one result", []string{"compare", a}, "give two or more result folders"},
		{"no folder", []string{"compare"}, "no folder given"},
		{"earlier comparison", []string{"compare", a, b, "--out", page}, "holds an earlier comparison"},
		{"a run's folder", []string{"compare", a, b, "--out", b, "--replace"}, "which a comparison never replaces"},
		{"replace without out", []string{"compare", a, b, "--replace"}, "give --out DIR too"},
		{"bad flag", []string{"compare", a, b, "--bogus"}, "bogus"},
	}
	for _, tc := range tests2 {
		t.Run(tc.name, func(t *testing.T) {
			code, stdout, errs := runCmd(tc.args...)
			if code != 2 || !strings.Contains(errs, tc.msg) || stdout != "" {
				t.Errorf("exit %d, stdout %q, stderr %q; want exit 2 with %q and nothing on stdout", code, stdout, errs, tc.msg)
			}
		})
	}
	if _, err := os.Stat(filepath.Join(b, "results.db")); err != nil {
		t.Errorf("the refused comparison removed the result's store: %v", err)
	}
	// --replace writes over an earlier comparison
	if code, _, errs := runCmd("compare", a, b, "--out", page, "--replace"); code != 0 {
		t.Errorf("--replace of an earlier comparison: exit %d: %s", code, errs)
	}
}
