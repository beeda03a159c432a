package store

import (
	"bytes"
	"compress/gzip"
	"context"
	"database/sql"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
)

var updateGolden = flag.Bool("update-golden-store", false, "rewrite testdata/golden_store.db.gz with the store this code writes")

// goldenFile is a case store written by an earlier version of the write
// path, gzipped (regenerate with -update-golden-store only when the
// file's content is meant to change).
const goldenFile = "testdata/golden_store.db.gz"

// goldenRows is the number of evaluations of the golden run.
const goldenRows = 75

// goldenRun is the run of the golden store: the business jet's width (4
// design variables, 9 constraints, 236 outputs), goldenRows evaluations in
// batches of 10 (multi-row inserts, and one-row inserts for the last
// five), iterations between them.
func goldenRun() mdo.RunInfo {
	info := syntheticRunOf(jetShape)
	info.Study, info.Optimizer, info.Seed = "golden", "synthetic", 7
	info.Settings = map[string]string{"population": "10"}
	info.Started = time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
	return info
}

// goldenEval is evaluation i of the golden run: values of every kind the
// store must keep exactly (NaN, ±0, ±Inf, subnormals, the largest float,
// integral values, values repeated from the row before and values that
// differ in the last bit), and every seventh analysis failed.
func goldenEval(i int) *mdo.Evaluation {
	sh := jetShape
	e := &mdo.Evaluation{ID: i + 1}
	special := []float64{math.NaN(), math.Copysign(0, -1), 0, math.Inf(1), math.Inf(-1), 5e-324, math.MaxFloat64,
		-math.MaxFloat64, 1, -3, 1e6, 123456789012345678, math.Nextafter(1, 2), 0.1 + 0.2, math.Pi, -math.E}
	val := func(k int) float64 {
		switch (i*7 + k*3) % 11 {
		case 0:
			return special[(i+k)%len(special)]
		case 1:
			return float64(k) // repeated from row to row
		default:
			return math.Sin(float64(i*len(special)+k)) * math.Pow(10, float64((i+k)%9-4))
		}
	}
	e.X, e.Design = make([]float64, sh.design), make([]float64, sh.design)
	for k := range e.X {
		e.X[k] = math.Mod(float64(i+1)*0.618034+float64(k)*0.414214, 1)
		e.Design[k] = 100 + 120*e.X[k]
	}
	e.Objectives, e.F = []float64{val(1000)}, []float64{val(1000)}
	e.Constraints, e.Margins, e.G = make([]float64, sh.cons), make([]float64, sh.cons), make([]float64, sh.cons)
	for k := range e.G {
		e.Constraints[k], e.Margins[k], e.G[k] = val(2000+k), val(3000+k), val(4000+k)
	}
	e.Violation = math.Max(0, val(5000))
	e.Feasible = i%3 != 0
	e.Converged = i%7 != 3
	e.CouplingIterations, e.DisciplineCalls = 5+i%4, 20+i%9
	e.Wall = time.Duration(1000+37*i) * time.Microsecond
	if !e.Converged {
		e.Err = fmt.Sprintf("the coupled group did not converge in %d iterations", 50+i)
		e.Failure = []mdo.FailureClass{mdo.SolverFailed, mdo.DoesNotClose, mdo.InvalidInput}[i%3]
		e.Feasible = false
		return e
	}
	e.Outputs = make([]float64, sh.outputs)
	for k := range e.Outputs {
		e.Outputs[k] = val(k)
	}
	return e
}

// goldenRecord is the run record of the golden run: the caution, the
// goals as declared (every other constraint with a tolerance and a
// scale) and two coupled groups' solvers, one with a NaN tolerance.
func goldenRecord(info mdo.RunInfo) RunRecord {
	rec := RunRecord{Caution: "Conceptual estimates: not for certification, flight or airworthiness decisions.",
		Objectives: []mdo.Objective{mdo.Minimize(info.Objectives[0])}}
	for k, c := range info.Constraints {
		if k%2 == 0 {
			rec.Constraints = append(rec.Constraints, mdo.AtMost(c, float64(k)))
		} else {
			rec.Constraints = append(rec.Constraints, mdo.AtLeast(c, -float64(k)))
		}
	}
	rec.CouplingSolvers = []CouplingSolver{
		{Disciplines: []string{"aero", "weights", "propulsion"}, Method: "gauss-seidel", Tolerance: 1e-8, MaxIterations: 50, Relaxation: 0.7, Fallback: true},
		{Disciplines: []string{"mission"}, Method: "newton", Tolerance: Number(math.NaN()), MaxIterations: 20, Relaxation: 1, FromReference: true, Exhaustive: true},
	}
	return rec
}

