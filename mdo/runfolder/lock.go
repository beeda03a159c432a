package runfolder

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
)

// Lock is the hold of one run on its output folder.
type Lock struct {
	f *os.File
}

// BusyError says that another process holds a folder's lock.
type BusyError struct {
	Dir string
	// PID is the holder's process number as it wrote it (0 if unknown).
	PID int
}

// Error implements error.
func (e *BusyError) Error() string {
	who := "another process"
	if e.PID > 0 {
		who = fmt.Sprintf("process %d", e.PID)
	}
	return fmt.Sprintf("runfolder: %s is in use by another run (%s holds %s); wait for it to end or choose another folder", e.Dir, who, filepath.Join(e.Dir, LockFile))
}

// TakeLock locks dir (created if need be) for one run: an exclusive
// flock on DIR/.couplet-lock, which then holds this process's number. A
// folder another process (or another lock of this one) holds is a
// *BusyError naming the holder. A lock file that is a symbolic link is
// refused (opened with O_NOFOLLOW). Release ends the hold; so does the end of
// the process.
func TakeLock(dir string) (*Lock, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("runfolder: %w", err)
	}
	p := filepath.Join(dir, LockFile)
	f, err := os.OpenFile(p, os.O_RDWR|os.O_CREATE|syscall.O_NOFOLLOW, 0o644)
	if err != nil {
		return nil, fmt.Errorf("runfolder: opening the lock %s (a symbolic link is refused): %w", p, err)
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		defer f.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			b := make([]byte, 32)
			n, _ := f.ReadAt(b, 0)
			pid, _ := strconv.Atoi(strings.TrimSpace(string(b[:n])))
			return nil, &BusyError{Dir: dir, PID: pid}
		}
		return nil, fmt.Errorf("runfolder: locking %s: %w", p, err)
	}
	if err := f.Truncate(0); err != nil {
		f.Close()
		return nil, fmt.Errorf("runfolder: %w", err)
	}
	if _, err := f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0); err != nil {
		f.Close()
		return nil, fmt.Errorf("runfolder: %w", err)
	}
	return &Lock{f: f}, nil
}

// Release ends the hold on the folder.
func (l *Lock) Release() error {
	if l == nil || l.f == nil {
		return nil
	}
	err := syscall.Flock(int(l.f.Fd()), syscall.LOCK_UN)
	if cerr := l.f.Close(); err == nil {
		err = cerr
	}
	l.f = nil
	if err != nil {
		return fmt.Errorf("runfolder: releasing the lock: %w", err)
	}
	return nil
}
