package store

import (
	"context"
	"fmt"
	"strings"

	"couplet/mdo"
)

// Format is the value of store_info.format that marks a Couplet case
// store; SchemaVersion is the version of the layout described in the
// package documentation. Version 1 stores (written before the counters
// were named repeats and picked-up points) still read and can be picked
// up: their run table says cache_hits and restored, their sessions table
// resumed_rows. Version 3 keeps the values of an evaluation in REAL
// columns of evaluation_data (see layout.columns); stores of versions 1
// and 2 keep them as JSON text and still read and can be picked up.
const (
	Format        = "couplet-case-store"
	SchemaVersion = 3
)

// maxTableColumns bounds the columns of evaluation_data in the REAL
// column layout (SQLite's default SQLITE_MAX_COLUMN is 2000); a study
// with more values per evaluation is stored in the JSON text layout.
const maxTableColumns = 1900

// outputChunk bounds the name/value pairs of one json_object call in the
// evaluations view (SQLite before 3.48 allows 127 arguments), and the
// terms of one UNION ALL in the outputs view (SQLite allows 500).
const (
	outputChunk = 60
	unionChunk  = 400
)

// counterNames are the names of the run table's repeat and picked-up
// counters and of the sessions table's picked-up rows in a store of a
// schema version.
type counterNames struct{ repeats, pickedUp, pickedUpRows string }

// countersOf returns the names for schema version v.
func countersOf(v int) counterNames {
	if v == 1 {
		return counterNames{repeats: "cache_hits", pickedUp: "restored", pickedUpRows: "resumed_rows"}
	}
	return counterNames{repeats: "repeats", pickedUp: "picked_up", pickedUpRows: "picked_up_rows"}
}

// fixedSchema creates the tables that do not depend on the study.
const fixedSchema = `
CREATE TABLE store_info (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE run (
	id INTEGER PRIMARY KEY CHECK (id = 1),
	study TEXT NOT NULL,
	script TEXT NOT NULL,
	script_sha256 TEXT NOT NULL,
	tool_version TEXT NOT NULL,
	go_version TEXT NOT NULL,
	seed TEXT NOT NULL,
	optimizer TEXT NOT NULL,
	formulation TEXT NOT NULL,
	settings TEXT NOT NULL,
	started TEXT NOT NULL,
	ended TEXT,
	stop TEXT,
	elapsed_seconds REAL,
	evaluations INTEGER,
	analyses INTEGER,
	repeats INTEGER,
	picked_up INTEGER,
	failed INTEGER,
	discipline_calls INTEGER,
	coupling_iterations INTEGER,
	best_id INTEGER
);
CREATE TABLE sessions (
	n INTEGER PRIMARY KEY,
	started TEXT NOT NULL,
	ended TEXT,
	tool_version TEXT NOT NULL,
	go_version TEXT NOT NULL,
	picked_up_rows INTEGER NOT NULL
);
CREATE TABLE variables (
	role TEXT NOT NULL CHECK (role IN ('design', 'objective', 'constraint', 'output')),
	position INTEGER NOT NULL,
	name TEXT NOT NULL,
	unit TEXT NOT NULL,
	description TEXT NOT NULL DEFAULT '',
	lower REAL,
	upper REAL,
	is_integer INTEGER NOT NULL DEFAULT 0,
	relation TEXT,
	kind TEXT,
	tolerance REAL,
	scale REAL,
	column_name TEXT,
	PRIMARY KEY (role, position)
);
CREATE TABLE iterations (
	n INTEGER PRIMARY KEY,
	session INTEGER NOT NULL,
	optimizer TEXT NOT NULL,
	iteration INTEGER NOT NULL,
	evaluations INTEGER NOT NULL,
	best REAL,
	feasible INTEGER NOT NULL,
	violation REAL,
	at TEXT NOT NULL
);
CREATE TABLE front (eval_id INTEGER PRIMARY KEY, rank INTEGER NOT NULL);
`