// goldenSensitivity is the sensitivity of the golden run's best point:
// limits active and not, an active limit without a sensitivity (NaN,
// with the reason) and a parameter without a unit (invented values).
func goldenSensitivity() *mdo.Sensitivity {
	return &mdo.Sensitivity{Objective: "mass.takeoff", Unit: "kg",
		Limits: []mdo.LimitCost{
			{Constraint: "perf.c0", Bound: "upper", Limit: 0, Unit: "m", Active: true, PerUnit: -12.5},
			{Constraint: "perf.c1", Bound: "lower", Limit: -1, Unit: "", Active: false, PerUnit: 0},
			{Constraint: "perf.c2", Bound: "upper", Limit: 2, Unit: "kg", Active: true, PerUnit: math.NaN(),
				NotDefined: "the constraint does not vary with the design here"},
		},
		Parameters: []mdo.ParameterCost{{Parameter: "range", Value: 5556e3, Unit: "m", PerUnit: 1.0 / 3}, {Parameter: "k", Value: 0.1 + 0.2, PerUnit: -7}},
	}
}

// writeGoldenRun writes the golden run into a new store at path.
func writeGoldenRun(t *testing.T, path string) {
	t.Helper()
	s, err := Create(path, Options{ToolVersion: "golden", BatchSize: 10, FlushInterval: time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	info := goldenRun()
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	if err := s.SetRunRecord(goldenRecord(info)); err != nil {
		t.Fatal(err)
	}
	const n = goldenRows
	evs := make([]*mdo.Evaluation, n)
	for i := range evs {
		evs[i] = goldenEval(i)
		if err := s.Record(evs[i]); err != nil {
			t.Fatal(err)
		}
		if i%25 == 24 {
			p := mdo.Progress{Optimizer: "synthetic", Iteration: i/25 + 1, Evaluations: i + 1, Best: evs[1].F[0], Feasible: true, Violation: 0}
			if err := s.Iteration(p); err != nil {
				t.Fatal(err)
			}
		}
	}
	res := &mdo.Result{Study: info.Study, Optimizer: info.Optimizer, Seed: info.Seed, Design: info.Design,
		Objectives: []mdo.Objective{mdo.Minimize(info.Objectives[0])}, Best: evs[1], Front: []*mdo.Evaluation{evs[1], evs[4]},
		Stop: mdo.StopBudget, Started: info.Started, Elapsed: 1500 * time.Millisecond}
	for k, c := range info.Constraints {
		if k%2 == 0 {
			res.Constraints = append(res.Constraints, mdo.AtMost(c, float64(k)))
		} else {
			res.Constraints = append(res.Constraints, mdo.AtLeast(c, -float64(k)))
		}
	}
	res.EvalCounters = mdo.EvalCounters{Evaluations: n, Analyses: n, Failed: 11, DisciplineCalls: 3600, CouplingIterations: 975}
	res.StopDetail = "the budget of 75 evaluations was spent before the simplex converged"
	res.Surrogates = []mdo.SurrogateUse{{Discipline: "aero-fit", Model: "quadratic response surface of 40 samples", Outputs: []string{"out.v3", "out.v4"}, Affects: []string{"mass.takeoff", "perf.c2"}}}
	res.Sensitivity = goldenSensitivity()
	res.Notes = []string{"fixed parameters from the calibration of 2 January", "a note with \"quotes\", a tab\tand ünïcode"}
	if err := s.End(res); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestStoreFileUnchanged writes the golden run and compares the file with
// testdata/golden_store.db, written by the code before the write path was
// last changed: the schema and views, every value of every table and of
// the views (bit for bit; only the clock's timestamps and the Go version
// are left out), and the evaluations the store's reader gives back.
func TestStoreFileUnchanged(t *testing.T) {
	path := filepath.Join(t.TempDir(), "now.db")
	writeGoldenRun(t, path)
	if *updateGolden {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var z bytes.Buffer
		zw, _ := gzip.NewWriterLevel(&z, gzip.BestCompression)
		if _, err := zw.Write(b); err != nil {
			t.Fatal(err)
		}
		if err := zw.Close(); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(goldenFile, z.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("rewrote %s", goldenFile)
		return
	}
	golden := gunzipTo(t, goldenFile)
	want, got := dumpStore(t, golden), dumpStore(t, path)
	for _, q := range storeQueries(t, golden) {
		w, g := want[q], got[q]
		if len(w) == 0 {
			t.Errorf("%s: no rows in the golden store", q)
		}
		if len(w) != len(g) {
			t.Errorf("%s: %d rows, the golden store %d", q, len(g), len(w))
			continue
		}
		for i := range w {
			if w[i] != g[i] {
				t.Errorf("%s: row %d differs: %s", q, i, firstDifference(g[i], w[i]))
				break
			}
		}
	}
	// the store's reader gives the same evaluations back
	evsWant, evsGot := readEvaluations(t, golden), readEvaluations(t, path)
	if len(evsWant) != goldenRows || len(evsGot) != len(evsWant) {
		t.Fatalf("read %d evaluations back, the golden store %d (want %d)", len(evsGot), len(evsWant), goldenRows)
	}
	for i := range evsWant {
		if f := sameEvaluation(evsGot[i], evsWant[i]); f != "" {
			t.Errorf("evaluation %d read back differs in %s", evsWant[i].ID, f)
		}
	}
}

// readEvaluations opens the store at path and returns its evaluations.
func readEvaluations(t *testing.T, path string) []*mdo.Evaluation {
	t.Helper()
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	evs, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	return evs
}

// maskedColumns are the values of a store that come from the clock or the
// toolchain, not from the run: left out of the comparison.
var maskedColumns = map[string]bool{
	"run.started": true, "run.ended": true, "run.go_version": true,
	"sessions.started": true, "sessions.ended": true, "sessions.go_version": true,
	"iterations.at": true, "run_summary.started": true, "run_summary.ended": true,
}

// storeQueries lists the SELECTs that dump a store: the schema, then
// every table and view in full.
func storeQueries(t *testing.T, path string) []string {
	t.Helper()
	db := openPlain(t, path)
	defer db.Close()
	rows, err := db.Query(`SELECT type, name FROM sqlite_schema WHERE type IN ('table', 'view') ORDER BY name`)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	qs := []string{`SELECT type, name, tbl_name, sql FROM sqlite_schema ORDER BY name`}
	for rows.Next() {
		var typ, name string
		if err := rows.Scan(&typ, &name); err != nil {
			t.Fatal(err)
		}
		order := "rowid"
		if typ == "view" {
			order = "1, 2"
		}
		if name == "store_info" {
			qs = append(qs, `SELECT * FROM store_info WHERE key <> 'created' ORDER BY key`)
			continue
		}
		qs = append(qs, fmt.Sprintf("SELECT * FROM %s ORDER BY %s", quote(name), order))
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return qs
}

// openPlain opens a store file with database/sql alone, read-only.
func openPlain(t *testing.T, path string) *sql.DB {
	t.Helper()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	return db
}

// dumpStore runs the store's queries (those of the golden store) on path
// and returns each row as text that tells apart the SQL type and every
// bit of a REAL.
func dumpStore(t *testing.T, path string) map[string][]string {
	t.Helper()
	db := openPlain(t, path)
	defer db.Close()
	out := map[string][]string{}
	for _, q := range storeQueries(t, path) {
		rows, err := db.QueryContext(context.Background(), q)
		if err != nil {
			t.Fatalf("%s: %v", q, err)
		}
		cols, err := rows.Columns()
		if err != nil {
			t.Fatal(err)
		}
		table := ""
		if f := strings.Fields(q); len(f) > 3 && f[1] == "*" {
			table = strings.Trim(f[3], `"`)
		}
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		for rows.Next() {
			if err := rows.Scan(ptrs...); err != nil {
				t.Fatal(err)
			}
			var b bytes.Buffer
			for i, v := range vals {
				if maskedColumns[table+"."+cols[i]] {
					continue
				}
				fmt.Fprintf(&b, "%s=", cols[i])
				switch x := v.(type) {
				case float64:
					fmt.Fprintf(&b, "real:%016x", math.Float64bits(x))
				case []byte:
					fmt.Fprintf(&b, "blob:%x", x)
				default:
					fmt.Fprintf(&b, "%T:%v", x, x)
				}
				b.WriteByte(' ')
			}
			out[q] = append(out[q], b.String())
		}
		if err := rows.Err(); err != nil {
			t.Fatal(err)
		}
		rows.Close()
	}
	return out
}

// firstDifference names the first value of a dumped row that differs.
func firstDifference(got, want string) string {
	g, w := strings.Fields(got), strings.Fields(want)
	for k := range min(len(g), len(w)) {
		if g[k] != w[k] {
			return fmt.Sprintf("got %.200s, want %.200s", g[k], w[k])
		}
	}
	return fmt.Sprintf("got %d values, want %d", len(g), len(w))
}
