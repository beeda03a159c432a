package runfolder

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

func TestReserved(t *testing.T) {
	tests := []struct {
		name string
		want bool
	}{
		{"results.db", true}, {"results-3.db", true}, {"results.db-journal", true}, {"results-2.db-wal", true}, {"results.db-shm", true},
		{"summary.json", true}, {"report.html", true}, {"evaluations.csv", true},
		{"history.svg", true}, {"my_plot.PNG", true}, {LockFile, true}, {ManifestFile, true},
		{"points.csv", false}, {"results.txt", false}, {"results-x.db", false}, {"notes.json", false},
	}
	for _, tc := range tests {
		if got := Reserved(tc.name); got != tc.want {
			t.Errorf("Reserved(%q) = %v, want %v", tc.name, got, tc.want)
		}
	}
}

// outside makes a file outside dir and returns its path and content.
func outside(t *testing.T) (string, string) {
	t.Helper()
	p := filepath.Join(t.TempDir(), "precious.txt")
	const text = "not the tool's to change\n"
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p, text
}

// A write replaces a symbolic link named like the file, leaving its
// target as it was.
func TestWriteFileReplacesALink(t *testing.T) {
	dir := t.TempDir()
	target, text := outside(t)
	link := filepath.Join(dir, "report.html")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(link, []byte("<html>")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(target); string(b) != text {
		t.Errorf("the link's target now holds %q", b)
	}
	if fi, err := os.Lstat(link); err != nil || fi.Mode()&os.ModeSymlink != 0 {
		t.Errorf("report.html is still a link (%v)", err)
	}
	if b, _ := os.ReadFile(link); string(b) != "<html>" {
		t.Errorf("report.html holds %q", b)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("the folder holds %d entries, want report.html alone (no temporary file left)", len(entries))
	}
}

// The files of an earlier run are found and cleared: the tool's names, a
// link among them (its target kept) and the script's own files the
// manifest lists; other files stay.
func TestOccupiedAndClear(t *testing.T) {
	dir := t.TempDir()
	if found, err := Occupied(filepath.Join(dir, "none")); err != nil || found != nil {
		t.Fatalf("a missing folder: %v, %v", found, err)
	}
	target, text := outside(t)
	for _, n := range []string{"results.db", "summary.json", "history.svg", "keep.txt"} {
		if err := os.WriteFile(filepath.Join(dir, n), []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Symlink(target, filepath.Join(dir, "evaluations.csv")); err != nil {
		t.Fatal(err)
	}
	if err := WriteOwn(dir, "points.csv", []byte("a,b\n")); err != nil {
		t.Fatal(err)
	}
	found, err := Occupied(dir)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{ManifestFile, "evaluations.csv", "history.svg", "points.csv", "results.db", "summary.json"}
	if !slices.Equal(found, want) {
		t.Errorf("Occupied = %v, want %v", found, want)
	}
	if err := Clear(dir); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 || entries[0].Name() != "keep.txt" {
		t.Errorf("after Clear the folder holds %v, want keep.txt alone", entries)
	}
	if b, _ := os.ReadFile(target); string(b) != text {
		t.Errorf("Clear changed a link's target: %q", b)
	}
}

func TestWriteOwnRefusesTheToolsNames(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"results.db", "results.db-journal", "summary.json", "report.html", "evaluations.csv", "history.png", "pareto.svg", "../x.csv", ".hidden", ""} {
		err := WriteOwn(dir, n, []byte("x"))
		if err == nil || !strings.Contains(err.Error(), "not allowed") && !strings.Contains(err.Error(), "is the tool's") {
			t.Errorf("WriteOwn(%q) = %v, want a refusal", n, err)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("refused writes left %v", entries)
	}
}

// A second lock on a folder is refused, naming the holder's process; after
// Release it is free again. A lock file that is a symbolic link is
// refused.
func TestLock(t *testing.T) {
	dir := t.TempDir()
	l, err := TakeLock(dir)
	if err != nil {
		t.Fatal(err)
	}
	_, err = TakeLock(dir)
	var busy *BusyError
	if !errors.As(err, &busy) || busy.PID != os.Getpid() || !strings.Contains(err.Error(), "in use by another run") {
		t.Fatalf("second lock: %v, want a BusyError naming process %d", err, os.Getpid())
	}
	if err := l.Release(); err != nil {
		t.Fatal(err)
	}
	l2, err := TakeLock(dir)
	if err != nil {
		t.Fatalf("after Release: %v", err)
	}
	l2.Release()

	linked := t.TempDir()
	target, text := outside(t)
	if err := os.Symlink(target, filepath.Join(linked, LockFile)); err != nil {
		t.Fatal(err)
	}
	if _, err := TakeLock(linked); err == nil || !strings.Contains(err.Error(), "symbolic link") {
		t.Errorf("lock through a link: %v", err)
	}
	if b, _ := os.ReadFile(target); string(b) != text {
		t.Errorf("the lock wrote through a link: %q", b)
	}
}

// A script's folder keeps each result in a sub-folder: the sub-folders'
// files count as the run's and are cleared with it, a sub-folder left
// empty goes, and one holding a file of the user's stays with that file.
func TestOccupiedResultFolders(t *testing.T) {
	dir := t.TempDir()
	files := []string{"index.html", "aft/results.db", "aft/report.html", "fwd/summary.json", "fwd/notes.txt", "plain/notes.txt"}
	for _, n := range files {
		p := filepath.Join(dir, filepath.FromSlash(n))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	found, err := Occupied(dir)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"aft/report.html", "aft/results.db", "fwd/summary.json", "index.html"}
	if !slices.Equal(found, want) {
		t.Errorf("Occupied = %v, want %v", found, want)
	}
	if err := Clear(dir); err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"aft", "index.html", "fwd/summary.json"} {
		if _, err := os.Lstat(filepath.Join(dir, n)); err == nil {
			t.Errorf("%s is left after Clear", n)
		}
	}
	for _, n := range []string{"fwd/notes.txt", "plain/notes.txt"} {
		if _, err := os.Stat(filepath.Join(dir, n)); err != nil {
			t.Errorf("Clear removed the user's %s: %v", n, err)
		}
	}
}

// A link replaces a symbolic link named like the file, leaving its
// target as it was.
func TestLinkFileReplacesALink(t *testing.T) {
	dir := t.TempDir()
	target, text := outside(t)
	src := filepath.Join(dir, "sub-results.db")
	if err := os.WriteFile(src, []byte("the store"), 0o644); err != nil {
		t.Fatal(err)
	}
	dst := filepath.Join(dir, "results.db")
	if err := os.Symlink(target, dst); err != nil {
		t.Fatal(err)
	}
	if err := LinkFile(src, dst); err != nil {
		t.Fatal(err)
	}
	if after, _ := os.ReadFile(target); string(after) != text {
		t.Errorf("the link's target changed: %q, was %q", after, text)
	}
	fi, err := os.Lstat(dst)
	if err != nil || !fi.Mode().IsRegular() {
		t.Fatalf("%s is %v (%v), want a regular file", dst, fi, err)
	}
	if got, _ := os.ReadFile(dst); string(got) != "the store" {
		t.Errorf("%s holds %q, want the source's bytes", dst, got)
	}
	if err := LinkFile(filepath.Join(dir, "none"), dst); err == nil {
		t.Error("linking a missing file: no error")
	}
}

// TestWriteOwnFigure: a script's figure is written under its own name,
// recorded, and cleared with the run; names with paths or extensions are
// refused, and WriteOwn still refuses image names.
func TestWriteOwnFigure(t *testing.T) {
	dir := t.TempDir()
	files, err := WriteOwnFigure(dir, "wing_map", []byte("<svg/>"), []byte("png"))
	if err != nil || len(files) != 2 {
		t.Fatalf("%v: %v", files, err)
	}
	found, err := Occupied(dir)
	if err != nil || !slices.Equal(found, []string{ManifestFile, "wing_map.png", "wing_map.svg"}) {
		t.Errorf("occupied %v (%v), want the manifest and the two figure files", found, err)
	}
	if err := Clear(dir); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "wing_map.svg")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("after Clear: %v", err)
	}
	for _, bad := range []string{"", "-x", "map.svg", "../map", "a/b", ".hidden"} {
		if _, err := WriteOwnFigure(dir, bad, nil, nil); err == nil || !strings.Contains(err.Error(), strconv.Quote(bad)) {
			t.Errorf("figure name %q: %v", bad, err)
		}
	}
	if err := WriteOwn(dir, "wing_map.svg", nil); err == nil {
		t.Error("WriteOwn wrote an .svg")
	}
}

