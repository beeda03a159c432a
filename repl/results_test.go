package repl

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"couplet/mdo/report"
	"couplet/mdo/store"
)

// resultFolder returns the folder of the principal result of a script's
// output folder, as its summary.json names it.
func resultFolder(t *testing.T, dir string) string {
	t.Helper()
	idx, err := report.ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	if idx.Principal == "" {
		t.Fatalf("%s/summary.json names no principal result folder", dir)
	}
	return filepath.Join(dir, idx.Principal)
}

// A script that hands over two results, of two studies and of a second
// run of one study, leaves a folder for each, named by its study and
// unique, with its own case store, summary, CSV, plots and report; the
// output folder gets an index page and a summary.json that keeps the
// principal (last) result's study, seed, evaluations and best and lists
// the folders. Pick-up finds each store again in its folder.
func TestEveryResultHasItsFolder(t *testing.T) {
	file := writeStudy(t, "three", sellarCells+`
//~ cell 2
aft, err := mdo.SellarStudy(mdo.MDF)
if err != nil {
	panic(err)
}
aft.Name = "Aft sweep"
aft.Seed = 3
if err := cell.Attach(aft); err != nil {
	panic(err)
}
r2, err := optimizers.NelderMead{MaxEvaluations: 20}.Minimize(cell.Context(), aft)
if err != nil {
	panic(err)
}
cell.Publish(r2)
r3, err := optimizers.NelderMead{MaxEvaluations: 12}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(r3)
`)
	dir := filepath.Join(t.TempDir(), "out")
	if stderr, err := runInto(t, context.Background(), file, dir, nil); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	idx, err := report.ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	var folders []string
	for _, r := range idx.Results {
		folders = append(folders, r.Folder)
	}
	if want := []string{"sellar", "aft-sweep", "sellar-2"}; !slices.Equal(folders, want) {
		t.Fatalf("result folders %v, want %v", folders, want)
	}
	if idx.Principal != "sellar-2" || idx.Study != "sellar" || idx.Best == nil || idx.Evaluations != idx.Results[2].Evaluations {
		t.Errorf("summary.json: principal %q, study %q, evaluations %d, best %v; want the last result's", idx.Principal, idx.Study, idx.Evaluations, idx.Best)
	}
	for i, f := range folders {
		sum, err := store.ReadSummary(filepath.Join(dir, f, "summary.json"))
		if err != nil {
			t.Fatal(err)
		}
		if sum.Evaluations != idx.Results[i].Evaluations || sum.Study != idx.Results[i].Study {
			t.Errorf("%s/summary.json: %s with %d evaluations, the index says %+v", f, sum.Study, sum.Evaluations, idx.Results[i])
		}
		for _, name := range []string{"results.db", "evaluations.csv", "report.html", "history.svg", "dsm.svg"} {
			if fi, err := os.Stat(filepath.Join(dir, f, name)); err != nil || fi.Size() == 0 {
				t.Errorf("%s/%s missing or empty: %v", f, name, err)
			}
		}
		st, err := store.Open(filepath.Join(dir, f, "results.db"))
		if err != nil {
			t.Fatal(err)
		}
		if st.Rows() != sum.Evaluations {
			t.Errorf("%s/results.db holds %d rows, its summary counts %d", f, st.Rows(), sum.Evaluations)
		}
		st.Close()
	}
	page, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range folders {
		if !strings.Contains(string(page), `href="`+f+`/report.html"`) {
			t.Errorf("index.html does not link %s/report.html", f)
		}
	}

	// the folder's top holds the principal result's store and report
	// under the names one result gives them (the command-line contract)
	for _, name := range []string{"results.db", "report.html"} {
		top, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatalf("the folder's %s: %v", name, err)
		}
		principal, err := os.ReadFile(filepath.Join(dir, "sellar-2", name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(top, principal) {
			t.Errorf("the folder's %s (%d bytes) is not the principal result's (%d bytes)", name, len(top), len(principal))
		}
	}

	// picked up, every result comes again from its own store
	before, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	if stderr, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.PickUp = true }); err != nil {
		t.Fatalf("--pick-up: %v\n%s", err, stderr)
	}
	again, err := report.ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range again.Results {
		if r.Folder != folders[i] || r.Evaluations != idx.Results[i].Evaluations {
			t.Errorf("picked up: %+v, want %+v", r, idx.Results[i])
		}
	}
	if after, _ := os.ReadFile(filepath.Join(dir, "summary.json")); len(before) == 0 || !sameButTimes(before, after) {
		t.Errorf("picked up, summary.json changed beyond its times:\n%s\n%s", before, after)
	}
}

// sameButTimes compares two summaries but for their timestamps and
// their counts of analyses and picked-up points.
func sameButTimes(a, b []byte) bool {
	var x, y report.IndexSummary
	if json.Unmarshal(a, &x) != nil || json.Unmarshal(b, &y) != nil {
		return false
	}
	for _, s := range []*report.IndexSummary{&x, &y} {
		s.Timestamps, s.Analyses, s.PickedUp = store.Timestamps{}, 0, 0
	}
	return reflect.DeepEqual(x, y)
}

// Folder names come from the study's name, in lower case, with other
// characters than letters, digits and '_' made one '-'.
func TestFolderName(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"sellar", "sellar"}, {"Aft sweep", "aft-sweep"}, {"../x", "x"}, {"a//b  c", "a-b-c"},
		{"", "study"}, {"...", "study"}, {"summary.json", "summary-json"}, {"wing_v2", "wing_v2"}, {"Flügel", "fl-gel"},
	} {
		if got := FolderName(tc.in); got != tc.want {
			t.Errorf("FolderName(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
