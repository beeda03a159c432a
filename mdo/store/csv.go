package store

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"couplet/mdo"
)

// The CSV export has one row per evaluation and a header naming each
// column and its unit in brackets:
//
//	id, feasible, converged, violation [-], error, iterations,
//	discipline_calls, wall_seconds [s], design:NAME [unit]…,
//	objective:NAME [unit]…, constraint:NAME [unit]…, margin:NAME [unit]…,
//	output:NAME [unit]…, x:NAME [-]…, f:NAME [-]…, g:NAME [-]…
//
// The output columns are written on request only (CSVOptions.AllOutputs):
// by default the file holds the status, design, objectives, constraints
// and margins (and x, f, g), and the store keeps every output. x are the
// unit-box coordinates, f the objectives in minimised sense and g the
// scaled constraints (≤ 0 when satisfied). Numbers are written so
// that ReadCSV gives them back exactly; non-finite ones as NaN, Infinity,
// -Infinity.

// CSVOptions choose the columns of a CSV export.
type CSVOptions struct {
	// AllOutputs adds a column per output of the analysis.
	AllOutputs bool
}

// unitOf returns the unit of a name among the outputs (or, for columns
// read from a CSV file, as its header says), or "".
func (c Columns) unitOf(name string) string {
	for _, v := range c.Outputs {
		if v.Name == name {
			return v.Unit
		}
	}
	return c.units[name]
}

// header returns the CSV header, with the output columns if outputs.
func (c Columns) header(outputs bool) []string {
	u := func(unit string) string {
		if unit == "" {
			return " [-]"
		}
		return " [" + unit + "]"
	}
	h := []string{"id", "feasible", "converged", "violation [-]", "error", "coupling_iterations", "discipline_calls", "wall_seconds [s]"}
	for _, d := range c.Design {
		h = append(h, "design:"+sanitize(d.Name)+u(d.Unit))
	}
	for _, o := range c.Objectives {
		h = append(h, "objective:"+sanitize(o)+u(c.unitOf(o)))
	}
	for _, k := range c.Constraints {
		h = append(h, "constraint:"+sanitize(k)+u(c.unitOf(k)))
	}
	for _, k := range c.Constraints {
		h = append(h, "margin:"+sanitize(k)+u(c.unitOf(k)))
	}
	for _, v := range c.Outputs {
		if outputs {
			h = append(h, "output:"+sanitize(v.Name)+u(v.Unit))
		}
	}
	for _, d := range c.Design {
		h = append(h, "x:"+sanitize(d.Name)+" [-]")
	}
	for _, o := range c.Objectives {
		h = append(h, "f:"+sanitize(o)+" [-]")
	}
	for _, k := range c.Constraints {
		h = append(h, "g:"+sanitize(k)+" [-]")
	}
	return h
}

// csvWriter writes one CSV export: the header, then a row per
// evaluation. Each row is formatted into one buffer (the numbers
// appended in place, a text field quoted as encoding/csv quotes it) and
// written at once: the file is the same, byte for byte, as one written
// by a csv.Writer, without a string per number.
type csvWriter struct {
	c       Columns
	outputs bool
	w       *bufio.Writer
	line    []byte
}

// newCSVWriter writes the header of an export of columns c to w.
func newCSVWriter(w io.Writer, c Columns, opt CSVOptions) (*csvWriter, error) {
	x := &csvWriter{c: c, outputs: opt.AllOutputs, w: bufio.NewWriterSize(w, 64<<10)}
	for i, h := range c.header(x.outputs) {
		if i > 0 {
			x.line = append(x.line, ',')
		}
		x.line = appendCSVField(x.line, h)
	}
	if err := x.end(); err != nil {
		return nil, err
	}
	return x, nil
}

// write writes the row of one evaluation.
func (x *csvWriter) write(e *mdo.Evaluation) error {
	x.line = x.c.appendRow(x.line, e, x.outputs)
	return x.end()
}

// end writes the line formatted and empties it.
func (x *csvWriter) end() error {
	x.line = append(x.line, '\n')
	_, err := x.w.Write(x.line)
	x.line = x.line[:0]
	if err != nil {
		return fmt.Errorf("store: writing CSV: %w", err)
	}
	return nil
}

// flush ends the export.
func (x *csvWriter) flush() error {
	if err := x.w.Flush(); err != nil {
		return fmt.Errorf("store: writing CSV: %w", err)
	}
	return nil
}

// appendCSVField appends a text field as encoding/csv's Writer (comma
// ',', no CRLF) writes it: in double quotes, each quote doubled, if it
// holds a comma, quote, CR or LF, begins with a space or is \. ;
// verbatim otherwise.
func appendCSVField(b []byte, field string) []byte {
	if !csvNeedsQuotes(field) {
		return append(b, field...)
	}
	b = append(b, '"')
	for i := 0; i < len(field); i++ {
		if field[i] == '"' {
			b = append(b, '"')
		}
		b = append(b, field[i])
	}
	return append(b, '"')
}

