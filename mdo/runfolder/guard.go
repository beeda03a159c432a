package runfolder

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// Occupied returns the files of an earlier run found in dir: every
// reserved name present but the lock (a symbolic link counts, whatever it
// points at), the files its manifest lists, and the reserved files of
// its result folders (a sub-folder, not a link, holding any), named
// "FOLDER/NAME". An empty list means dir holds no run (or does not
// exist).
func Occupied(dir string) ([]string, error) {
	found, err := occupied(dir)
	if err != nil {
		return nil, err
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if !e.IsDir() {
			continue
		}
		sub, err := occupied(filepath.Join(dir, e.Name()))
		if err != nil {
			return nil, err
		}
		for _, n := range sub {
			found = append(found, e.Name()+"/"+n)
		}
	}
	slices.Sort(found)
	return found, nil
}

// occupied is Occupied for the files of dir itself.
func occupied(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("runfolder: reading %s: %w", dir, err)
	}
	var found []string
	for _, e := range entries {
		if e.Name() != LockFile && Reserved(e.Name()) {
			found = append(found, e.Name())
		}
	}
	own, err := manifest(dir)
	if err != nil {
		return nil, err
	}
	for _, n := range own {
		if _, err := os.Lstat(filepath.Join(dir, n)); err == nil && !slices.Contains(found, n) {
			found = append(found, n)
		}
	}
	slices.Sort(found)
	return found, nil
}

// Clear removes the files of an earlier run from dir (Occupied): a
// symbolic link is removed itself, never its target. A result folder
// left empty is removed too. Other files stay.
func Clear(dir string) error {
	found, err := Occupied(dir)
	if err != nil {
		return err
	}
	subs := map[string]bool{}
	for _, n := range found {
		if err := os.Remove(filepath.Join(dir, filepath.FromSlash(n))); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("runfolder: clearing the old run: %w", err)
		}
		if sub, _, ok := strings.Cut(n, "/"); ok {
			subs[sub] = true
		}
	}
	for sub := range subs {
		// only an empty folder goes: a file of the user's keeps it
		_ = os.Remove(filepath.Join(dir, sub))
	}
	return nil
}

// WriteOwn writes a file of the script's own into dir (created if need
// be) as WriteFile does, never through a symbolic link, and records its
// name in the manifest so that Clear removes it with the run. A reserved
// name or one with a path is refused; a figure goes through
// WriteOwnFigure.
func WriteOwn(dir, name string, data []byte) error {
	if name == "" || name != filepath.Base(name) || strings.HasPrefix(name, ".") {
		return fmt.Errorf("runfolder: file name %q is not allowed: a plain name in the output folder, not starting with '.'", name)
	}
	if Reserved(name) {
		return fmt.Errorf("runfolder: file name %q is the tool's (results*.db and its journals, summary.json, report.html, index.html, comparison.html, evaluations.csv, any .svg or .png): choose another name", name)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("runfolder: %w", err)
	}
	if err := Record(dir, name); err != nil {
		return err
	}
	return WriteFile(filepath.Join(dir, name), data)
}

// WriteOwnFigure writes a figure of the script's own into dir as
// STEM.svg and STEM.png (each as WriteOwn does, recorded in the manifest
// so that Clear removes them with the run) and returns the files
// written. The figures of the tool go into the result folders below dir,
// so a figure of the script's own at the top of its output folder never
// takes one of their names. stem is a plain name: letters, digits, '-'
// and '_', not starting with '-'.
func WriteOwnFigure(dir, stem string, svg, png []byte) ([]string, error) {
	if stem == "" || strings.HasPrefix(stem, "-") {
		return nil, fmt.Errorf("runfolder: figure name %q is not allowed: a plain name such as \"wing_map\"", stem)
	}
	for _, r := range stem {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			return nil, fmt.Errorf("runfolder: figure name %q is not allowed: only letters, digits, '-' and '_' (no extension, no path)", stem)
		}
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("runfolder: %w", err)
	}
	var files []string
	for _, f := range []struct {
		ext  string
		data []byte
	}{{".svg", svg}, {".png", png}} {
		name := stem + f.ext
		if err := Record(dir, name); err != nil {
			return files, err
		}
		p := filepath.Join(dir, name)
		if err := WriteFile(p, f.data); err != nil {
			return files, err
		}
		files = append(files, p)
	}
	return files, nil
}

// Record adds a name to the folder's manifest of the script's own files.
func Record(dir, name string) error {
	names, err := manifest(dir)
	if err != nil {
		return err
	}
	if slices.Contains(names, name) {
		return nil
	}
	var b bytes.Buffer
	for _, n := range append(names, name) {
		b.WriteString(n)
		b.WriteByte('\n')
	}
	return WriteFile(filepath.Join(dir, ManifestFile), b.Bytes())
}

// manifest reads the names the folder's manifest lists; a missing
// manifest lists none. Only plain names count.
func manifest(dir string) ([]string, error) {
	b, err := os.ReadFile(filepath.Join(dir, ManifestFile))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("runfolder: reading the manifest: %w", err)
	}
	var names []string
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		n := strings.TrimSpace(sc.Text())
		if n != "" && n == filepath.Base(n) && n != "." && n != ".." {
			names = append(names, n)
		}
	}
	return names, nil
}
