package store

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// A limit whose sensitivity is not defined (the golden run's perf.c2)
// keeps its reason through results.db (per_unit NULL, the reason in
// run_record) and summary.json (per_unit null, not_defined), and the
// other limits keep their figures; a dimensionless limit's cost is per
// unit of it.
func TestSensitivityNotDefinedKept(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	writeGoldenRun(t, path)
	want := goldenSensitivity()
	got := storedRecord(t, path).Sensitivity
	if got == nil || len(got.Limits) != len(want.Limits) {
		t.Fatalf("read back %+v, want %+v", got, want)
	}
	for i, l := range got.Limits {
		w := want.Limits[i]
		same := l.PerUnit == w.PerUnit || math.IsNaN(l.PerUnit) && math.IsNaN(w.PerUnit)
		if l.Constraint != w.Constraint || l.NotDefined != w.NotDefined || !same || l.Active != w.Active {
			t.Errorf("limit %d read back %+v, want %+v", i, l, w)
		}
	}
	b, err := json.Marshal(summarySensitivity(got))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{
		`"per_unit":null,"per_unit_unit":"kg/kg","not_defined":"` + want.Limits[2].NotDefined + `"`,
		`"per_unit":-12.5,"per_unit_unit":"kg/m"}`,
		`"constraint":"perf.c1","bound":"lower","limit":-1,"active":false,"per_unit":0,"per_unit_unit":"kg per unit"}`,
	} {
		if !strings.Contains(string(b), w) {
			t.Errorf("summary.json lacks %s:\n%s", w, b)
		}
	}
}

// storedRecord opens the store at path and returns its run record.
func storedRecord(t *testing.T, path string) RunRecord {
	t.Helper()
	s, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	rec, err := s.StoredRecord()
	if err != nil {
		t.Fatal(err)
	}
	return rec
}