// WriteFileFrom writes what its function writes; a failing function
// leaves the file as it was and no temporary file behind.
func TestWriteFileFrom(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "evaluations.csv")
	if err := os.WriteFile(p, []byte("old\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	refused := errors.New("the store is closed")
	err := WriteFileFrom(p, func(w io.Writer) error {
		if _, err := io.WriteString(w, "half a "); err != nil {
			return err
		}
		return refused
	})
	if !errors.Is(err, refused) || !strings.Contains(err.Error(), "evaluations.csv") {
		t.Errorf("error %v; want it to wrap the function's and name the file", err)
	}
	if b, _ := os.ReadFile(p); string(b) != "old\n" {
		t.Errorf("a failed write left %q", b)
	}
	big := strings.Repeat("0123456789", 20000) // beyond the buffer
	if err := WriteFileFrom(p, func(w io.Writer) error { _, err := io.WriteString(w, big); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(p); string(b) != big {
		t.Errorf("wrote %d bytes, want %d", len(b), len(big))
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("the folder holds %d entries, want the file alone", len(entries))
	}
}

// ReadFile reads a regular file and refuses a symbolic link (whatever
// it points at) and a folder.
func TestReadFileFollowsNoLink(t *testing.T) {
	dir := t.TempDir()
	target, text := outside(t)
	p := filepath.Join(dir, "summary.json")
	if err := os.WriteFile(p, []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	if b, err := ReadFile(p); err != nil || string(b) != "{}" {
		t.Errorf("ReadFile of a file: %q, %v", b, err)
	}
	link := filepath.Join(dir, "linked.json")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	if b, err := ReadFile(link); err == nil || !strings.Contains(err.Error(), "symbolic link") {
		t.Errorf("ReadFile of a link: %q, %v; want a refusal (the target holds %q)", b, err, text)
	}
	if _, err := ReadFile(dir); err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("ReadFile of a folder: %v, want a refusal", err)
	}
}

// LinkFileWith links, or copies where asked (NoHardLink) with the
// caller's Copy or the bytes; a copy is a file of its own, and a failed
// copy leaves dst as it was and no temporary file behind.
func TestLinkFileWith(t *testing.T) {
	failed := errors.New("the copy failed")
	tests := []struct {
		name    string
		opt     LinkOptions
		linked  bool   // dst is src's file
		want    string // dst's content
		wantErr error
	}{
		{name: "hard link", opt: LinkOptions{}, linked: true, want: "the store"},
		{name: "bytes copied", opt: LinkOptions{NoHardLink: true}, want: "the store"},
		{name: "the caller's copy", opt: LinkOptions{NoHardLink: true, Copy: func(src, tmp string) error {
			b, err := os.ReadFile(src)
			if err != nil {
				return err
			}
			return os.WriteFile(tmp, append(b, " (copied)"...), 0o644)
		}}, want: "the store (copied)"},
		{name: "a failed copy", opt: LinkOptions{NoHardLink: true, Copy: func(src, tmp string) error { return failed }}, want: "old", wantErr: failed},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			src, dst := filepath.Join(dir, "sub-results.db"), filepath.Join(dir, "results.db")
			if err := os.WriteFile(src, []byte("the store"), 0o644); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(dst, []byte("old"), 0o644); err != nil {
				t.Fatal(err)
			}
			err := LinkFileWith(src, dst, tc.opt)
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("error %v, want %v", err, tc.wantErr)
			}
			if b, _ := os.ReadFile(dst); string(b) != tc.want {
				t.Errorf("%s holds %q, want %q", dst, b, tc.want)
			}
			a, _ := os.Stat(src)
			b, _ := os.Stat(dst)
			if os.SameFile(a, b) != tc.linked {
				t.Errorf("dst is src's file: %v, want %v", os.SameFile(a, b), tc.linked)
			}
			if fi, err := os.Stat(dst); err == nil && fi.Mode().Perm() != 0o644 {
				t.Errorf("%s has permissions %v, want 0644", dst, fi.Mode().Perm())
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 2 {
				t.Errorf("the folder holds %d entries, want src and dst alone (no temporary file left)", len(entries))
			}
		})
	}
}
