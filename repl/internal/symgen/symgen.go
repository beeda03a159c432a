// Package symgen writes the yaegi symbol tables through which study
// scripts reach the framework and a curated set of standard packages.
//
// The package lists below are the single place that decides what a
// script may import. Adding a framework package to the interpreter is one
// line in Framework followed by `go generate ./repl/...`.
package symgen

import (
	"bytes"
	"fmt"
	"go/format"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"sort"
	"strings"
	"sync"

	"github.com/traefik/yaegi/extract"
)

// Framework lists the couplet packages exposed to scripts.
var Framework = []string{
	"couplet/mdo",
	"couplet/mdo/external",
	"couplet/optimizers",
	"couplet/optimizers/designmap",
	"couplet/optimizers/sensitivity",
	"couplet/optimizers/surrogate",
	"couplet/disciplines",
}

// Curated lists the standard packages a sandboxed script may import:
// mathematics, formatting, text, sorting and the like. Nothing here reaches
// the file system, the network, other processes or unsafe memory.
var Curated = []string{
	"bytes",
	"cmp",
	"context",
	"errors",
	"fmt",
	"maps",
	"math",
	"math/bits",
	"math/cmplx",
	"slices",
	"sort",
	"strconv",
	"strings",
	"text/tabwriter",
	"time",
	"unicode",
	"unicode/utf8",
}

// Trusted lists the further standard packages exposed only when the
// sandbox is lifted for a trusted script.
var Trusted = []string{
	"bufio",
	"encoding/csv",
	"encoding/json",
	"io",
	"io/fs",
	"os",
	"os/exec",
	"path",
	"path/filepath",
}

// exclude names symbols left out of the tables: os.Exit would end the
// whole session and FindProcess could signal it; external.AllowAll and
// Allow would let a script approve its own programs (it gets its gate
// from cell.Programs); the others are deprecated in the standard library
// and have better replacements.
var exclude = map[string][]string{
	"couplet/mdo/external": {"^AllowAll$", "^Allow$"},
	"os":                   {"^Exit$", "^FindProcess$", "^SEEK_"},
	"bytes":                {"^Title$"},
	"strings":              {"^Title$"},
	"encoding/csv":         {"^ErrTrailingComma$"},
	"encoding/json":        {"^InvalidUTF8Error$", "^UnmarshalFieldError$"},
	"path/filepath":        {"^HasPrefix$"},
}

// prefix marks generated files so that regeneration can remove stale ones.
const prefix = "gen_"

// buildTag matches the Go-version constraint that extract writes for
// standard packages; it is dropped so the tables compile with any newer
// toolchain (CI regenerates them with the current one and compares).
var buildTag = regexp.MustCompile(`(?m)^//(go:build| \+build) [^\n]*\n`)

// Generate writes the sandbox tables (framework and curated packages) as
// package symbols into dir, and the trusted-only tables as package trusted
// into dir/trusted, replacing earlier generated files.
func Generate(dir string) error {
	if err := writeSet(dir, "symbols", append(append([]string(nil), Framework...), Curated...)); err != nil {
		return err
	}
	return writeSet(filepath.Join(dir, "trusted"), "trusted", Trusted)
}

// writeSet extracts the packages into dir as package dest.
func writeSet(dir, dest string, pkgs []string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("symgen: %w", err)
	}
	old, err := filepath.Glob(filepath.Join(dir, prefix+"*.go"))
	if err != nil {
		return fmt.Errorf("symgen: %w", err)
	}
	for _, f := range old {
		if err := os.Remove(f); err != nil {
			return fmt.Errorf("symgen: %w", err)
		}
	}
	sorted := append([]string(nil), pkgs...)
	sort.Strings(sorted)
	// Each extraction type-checks its package from source; run them side
	// by side.
	srcs := make([][]byte, len(sorted))
	errs := make([]error, len(sorted))
	sem := make(chan struct{}, runtime.GOMAXPROCS(0))
	var wg sync.WaitGroup
	for i, p := range sorted {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sem <- struct{}{}
			defer func() { <-sem }()
			srcs[i], errs[i] = extractOne(dest, p)
		}()
	}
	wg.Wait()
	for i, p := range sorted {
		if errs[i] != nil {
			return errs[i]
		}
		if err := os.WriteFile(filepath.Join(dir, fileName(p)), srcs[i], 0o644); err != nil {
			return fmt.Errorf("symgen: %w", err)
		}
	}
	return nil
}

// fileName is the name of the generated table of package p.
func fileName(p string) string {
	return prefix + strings.NewReplacer("/", "_", ".", "_").Replace(p) + ".go"
}

// extractOne returns the formatted table of one package.
func extractOne(dest, p string) ([]byte, error) {
	ext := extract.Extractor{Dest: dest, Exclude: exclude[p]}
	var buf bytes.Buffer
	if _, err := ext.Extract(p, "", &buf); err != nil {
		return nil, fmt.Errorf("symgen: extracting %s: %w", p, err)
	}
	src, err := format.Source(buildTag.ReplaceAll(buf.Bytes(), nil))
	if err != nil {
		return nil, fmt.Errorf("symgen: formatting %s: %w", p, err)
	}
	return src, nil
}
