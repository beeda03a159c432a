package plot

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// TestOpaquePNGIsImagePNGs writes pictures with writeOpaquePNG and with
// image/png's Encoder at BestSpeed (the reference: the standard library's
// encoder) and compares the files byte for byte: a figure's picture, and
// pictures made to test each path of the row filter: noise (no run of
// equal bytes), flat colour with sparse dots and boxes (long runs, broken
// at every position of a word), three colours (many ties between the
// filters' sums), stripes one pixel wide, narrow and tiny pictures (rows
// shorter than a word) and a picture cut from a larger one. The encoder
// is used again from one picture to the next, larger and smaller.
func TestOpaquePNGIsImagePNGs(t *testing.T) {
	figure := historyPicture(t)

	rng := rand.New(rand.NewPCG(1, 2))
	opaque := func(w, h int, at func(x, y int) color.RGBA) *image.RGBA {
		m := image.NewRGBA(image.Rect(0, 0, w, h))
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				m.SetRGBA(x, y, at(x, y))
			}
		}
		return m
	}
	noise := func(x, y int) color.RGBA {
		return color.RGBA{uint8(rng.IntN(256)), uint8(rng.IntN(256)), uint8(rng.IntN(256)), 255}
	}
	white := color.RGBA{255, 255, 255, 255}
	dots := func(x, y int) color.RGBA {
		switch {
		case rng.IntN(97) == 0:
			return noise(x, y)
		case x%37 < 5 && y%23 < 4:
			return color.RGBA{31, 119, 180, 255}
		}
		return white
	}
	three := []color.RGBA{white, {0, 0, 0, 255}, {214, 39, 40, 255}}
	few := func(x, y int) color.RGBA { return three[rng.IntN(3)] }
	stripes := func(x, y int) color.RGBA { return three[(x+y/5)%3] }
	big := opaque(300, 120, dots)
	cases := []struct {
		name string
		m    *image.RGBA
	}{
		{"figure", figure},
		{"noise", opaque(203, 61, noise)},
		{"flat with dots and boxes", big},
		{"three colours", opaque(130, 90, few)},
		{"stripes", opaque(257, 40, stripes)},
		{"narrow", opaque(3, 50, dots)},
		{"tiny", opaque(1, 1, noise)},
		{"two by three", opaque(2, 3, few)},
		{"cut out", big.SubImage(image.Rect(17, 9, 250, 101)).(*image.RGBA)},
		{"figure again", figure},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var want, got bytes.Buffer
			if err := (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(&want, tc.m); err != nil {
				t.Fatal(err)
			}
			if err := writeOpaquePNG(&got, tc.m); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got.Bytes(), want.Bytes()) {
				t.Errorf("%s: %d bytes, image/png writes %d; first difference at byte %d", tc.name, got.Len(), want.Len(), firstDifference(got.Bytes(), want.Bytes()))
			}
		})
	}
}

// historyPicture is the picture WritePNG encodes for the history of
// 10 000 evaluations (605 × 605 pixels).
func historyPicture(tb testing.TB) *image.RGBA {
	tb.Helper()
	r, evs := tenThousand()
	hist, err := History(r, evs)
	if err != nil {
		tb.Fatal(err)
	}
	c := vgimg.NewWith(vgimg.UseWH(hist.Width, hist.Height), vgimg.UseDPI(96))
	hist.draw(draw.New(c))
	return c.Image().(*image.RGBA)
}

// firstDifference is the index of the first byte where a and b differ.
func firstDifference(a, b []byte) int {
	for i := range min(len(a), len(b)) {
		if a[i] != b[i] {
			return i
		}
	}
	return min(len(a), len(b))
}

// BenchmarkOpaquePNG encodes the picture of the history of 10 000
// evaluations (605 × 605 pixels) with writeOpaquePNG and, for the
// floor, with image/png's Encoder at BestSpeed.
func BenchmarkOpaquePNG(b *testing.B) {
	m := historyPicture(b)
	for _, enc := range []struct {
		name  string
		write func(*bytes.Buffer) error
	}{
		{"couplet", func(w *bytes.Buffer) error { return writeOpaquePNG(w, m) }},
		{"image-png", func(w *bytes.Buffer) error {
			return (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(w, m)
		}},
	} {
		b.Run(enc.name, func(b *testing.B) {
			b.ReportAllocs()
			var buf bytes.Buffer
			for b.Loop() {
				buf.Reset()
				if err := enc.write(&buf); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(buf.Len())/1024, "KiB-png")
		})
	}
}
