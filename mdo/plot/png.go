package plot

import (
	"bufio"
	"compress/zlib"
	"encoding/binary"
	"hash/crc32"
	"image"
	"io"
	"sync"
)

// The PNG files of the figures. A figure's picture is an opaque RGBA
// image, which image/png's Encoder writes as 8-bit truecolour, each row
// filtered by the filter (none, sub, up, average, Paeth) whose bytes have
// the least sum of absolute values (libpng's heuristic), the rows
// compressed by zlib at the fastest level into IDAT chunks of 32 KiB.
// writeOpaquePNG writes that same file, byte for byte, faster: most of a
// figure is flat colour, and where eight bytes of a row equal those
// above them and those three bytes (a pixel) to their left, every filter
// gives zeros there, so such a run is not filtered byte by byte; the
// filters are computed in one pass over the row, not one pass each.
// TestOpaquePNGIsImagePNGs compares the two on figures and on pictures
// made to defeat the shortcut.

// The PNG filter types, in the order of their numbers.
const (
	ftNone = iota
	ftSub
	ftUp
	ftAverage
	ftPaeth
	nFilter
)

// pngEncoder holds the buffers of one PNG being written.
type pngEncoder struct {
	w   io.Writer
	err error
	bw  *bufio.Writer
	zw  *zlib.Writer
	// cr[ft] is the current row filtered by ft (cr[ftNone] the row
	// itself), pr the row above, each after its filter-type byte
	cr   [nFilter][]byte
	pr   []byte
	tmp  [13]byte
	head [8]byte
	foot [4]byte
}

// pngEncoders are the encoders' buffers, used again from one figure to
// the next.
var pngEncoders = sync.Pool{New: func() any { return new(pngEncoder) }}

// writeOpaquePNG writes m, whose every pixel is opaque, as PNG to w: the
// bytes image/png's Encoder at png.BestSpeed writes.
func writeOpaquePNG(w io.Writer, m *image.RGBA) error {
	e := pngEncoders.Get().(*pngEncoder)
	defer pngEncoders.Put(e)
	e.w, e.err = w, nil
	defer func() { e.w = nil }()
	b := m.Bounds()
	_, e.err = io.WriteString(w, "\x89PNG\r\n\x1a\n")
	binary.BigEndian.PutUint32(e.tmp[0:4], uint32(b.Dx()))
	binary.BigEndian.PutUint32(e.tmp[4:8], uint32(b.Dy()))
	// 8 bits a sample, truecolour, the default compression and filter
	// methods, not interlaced
	e.tmp[8], e.tmp[9], e.tmp[10], e.tmp[11], e.tmp[12] = 8, 2, 0, 0, 0
	e.chunk(e.tmp[:13], "IHDR")
	if e.err == nil {
		if e.bw == nil {
			e.bw = bufio.NewWriterSize(idatWriter{e}, 1<<15)
		} else {
			e.bw.Reset(idatWriter{e})
		}
		if e.err = e.rows(m); e.err == nil {
			e.err = e.bw.Flush()
		}
	}
	e.chunk(nil, "IEND")
	return e.err
}

// idatWriter writes each Write as an IDAT chunk.
type idatWriter struct{ e *pngEncoder }

// Write implements io.Writer.
func (w idatWriter) Write(b []byte) (int, error) {
	w.e.chunk(b, "IDAT")
	if w.e.err != nil {
		return 0, w.e.err
	}
	return len(b), nil
}

// chunk writes a chunk of type name holding b.
func (e *pngEncoder) chunk(b []byte, name string) {
	if e.err != nil {
		return
	}
	binary.BigEndian.PutUint32(e.head[:4], uint32(len(b)))
	copy(e.head[4:8], name)
	crc := crc32.Update(0, crc32.IEEETable, e.head[4:8])
	crc = crc32.Update(crc, crc32.IEEETable, b)
	binary.BigEndian.PutUint32(e.foot[:], crc)
	if _, e.err = e.w.Write(e.head[:8]); e.err != nil {
		return
	}
	if _, e.err = e.w.Write(b); e.err != nil {
		return
	}
	_, e.err = e.w.Write(e.foot[:4])
}

