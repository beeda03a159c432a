package mdo

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Measurements is a table of measured data read by ReadMeasurements: each
// row is one measured condition (values of parameters of the system, such
// as cruise.mach) with the quantities measured there (values of variables
// the system computes, such as aero.cd0_cruise), each with an optional
// standard uncertainty.
//
// The file is CSV (encoding/csv) whose first row names the columns. A
// column header is a variable name followed by its unit in square
// brackets, "cruise.mach [-]" or "aero.cla_cruise [1/rad]"; "[-]" marks a
// dimensionless variable, and the unit must be the one the model declares.
// A column "u(name) [unit]" holds the standard uncertainty u (as in the
// GUM, JCGM 100:2008) of the measured column name, in the same unit; an
// empty uncertainty cell, or no such column, means "not given" (the point
// then weighs 1). An empty cell of a measured quantity means "not measured
// at this condition"; condition cells must all be filled. Lines starting
// with '#' are comments (the file's provenance, for example).
type Measurements struct {
	// Source names where the data came from (the file name, or the name
	// given to ReadMeasurements).
	Source string
	// Conditions are the parameter columns; Quantities the measured ones.
	Conditions, Quantities []Var
	// Rows hold the data, one per line of data in the file.
	Rows []MeasuredRow
}

// MeasuredRow is one row of Measurements.
type MeasuredRow struct {
	// Line is the row's line number in the file (the header is line 1
	// when the file has no comments).
	Line int
	// Conditions holds the row's condition values, in the order of
	// Measurements.Conditions.
	Conditions []float64
	// Values holds the measured values, in the order of
	// Measurements.Quantities; NaN where not measured.
	Values []float64
	// Uncertainty holds each value's standard uncertainty; NaN where not
	// given.
	Uncertainty []float64
}

// Points returns the number of measured values in the table.
func (m *Measurements) Points() int {
	n := 0
	for _, r := range m.Rows {
		for _, v := range r.Values {
			if !math.IsNaN(v) {
				n++
			}
		}
	}
	return n
}