// csvNeedsQuotes is encoding/csv's rule for a field with the comma ','.
func csvNeedsQuotes(field string) bool {
	if field == "" {
		return false
	}
	if field == `\.` {
		return true
	}
	if strings.ContainsAny(field, ",\"\r\n") {
		return true
	}
	r1, _ := utf8.DecodeRuneInString(field)
	return unicode.IsSpace(r1)
}

// appendCSVFloat appends x so that parseFloat gives it back exactly:
// the shortest decimal, NaN, Infinity or -Infinity (never quoted).
func appendCSVFloat(b []byte, x float64) []byte {
	switch {
	case math.IsNaN(x):
		return append(b, "NaN"...)
	case math.IsInf(x, 1):
		return append(b, "Infinity"...)
	case math.IsInf(x, -1):
		return append(b, "-Infinity"...)
	}
	return strconv.AppendFloat(b, x, 'g', -1, 64)
}

// appendRow formats one evaluation as a CSV line (without its end), with
// its outputs if outputs.
func (c Columns) appendRow(b []byte, e *mdo.Evaluation, outputs bool) []byte {
	b = strconv.AppendInt(b, int64(e.ID), 10)
	b = append(b, ',')
	b = strconv.AppendBool(b, e.Feasible)
	b = append(b, ',')
	b = strconv.AppendBool(b, e.Converged)
	b = append(b, ',')
	b = appendCSVFloat(b, e.Violation)
	b = append(b, ',')
	b = appendCSVField(b, e.Err)
	b = append(b, ',')
	b = strconv.AppendInt(b, int64(e.CouplingIterations), 10)
	b = append(b, ',')
	b = strconv.AppendInt(b, int64(e.DisciplineCalls), 10)
	b = append(b, ',')
	b = appendCSVFloat(b, e.Wall.Seconds())
	for _, xs := range [][]float64{e.Design, e.Objectives, e.Constraints, e.Margins} {
		for _, x := range xs {
			b = appendCSVFloat(append(b, ','), x)
		}
	}
	for i := range c.Outputs {
		if !outputs {
			break
		}
		// a failed analysis has no outputs: its cells stay empty
		b = append(b, ',')
		if i < len(e.Outputs) {
			b = appendCSVFloat(b, e.Outputs[i])
		}
	}
	for _, xs := range [][]float64{e.X, e.F, e.G} {
		for _, x := range xs {
			b = appendCSVFloat(append(b, ','), x)
		}
	}
	return b
}

// WriteCSV streams the store's evaluations, in the order they were
// recorded, as CSV with a header naming units (the layout above), with
// the output columns if opt.AllOutputs.
func (s *Store) WriteCSV(w io.Writer, opt CSVOptions) error {
	x, err := newCSVWriter(w, s.Columns(), opt)
	if err != nil {
		return err
	}
	if err := s.Scan(x.write); err != nil {
		return err
	}
	return x.flush()
}

// WriteCSVOf writes evs, the store's evaluations as Evaluations returned
// them, as WriteCSV does, without reading the file again: a caller that
// has loaded the evaluations pays for one read instead of two.
func (s *Store) WriteCSVOf(w io.Writer, evs []*mdo.Evaluation, opt CSVOptions) error {
	return writeCSVOf(w, s.Columns(), evs, opt)
}

// writeCSVOf writes evs as CSV of the columns c.
func writeCSVOf(w io.Writer, c Columns, evs []*mdo.Evaluation, opt CSVOptions) error {
	x, err := newCSVWriter(w, c, opt)
	if err != nil {
		return err
	}
	for _, e := range evs {
		if err := x.write(e); err != nil {
			return err
		}
	}
	return x.flush()
}

// splitHeader splits "role:name [unit]" into its parts.
func splitHeader(h string) (role, name, unit string, ok bool) {
	role, rest, ok := strings.Cut(h, ":")
	if !ok {
		return "", "", "", false
	}
	i := strings.LastIndex(rest, " [")
	if i < 0 || !strings.HasSuffix(rest, "]") {
		return "", "", "", false
	}
	name, unit = rest[:i], rest[i+2:len(rest)-1]
	if unit == "-" {
		unit = ""
	}
	return role, name, unit, true
}

