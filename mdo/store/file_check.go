package store

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
)

// sqliteMagic opens every SQLite 3 database file.
const sqliteMagic = "SQLite format 3\x00"

// ErrNotStore is wrapped by the errors for a file that is not a Couplet
// case store: not SQLite at all, another program's database, or a newer
// schema.
var ErrNotStore = errors.New("not a Couplet case store")

// ErrDamaged is wrapped by the errors for a case store that is truncated
// or corrupt.
var ErrDamaged = errors.New("case store damaged")

// checkFile looks at the file's SQLite header before the driver opens it,
// so that a truncated or foreign file gives a clear error instead of a
// driver message (or, worse, a fresh empty database).
func checkFile(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return fmt.Errorf("store: opening %s: %w", path, err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return fmt.Errorf("store: %s: %w", path, err)
	}
	if st.IsDir() {
		return fmt.Errorf("store: %s is a directory, not a case store file: %w", path, ErrNotStore)
	}
	size := st.Size()
	if size == 0 {
		return fmt.Errorf("store: %s is empty (0 bytes): %w", path, ErrNotStore)
	}
	var hdr [100]byte
	n, err := io.ReadFull(f, hdr[:])
	if n >= len(sqliteMagic) && string(hdr[:len(sqliteMagic)]) != sqliteMagic || n < len(sqliteMagic) && string(hdr[:n]) != sqliteMagic[:n] {
		return fmt.Errorf("store: %s is not a SQLite database (it starts with %q): %w", path, hdr[:min(n, 16)], ErrNotStore)
	}
	if err != nil {
		return fmt.Errorf("store: %s is truncated: %d bytes, shorter than the 100-byte SQLite header: %w", path, size, ErrDamaged)
	}
	pageSize := int64(binary.BigEndian.Uint16(hdr[16:18]))
	if pageSize == 1 {
		pageSize = 65536
	}
	if pageSize < 512 || pageSize&(pageSize-1) != 0 {
		return fmt.Errorf("store: %s has an invalid page size %d in its header: %w", path, pageSize, ErrDamaged)
	}
	pages := int64(binary.BigEndian.Uint32(hdr[28:32]))
	change := binary.BigEndian.Uint32(hdr[24:28])
	validFor := binary.BigEndian.Uint32(hdr[92:96])
	if pages > 0 && change == validFor && size < pages*pageSize {
		return fmt.Errorf("store: %s is truncated: its header declares %d pages of %d bytes (%d bytes) but the file has %d bytes: %w",
			path, pages, pageSize, pages*pageSize, size, ErrDamaged)
	}
	if size%pageSize != 0 {
		return fmt.Errorf("store: %s is truncated: %d bytes is not a whole number of %d-byte pages: %w", path, size, pageSize, ErrDamaged)
	}
	return nil
}
