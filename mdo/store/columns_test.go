package store

import (
	"database/sql"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"reflect"
	"strconv"
	"testing"

	"couplet/mdo"
)

// writeSynthetic records n synthetic evaluations of shape sh (every
// fifth failed, one with non-finite outputs) into a new store at path.
func writeSynthetic(t *testing.T, path string, sh shape, n int, opt Options) []*mdo.Evaluation {
	t.Helper()
	s, err := Create(path, opt)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Begin(syntheticRunOf(sh)); err != nil {
		t.Fatal(err)
	}
	var evs []*mdo.Evaluation
	for i := 0; i < n; i++ {
		e := &mdo.Evaluation{}
		syntheticEvalOf(e, i, sh)
		switch {
		case i%5 == 4:
			e.Converged, e.Feasible, e.Err, e.Outputs = false, false, "failed", nil
		case i == 1:
			e.Outputs[0], e.Outputs[1], e.Outputs[2] = math.NaN(), math.Inf(1), 1e-310
		}
		e.Design[0] = math.Pi * float64(i) // integral and not
		evs = append(evs, e)
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.End(nil); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	return evs
}

// queryAll reads every row of q, values as Go values.
func queryAll(t *testing.T, path, q string) ([]string, [][]any) {
	t.Helper()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	rows, err := db.Query(q)
	if err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	defer rows.Close()
	cols, _ := rows.Columns()
	var out [][]any
	for rows.Next() {
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		for i, v := range vals {
			switch x := v.(type) {
			case int64: // the JSON text layout reads integral numbers as INTEGER
				vals[i] = float64(x)
			case string: // the outputs object, whose numbers are written 1 or 1.0
				if cols[i] == "outputs" {
					var raw map[string]*json.Number
					if err := json.Unmarshal([]byte(x), &raw); err != nil {
						t.Fatalf("outputs %.40q: %v", x, err)
					}
					m := map[string]any{}
					for k, n := range raw {
						if n == nil {
							m[k] = nil
							continue
						}
						f, err := strconv.ParseFloat(n.String(), 64) // 9e999 is +Inf (with ErrRange)
						if err != nil && !math.IsInf(f, 0) {
							t.Fatalf("outputs: %s = %s: %v", k, n, err)
						}
						m[k] = f
					}
					vals[i] = m
				}
			}
		}
		out = append(out, vals)
	}
	return cols, out
}

// The REAL column layout keeps every value exactly and shows the same
// views as the JSON text layout of older stores, with more outputs than
// one json_object call and one UNION ALL take.
func TestColumnLayoutSameAsJSONText(t *testing.T) {
	for _, sh := range []shape{{design: 3, cons: 2, outputs: 5}, {design: 4, cons: 3, outputs: 2*outputChunk + 7}, {design: 2, cons: 1, outputs: unionChunk + 3}} {
		t.Run(fmt.Sprintf("outputs=%d", sh.outputs), func(t *testing.T) {
			dir := t.TempDir()
			cols, text := filepath.Join(dir, "cols.db"), filepath.Join(dir, "text.db")
			want := writeSynthetic(t, cols, sh, 12, Options{})
			writeSynthetic(t, text, sh, 12, Options{jsonText: true})
			for path, columns := range map[string]bool{cols: true, text: false} {
				s, evs := openEvaluations(t, path)
				if s.lay.columns != columns {
					t.Fatalf("%s: layout in REAL columns %v, want %v", path, s.lay.columns, columns)
				}
				if len(evs) != len(want) {
					t.Fatalf("%s: %d evaluations, want %d", path, len(evs), len(want))
				}
				for i := range evs {
					if f := sameEvaluation(evs[i], want[i]); f != "" {
						t.Errorf("%s: evaluation %d differs in %s after reload", path, i, f)
					}
				}
			}
			for _, q := range []string{
				"SELECT * FROM evaluations ORDER BY id",
				"SELECT eval_id, name, unit, value FROM outputs ORDER BY eval_id, name",
				"SELECT id, json_extract(outputs, '$.\"out.v2\"'), json_extract(outputs, '$.\"out.v0\"') FROM evaluations ORDER BY id",
			} {
				c1, r1 := queryAll(t, cols, q)
				c2, r2 := queryAll(t, text, q)
				if !reflect.DeepEqual(c1, c2) {
					t.Fatalf("%s: columns %v, older layout %v", q, c1, c2)
				}
				if len(r1) == 0 || len(r1) != len(r2) {
					t.Fatalf("%s: %d rows, older layout %d", q, len(r1), len(r2))
				}
				for i := range r1 {
					for k := range r1[i] {
						if c1[k] != "wall_seconds" && !reflect.DeepEqual(r1[i][k], r2[i][k]) {
							t.Fatalf("%s: row %d column %s is %.80v, in the older layout %.80v", q, i, c1[k], r1[i][k], r2[i][k])
						}
					}
				}
			}
		})
	}
}

// A value bound from the interface of the row before (lastBound) reads
// back as recorded, through repeats, NaN, −0 and 0.
func TestRepeatedValuesBound(t *testing.T) {
	path := filepath.Join(t.TempDir(), "repeats.db")
	s, err := Create(path, Options{BatchSize: 3})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRun()); err != nil {
		t.Fatal(err)
	}
	seq := []float64{1.5, 1.5, math.NaN(), 1.5, math.Copysign(0, -1), 0, 0, 2, 2, math.Inf(1), math.Inf(1)}
	var recorded []*mdo.Evaluation
	for i, x := range seq {
		e := &mdo.Evaluation{}
		syntheticEval(e, i)
		e.Design[0], e.Margins[1], e.Outputs[5] = x, x, x
		recorded = append(recorded, e)
	}
	evs := recordAndEnd(t, s, recorded...)
	for i, e := range evs {
		want := seq[i]
		if want == 0 {
			want = 0 // −0 reads back as 0
		}
		for _, got := range []float64{e.Design[0], e.Margins[1], e.Outputs[5]} {
			if !sameFloat(got, want) {
				t.Errorf("evaluation %d: read %v, recorded %v", i, got, seq[i])
			}
		}
		if f := sameEvaluation(e, storedForm(recorded[i], s.lay)); f != "" {
			t.Errorf("evaluation %d differs from the recorded one in %s", i, f)
		}
	}
}
