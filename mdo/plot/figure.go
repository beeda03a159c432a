package plot

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"io"
	"path/filepath"
	"strings"

	"couplet/mdo/runfolder"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure is a picture ready to be written as SVG or PNG.
type Figure struct {
	// Title is the figure's title, also drawn on it.
	Title string
	// Name is a file-name stem for the figure ("history", "dsm", ...):
	// lower-case letters, digits and underscores.
	Name string
	// Width and Height are the figure's size.
	Width, Height vg.Length
	// Reason, when not nil, says why the figure could not be drawn (see
	// LeftOut): writing it returns the reason.
	Reason error
	draw   func(draw.Canvas)
}

// LeftOut returns the stand-in of a figure that could not be drawn, with
// the reason: a report shows the reason in the figure's place, and a run
// folder saves no file for it.
func LeftOut(name, title string, reason error) *Figure {
	if reason == nil {
		reason = fmt.Errorf("plot: figure %s left out for no stated reason", name)
	}
	return &Figure{Name: name, Title: title, Reason: reason}
}

// NewFigure returns a figure of the given size drawn by fn: the builder
// of every figure of this package, and of figures drawn elsewhere (an
// application's own pictures). A panic in fn while the figure is written is
// returned as an error naming the figure.
func NewFigure(name, title string, w, h vg.Length, fn func(draw.Canvas)) *Figure {
	return &Figure{Name: name, Title: title, Width: w, Height: h, draw: fn}
}

// WriteSVG writes the figure as an SVG document.
func (f *Figure) WriteSVG(w io.Writer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("plot: rendering %s: %v", f.Name, r)
		}
	}()
	if f.Reason != nil {
		return f.Reason
	}
	c := vgsvg.New(f.Width, f.Height)
	f.draw(draw.New(c))
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("plot: writing %s as SVG: %w", f.Name, err)
	}
	return nil
}

// WritePNG writes the figure as a PNG image at 96 dots per inch,
// compressed at the fastest level.
func (f *Figure) WritePNG(w io.Writer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("plot: rendering %s: %v", f.Name, r)
		}
	}()
	if f.Reason != nil {
		return f.Reason
	}
	c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(96))
	f.draw(draw.New(c))
	// the fastest deflate level: a figure's flat colours compress well at
	// any level, and the default level took most of the time
	img := c.Image()
	if m, ok := img.(*image.RGBA); ok && m.Opaque() && !m.Bounds().Empty() {
		err = writeOpaquePNG(w, m)
	} else {
		err = (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(w, img)
	}
	if err != nil {
		return fmt.Errorf("plot: writing %s as PNG: %w", f.Name, err)
	}
	return nil
}

// SVG returns the figure as an SVG document.
func (f *Figure) SVG() ([]byte, error) {
	var b bytes.Buffer
	err := f.WriteSVG(&b)
	return b.Bytes(), err
}

// InlineSVG returns the figure's SVG element without the XML prolog, for
// embedding in an HTML page.
func (f *Figure) InlineSVG() (string, error) {
	b, err := f.SVG()
	if err != nil {
		return "", err
	}
	s := string(b)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	return s, nil
}

// Save writes the figure to path, as SVG or PNG by the extension (.svg,
// .png), atomically and never through a symbolic link named path.
func (f *Figure) Save(path string) error {
	var write func(io.Writer) error
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".svg":
		write = f.WriteSVG
	case ".png":
		write = f.WritePNG
	default:
		return fmt.Errorf("plot: cannot save %s: extension %q, allowed .svg and .png", path, ext)
	}
	var b bytes.Buffer
	if err := write(&b); err != nil {
		return err
	}
	if err := runfolder.WriteFile(path, b.Bytes()); err != nil {
		return fmt.Errorf("plot: saving %s: %w", path, err)
	}
	return nil
}

// SaveAll writes each figure into dir as NAME.svg and NAME.png and
// returns the files written.
func SaveAll(dir string, figs ...*Figure) ([]string, error) {
	var out []string
	for _, f := range figs {
		for _, ext := range []string{".svg", ".png"} {
			p := filepath.Join(dir, f.Name+ext)
			if err := f.Save(p); err != nil {
				return out, err
			}
			out = append(out, p)
		}
	}
	return out, nil
}
