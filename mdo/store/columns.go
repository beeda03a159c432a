package store

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"fmt"
	"math"
	"strings"

	"couplet/mdo"
)

// The REAL column layout (schema version 3). evaluation_data keeps each
// value of an evaluation in a REAL column of its own: "design:NAME",
// "objective:NAME", "constraint:NAME", "margin:NAME" and "output:NAME"
// (the names of the variables table's column_name). SQLite stores a REAL
// in 8 bytes, and one without a fractional part in fewer, exactly; NaN is
// NULL and so are the outputs of a failed analysis. −0 reads back as 0
// (SQLite keeps a zero REAL as the integer 0). The views evaluations and
// outputs show the same columns and rows as in the JSON text layout.

// createColumns is the DDL of the evaluations in the REAL column layout.
func (l *layout) createColumns() string {
	var b strings.Builder
	b.WriteString(evaluationHead + `,
	vectors BLOB NOT NULL,
	failure TEXT NOT NULL DEFAULT ''`)
	for _, c := range l.named() {
		fmt.Fprintf(&b, ",\n\t%s REAL", quote(c))
	}
	for _, c := range l.outCols {
		fmt.Fprintf(&b, ",\n\t%s REAL", quote(c))
	}
	b.WriteString(`
);
CREATE VIEW evaluations AS SELECT d.id AS id, d.feasible AS feasible, d.converged AS converged, d.violation AS violation,
	d.error AS error, d.failure AS failure, d.iterations AS coupling_iterations, d.discipline_calls AS discipline_calls, d.wall_seconds AS wall_seconds`)
	for _, c := range l.named() {
		fmt.Fprintf(&b, ",\n\td.%s AS %s", quote(c), quote(c))
	}
	fmt.Fprintf(&b, ",\n\t%s AS outputs\nFROM evaluation_data d;\n", l.outputsObject())
	b.WriteString("CREATE VIEW outputs AS ")
	b.WriteString(l.outputRows())
	return b.String()
}

// outputsObject is the SQL expression of an evaluation's outputs as a
// JSON object name → value, in json_object calls of at most outputChunk
// pairs joined as text.
func (l *layout) outputsObject() string {
	if len(l.outputs) == 0 {
		return "json_object()"
	}
	var parts []string
	for lo := 0; lo < len(l.outputs); lo += outputChunk {
		hi := min(lo+outputChunk, len(l.outputs))
		args := make([]string, 0, 2*(hi-lo))
		for k := lo; k < hi; k++ {
			args = append(args, sqlString(l.outputs[k].Name), "d."+quote(l.outCols[k]))
		}
		parts = append(parts, "json_object("+strings.Join(args, ", ")+")")
	}
	if len(parts) == 1 {
		return parts[0]
	}
	inner := make([]string, len(parts))
	for i, p := range parts {
		inner[i] = fmt.Sprintf("substr(%s, 2, length(%s) - 2)", p, p)
	}
	return "json('{' || " + strings.Join(inner, " || ',' || ") + " || '}')"
}

// outputRows is the SELECT of the outputs view: one row per evaluation
// and output, as UNION ALL of at most unionChunk terms each.
func (l *layout) outputRows() string {
	if len(l.outputs) == 0 {
		return "SELECT d.id AS eval_id, '' AS name, '' AS unit, NULL AS value FROM evaluation_data d WHERE 0"
	}
	var chunks []string
	for lo := 0; lo < len(l.outputs); lo += unionChunk {
		hi := min(lo+unionChunk, len(l.outputs))
		terms := make([]string, 0, hi-lo)
		for k := lo; k < hi; k++ {
			v := l.outputs[k]
			terms = append(terms, fmt.Sprintf("SELECT d.id AS eval_id, %s AS name, %s AS unit, d.%s AS value FROM evaluation_data d",
				sqlString(v.Name), sqlString(v.Unit), quote(l.outCols[k])))
		}
		chunks = append(chunks, strings.Join(terms, "\nUNION ALL "))
	}
	if len(chunks) == 1 {
		return chunks[0]
	}
	for i, c := range chunks {
		chunks[i] = "SELECT * FROM (" + c + ")"
	}
	return strings.Join(chunks, "\nUNION ALL ")
}

// sqlString quotes an SQL string literal.
func sqlString(s string) string { return "'" + strings.ReplaceAll(s, "'", "''") + "'" }

// lastBound holds, per value column, the value given to SQLite last and
// its driver value, so that a value equal (bit for bit) to the one before
// it in its column is given from the same interface: a float64 put in an interface
// is an allocation, and the values of a study's parameters, and many of
// its outputs, repeat from row to row.
type lastBound struct {
	bits []uint64
	vals []driver.Value
}

// value returns x as the driver value of column k: nil for NaN (NULL).
func (l *lastBound) value(k int, x float64) driver.Value {
	if math.IsNaN(x) {
		return nil
	}
	b := math.Float64bits(x)
	if l.vals[k] != nil && l.bits[k] == b {
		return l.vals[k]
	}
	v := driver.Value(x)
	l.bits[k], l.vals[k] = b, v
	return v
}

// columnsSelect is the SELECT of Scan in the REAL column layout.
func (l *layout) columnsSelect(failureCol string) string {
	cols := []string{"id", "feasible", "converged", "violation", "error", "iterations", "discipline_calls", "wall_seconds", "vectors", failureCol}
	for _, c := range l.named() {
		cols = append(cols, quote(c))
	}
	for _, c := range l.outCols {
		cols = append(cols, quote(c))
	}
	return "SELECT " + strings.Join(cols, ", ") + " FROM evaluation_data ORDER BY id"
}

// columnValues reads the scanned value columns into e: design,
// objectives, constraints, margins and (for a converged analysis) outputs.
func (l *layout) columnValues(e *mdo.Evaluation, vals []sql.NullFloat64) {
	nd, no, nc := len(l.design), len(l.objectives), len(l.constraints)
	take := func(n int) []float64 {
		out := make([]float64, n)
		for k := range out {
			out[k] = nullNaN(vals[k])
		}
		vals = vals[n:]
		return out
	}
	e.Design, e.Objectives, e.Constraints, e.Margins = take(nd), take(no), take(nc), take(nc)
	if e.Converged && len(l.outputs) > 0 {
		e.Outputs = take(len(l.outputs))
	}
}

// jsonLayout reports whether the stored evaluation_data keeps its values
// as the JSON text arrays of schema versions 1 and 2.
func (s *Store) jsonLayout() (bool, error) {
	var n int
	err := s.conn.QueryRowContext(context.Background(), "SELECT count(*) FROM pragma_table_info('evaluation_data') WHERE name = 'numbers'").Scan(&n)
	if err != nil {
		return false, fmt.Errorf("store: reading the schema of %s: %w", s.path, err)
	}
	return n > 0, nil
}
