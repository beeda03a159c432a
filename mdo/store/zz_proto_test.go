package store

import (
	"context"
	"database/sql/driver"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

func BenchmarkProtoLayout(b *testing.B) {
	for _, nv := range []int{16, 39} {
		for _, mode := range []string{"json", "real"} {
			b.Run(fmt.Sprintf("%s/%d", mode, nv), func(b *testing.B) {
				db, conn, err := openDB(filepath.Join(b.TempDir(), "p.db"), false)
				if err != nil {
					b.Fatal(err)
				}
				defer db.Close()
				ctx := context.Background()
				cols := []string{"id INTEGER PRIMARY KEY", "a", "b", "c", "d", "e", "f", "g"}
				ncol := 8
				if mode == "json" {
					cols = append(cols, "n1 TEXT", "n2 TEXT", "v BLOB")
					ncol += 3
				} else {
					for k := 0; k < nv; k++ {
						cols = append(cols, fmt.Sprintf("x%d", k))
					}
					cols = append(cols, "v BLOB")
					ncol += nv + 1
				}
				if _, err := conn.ExecContext(ctx, "CREATE TABLE t ("+strings.Join(cols, ",")+")"); err != nil {
					b.Fatal(err)
				}
				const rows = 64
				one := "(" + strings.TrimSuffix(strings.Repeat("?,", ncol), ",") + ")"
				q := "INSERT OR REPLACE INTO t VALUES " + strings.TrimSuffix(strings.Repeat(one+",", rows), ",")
				var args []driver.NamedValue
				add := func(v driver.Value) { args = append(args, driver.NamedValue{Ordinal: len(args) + 1, Value: v}) }
				xs := make([]float64, nv)
				var arena []byte
				b.ResetTimer()
				err = conn.Raw(func(dc any) error {
					st, err := dc.(driver.ConnPrepareContext).PrepareContext(ctx, q)
					if err != nil {
						return err
					}
					ex := st.(driver.StmtExecContext)
					dc.(driver.ExecerContext).ExecContext(ctx, "BEGIN", nil)
					for i := 0; i < b.N; i += rows {
						args = args[:0]
						arena = arena[:0]
						for r := 0; r < rows; r++ {
							id := i + r
							for k := range xs {
								xs[k] = 1/(float64(id)+float64(k)+1.5) + float64(id)*0.1
							}
							add(int64(id))
							add(true)
							add(true)
							add(0.5 + float64(id))
							add("")
							add(int64(9))
							add(int64(27))
							add(1.2345e-5)
							if mode == "json" {
								st := len(arena)
								arena = appendNumbers(arena, xs[:nv/2])
								add(string(arena[st:]))
								st = len(arena)
								arena = appendNumbers(arena, xs[nv/2:])
								add(string(arena[st:]))
							} else {
								for _, x := range xs {
									add(x)
								}
							}
							st := len(arena)
							arena = appendFloats(arena, xs[:6])
							add(arena[st:])
						}
						if _, err := ex.ExecContext(ctx, args); err != nil {
							return err
						}
						if (i/rows)%64 == 63 {
							dc.(driver.ExecerContext).ExecContext(ctx, "COMMIT", nil)
							dc.(driver.ExecerContext).ExecContext(ctx, "BEGIN", nil)
						}
					}
					dc.(driver.ExecerContext).ExecContext(ctx, "COMMIT", nil)
					return st.Close()
				})
				if err != nil {
					b.Fatal(err)
				}
				conn.Close()
			})
		}
	}
}
