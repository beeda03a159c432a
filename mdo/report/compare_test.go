package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/mdo/runfolder"
	"couplet/mdo/store"

	"github.com/chromedp/chromedp"
)

// gridRun evaluates points of a Sellar study named name over the given
// design variables (the others fixed at fixed) and writes its result
// folder dir/folder with WriteRun; it returns the index entry.
func gridRun(t *testing.T, dir, folder, name string, design []mdo.DesignVar, cons []mdo.Constraint, fixed map[string]float64, points [][]float64) IndexEntry {
	t.Helper()
	e, db := gridRunOpen(t, dir, folder, name, design, cons, fixed, points)
	db.Close()
	return e
}

// gridRunOpen is gridRun with the case store left open after End (the
// test closes it), as a session keeps it until it closes its stores.
func gridRunOpen(t *testing.T, dir, folder, name string, design []mdo.DesignVar, cons []mdo.Constraint, fixed map[string]float64, points [][]float64) (IndexEntry, *store.Store) {
	t.Helper()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Name, st.Design, st.Fixed, st.Seed, st.Workers = name, design, fixed, 3, 1
	if cons != nil {
		st.Constraints = cons
	}
	sub := filepath.Join(dir, folder)
	if err := os.MkdirAll(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	db, err := store.Create(filepath.Join(sub, StoreFile), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	st.Recorder = db
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), points); err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := WriteRun(context.Background(), sub, Run{Result: r, Study: st, Store: db}); err != nil {
		t.Fatal(err)
	}
	s, err := ReadRecord(filepath.Join(sub, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	return IndexEntry{Folder: folder, Summary: s}, db
}

// twoResults writes a script's folder with two results of the Sellar
// problem: one over x, z1 and z2 under both constraints, one over x and
// z1 alone (z2 fixed) under g1 alone.
func twoResults(t *testing.T) (string, []IndexEntry) {
	t.Helper()
	dir := t.TempDir()
	all := gridRun(t, dir, "three-variables", "three variables",
		[]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)}, nil, nil,
		[][]float64{{0.1, 0.75, 0.2}, {0.05, 0.6, 0.05}, {0, 0.599, 0}, {0.2, 0.65, 0.1}, {0, 0.5, 0}})
	two := gridRun(t, dir, "two-variables", "two variables",
		[]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10)}, []mdo.Constraint{mdo.AtLeast("g1", 3.16)}, map[string]float64{"z2": 0.5},
		[][]float64{{0.1, 0.7}, {0.02, 0.625}, {0, 0.6}})
	entries := []IndexEntry{all, two}
	if _, err := WriteIndex(dir, entries); err != nil {
		t.Fatal(err)
	}
	return dir, entries
}

// comparedFolder compares the two results of twoResults' folder.
func comparedFolder(t *testing.T, opt CompareOptions) (string, *Comparison) {
	t.Helper()
	dir, _ := twoResults(t)
	results, err := ReadCompared(dir)
	if err != nil {
		t.Fatal(err)
	}
	c, err := Compare(context.Background(), results, opt)
	if err != nil {
		t.Fatal(err)
	}
	return dir, c
}

// cellOf returns the cells of a row of a section, nil if there is none.
func cellOf(c *Comparison, section, name string) []CompareCell {
	for _, s := range c.Sections {
		if s.Title != section {
			continue
		}
		for _, r := range s.Rows {
			if r.Name == name {
				return r.Cells
			}
		}
	}
	return nil
}

// testFlags is a checklist of our own for the hook: one rule on y1.
func testFlags(r *mdo.Result) []Flag {
	y1, err := r.Lookup("y1")
	if err != nil {
		return nil
	}
	return []Flag{{Rule: "y1 below 10", Value: y1, Band: "< 10", Pass: y1 < 10}}
}

