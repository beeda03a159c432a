package runfolder

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"syscall"
)

// WriteFile writes data to path atomically and never through a
// symbolic link: the bytes go to a temporary file in path's folder, which
// is then renamed over the name, so that a link named path is replaced,
// its target untouched, and a reader sees the old file or the whole new
// one. The file gets permissions 0644.
func WriteFile(path string, data []byte) error {
	return WriteFileFrom(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// WriteFileFrom writes what write writes to path, as WriteFile writes
// its bytes (atomically, never through a symbolic link), without holding
// the whole file in memory: write's writer is the temporary file, behind
// a buffer. An error of write leaves path as it was and is returned.
func WriteFileFrom(path string, write func(io.Writer) error) error {
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
	bw := bufio.NewWriterSize(tmp, 64<<10)
	if err := write(bw); err != nil {
		return fail(err)
	}
	if err := bw.Flush(); err != nil {
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

// LinkFile makes dst name the same file as src, never through a symbolic
// link: a hard link to src is made under a temporary name in dst's folder
// and renamed over dst, so that a link named dst is replaced, its target
// untouched. Where the file system refuses hard links (another device,
// no support), src's bytes are copied instead, as WriteFile writes them.
func LinkFile(src, dst string) error {
	dir, name := filepath.Split(dst)
	if dir == "" {
		dir = "."
	}
	info, err := os.Lstat(src)
	if err != nil {
		return fmt.Errorf("runfolder: linking %s: %w", dst, err)
	}
	if !info.Mode().IsRegular() {
		return fmt.Errorf("runfolder: linking %s: %s is not a regular file (%s)", dst, src, info.Mode().Type())
	}
	tmp, err := os.CreateTemp(dir, "."+name+".tmp-*")
	if err != nil {
		return fmt.Errorf("runfolder: linking %s: %w", dst, err)
	}
	tmpName := tmp.Name()
	tmp.Close()
	os.Remove(tmpName)
	if err := os.Link(src, tmpName); err != nil {
		data, rerr := os.ReadFile(src)
		if rerr != nil {
			return fmt.Errorf("runfolder: linking %s: %w", dst, rerr)
		}
		return WriteFile(dst, data)
	}
	if err := os.Rename(tmpName, dst); err != nil {
		os.Remove(tmpName)
		return fmt.Errorf("runfolder: linking %s: %w", dst, err)
	}
	return nil
}

// ReadFile reads a file of a run folder, never through a symbolic link:
// a link named path is refused (the file is opened with O_NOFOLLOW), and
// so is anything but a regular file (a folder, a device, a pipe). The
// folders above path are the caller's to check.
func ReadFile(path string) ([]byte, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NOFOLLOW|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, fmt.Errorf("runfolder: reading %s (a symbolic link is refused): %w", path, err)
	}
	defer f.Close()
	info, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("runfolder: reading %s: %w", path, err)
	}
	if !info.Mode().IsRegular() {
		return nil, fmt.Errorf("runfolder: reading %s: not a regular file (%s)", path, info.Mode().Type())
	}
	b, err := io.ReadAll(f)
	if err != nil {
		return nil, fmt.Errorf("runfolder: reading %s: %w", path, err)
	}
	return b, nil
}
