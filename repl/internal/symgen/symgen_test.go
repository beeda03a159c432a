package symgen

import (
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// TestTablesCoverTheLists checks that the committed tables are exactly
// one file per listed package, so a package added to or dropped from a
// list without `go generate ./...` fails here. Whether each table matches
// its package's exported API is checked by CI, which regenerates every
// table and fails on any difference (.ci/run: go generate ./... && git
// diff --exit-code); type-checking the packages from source is too slow
// for go test.
func TestTablesCoverTheLists(t *testing.T) {
	committed := filepath.Join("..", "..", "symbols")
	for _, set := range []struct {
		dir  string
		pkgs []string
	}{
		{".", append(append([]string(nil), Framework...), Curated...)},
		{"trusted", Trusted},
	} {
		var want []string
		for _, p := range set.pkgs {
			want = append(want, fileName(p))
		}
		sort.Strings(want)
		got := keys(generated(t, filepath.Join(committed, set.dir)))
		if strings.Join(got, " ") != strings.Join(want, " ") {
			t.Errorf("%s: committed tables %v, the lists want %v; run go generate ./...", set.dir, got, want)
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
