package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io/fs"
	"net/url"
	"os"

	"couplet/mdo/runfolder"
)

// LinkFile makes dst the case store src, for a folder that shows a
// store under a second name (a script's folder shows its principal
// result's results.db): a hard link to src (runfolder.LinkFile), or,
// where the file system has no hard links, a copy as CopyFile makes it.
// Either way dst is a complete database on its own: End copies the
// write-ahead log into the file, so that the file a hard link names
// holds every row even before the store is closed, and a copy is made
// by SQLite and holds every committed row, those still in the log
// included. The write-ahead log and shared-memory files of an earlier
// dst (dst-wal, dst-shm), which SQLite would otherwise read with the
// new file, are removed first. Nothing is written through a symbolic
// link.
func LinkFile(src, dst string) error {
	return linkStore(src, dst, runfolder.LinkOptions{Copy: copyStore})
}

// CopyFile copies the case store src to dst as SQLite reads it (VACUUM
// INTO): a consistent, complete database of its own holding every
// committed row, those still in src's write-ahead log included, while
// src may be open and written; src-wal and src-shm are not needed beside
// the copy. The copy is written under a temporary name in dst's folder
// and renamed over dst (a symbolic link named dst is replaced, its
// target untouched), after dst-wal and dst-shm are removed.
func CopyFile(src, dst string) error {
	return linkStore(src, dst, runfolder.LinkOptions{Copy: copyStore, NoHardLink: true})
}

// linkStore links or copies the store src to dst with opt.
func linkStore(src, dst string, opt runfolder.LinkOptions) error {
	if err := checkFile(src); err != nil {
		return err
	}
	for _, p := range []string{dst + "-wal", dst + "-shm"} {
		if err := os.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("store: replacing %s: %w", dst, err)
		}
	}
	if err := runfolder.LinkFileWith(src, dst, opt); err != nil {
		return fmt.Errorf("store: %w", err)
	}
	return nil
}

// copyStore writes the database src into the empty file tmp with
// VACUUM INTO, through a read-only connection of its own.
func copyStore(src, tmp string) error {
	q := url.Values{}
	q.Add("mode", "ro")
	q.Add("_pragma", "busy_timeout(5000)")
	db, err := sql.Open("sqlite", "file:"+(&url.URL{Path: src}).EscapedPath()+"?"+q.Encode())
	if err != nil {
		return err
	}
	defer db.Close()
	if _, err := db.ExecContext(context.Background(), "VACUUM INTO ?", tmp); err != nil {
		return fmt.Errorf("VACUUM INTO: %w", err)
	}
	return db.Close()
}