// fixedCols are the study-independent columns of the evaluations table,
// in order. The column iterations holds the coupling iterations; the
// evaluations view shows it as coupling_iterations.
var fixedCols = []string{"id", "feasible", "converged", "violation", "error", "iterations", "discipline_calls", "wall_seconds"}

// layout is the study-dependent part of the schema: the names, units and
// column names of what an evaluation holds.
type layout struct {
	design      []mdo.DesignSpec
	objectives  []string
	constraints []string
	outputs     []mdo.Var

	designCols, objCols, consCols, marginCols, outCols []string

	// columns: the values are REAL columns of evaluation_data, one per
	// design variable, objective, constraint, margin and output (schema
	// version 3); otherwise JSON text arrays numbers and outputs (versions
	// 1 and 2, and a study with more than maxTableColumns values).
	columns bool
	// units are the declared units of objectives and constraints.
	units map[string]string
}

// newLayout derives the column names of a run.
func newLayout(design []mdo.DesignSpec, objectives, constraints []string, outputs []mdo.Var) *layout {
	l := &layout{design: design, objectives: objectives, constraints: constraints, outputs: outputs}
	used := map[string]bool{}
	for _, c := range fixedCols {
		used[c] = true
	}
	used["outputs"], used["vectors"], used["failure"] = true, true, true
	name := func(prefix, n string) string {
		base := prefix + ":" + sanitize(n)
		c := base
		for k := 2; used[strings.ToLower(c)]; k++ {
			c = fmt.Sprintf("%s#%d", base, k)
		}
		used[strings.ToLower(c)] = true
		return c
	}
	for _, d := range design {
		l.designCols = append(l.designCols, name("design", d.Name))
	}
	for _, o := range objectives {
		l.objCols = append(l.objCols, name("objective", o))
	}
	for _, c := range constraints {
		l.consCols = append(l.consCols, name("constraint", c))
	}
	for _, c := range constraints {
		l.marginCols = append(l.marginCols, name("margin", c))
	}
	for _, v := range outputs {
		l.outCols = append(l.outCols, name("output", v.Name))
	}
	l.columns = len(fixedCols)+3+len(l.named())+len(l.outCols) <= maxTableColumns
	return l
}

// stored returns the columns of evaluation_data, in order. The last,
// failure, is the failure class of a failed analysis (mdo.FailureClass
// as text, empty when it converged); stores written before it existed lack
// the column and read as empty.
func (l *layout) stored() []string {
	if l.columns {
		cols := append(append([]string(nil), fixedCols...), "vectors", "failure")
		return append(append(cols, l.named()...), l.outCols...)
	}
	return append(append([]string(nil), fixedCols...), "numbers", "outputs", "vectors", "failure")
}

// named returns the per-name columns of the evaluations view, in the
// order of the numbers array.
func (l *layout) named() []string {
	var cols []string
	cols = append(cols, l.designCols...)
	cols = append(cols, l.objCols...)
	cols = append(cols, l.consCols...)
	return append(cols, l.marginCols...)
}

// evaluationHead begins the DDL of evaluation_data in both layouts.
const evaluationHead = `CREATE TABLE evaluation_data (
	id INTEGER PRIMARY KEY,
	feasible INTEGER NOT NULL,
	converged INTEGER NOT NULL,
	violation REAL,
	error TEXT NOT NULL,
	iterations INTEGER NOT NULL,
	discipline_calls INTEGER NOT NULL,
	wall_seconds REAL NOT NULL`

