package store

import (
	"context"
	"database/sql/driver"
	"errors"
	"fmt"
	"strings"

	"couplet/mdo"

	"modernc.org/sqlite"
	"modernc.org/sqlite/vtab"
)

// The rows of a batch reach SQLite through a virtual table of the
// store's own connection, not as bound parameters: the committer runs
// one INSERT … SELECT per batch, and SQLite reads each value of each row
// from the batch in Go memory (the cursor's Column). Binding a value costs
// the driver a look-up of the parameter's name and a lock of the
// connection's mutex per value; a column read costs neither. The table
// lives in the connection's temp schema and holds no data of its own, so
// the file is the same as with bound parameters, value for value.

// batchModule is the name of the virtual table module, and batchTable the
// name of its one table, temp.couplet_batch.
const (
	batchModule = "couplet_batch_rows"
	batchTable  = "couplet_batch"
)

// batchSource is the batch the virtual table shows: the rows of the
// commit under way (nil between commits) and the layout they follow. It
// belongs to one store's connection, and is used by the committer alone.
type batchSource struct {
	lay  *layout
	rows []encRow
	last lastBound // the value columns given last (see lastBound)
}

// connector opens the store's connections through a driver of the
// store's own, which knows the batch module.
type connector struct {
	d   *sqlite.Driver
	dsn string
}

// Connect implements driver.Connector.
func (c connector) Connect(context.Context) (driver.Conn, error) { return c.d.Open(c.dsn) }

// Driver implements driver.Connector.
func (c connector) Driver() driver.Driver { return c.d }

// newConnector returns a connector whose connections have the batch
// module, showing src.
func newConnector(dsn string, src *batchSource) (connector, error) {
	d := &sqlite.Driver{}
	if err := d.RegisterModule(batchModule, batchRows{src}); err != nil {
		return connector{}, fmt.Errorf("registering the batch table: %w", err)
	}
	return connector{d: d, dsn: dsn}, nil
}

// batchRows is the module of the batch table.
type batchRows struct{ src *batchSource }

// Create implements vtab.Module.
func (m batchRows) Create(ctx vtab.Context, args []string) (vtab.Table, error) {
	return m.Connect(ctx, args)
}

// Connect implements vtab.Module: the table has a column per stored
// column of the layout, c0 … cN, in the layout's order.
func (m batchRows) Connect(ctx vtab.Context, _ []string) (vtab.Table, error) {
	if m.src.lay == nil {
		return nil, errors.New("the batch table has no layout")
	}
	n := len(m.src.lay.stored())
	cols := make([]string, n)
	for k := range cols {
		cols[k] = fmt.Sprintf("c%d", k)
	}
	if err := ctx.Declare("CREATE TABLE x(" + strings.Join(cols, ", ") + ")"); err != nil {
		return nil, err
	}
	return batchRowsTable(m), nil
}

// batchRowsTable is the batch table.
type batchRowsTable batchRows

// BestIndex implements vtab.Table: the one plan is a scan.
func (t batchRowsTable) BestIndex(info *vtab.IndexInfo) error {
	info.EstimatedCost = 1
	info.EstimatedRows = int64(max(len(t.src.rows), 1))
	return nil
}

// Open implements vtab.Table.
func (t batchRowsTable) Open() (vtab.Cursor, error) { return &batchCursor{src: t.src}, nil }

// Disconnect implements vtab.Table.
func (t batchRowsTable) Disconnect() error { return nil }

// Destroy implements vtab.Table.
func (t batchRowsTable) Destroy() error { return nil }

// batchCursor walks the rows of the batch.
type batchCursor struct {
	src *batchSource
	i   int
	// vals are the value columns of row i in their order (design,
	// objectives, constraints, margins), cut from the evaluation's own
	// slices when the cursor reaches the row, so that a column's read
	// does not walk them; named is the number of those values, after
	// which come the outputs
	vals  [4][]float64
	named int
}

// Filter implements vtab.Cursor: a scan from the first row.
func (c *batchCursor) Filter(int, string, []vtab.Value) error { c.i = 0; c.row(); return nil }

// Next implements vtab.Cursor.
func (c *batchCursor) Next() error { c.i++; c.row(); return nil }

// row notes the value slices of the current row (none past the last).
func (c *batchCursor) row() {
	if c.i >= len(c.src.rows) {
		c.vals, c.named = [4][]float64{}, 0
		return
	}
	e := c.src.rows[c.i].e
	c.vals = [4][]float64{e.Design, e.Objectives, e.Constraints, e.Margins}
	c.named = len(e.Design) + len(e.Objectives) + len(e.Constraints) + len(e.Margins)
}

// Eof implements vtab.Cursor.
func (c *batchCursor) Eof() bool { return c.i >= len(c.src.rows) }

// Rowid implements vtab.Cursor.
func (c *batchCursor) Rowid() (int64, error) { return int64(c.i), nil }

// Close implements vtab.Cursor.
func (c *batchCursor) Close() error { return nil }

// Column implements vtab.Cursor: column col of the current row, the
// value the insert of bound parameters bound (a bool as 0 or 1, NaN as
// NULL, the outputs of a failed analysis NULL).
func (c *batchCursor) Column(col int) (vtab.Value, error) {
	if c.i >= len(c.src.rows) {
		return nil, fmt.Errorf("the batch table has %d rows; row %d was read", len(c.src.rows), c.i)
	}
	r := &c.src.rows[c.i]
	e := r.e
	if col >= 10 {
		return c.value(col, e)
	}
	switch col {
	case 0:
		return int64(e.ID), nil
	case 1:
		return boolInt(e.Feasible), nil
	case 2:
		return boolInt(e.Converged), nil
	case 3:
		return e.Violation, nil
	case 4:
		return e.Err, nil
	case 5:
		return int64(e.CouplingIterations), nil
	case 6:
		return int64(e.DisciplineCalls), nil
	case 7:
		return e.Wall.Seconds(), nil
	case 8:
		if r.vectors == nil {
			return nil, nil
		}
		return r.vectors, nil
	case 9:
		return mdo.ClassOf(e).String(), nil
	}
	return nil, fmt.Errorf("the batch table has no column %d", col)
}

// value is value column col (10 on) of the current row, evaluation e:
// a design variable, objective, constraint, margin or output.
func (c *batchCursor) value(col int, e *mdo.Evaluation) (vtab.Value, error) {
	k := col - 10
	if k < c.named {
		for _, xs := range &c.vals {
			if k < len(xs) {
				return c.src.last.value(col-10, xs[k]), nil
			}
			k -= len(xs)
		}
	}
	k -= c.named
	if k >= len(c.src.lay.outputs) {
		return nil, fmt.Errorf("the batch table has no column %d", col)
	}
	if len(e.Outputs) == 0 {
		return nil, nil
	}
	return c.src.last.value(col-10, e.Outputs[k]), nil
}

// boolInt is b as the integer SQLite keeps.
func boolInt(b bool) int64 {
	if b {
		return 1
	}
	return 0
}
