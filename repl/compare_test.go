package repl

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo/report"
)

// A cell compares two results of the session, in memory, and two result
// folders @report wrote, with cell.Compare; the table shows on the
// session's output and the page is written into the named sub-folder.
func TestCompareFromACell(t *testing.T) {
	dir := t.TempDir()
	s, out, errb := newTest(t, Options{OutDir: dir})
	defer s.Close()
	serve(t, s, `st, err := mdo.SellarStudy(mdo.MDF)
cell.Attach(st)
res, err := optimizers.RandomDesign{Samples: 6}.Minimize(cell.Context(), st)
two, err := mdo.SellarStudy(mdo.MDF)
two.Name = "two variables"
two.Design = two.Design[:2]
cell.Attach(two)
res2, err := optimizers.RandomDesign{Samples: 4}.Minimize(cell.Context(), two)
cmp, err := cell.Compare("side-by-side", res, res2)
cmp
@report res
@report res2
folders, err := cell.Compare("", "sellar", "two-variables")
folders
bad, err := cell.Compare("", "sellar", "nowhere")
err
`)
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	text := out.String()
	for _, w := range []string{
		"comparison of 2 results",
		"  study  ", "sellar", "two variables",
		"  z2 ",
		"absent",
		"two-variables",
		"is not a result folder: it does not exist",
	} {
		if !strings.Contains(text, w) {
			t.Errorf("the session's output lacks %q:\n%s", w, text)
		}
	}
	// the results in memory and their folders give the same rows
	tables := strings.Split(text, "comparison of 2 results")
	if len(tables) != 3 {
		t.Fatalf("%d comparisons shown, want 2:\n%s", len(tables)-1, text)
	}
	rows := func(s string) string {
		_, body, _ := strings.Cut(s, "\nruns\n")
		body, _, _ = strings.Cut(body, "\nwrote ")
		body, _, _ = strings.Cut(body, "\nerror: ")
		return body
	}
	if a, b := rows(tables[1]), rows(tables[2]); a != b || a == "" {
		t.Errorf("the comparison in memory differs from that of the folders:\n%s\n---\n%s", a, b)
	}
	if _, err := os.Stat(filepath.Join(dir, "side-by-side", report.ComparisonFile)); err != nil {
		t.Errorf("cell.Compare wrote no page: %v", err)
	}
	// the folders' comparison reads their summaries: z2 is absent from
	// the second
	results, err := report.ReadCompared(filepath.Join(dir, "sellar"), filepath.Join(dir, "two-variables"))
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := results[1].Summary.Best.Design["z2"]; ok || len(results[0].Summary.Best.Design) != 3 {
		t.Errorf("designs %v and %v", results[0].Summary.Best.Design, results[1].Summary.Best.Design)
	}
}

// A study named like an earlier comparison gets a folder of its own: the
// comparison's folder is never shared with a result's.
func TestResultFolderSkipsAComparisonsFolder(t *testing.T) {
	dir := t.TempDir()
	s, out, errb := newTest(t, Options{OutDir: dir})
	defer s.Close()
	serve(t, s, `st, err := mdo.SellarStudy(mdo.MDF)
cell.Attach(st)
res, err := optimizers.RandomDesign{Samples: 4}.Minimize(cell.Context(), st)
res2, err := optimizers.RandomDesign{Samples: 5}.Minimize(cell.Context(), st)
cmp, err := cell.Compare("later", res, res2)
later, err := mdo.SellarStudy(mdo.MDF)
later.Name = "later"
cell.Attach(later)
res3, err := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), later)
@report res3
`)
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	if _, err := os.Stat(filepath.Join(dir, "later", report.ComparisonFile)); err != nil {
		t.Fatalf("the comparison's page: %v\n%s", err, out)
	}
	if _, err := os.Stat(filepath.Join(dir, "later", report.ReportFile)); err == nil {
		t.Errorf("the study's report went into the comparison's folder:\n%s", out)
	}
	if _, err := os.Stat(filepath.Join(dir, "later-2", report.ReportFile)); err != nil {
		t.Errorf("the study's report is not in later-2: %v\n%s", err, out)
	}
}