// createEvaluations is the DDL of the evaluations: the table
// evaluation_data, where the design, objective, constraint and margin
// values of a row are kept once, as the JSON array numbers, and the
// outputs as the JSON array outputs (in the order of the variables
// table); the view evaluations, which shows one column per value and the
// outputs as a JSON object; and the view outputs, one row per evaluation
// and output. Reading through a view parses the arrays; writing a row
// costs no more than the arrays.
func (l *layout) createEvaluations() string {
	if l.columns {
		return l.createColumns()
	}
	var b strings.Builder
	b.WriteString(evaluationHead + `,
	numbers TEXT NOT NULL,
	outputs TEXT NOT NULL,
	vectors BLOB NOT NULL,
	failure TEXT NOT NULL DEFAULT ''
);
CREATE VIEW evaluations AS SELECT d.id AS id, d.feasible AS feasible, d.converged AS converged, d.violation AS violation,
	d.error AS error, d.failure AS failure, d.iterations AS coupling_iterations, d.discipline_calls AS discipline_calls, d.wall_seconds AS wall_seconds`)
	for k, c := range l.named() {
		fmt.Fprintf(&b, ",\n\tjson_extract(d.numbers, '$[%d]') AS %s", k, quote(c))
	}
	// outputs as a JSON object name → value, built when it is read
	b.WriteString(`,
	(SELECT json_group_object(v.name, json_extract(d.outputs, '$[' || v.position || ']'))
		FROM variables v WHERE v.role = 'output') AS outputs
FROM evaluation_data d;
CREATE VIEW outputs AS SELECT d.id AS eval_id, v.name AS name, v.unit AS unit,
	json_extract(d.outputs, '$[' || v.position || ']') AS value
FROM evaluation_data d JOIN variables v ON v.role = 'output'`)
	return b.String()
}

// insertSQL is an INSERT of rows rows into the evaluations table.
func (l *layout) insertSQL(rows int) string {
	cols := l.stored()
	quoted := make([]string, len(cols))
	for i, c := range cols {
		quoted[i] = quote(c)
	}
	one := "(" + strings.TrimSuffix(strings.Repeat("?,", len(cols)), ",") + ")"
	var b strings.Builder
	b.WriteString("INSERT OR REPLACE INTO evaluation_data (" + strings.Join(quoted, ", ") + ") VALUES ")
	for r := 0; r < rows; r++ {
		if r > 0 {
			b.WriteByte(',')
		}
		b.WriteString(one)
	}
	return b.String()
}

// insertFromBatchSQL is the INSERT of every row of the batch table into
// the evaluations table (the REAL column layout).
func (l *layout) insertFromBatchSQL() string {
	cols := l.stored()
	quoted := make([]string, len(cols))
	for i, c := range cols {
		quoted[i] = quote(c)
	}
	return "INSERT OR REPLACE INTO evaluation_data (" + strings.Join(quoted, ", ") + ") SELECT * FROM temp." + batchTable
}

// sanitize makes a name safe inside a quoted SQL identifier and a CSV
// header: control characters become '_'.
func sanitize(n string) string {
	return strings.Map(func(r rune) rune {
		if r < 0x20 || r == 0x7f {
			return '_'
		}
		return r
	}, n)
}

// quote quotes an SQL identifier.
func quote(id string) string { return `"` + strings.ReplaceAll(id, `"`, `""`) + `"` }

// failureColumn handles stores written before evaluation_data had its
// failure column: one opened to continue its run gets the column (every
// earlier row reads empty), one opened for reading is read without it.
func (s *Store) failureColumn() error {
	ctx := context.Background()
	var n int
	if err := s.conn.QueryRowContext(ctx, "SELECT count(*) FROM pragma_table_info('evaluation_data') WHERE name = 'failure'").Scan(&n); err != nil {
		return fmt.Errorf("store: reading the schema of %s: %w", s.path, err)
	}
	if n > 0 {
		return nil
	}
	if s.readOnly {
		s.noFailure = true
		return nil
	}
	if _, err := s.conn.ExecContext(ctx, "ALTER TABLE evaluation_data ADD COLUMN failure TEXT NOT NULL DEFAULT ''"); err != nil {
		return fmt.Errorf("store: %s: adding the failure column: %w", s.path, err)
	}
	return nil
}

// failureCol is the SELECT expression of the failure class.
func (s *Store) failureCol() string {
	if s.noFailure {
		return "''"
	}
	return "failure"
}