// ReadCSV reads a CSV written by Store.WriteCSV back into columns and
// evaluations. An unexpected header or a malformed number is an error
// naming the line and the column.
func ReadCSV(r io.Reader) (Columns, []*mdo.Evaluation, error) {
	cr := csv.NewReader(r)
	head, err := cr.Read()
	if err != nil {
		return Columns{}, nil, fmt.Errorf("store: reading the CSV header: %w", err)
	}
	fixed := []string{"id", "feasible", "converged", "violation [-]", "error", "coupling_iterations", "discipline_calls", "wall_seconds [s]"}
	if len(head) < len(fixed) {
		return Columns{}, nil, fmt.Errorf("store: CSV header has %d columns, a case export has at least %d", len(head), len(fixed))
	}
	if head[5] == "iterations" {
		head[5] = "coupling_iterations" // a file written before the column was renamed
	}
	for i, f := range fixed {
		if head[i] != f {
			return Columns{}, nil, fmt.Errorf("store: CSV column %d is %q, want %q", i+1, head[i], f)
		}
	}
	c := Columns{units: map[string]string{}}
	for i, h := range head[len(fixed):] {
		role, name, unit, ok := splitHeader(h)
		if !ok {
			return Columns{}, nil, fmt.Errorf("store: CSV column %d %q is not of the form role:name [unit]", i+len(fixed)+1, h)
		}
		switch role {
		case "design":
			c.Design = append(c.Design, mdo.DesignSpec{Name: name, Unit: unit})
		case "objective":
			c.Objectives = append(c.Objectives, name)
			c.units[name] = unit
		case "constraint":
			c.Constraints = append(c.Constraints, name)
			c.units[name] = unit
		case "output":
			c.Outputs = append(c.Outputs, mdo.Var{Name: name, Unit: unit})
		case "margin", "x", "f", "g":
		default:
			return Columns{}, nil, fmt.Errorf("store: CSV column %d %q has an unknown role %q", i+len(fixed)+1, h, role)
		}
	}
	withOutputs := len(c.Outputs) > 0
	if got, want := len(head), len(c.header(withOutputs)); got != want {
		return Columns{}, nil, fmt.Errorf("store: CSV header has %d columns, its roles call for %d", got, want)
	}
	for i, h := range c.header(withOutputs) {
		if head[i] != h {
			return Columns{}, nil, fmt.Errorf("store: CSV column %d is %q, want %q", i+1, head[i], h)
		}
	}
	var evs []*mdo.Evaluation
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return c, nil, fmt.Errorf("store: reading CSV line %d: %w", line, err)
		}
		e, err := c.parseRow(rec, head)
		if err != nil {
			return c, nil, fmt.Errorf("store: CSV line %d: %w", line, err)
		}
		evs = append(evs, e)
	}
	return c, evs, nil
}

// parseRow decodes one CSV record.
func (c Columns) parseRow(rec, head []string) (*mdo.Evaluation, error) {
	col := 0
	bad := func(err error) error { return fmt.Errorf("column %q = %q: %w", head[col], rec[col], err) }
	next := func() string { col++; return rec[col-1] }
	integer := func() (int, error) {
		v, err := strconv.Atoi(next())
		if err != nil {
			col--
			return 0, bad(err)
		}
		return v, nil
	}
	boolean := func() (bool, error) {
		v, err := strconv.ParseBool(next())
		if err != nil {
			col--
			return false, bad(err)
		}
		return v, nil
	}
	floats := func(n int) ([]float64, error) {
		out := make([]float64, n)
		for k := range out {
			v, err := parseFloat(next())
			if err != nil {
				col--
				return nil, bad(err)
			}
			out[k] = v
		}
		return out, nil
	}
	e := &mdo.Evaluation{}
	var err error
	if e.ID, err = integer(); err != nil {
		return nil, err
	}
	if e.Feasible, err = boolean(); err != nil {
		return nil, err
	}
	if e.Converged, err = boolean(); err != nil {
		return nil, err
	}
	v, err := floats(1)
	if err != nil {
		return nil, err
	}
	e.Violation = v[0]
	e.Err = next()
	if e.CouplingIterations, err = integer(); err != nil {
		return nil, err
	}
	if e.DisciplineCalls, err = integer(); err != nil {
		return nil, err
	}
	if v, err = floats(1); err != nil {
		return nil, err
	}
	e.Wall = time.Duration(math.Round(v[0] * 1e9))
	nd, no, nc := len(c.Design), len(c.Objectives), len(c.Constraints)
	for _, dst := range []struct {
		p *[]float64
		n int
	}{{&e.Design, nd}, {&e.Objectives, no}, {&e.Constraints, nc}, {&e.Margins, nc}, {&e.Outputs, len(c.Outputs)}, {&e.X, nd}, {&e.F, no}, {&e.G, nc}} {
		if *dst.p, err = floats(dst.n); err != nil {
			return nil, err
		}
	}
	if !e.Converged || len(c.Outputs) == 0 {
		e.Outputs = nil // a failed analysis has no outputs (older files wrote its defaults)
	}
	return e, nil
}