// rows filters and compresses the rows of m into bw.
func (e *pngEncoder) rows(m *image.RGBA) error {
	if e.zw == nil {
		zw, err := zlib.NewWriterLevel(e.bw, zlib.BestSpeed)
		if err != nil {
			return err
		}
		e.zw = zw
	} else {
		e.zw.Reset(e.bw)
	}
	b := m.Bounds()
	sz := 1 + 3*b.Dx()
	for i := range e.cr {
		e.cr[i] = grown(e.cr[i], sz)
		e.cr[i][0] = uint8(i)
	}
	e.pr = grown(e.pr, sz)
	clear(e.pr)
	cr, pr := e.cr, e.pr
	for y := b.Min.Y; y < b.Max.Y; y++ {
		row := m.Pix[(y-b.Min.Y)*m.Stride:]
		c0 := cr[ftNone][1:]
		for x, j := 0, 0; x < len(c0); x, j = x+3, j+4 {
			c0[x], c0[x+1], c0[x+2] = row[j], row[j+1], row[j+2]
		}
		f := filterRow(&cr, pr)
		if _, err := e.zw.Write(cr[f]); err != nil {
			return err
		}
		// the current row is the row above the next
		pr, cr[ftNone] = cr[ftNone], pr
	}
	e.cr[ftNone], e.pr = cr[ftNone], pr
	return e.zw.Close()
}

// grown returns b with length n, reallocated if too small.
func grown(b []byte, n int) []byte {
	if cap(b) < n {
		return make([]byte, n)
	}
	return b[:n]
}

// filterRow fills cr[ftSub], cr[ftUp], cr[ftAverage] and cr[ftPaeth] with
// the row cr[ftNone] filtered against the row above, pr, three bytes a
// pixel, and returns the filter image/png chooses: the least sum of the
// bytes' absolute values as signed, up first, then Paeth, none, sub and
// average, a later one only if its sum is less.
func filterRow(cr *[nFilter][]byte, pr []byte) int {
	const bpp = 3
	cur, prev := cr[ftNone][1:], pr[1:]
	sub, up, avg, pth := cr[ftSub][1:], cr[ftUp][1:], cr[ftAverage][1:], cr[ftPaeth][1:]
	n := len(cur)
	sub, up, avg, pth, prev = sub[:n], up[:n], avg[:n], pth[:n], prev[:n]
	var sUp, sSub, sAvg, sPth int
	// the first pixel has none to its left (taken as zeros)
	for i := 0; i < min(bpp, n); i++ {
		up[i] = cur[i] - prev[i]
		pth[i] = up[i]
		sub[i] = cur[i]
		avg[i] = cur[i] - prev[i]/2
		sUp += abs8(up[i])
		sPth += abs8(pth[i])
		sSub += abs8(sub[i])
		sAvg += abs8(avg[i])
	}
	for i := bpp; i < n; {
		if i+8 <= n {
			w := binary.LittleEndian.Uint64(cur[i:])
			if w == binary.LittleEndian.Uint64(prev[i:]) && w == binary.LittleEndian.Uint64(cur[i-bpp:]) {
				// every byte equals the one above and the one to its left:
				// each filter gives zeros (Paeth's predictor is the left
				// byte whatever the one above left is)
				binary.LittleEndian.PutUint64(up[i:], 0)
				binary.LittleEndian.PutUint64(pth[i:], 0)
				binary.LittleEndian.PutUint64(sub[i:], 0)
				binary.LittleEndian.PutUint64(avg[i:], 0)
				i += 8
				continue
			}
		}
		for end := min(i+8, n); i < end; i++ {
			c, a, b, d := cur[i], cur[i-bpp], prev[i], prev[i-bpp]
			if c == a && c == b {
				up[i], pth[i], sub[i], avg[i] = 0, 0, 0, 0
				continue
			}
			up[i] = c - b
			pth[i] = c - paeth(a, b, d)
			sub[i] = c - a
			avg[i] = c - uint8((int(a)+int(b))/2)
			sUp += abs8(up[i])
			sPth += abs8(pth[i])
			sSub += abs8(sub[i])
			sAvg += abs8(avg[i])
		}
	}
	best, f := sUp, ftUp
	if sPth < best {
		best, f = sPth, ftPaeth
	}
	// none: the row's own bytes, summed only as far as they can win
	sNone := 0
	for i := 0; i < n && sNone < best; i++ {
		sNone += abs8(cur[i])
	}
	if sNone < best {
		best, f = sNone, ftNone
	}
	if sSub < best {
		best, f = sSub, ftSub
	}
	if sAvg < best {
		f = ftAverage
	}
	return f
}

// abs8 is the absolute value of a byte read as a signed int8.
func abs8(d uint8) int {
	if d < 128 {
		return int(d)
	}
	return 256 - int(d)
}

// paeth is the Paeth predictor of a byte from the bytes to its left (a),
// above (b) and above left (c), as image/png computes it.
func paeth(a, b, c uint8) uint8 {
	pc := int(c)
	pa := int(b) - pc
	pb := int(a) - pc
	pc = absInt(pa + pb)
	pa = absInt(pa)
	pb = absInt(pb)
	if pa <= pb && pa <= pc {
		return a
	} else if pb <= pc {
		return b
	}
	return c
}

// absInt is |x|.
func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
