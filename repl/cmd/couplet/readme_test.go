package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"couplet/repl"
)

// transcript is a LineReader that types the given lines and writes each
// prompt and line into the output, as a terminal shows them.
type transcript struct {
	out   io.Writer
	lines []string
}

func (r *transcript) ReadLine(prompt string) (string, error) {
	if len(r.lines) == 0 {
		return "", io.EOF
	}
	l := r.lines[0]
	r.lines = r.lines[1:]
	fmt.Fprintf(r.out, "%s%s\n", prompt, l)
	return l, nil
}

// readmeSession returns the command line and the transcript of the
// README's "A short session".
func readmeSession(t *testing.T) (string, string) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	_, rest, ok := strings.Cut(string(b), "\n## A short session\n")
	if !ok {
		t.Fatal("README.md has no section \"A short session\"")
	}
	_, rest, ok = strings.Cut(rest, "\n```\n")
	if !ok {
		t.Fatal("the README's short session has no code block")
	}
	block, _, ok := strings.Cut(rest, "\n```\n")
	if !ok {
		t.Fatal("the README's short session block is not closed")
	}
	cmdLine, text, _ := strings.Cut(block, "\n")
	return cmdLine, text + "\n"
}

// The README's short session is what the notebook prints for the cells
// and commands it shows, typed one by one.
func TestReadmeSession(t *testing.T) {
	cmdLine, want := readmeSession(t)
	const prefix = "$ go run ./repl/cmd/couplet --out "
	if !strings.HasPrefix(cmdLine, prefix) {
		t.Fatalf("the session starts with %q, want %q and a folder", cmdLine, prefix)
	}
	outDir := strings.TrimPrefix(cmdLine, prefix)
	// what follows a prompt (c1> ) was typed
	prompt := regexp.MustCompile(`(?m)^c\d+> (.*)$`)
	var typed []string
	for _, m := range prompt.FindAllStringSubmatch(want, -1) {
		typed = append(typed, m[1])
	}
	t.Chdir(t.TempDir())
	var got bytes.Buffer
	banner(&got, false)
	s, err := repl.NewSession(repl.Options{Stdout: &got, Stderr: &got, OutDir: outDir})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Serve(context.Background(), &transcript{out: &got, lines: typed}); err != nil {
		t.Fatal(err)
	}
	if got.String() != want {
		t.Errorf("the README's short session differs from what the notebook prints; README:\n%s\nnotebook:\n%s", want, got.String())
	}
	if _, err := os.Stat(filepath.Join(outDir, "sellar", "report.html")); err != nil {
		t.Errorf("the session's @report wrote no report: %v", err)
	}
	if _, err := os.Stat(filepath.Join(outDir, "both", "comparison.html")); err != nil {
		t.Errorf("the session's cell.Compare wrote no comparison page: %v", err)
	}
}
