package report

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/runfolder"
)

// folders lists the folders of the index dir's summary.json names, in
// order, and its principal.
func folders(t *testing.T, dir string) ([]string, string) {
	t.Helper()
	idx, err := ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, r := range idx.Results {
		out = append(out, r.Folder)
	}
	return out, idx.Principal
}

// sellarGrid writes the result folder dir/folder of a small grid on the
// Sellar problem named study.
func sellarGrid(t *testing.T, dir, folder, study string, points [][]float64) IndexEntry {
	t.Helper()
	return gridRun(t, dir, folder, study,
		[]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)}, nil, nil, points)
}

// A later index of the same folder keeps the results written there
// before, whoever wrote them: an earlier index's results in their order,
// a result folder no index listed (its writer died before the index),
// and a result written again keeps its line with its new summary; the
// principal is the last written. (Before, the index listed the entries
// it was given alone.)
func TestWriteIndexKeepsEarlierResults(t *testing.T) {
	dir := t.TempDir()
	a := sellarGrid(t, dir, "wing", "wing", [][]float64{{0.1, 0.7, 0.2}, {0.05, 0.6, 0.05}})
	if _, err := WriteIndex(dir, []IndexEntry{a}); err != nil {
		t.Fatal(err)
	}
	b := sellarGrid(t, dir, "tail", "tail", [][]float64{{0.2, 0.65, 0.1}})
	if _, err := WriteIndex(dir, []IndexEntry{b}); err != nil {
		t.Fatal(err)
	}
	if got, principal := folders(t, dir); !slices.Equal(got, []string{"wing", "tail"}) || principal != "tail" {
		t.Fatalf("after a second index: %v, principal %q; want [wing tail], tail", got, principal)
	}
	// a folder written by a process that died before its index, and the
	// first result written again with more points
	sellarGrid(t, dir, "fin", "fin", [][]float64{{0, 0.5, 0}})
	if err := os.Remove(filepath.Join(dir, "wing", StoreFile)); err != nil {
		t.Fatal(err)
	}
	a2 := sellarGrid(t, dir, "wing", "wing", [][]float64{{0.1, 0.7, 0.2}, {0.05, 0.6, 0.05}, {0, 0.599, 0}})
	if _, err := WriteIndex(dir, []IndexEntry{a2}); err != nil {
		t.Fatal(err)
	}
	got, principal := folders(t, dir)
	if !slices.Equal(got, []string{"wing", "tail", "fin"}) || principal != "wing" {
		t.Fatalf("after the first written again: %v, principal %q; want [wing tail fin], wing", got, principal)
	}
	idx, _ := ReadIndex(dir)
	if idx.Results[0].Evaluations != 3 || idx.Evaluations != 3 || idx.Study != "wing" {
		t.Errorf("the result written again: line %+v, summary %s with %d evaluations; want its new 3 evaluations", idx.Results[0], idx.Study, idx.Evaluations)
	}
	page, err := os.ReadFile(filepath.Join(dir, runfolder.IndexFile))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range got {
		if !strings.Contains(string(page), `href="`+f+`/report.html"`) {
			t.Errorf("index.html does not link %s/report.html", f)
		}
	}
	if !strings.Contains(string(page), "wing (principal)") {
		t.Errorf("index.html does not mark the principal result")
	}
	// a folder whose result is gone drops out of the list
	if err := os.RemoveAll(filepath.Join(dir, "tail")); err != nil {
		t.Fatal(err)
	}
	if _, err := WriteIndex(dir, []IndexEntry{a2}); err != nil {
		t.Fatal(err)
	}
	if got, _ := folders(t, dir); !slices.Equal(got, []string{"wing", "fin"}) {
		t.Errorf("after tail was removed: %v, want [wing fin]", got)
	}
}

// Nothing of the index is read through a symbolic link: a result
// sub-folder that is a link to a result elsewhere is not listed, nor is
// one whose summary.json is a link, and a summary.json of the folder
// that is a link to another index is not read (it is replaced by a file,
// its target untouched). Comparisons' folders are not results.
func TestWriteIndexFollowsNoLink(t *testing.T) {
	elsewhere := t.TempDir()
	sellarGrid(t, elsewhere, "outside", "outside", [][]float64{{0.1, 0.7, 0.2}})
	if _, err := WriteIndex(elsewhere, []IndexEntry{sellarGrid(t, elsewhere, "other", "other", [][]float64{{0.2, 0.7, 0.2}})}); err != nil {
		t.Fatal(err)
	}
	foreign, err := os.ReadFile(filepath.Join(elsewhere, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.Symlink(filepath.Join(elsewhere, "outside"), filepath.Join(dir, "outside")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(elsewhere, "other"), filepath.Join(dir, "other")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(elsewhere, SummaryFile), filepath.Join(dir, SummaryFile)); err != nil {
		t.Fatal(err)
	}
	linkedSummary := filepath.Join(dir, "linked")
	if err := os.MkdirAll(linkedSummary, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(elsewhere, "outside", SummaryFile), filepath.Join(linkedSummary, SummaryFile)); err != nil {
		t.Fatal(err)
	}
	cmpDir := sellarGrid(t, dir, "compared", "compared", [][]float64{{0.1, 0.6, 0.2}})
	if err := os.WriteFile(filepath.Join(dir, cmpDir.Folder, runfolder.ComparisonFile), []byte("<html>"), 0o644); err != nil {
		t.Fatal(err)
	}
	mine := sellarGrid(t, dir, "mine", "mine", [][]float64{{0.3, 0.7, 0.2}})
	if _, err := WriteIndex(dir, []IndexEntry{mine}); err != nil {
		t.Fatal(err)
	}
	if got, _ := folders(t, dir); !slices.Equal(got, []string{"mine"}) {
		t.Errorf("the index lists %v, want [mine] alone", got)
	}
	if fi, err := os.Lstat(filepath.Join(dir, SummaryFile)); err != nil || !fi.Mode().IsRegular() {
		t.Errorf("the folder's summary.json is not a file of its own (%v)", err)
	}
	if b, _ := os.ReadFile(filepath.Join(elsewhere, SummaryFile)); string(b) != string(foreign) {
		t.Errorf("the link's target changed")
	}
}