// The table of a script's two results shows the values of their
// summaries, side by side; what one result lacks is absent.
func TestCompareScriptFolder(t *testing.T) {
	dir, entries := twoResults(t)
	results, err := ReadCompared(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(results) != 2 || results[0].Label != "three-variables" || results[1].Label != "two-variables" {
		t.Fatalf("read %d results labelled %v", len(results), labels(results))
	}
	for i, r := range results {
		if r.Result == nil {
			t.Fatalf("%s: the case store was not read: %s", r.Label, r.Missing)
		}
		if want := []int{5, 3}[i]; r.Summary.Evaluations != want {
			t.Errorf("%s: %d evaluations in the summary, want the %d points evaluated", r.Label, r.Summary.Evaluations, want)
		}
	}
	c, err := Compare(context.Background(), results, CompareOptions{Flags: testFlags})
	if err != nil {
		t.Fatal(err)
	}
	a, b := entries[0].Summary.Best, entries[1].Summary.Best
	cell := func(m map[string]store.Number, name string) string {
		v, ok := m[name]
		if !ok {
			return Absent
		}
		return num(float64(v))
	}
	// the values the summaries hold, formatted as the table formats them
	tests := []struct {
		section, row string
		want         []string
	}{
		{"runs", "study", []string{"three variables", "two variables"}},
		{"runs", "optimiser", []string{"grid", "grid"}},
		{"runs", "evaluations", []string{strconv.Itoa(entries[0].Summary.Evaluations), strconv.Itoa(entries[1].Summary.Evaluations)}},
		{"runs", "stop", []string{entries[0].Summary.Stop, entries[1].Summary.Stop}},
		{"design variables", "x", []string{cell(a.Design, "x"), cell(b.Design, "x")}},
		{"design variables", "z1", []string{cell(a.Design, "z1"), cell(b.Design, "z1")}},
		{"design variables", "z2", []string{cell(a.Design, "z2"), Absent}},
		{"objectives", "minimise f", []string{cell(a.Objectives, "f"), cell(b.Objectives, "f")}},
		{"constraints", "g1 >= 3.16", []string{cell(a.Constraints, "g1"), cell(b.Constraints, "g1")}},
		{"constraints", "g2 <= 24", []string{cell(a.Constraints, "g2"), Absent}},
	}
	for _, tc := range tests {
		t.Run(tc.section+"/"+tc.row, func(t *testing.T) {
			cells := cellOf(c, tc.section, tc.row)
			var got []string
			for _, x := range cells {
				got = append(got, x.Text)
			}
			if !slices.Equal(got, tc.want) {
				t.Errorf("row %q of %q: %q, want %q (from the summaries)", tc.row, tc.section, got, tc.want)
			}
		})
	}
	// margins carry their state; g2 is absent from the second result
	m := cellOf(c, "margins", "g1")
	for i, p := range []*store.SummaryPoint{a, b} {
		want := float64(p.Margins["g1"])
		if len(m) != 2 || m[i].Value != want || !strings.HasPrefix(m[i].Text, num(want)+" ") {
			t.Errorf("margin of g1 of result %d: %+v, want %s and its state", i+1, m, num(want))
		}
		state := "ok"
		if want < 0 {
			state = "violated"
		}
		if len(m) == 2 && m[i].State != state && !(state == "ok" && m[i].State == "active") {
			t.Errorf("margin %s of result %d has state %q, want %q", num(want), i+1, m[i].State, state)
		}
	}
	if g2 := cellOf(c, "margins", "g2"); len(g2) != 2 || !g2[1].Absent {
		t.Errorf("margin of g2: %+v, want absent for the second result", g2)
	}
	// the hook's flags, read from each best design's outputs
	flags := cellOf(c, "checklist flags (flags, not constraints)", "y1 below 10")
	if len(flags) != 2 {
		t.Fatalf("the checklist's row: %+v", flags)
	}
	for i, r := range results {
		y1, _ := r.Result.Lookup("y1")
		if flags[i].Value != y1 {
			t.Errorf("flag of result %d: %v, want y1 = %v", i+1, flags[i].Value, y1)
		}
	}
	text := c.String()
	for _, w := range []string{"three-variables", "two-variables", "design variables", "absent", "airworthiness"} {
		if !strings.Contains(text, w) {
			t.Errorf("the text lacks %q:\n%s", w, text)
		}
	}
	for _, l := range strings.Split(text, "\n") {
		if strings.HasSuffix(l, " ") {
			t.Errorf("line %q ends in a blank", l)
		}
	}
	if len(c.Figures) == 0 || c.Figures[0].Name != "overlay_history" || c.Figures[0].Reason != nil {
		t.Fatalf("figures %v", c.Figures)
	}
	var svg bytes.Buffer
	if err := c.Figures[0].WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	words, err := plot.SVGText(svg.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"three-variables", "two-variables", "evaluations"} {
		if !slices.Contains(words, w) {
			t.Errorf("the history overlay does not show %q: %q", w, words)
		}
	}
}

// labels lists the labels of results.
func labels(cs []Compared) []string {
	var out []string
	for _, c := range cs {
		out = append(out, c.Label)
	}
	return out
}

// A folder that holds no result is refused, naming it.
func TestReadComparedRefuses(t *testing.T) {
	dir, _ := twoResults(t)
	bad := t.TempDir()
	file := filepath.Join(bad, "notes.txt")
	garbled := filepath.Join(bad, "garbled")
	noResult := filepath.Join(bad, "no-result")
	for _, d := range []string{garbled, noResult, filepath.Join(bad, "empty")} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(file, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(garbled, SummaryFile), []byte("{not json"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := store.WriteSummary(filepath.Join(noResult, SummaryFile), store.NoResultSummary("idle", 0, 2, time.Unix(0, 0), store.SummaryOptions{})); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, path, reason string
	}{
		{"missing", filepath.Join(bad, "none"), "does not exist"},
		{"a file", file, "is a file"},
		{"no summary", filepath.Join(bad, "empty"), "holds no summary.json"},
		{"garbled summary", garbled, "summary.json"},
		{"a run without a result", noResult, "records no best point"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadCompared(filepath.Join(dir, "three-variables"), tc.path)
			var nr *NotAResultError
			if !errors.As(err, &nr) || nr.Path != tc.path || !strings.Contains(err.Error(), tc.path) || !strings.Contains(err.Error(), tc.reason) {
				t.Errorf("error %v, want a *NotAResultError naming %s: %s", err, tc.path, tc.reason)
			}
		})
	}
	// one folder given twice, and two folders of one name
	sub := filepath.Join(dir, "two-variables")
	other := filepath.Join(t.TempDir(), "two-variables")
	if err := os.CopyFS(other, os.DirFS(sub)); err != nil {
		t.Fatal(err)
	}
	twice, err := ReadCompared(sub, sub, other)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := labels(twice), []string{sub, sub + " (2)", other}; !slices.Equal(got, want) {
		t.Errorf("labels %q, want %q", got, want)
	}
	// a result folder without its case store is compared from its
	// summary, the plots and flags left out with a note
	if err := os.Remove(filepath.Join(other, StoreFile)); err != nil {
		t.Fatal(err)
	}
	bare, err := ReadCompared(sub, other)
	if err != nil {
		t.Fatal(err)
	}
	if bare[1].Result != nil || !strings.Contains(bare[1].Missing, "no results.db") {
		t.Errorf("the folder without a store: %+v", bare[1])
	}
	c, err := Compare(context.Background(), bare, CompareOptions{Flags: testFlags})
	if err != nil {
		t.Fatal(err)
	}
	if x := cellOf(c, "design variables", "x"); len(x) != 2 || x[1].Text != x[0].Text || x[1].Absent {
		t.Errorf("the x row from the summaries of one result twice: %+v", x)
	}
	if f := cellOf(c, "checklist flags (flags, not constraints)", "y1 below 10"); len(f) != 2 || !f[1].Absent {
		t.Errorf("the flags of the folder without a store: %+v", f)
	}
	if !strings.Contains(c.String(), "note: "+other+": no plots nor checklist flags") {
		t.Errorf("no note of the missing store:\n%s", c)
	}
	if _, err := Compare(context.Background(), nil, CompareOptions{}); err == nil {
		t.Error("a comparison of no result was accepted")
	}
}

// The page is written into a folder of its own, guarded as a run folder
// is: an earlier comparison only with Replace, a run's folder never.
func TestWriteComparisonGuard(t *testing.T) {
	dir, c := comparedFolder(t, CompareOptions{})
	out := filepath.Join(t.TempDir(), "cmp")
	files, err := WriteComparison(context.Background(), out, c, WriteComparisonOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(files, filepath.Join(out, ComparisonFile)) || !slices.Contains(files, filepath.Join(out, "overlay_history.svg")) {
		t.Errorf("files written: %q", files)
	}
	var occ *OccupiedError
	if _, err := WriteComparison(context.Background(), out, c, WriteComparisonOptions{}); !errors.As(err, &occ) || occ.Run {
		t.Errorf("a second comparison into %s: %v, want it refused as an earlier comparison", out, err)
	}
	// a link in place of the page is replaced, its target left alone
	target := filepath.Join(t.TempDir(), "outside.html")
	if err := os.WriteFile(target, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(filepath.Join(out, ComparisonFile)); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(target, filepath.Join(out, ComparisonFile)); err != nil {
		t.Fatal(err)
	}
	if _, err := WriteComparison(context.Background(), out, c, WriteComparisonOptions{Replace: true}); err != nil {
		t.Fatalf("replacing the earlier comparison: %v", err)
	}
	if b, _ := os.ReadFile(target); string(b) != "mine" {
		t.Errorf("the comparison was written through a link: %q", b)
	}
	if fi, err := os.Lstat(filepath.Join(out, ComparisonFile)); err != nil || !fi.Mode().IsRegular() {
		t.Errorf("the page is not a regular file: %v", err)
	}
	// a result folder, or the script's folder, is never cleared
	for _, d := range []string{filepath.Join(dir, "two-variables"), dir} {
		if _, err := WriteComparison(context.Background(), d, c, WriteComparisonOptions{Replace: true}); !errors.As(err, &occ) || !occ.Run {
			t.Errorf("comparison into the run's folder %s: %v, want it refused", d, err)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "two-variables", StoreFile)); err != nil {
		t.Errorf("the result's store is gone: %v", err)
	}
	// a folder another writer holds
	busyDir := filepath.Join(t.TempDir(), "busy")
	lock, err := runfolder.TakeLock(busyDir)
	if err != nil {
		t.Fatal(err)
	}
	defer lock.Release()
	var busy *runfolder.BusyError
	if _, err := WriteComparison(context.Background(), busyDir, c, WriteComparisonOptions{}); !errors.As(err, &busy) {
		t.Errorf("comparison into a folder in use: %v, want a *runfolder.BusyError", err)
	}
}

// The page is well formed HTML: every element closed in order, one cell
// per result in every row of the table, the absent values marked.
func TestComparisonPageWellFormed(t *testing.T) {
	dir, c := comparedFolder(t, CompareOptions{Flags: testFlags})
	var page bytes.Buffer
	if err := c.WritePage(&page, filepath.Join(dir, "cmp")); err != nil {
		t.Fatal(err)
	}
	checkWellFormed(t, page.Bytes(), len(c.Results)+2)
	for _, w := range []string{`href="../three-variables/report.html"`, `class="num absent"`, "airworthiness", "<svg"} {
		if !strings.Contains(page.String(), w) {
			t.Errorf("the page lacks %q", w)
		}
	}
}

// checkWellFormed parses an HTML page as XML with HTML's void elements
// and entities, failing on an element closed out of order, and checks
// that every row of the comparison table has cells (or one heading
// spanning them) for all span columns.
func checkWellFormed(t *testing.T, page []byte, span int) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(page))
	d.Strict, d.AutoClose, d.Entity = true, xml.HTMLAutoClose, xml.HTMLEntity
	var stack []string
	inTable, cells, rows := false, 0, 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the page is not well formed: %v", err)
		}
		switch x := tok.(type) {
		case xml.StartElement:
			stack = append(stack, x.Name.Local)
			switch x.Name.Local {
			case "table":
				for _, a := range x.Attr {
					inTable = inTable || a.Name.Local == "id" && a.Value == "comparison"
				}
			case "tr":
				cells = 0
			case "td", "th":
				if inTable {
					cells++
					for _, a := range x.Attr {
						if a.Name.Local == "colspan" {
							n, _ := strconv.Atoi(a.Value)
							cells += n - 1
						}
					}
				}
			}
		case xml.EndElement:
			if len(stack) == 0 || stack[len(stack)-1] != x.Name.Local {
				t.Fatalf("</%s> closes <%s>", x.Name.Local, strings.Join(stack, "><"))
			}
			stack = stack[:len(stack)-1]
			if x.Name.Local == "tr" && inTable {
				rows++
				if cells != span {
					t.Errorf("row %d of the table has %d cells, want %d", rows, cells, span)
				}
			}
			if x.Name.Local == "table" {
				inTable = false
			}
		}
	}
	if len(stack) != 0 {
		t.Errorf("elements left open: %v", stack)
	}
	if rows < 10 {
		t.Errorf("the table has %d rows", rows)
	}
}

