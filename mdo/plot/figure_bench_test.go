package plot

import (
	"bytes"
	"testing"
)

// BenchmarkHistoryPNG10k draws the history of 10 000 evaluations as PNG
// (rasterised and encoded) and reports the file's size.
func BenchmarkHistoryPNG10k(b *testing.B) {
	r, evs := tenThousand()
	f, err := History(r, evs)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	var buf bytes.Buffer
	for b.Loop() {
		buf.Reset()
		if err := f.WritePNG(&buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len())/1024, "KiB-png")
}
