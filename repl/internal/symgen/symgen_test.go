package symgen

import (
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// TestTablesAreFresh regenerates the symbol tables into a temporary
// folder and compares them with the committed ones: run `go generate
// ./repl/...` when it fails.
func TestTablesAreFresh(t *testing.T) {
	if testing.Short() || raceEnabled {
		t.Skip("type-checks the exposed packages from source (minutes under the race detector)")
	}
	tmp := t.TempDir()
	if err := Generate(tmp); err != nil {
		t.Fatal(err)
	}
	committed := filepath.Join("..", "..", "symbols")
	for _, sub := range []string{".", "trusted"} {
		want := generated(t, filepath.Join(tmp, sub))
		got := generated(t, filepath.Join(committed, sub))
		if strings.Join(keys(want), " ") != strings.Join(keys(got), " ") {
			t.Errorf("%s: generated files %v, committed %v; run go generate ./repl/...", sub, keys(want), keys(got))
			continue
		}
		for name, w := range want {
			if got[name] != w {
				t.Errorf("%s/%s is stale; run go generate ./repl/...", sub, name)
			}
		}
	}
}

// TestPackageLists checks that the sandbox lists stay apart: nothing that
// reaches files, the network or processes is curated.
func TestPackageLists(t *testing.T) {
	curated := map[string]bool{}
	for _, p := range Curated {
		curated[p] = true
	}
	for _, p := range []string{"os", "os/exec", "net", "net/http", "syscall", "unsafe", "io/ioutil", "io/fs", "path/filepath", "plugin", "runtime", "reflect", "math/rand", "math/rand/v2"} {
		if curated[p] {
			t.Errorf("package %s must not be importable in the sandbox", p)
		}
	}
	for _, p := range Trusted {
		if curated[p] {
			t.Errorf("package %s is both curated and trusted-only", p)
		}
	}
}

// generated reads the generated files of a folder.
func generated(t *testing.T, dir string) map[string]string {
	t.Helper()
	files, err := filepath.Glob(filepath.Join(dir, prefix+"*.go"))
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		out[filepath.Base(f)] = string(b)
	}
	return out
}

func keys(m map[string]string) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