// Results with two objectives get their fronts overlaid; a result of one
// objective beside them is left out of that figure, and their table cells
// give the ranges over the fronts.
func TestCompareFronts(t *testing.T) {
	r1, _ := sellarResult(t, 40, mdo.Minimize("f"), mdo.Minimize("y2"))
	r2, _ := sellarResult(t, 25, mdo.Minimize("f"), mdo.Minimize("y2"))
	r3, _ := sellarResult(t, 10)
	cs, err := ComparedResults(r1, r2, r3)
	if err != nil {
		t.Fatal(err)
	}
	if got := labels(cs); !slices.Equal(got, []string{"sellar", "sellar (2)", "sellar (3)"}) {
		t.Errorf("labels %q", got)
	}
	c, err := Compare(context.Background(), cs, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var pareto *plot.Figure
	for _, f := range c.Figures {
		if f.Name == "overlay_pareto" {
			pareto = f
		}
	}
	if pareto == nil || pareto.Reason != nil {
		t.Fatalf("no Pareto overlay: %v", c.Figures)
	}
	var svg bytes.Buffer
	if err := pareto.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	words, _ := plot.SVGText(svg.Bytes())
	joined := strings.Join(words, " ")
	for _, w := range []string{"sellar (" + strconv.Itoa(len(r1.Front)) + " points)", "sellar (2) (" + strconv.Itoa(len(r2.Front)) + " points)"} {
		if !strings.Contains(joined, w) {
			t.Errorf("the front overlay lacks %q: %s", w, joined)
		}
	}
	if strings.Contains(joined, "sellar (3)") {
		t.Errorf("the one-objective result is on the front overlay: %s", joined)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range r1.Front {
		lo, hi = math.Min(lo, e.Objectives[1]), math.Max(hi, e.Objectives[1])
	}
	if len(r1.Front) < 3 || lo == hi {
		t.Fatalf("the first front has %d points, from %v to %v", len(r1.Front), lo, hi)
	}
	if got := cellOf(c, "objectives", "minimise y2"); len(got) != 3 || got[0].Text != num(lo)+" … "+num(hi) || !got[2].Absent {
		t.Errorf("y2 row %+v, want the range %s … %s over the first front and absent for the third", got, num(lo), num(hi))
	}
}

// A comparison page renders in a browser without a console message, with
// its table and its overlay figures.
func TestComparisonRendersInChromium(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	_, c := comparedFolder(t, CompareOptions{Flags: testFlags})
	out := filepath.Join(t.TempDir(), "cmp")
	if _, err := WriteComparison(context.Background(), out, c, WriteComparisonOptions{}); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := browser(t)
	defer cancel()
	abs, err := filepath.Abs(filepath.Join(out, ComparisonFile))
	if err != nil {
		t.Fatal(err)
	}
	res := render(t, ctx, abs)
	checkRendered(t, res, "Comparison of 2 results", len(c.Figures))
	// every row of the table has its cells
	rows, err := chromedp.Run(ctx, chromedp.Evaluate[[]int](`Array.from(document.querySelectorAll("#comparison tr")).map(r => r.cells.length === 1 ? r.cells[0].colSpan : r.cells.length)`))
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 10 {
		t.Errorf("the table shows %d rows", len(rows))
	}
	for i, n := range rows {
		if n != len(c.Results)+2 {
			t.Errorf("row %d of the table spans %d columns, want %d", i+1, n, len(c.Results)+2)
		}
	}
}

// A result whose first objective is another is left out of the history
// overlay, and a note says so.
func TestCompareHistoryOfAnotherObjective(t *testing.T) {
	r1, _ := sellarResult(t, 10)
	r2, _ := sellarResult(t, 10, mdo.Maximize("y2"))
	cs, err := ComparedResults(r1, r2)
	if err != nil {
		t.Fatal(err)
	}
	c, err := Compare(context.Background(), cs, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := "sellar (2): left out of the history overlay, drawn on minimise f: its first objective is maximise y2."
	if !slices.Contains(c.Notes, want) || !strings.Contains(c.String(), "note: "+want) {
		t.Errorf("notes %q, want %q", c.Notes, want)
	}
	var svg bytes.Buffer
	if err := c.Figures[0].WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	words, _ := plot.SVGText(svg.Bytes())
	if slices.Contains(words, "sellar (2)") || !slices.Contains(words, "sellar") {
		t.Errorf("the history overlay shows %q", words)
	}
	if got := cellOf(c, "objectives", "maximise y2"); len(got) != 2 || !got[0].Absent || got[1].Absent {
		t.Errorf("the y2 row: %+v", got)
	}
}
