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
// A file another process may still be writing (a SQLite database with
// its write-ahead log) is linked with LinkFileWith and a Copy that knows
// its format.
func LinkFile(src, dst string) error { return LinkFileWith(src, dst, LinkOptions{}) }

// LinkOptions change what LinkFileWith does where it cannot make a hard
// link.
type LinkOptions struct {
	// Copy, if not nil, makes the copy where no hard link is made: it
	// writes src's content into tmp, a new, empty file (permissions
	// 0644) in dst's folder, which is then renamed over dst. nil copies
	// src's bytes.
	Copy func(src, tmp string) error
	// NoHardLink copies even where the file system could link, so that
	// dst is a file of its own that does not change with src.
	NoHardLink bool
}

// LinkFileWith is LinkFile with options: dst names the same file as
// src (a hard link renamed over dst) or, where the file system refuses
// hard links or opt.NoHardLink asks for a copy, a copy made by opt.Copy,
// renamed over dst. Neither follows a symbolic link named dst; a failed
// copy leaves dst as it was and no temporary file behind.
func LinkFileWith(src, dst string, opt LinkOptions) error {
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
	if !opt.NoHardLink {
		tmp.Close()
		os.Remove(tmpName)
		if err := os.Link(src, tmpName); err == nil {
			if err := os.Rename(tmpName, dst); err != nil {
				os.Remove(tmpName)
				return fmt.Errorf("runfolder: linking %s: %w", dst, err)
			}
			return nil
		}
		// no hard link here: a copy, into a new temporary file
		if tmp, err = os.CreateTemp(dir, "."+name+".tmp-*"); err != nil {
			return fmt.Errorf("runfolder: linking %s: %w", dst, err)
		}
		tmpName = tmp.Name()
	}
	fail := func(err error) error {
		os.Remove(tmpName)
		return fmt.Errorf("runfolder: copying %s to %s: %w", src, dst, err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		tmp.Close()
		return fail(err)
	}
	if opt.Copy == nil {
		err = copyBytes(src, tmp)
		if cerr := tmp.Close(); err == nil {
			err = cerr
		}
	} else {
		if err = tmp.Close(); err == nil {
			err = opt.Copy(src, tmpName)
		}
	}
	if err != nil {
		return fail(err)
	}
	if err := os.Rename(tmpName, dst); err != nil {
		return fail(err)
	}
	return nil
}

// copyBytes copies the bytes of the regular file src (not through a
// symbolic link) into f.
func copyBytes(src string, f *os.File) error {
	in, err := os.OpenFile(src, os.O_RDONLY|syscall.O_NOFOLLOW, 0)
	if err != nil {
		return err
	}
	defer in.Close()
	_, err = io.Copy(f, in)
	return err
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
