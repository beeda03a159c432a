package repl

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// The time limit covers the whole run from its start, the checks of the
// script included: a limit that has passed before the imports are checked
// stops the run there, and nothing runs. Before, the limit started only
// after the checks, which then reported cell 2's refused import.
func TestTimeoutCoversTheChecks(t *testing.T) {
	dir := t.TempDir()
	study := filepath.Join(dir, "late_refusal.study")
	src := "//~ cell 1\nimport \"fmt\"\nfmt.Println(\"first cell ran\")\n//~ cell 2\nimport \"os\"\nos.Getpid()\n"
	if err := os.WriteFile(study, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	_, err := Run(context.Background(), RunOptions{File: study, OutDir: filepath.Join(dir, "out"), Stdout: &out, Timeout: time.Nanosecond})
	var re *RefusedImportError
	if err == nil || errors.As(err, &re) || !strings.Contains(err.Error(), "time limit of 1ns was reached while the script was checked") {
		t.Errorf("run error %v, want the time limit reached during the checks", err)
	}
	var ue *UsageError
	if errors.As(err, &ue) {
		t.Errorf("a time limit is not a usage error: %v", err)
	}
	if out.Len() > 0 {
		t.Errorf("cells ran: %q", out.String())
	}
}
