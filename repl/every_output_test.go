package repl

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// evaluationsHeader returns the header of the one evaluations.csv a
// replay into dir wrote.
func evaluationsHeader(t *testing.T, dir string) string {
	t.Helper()
	files, _ := filepath.Glob(filepath.Join(dir, "*", "evaluations.csv"))
	if root := filepath.Join(dir, "evaluations.csv"); len(files) == 0 {
		files = append(files, root)
	}
	b, err := os.ReadFile(files[0])
	if err != nil {
		t.Fatal(err)
	}
	head, _, _ := strings.Cut(string(b), "\n")
	return head
}

// evaluations.csv holds the outputs only when asked: by RunOptions
// (the --every-output flag) or by the script (cell.EveryOutput).
func TestEveryOutputOnRequest(t *testing.T) {
	asked := strings.Replace(sellarCells, "cell.Publish(result)", "cell.EveryOutput()\ncell.Publish(result)", 1)
	cases := []struct {
		name, cells string
		flag, want  bool
	}{
		{"default", sellarCells, false, false},
		{"flag", sellarCells, true, true},
		{"cell option", asked, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			file := writeStudy(t, "sellar", c.cells)
			dir := filepath.Join(t.TempDir(), "out")
			if msg, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.EveryOutput = c.flag }); err != nil {
				t.Fatalf("%v\n%s", err, msg)
			}
			head := evaluationsHeader(t, dir)
			if got := strings.Contains(head, "output:y1"); got != c.want || !strings.Contains(head, "objective:") || !strings.Contains(head, "margin:") {
				t.Errorf("evaluations.csv header %q: output columns %v, want %v (and the objectives and margins always)", head, got, c.want)
			}
		})
	}
}
