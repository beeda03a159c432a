package runfolder

import (
	"fmt"
	"os"
	"path/filepath"
)

// WriteFile writes data to path atomically and never through a
// symbolic link: the bytes go to a temporary file in path's folder, which
// is then renamed over the name, so that a link named path is replaced,
// its target untouched, and a reader sees the old file or the whole new
// one. The file gets permissions 0644.
func WriteFile(path string, data []byte) error {
	dir, name := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+name+".tmp-*")
	if err != nil {
		return fmt.Errorf("runfolder: writing %s: %w", path, err)
	}
	fail := func(err error) error {
		tmp.Close()
		os.Remove(tmp.Name())
		return fmt.Errorf("runfolder: writing %s: %w", path, err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		return fail(err)
	}
	if _, err := tmp.Write(data); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("runfolder: writing %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("runfolder: writing %s: %w", path, err)
	}
	return nil
}
