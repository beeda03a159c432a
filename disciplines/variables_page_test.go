package disciplines_test

import (
	"os"
	"testing"

	"couplet/disciplines/internal/varsdoc"
)

// The committed reference page of the model's variables is what the
// model gives now: a variable added, renamed or given another unit,
// range or description makes this fail until `go generate ./disciplines`
// writes the page again.
func TestVariablesPageFresh(t *testing.T) {
	want, err := varsdoc.Page()
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(varsdoc.FileName)
	if err != nil {
		t.Fatalf("%v: run go generate ./disciplines", err)
	}
	if string(got) != want {
		t.Errorf("%s is stale: run go generate ./disciplines and commit it", varsdoc.FileName)
	}
}
