package report

import (
	"context"
	"path/filepath"
	"testing"

	"couplet/mdo"
	"couplet/mdo/store"
)

// BenchmarkWriteRun writes the run folder of 10 000 evaluations of the
// Sellar study (summary, evaluations.csv, history and DSM as SVG and PNG,
// report.html with the parallel coordinates), its evaluations read back
// from results.db (file) or kept in memory by the store
// (store.Options.KeepEvaluations, as couplet run does).
func BenchmarkWriteRun(b *testing.B) {
	for _, c := range []struct {
		name string
		keep bool
	}{{"file", false}, {"kept", true}} {
		b.Run(c.name, func(b *testing.B) {
			st, err := mdo.SellarStudy(mdo.MDF)
			if err != nil {
				b.Fatal(err)
			}
			dir := b.TempDir()
			r, s := recordedRunWith(b, dir, st, 10000, store.Options{ToolVersion: "t", KeepEvaluations: c.keep})
			b.ReportAllocs()
			for b.Loop() {
				out := filepath.Join(b.TempDir(), "out")
				if _, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