// ReadMeasurements reads a measurements table (see Measurements for its
// format) from r, naming it source in errors and in the result, and checks
// every column against the system's variables: a condition must be a
// parameter of the system, a measured quantity one of its computed
// variables, and each unit the one the variable declares. Errors name the
// line and the column.
func ReadMeasurements(r io.Reader, source string, sys *System) (*Measurements, error) {
	if sys == nil {
		return nil, errors.New("mdo: measurements: the system is nil")
	}
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("mdo: measurements %s: the file is empty; its first row must name the columns, e.g. \"cruise.mach [-],aero.cd0_cruise [-]\"", source)
	}
	if err != nil {
		return nil, fmt.Errorf("mdo: measurements %s: %w", source, err)
	}
	headerLine, _ := cr.FieldPos(0)
	m := &Measurements{Source: source}
	type col struct {
		kind  int // 0 condition, 1 quantity, 2 uncertainty
		index int // into Conditions, Quantities (for an uncertainty: its quantity)
		name  string
	}
	cols := make([]col, len(header))
	seen := map[string]int{}
	uncertain := map[string]int{} // quantity name -> column
	for j, h := range header {
		where := fmt.Sprintf("mdo: measurements %s: line %d, column %d (%q)", source, headerLine, j+1, h)
		name, unit, ok := splitHeader(h)
		if !ok {
			return nil, fmt.Errorf("%s: a header must be a variable name and its unit in brackets, e.g. \"aero.cla_cruise [1/rad]\" (\"[-]\" when dimensionless)", where)
		}
		quantity, isU := strings.CutPrefix(name, "u(")
		if isU {
			if !strings.HasSuffix(quantity, ")") {
				return nil, fmt.Errorf("%s: an uncertainty column is written u(name) [unit]", where)
			}
			quantity = strings.TrimSuffix(quantity, ")")
		}
		v, err := sys.Var(quantity)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", where, err)
		}
		if unit != v.Unit {
			return nil, fmt.Errorf("%s: %s is in %q in the model, not %q; convert the column to %q", where, quantity, v.Unit, unit, v.Unit)
		}
		if prev, dup := seen[name]; dup {
			return nil, fmt.Errorf("%s: %s is also column %d", where, name, prev+1)
		}
		seen[name] = j
		switch {
		case isU:
			if sys.IsParameter(quantity) {
				return nil, fmt.Errorf("%s: %s is a condition (a parameter of the model); uncertainties are given for measured quantities only", where, quantity)
			}
			uncertain[quantity] = j
			cols[j] = col{kind: 2, name: quantity}
		case sys.IsParameter(name):
			cols[j] = col{kind: 0, index: len(m.Conditions), name: name}
			m.Conditions = append(m.Conditions, v)
		default:
			cols[j] = col{kind: 1, index: len(m.Quantities), name: name}
			m.Quantities = append(m.Quantities, v)
		}
	}
	for q, j := range uncertain {
		if _, ok := seen[q]; !ok {
			return nil, fmt.Errorf("mdo: measurements %s: line %d, column %d: u(%s) has no column %s beside it", source, headerLine, j+1, q, q)
		}
	}
	for j := range cols {
		if cols[j].kind == 2 {
			cols[j].index = cols[seen[cols[j].name]].index
		}
	}
	if len(m.Quantities) == 0 {
		return nil, fmt.Errorf("mdo: measurements %s: no measured quantity: every column is a parameter of the model (%s)", source, strings.Join(header, ", "))
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("mdo: measurements %s: %w", source, err)
		}
		line, _ := cr.FieldPos(0)
		row := MeasuredRow{Line: line, Conditions: make([]float64, len(m.Conditions)),
			Values: nanSlice(len(m.Quantities)), Uncertainty: nanSlice(len(m.Quantities))}
		for j, cell := range rec {
			c := cols[j]
			where := fmt.Sprintf("mdo: measurements %s: line %d, column %d (%s)", source, line, j+1, header[j])
			cell = strings.TrimSpace(cell)
			if cell == "" {
				if c.kind == 0 {
					return nil, fmt.Errorf("%s: the condition is empty; every row needs all its conditions", where)
				}
				continue
			}
			x, err := strconv.ParseFloat(cell, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("%s: %q is not a finite number", where, cell)
			}
			switch c.kind {
			case 0:
				if err := m.Conditions[c.index].Check(x); err != nil {
					return nil, fmt.Errorf("%s: %w", where, err)
				}
				row.Conditions[c.index] = x
			case 1:
				row.Values[c.index] = x
			case 2:
				if !(x > 0) {
					return nil, fmt.Errorf("%s: the uncertainty is %g; it must be > 0 (leave the cell empty when not known)", where, x)
				}
				row.Uncertainty[c.index] = x
			}
		}
		for k, q := range m.Quantities {
			if math.IsNaN(row.Values[k]) && !math.IsNaN(row.Uncertainty[k]) {
				return nil, fmt.Errorf("mdo: measurements %s: line %d, column %d (u(%s)): an uncertainty without a measured value", source, line, uncertain[q.Name]+1, q.Name)
			}
		}
		m.Rows = append(m.Rows, row)
	}
	if len(m.Rows) == 0 {
		return nil, fmt.Errorf("mdo: measurements %s: no data rows below the header", source)
	}
	return m, nil
}

// splitHeader splits "name [unit]" into its name and unit.
func splitHeader(h string) (name, unit string, ok bool) {
	h = strings.TrimSpace(h)
	i := strings.LastIndexByte(h, '[')
	if i <= 0 || !strings.HasSuffix(h, "]") {
		return "", "", false
	}
	name = strings.TrimSpace(h[:i])
	unit = strings.TrimSpace(h[i+1 : len(h)-1])
	return name, unit, name != "" && unit != ""
}

// nanSlice returns n NaNs.
func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}
