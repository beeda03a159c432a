package store

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"database/sql/driver"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"net/url"
	"os"
	"runtime"
	"strconv"
	"sync"
	"time"

	"couplet/mdo"
)

// Options configure a Store.
type Options struct {
	// ToolVersion is the version of the program writing the store, kept
	// in the provenance (for example the couplet command's version).
	ToolVersion string
	// BatchSize is the most evaluations committed together; default
	// 4096 (the flush interval bounds what a crash can lose). Record
	// queues evaluations for the store's writer goroutine, which commits
	// them as soon as BatchSize are waiting; the queue holds up to
	// max(4×BatchSize, 256) evaluations, beyond which Record waits for the
	// writer.
	BatchSize int
	// FlushInterval bounds how long a recorded evaluation waits for its
	// commit: the writer commits what is queued when this long has passed
	// since its last commit, whether or not more evaluations arrive;
	// default 20 ms, so that the writer keeps up with a fast run and End
	// has little left to commit (at 250 ms, End spent a tenth of a second
	// committing 3 000 of the business jet's 10 000 evaluations after the
	// last analysis; at 50 ms, a median 10 ms on its GA run's last batch,
	// at 20 ms 3 ms, with the same CPU time).
	FlushInterval time.Duration
	// Durable asks SQLite to sync the write-ahead log at every commit
	// (synchronous=FULL), so that committed batches also survive a power
	// failure. By default (synchronous=NORMAL) they survive the process
	// being killed but an operating-system crash may lose the last ones.
	Durable bool
	// Overwrite lets Create replace an existing file.
	Overwrite bool
	// OnCommit, if not nil, is called after each committed batch with the
	// number of evaluation rows the store holds. It is called from the
	// store's writer goroutine and must not call the store's Flush, End
	// or Close, which wait for that goroutine.
	OnCommit func(rows int)
	// KeepEvaluations keeps every evaluation the store commits (and, on a
	// store picked up, those Evaluations read back before Begin) in memory
	// until Close, so that Evaluations and Scan answer from memory, with
	// what a read of the file would give, instead of reading the file
	// back: for a run whose outputs are written from its store as soon as
	// it ends. It costs the evaluations' memory until Close (the
	// evaluations themselves, which the store holds by reference). A
	// store in the JSON text layout reads its file regardless.
	KeepEvaluations bool

	// jsonText makes Begin write the JSON text layout of schema versions
	// 1 and 2 (the package's tests of older stores).
	jsonText bool
}

// normalized fills in the defaults and checks the values.
func (o Options) normalized() (Options, error) {
	if o.BatchSize == 0 {
		o.BatchSize = 4096
	}
	if o.FlushInterval == 0 {
		o.FlushInterval = 20 * time.Millisecond
	}
	if o.BatchSize < 1 || o.BatchSize > 1<<20 {
		return o, fmt.Errorf("store: BatchSize = %d, allowed 1 to %d", o.BatchSize, 1<<20)
	}
	if o.FlushInterval < 0 {
		return o, fmt.Errorf("store: FlushInterval = %v, must be >= 0", o.FlushInterval)
	}
	return o, nil
}

// RunMeta is the provenance of the run a store holds.
type RunMeta struct {
	Study        string
	Script       string
	ScriptSHA256 string
	ToolVersion  string
	GoVersion    string
	Seed         uint64
	Optimizer    string
	Formulation  string
	Settings     map[string]string
	Started      time.Time
	// Ended is zero and Stop mdo.NotStopped while the run has not ended
	// (or when it was killed).
	Ended time.Time
	Stop  mdo.StopReason
	// Rows is the number of evaluation rows.
	Rows int
}

// Store is a SQLite case store. It implements mdo.Recorder and
// mdo.IterationRecorder. A Store is used from one goroutine; between
// Begin and End it runs a writer of its own (two goroutines), which
// encodes and commits the recorded rows in the background.
type Store struct {
	path     string
	opt      Options
	db       *sql.DB
	conn     *sql.Conn
	readOnly bool

	meta    *RunMeta     // the stored run, nil before Begin on a new store
	names   counterNames // the counters' column names of the store's schema version
	lay     *layout
	session int
	// noFailure marks a store written before evaluation_data had its
	// failure column, opened read-only (see failureColumn).
	noFailure bool
	// noRecord marks a store written before the run record's tables,
	// opened read-only (see recordTables).
	noRecord bool
	// noSensitivity marks a store written before the sensitivity table,
	// opened read-only (see sensitivityTable).
	noSensitivity bool

	w         *writer // the background writer, between Begin and End
	keptMu    sync.Mutex
	kept      *keptSet // the evaluations kept in memory (Options.KeepEvaluations), or nil
	txMu      sync.Mutex
	batch     *batchSource // the rows the batch table shows (REAL column layout)
	batchRows int
	stmts     []driver.Stmt
	stmtBatch driver.StmtExecContext // a batch's insert: from the batch table, or of batchRows rows' parameters
	stmtOne   driver.StmtExecContext // one row's insert of parameters (JSON text layout)
	stmtIt    driver.StmtExecContext
	args      []driver.NamedValue
	rows      int
	// rowsExact says that rows counts the evaluation rows exactly: none
	// replaced another (set as the writer stops)
	rowsExact bool
	began     bool
	ended     bool
	err       error
}

// Compile-time checks of the interfaces.
var (
	_ mdo.Recorder          = (*Store)(nil)
	_ mdo.IterationRecorder = (*Store)(nil)
)

// ScriptHash returns the hex SHA-256 of a study script, as stored in
// run.script_sha256.
func ScriptHash(script string) string {
	h := sha256.Sum256([]byte(script))
	return hex.EncodeToString(h[:])
}

// walCheckpointPages is the size of the write-ahead log, in pages, past
// which a commit copies it into the file (SQLite's automatic checkpoint):
// 2 MiB of 32 KiB pages. A small log is copied by the writer as the run
// goes, beside the analyses, and leaves Close little to copy and sync (the
// whole file when the log held it all: a quarter of a second for the
// business jet's 10 000 evaluations).
const walCheckpointPages = 64

// pageSize is the page size of a new file: pages of 32 KiB hold several
// rows of a study with hundreds of outputs (4 KiB pages hold one and
// waste the rest).
const pageSize = 32768

// dsn builds the driver's data source name with the store's pragmas. A
// fresh file (Create's) gets pageSize and is left in the default journal
// mode, for the driver runs the pragmas in the order of their names and
// a journal_mode would fix the page size first: Create turns write-ahead
// logging on itself.
func dsn(path string, durable, fresh bool) string {
	sync := "NORMAL"
	if durable {
		sync = "FULL"
	}
	q := url.Values{}
	q.Add("_pragma", "busy_timeout(5000)")
	if fresh {
		q.Add("_pragma", "page_size("+strconv.Itoa(pageSize)+")")
	} else {
		q.Add("_pragma", "journal_mode(WAL)")
	}
	q.Add("_pragma", "synchronous("+sync+")")
	q.Add("_pragma", "foreign_keys(1)")
	q.Add("_pragma", "wal_autocheckpoint("+strconv.Itoa(walCheckpointPages)+")")
	return "file:" + (&url.URL{Path: path}).EscapedPath() + "?" + q.Encode()
}

// openDB opens the database with one pinned connection, whose batch
// table shows src; fresh is a file Create makes (see dsn).
func openDB(path string, durable, fresh bool, src *batchSource) (*sql.DB, *sql.Conn, error) {
	c, err := newConnector(dsn(path, durable, fresh), src)
	if err != nil {
		return nil, nil, fmt.Errorf("store: opening %s: %w", path, err)
	}
	db := sql.OpenDB(c)
	db.SetMaxOpenConns(1)
	conn, err := db.Conn(context.Background())
	if err != nil {
		db.Close()
		return nil, nil, fmt.Errorf("store: opening %s: %w", path, err)
	}
	return db, conn, nil
}

// Create makes a new, empty case store at path. An existing file is an
// error unless opt.Overwrite is set.
func Create(path string, opt Options) (*Store, error) {
	opt, err := opt.normalized()
	if err != nil {
		return nil, err
	}
	if _, err := os.Stat(path); err == nil && !opt.Overwrite {
		return nil, fmt.Errorf("store: %s already exists; pick its run up, remove it, or choose another file", path)
	}
	// also a write-ahead log left beside a removed file, which SQLite
	// would otherwise replay into the new one
	for _, p := range []string{path, path + "-wal", path + "-shm"} {
		if err := os.Remove(p); err != nil && !errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("store: replacing %s: %w", path, err)
		}
	}
	src := &batchSource{}
	db, conn, err := openDB(path, opt.Durable, true, src)
	if err != nil {
		return nil, err
	}
	s := &Store{path: path, opt: opt, db: db, conn: conn, batch: src, names: countersOf(SchemaVersion)}
	ctx := context.Background()
	// the page size (the connection's pragma) is taken as write-ahead
	// logging begins the file
	if _, err := conn.ExecContext(ctx, "PRAGMA journal_mode = WAL"); err != nil {
		s.Close()
		return nil, fmt.Errorf("store: creating %s: turning write-ahead logging on: %w", path, err)
	}
	err = s.inTx(func() error {
		if _, err := conn.ExecContext(ctx, fixedSchema+recordSchema+sensitivitySchema+recordViews(s.names)); err != nil {
			return err
		}
		_, err := conn.ExecContext(ctx, `INSERT INTO store_info (key, value) VALUES ('format', ?), ('schema_version', ?), ('created', ?)`,
			Format, strconv.Itoa(SchemaVersion), time.Now().UTC().Format(time.RFC3339Nano))
		return err
	})
	if err != nil {
		s.Close()
		return nil, fmt.Errorf("store: creating %s: %w", path, err)
	}
	return s, nil
}

// PickUp opens an existing case store to pick up its run. Check the
// script and seed with Check, hand Evaluations to mdo.Evaluator.PickUp,
// then give the store to the study as its recorder: new evaluations are
// appended. A truncated or damaged file wraps ErrDamaged; a file that is
// not a case store wraps ErrNotStore.
func PickUp(path string, opt Options) (*Store, error) {
	opt, err := opt.normalized()
	if err != nil {
		return nil, err
	}
	return openExisting(path, opt, false)
}

// Open opens an existing case store for reading (queries and exports).
// Begin and Record on it are errors.
func Open(path string) (*Store, error) {
	opt, _ := Options{}.normalized()
	return openExisting(path, opt, true)
}

// openExisting checks and opens a store file.
func openExisting(path string, opt Options, readOnly bool) (*Store, error) {
	if err := checkFile(path); err != nil {
		return nil, err
	}
	src := &batchSource{}
	db, conn, err := openDB(path, opt.Durable, false, src)
	if err != nil {
		return nil, err
	}
	s := &Store{path: path, opt: opt, db: db, conn: conn, batch: src, readOnly: readOnly}
	if err := s.verify(); err != nil {
		s.Close()
		return nil, err
	}
	if err := s.loadMeta(); err != nil {
		s.Close()
		return nil, err
	}
	if err := s.recordTables(); err != nil {
		s.Close()
		return nil, err
	}
	if err := s.sensitivityTable(); err != nil {
		s.Close()
		return nil, err
	}
	return s, nil
}

// verify runs SQLite's quick check and looks for the format marker.
func (s *Store) verify() error {
	ctx := context.Background()
	var res string
	if err := s.conn.QueryRowContext(ctx, "PRAGMA quick_check").Scan(&res); err != nil {
		return fmt.Errorf("store: %s cannot be read as SQLite (%v): %w", s.path, err, ErrDamaged)
	}
	if res != "ok" {
		return fmt.Errorf("store: %s failed SQLite's integrity check (%s): %w", s.path, res, ErrDamaged)
	}
	var n int
	if err := s.conn.QueryRowContext(ctx, "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = 'store_info'").Scan(&n); err != nil {
		return fmt.Errorf("store: reading the schema of %s: %w", s.path, err)
	}
	if n == 0 {
		return fmt.Errorf("store: %s is a SQLite database without a store_info table (another program's database?): %w", s.path, ErrNotStore)
	}
	var format, version string
	_ = s.conn.QueryRowContext(ctx, "SELECT value FROM store_info WHERE key = 'format'").Scan(&format)
	_ = s.conn.QueryRowContext(ctx, "SELECT value FROM store_info WHERE key = 'schema_version'").Scan(&version)
	if format != Format {
		return fmt.Errorf("store: %s has format %q, want %q: %w", s.path, format, Format, ErrNotStore)
	}
	v, err := strconv.Atoi(version)
	if err != nil || v < 1 || v > SchemaVersion {
		return fmt.Errorf("store: %s has schema version %q; this program reads versions 1 to %d: %w", s.path, version, SchemaVersion, ErrNotStore)
	}
	s.names = countersOf(v)
	return nil
}

// loadMeta reads the run row and the layout, if the run has begun.
func (s *Store) loadMeta() error {
	ctx := context.Background()
	var m RunMeta
	var seed, settings, started string
	var ended, stop sql.NullString
	err := s.conn.QueryRowContext(ctx, `SELECT study, script, script_sha256, tool_version, go_version, seed, optimizer, formulation, settings, started, ended, stop FROM run WHERE id = 1`).
		Scan(&m.Study, &m.Script, &m.ScriptSHA256, &m.ToolVersion, &m.GoVersion, &seed, &m.Optimizer, &m.Formulation, &settings, &started, &ended, &stop)
	if errors.Is(err, sql.ErrNoRows) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("store: reading the run of %s: %w", s.path, err)
	}
	if m.Seed, err = strconv.ParseUint(seed, 10, 64); err != nil {
		return fmt.Errorf("store: %s: run.seed = %q is not an unsigned integer: %w", s.path, seed, ErrDamaged)
	}
	if err := json.Unmarshal([]byte(settings), &m.Settings); err != nil {
		return fmt.Errorf("store: %s: run.settings is not a JSON object: %w", s.path, ErrDamaged)
	}
	m.Started, _ = time.Parse(time.RFC3339Nano, started)
	if ended.Valid {
		m.Ended, _ = time.Parse(time.RFC3339Nano, ended.String)
	}
	if m.Stop, err = mdo.ParseStopReason(stop.String); err != nil {
		return fmt.Errorf("store: %s: run.stop: %v: %w", s.path, err, ErrDamaged)
	}
	lay, err := s.loadLayout()
	if err != nil {
		return err
	}
	inJSON, err := s.jsonLayout()
	if err != nil {
		return err
	}
	lay.columns = !inJSON
	if err := s.conn.QueryRowContext(ctx, "SELECT count(*) FROM evaluation_data").Scan(&m.Rows); err != nil {
		return fmt.Errorf("store: counting the evaluations of %s: %w", s.path, err)
	}
	s.rows = m.Rows
	s.meta = &m
	s.lay = lay
	return s.failureColumn()
}

// loadLayout rebuilds the layout from the variables table.
func (s *Store) loadLayout() (*layout, error) {
	rows, err := s.conn.QueryContext(context.Background(), `SELECT role, name, unit, description, lower, upper, is_integer FROM variables ORDER BY role, position`)
	if err != nil {
		return nil, fmt.Errorf("store: reading the variables of %s: %w", s.path, err)
	}
	defer rows.Close()
	var design []mdo.DesignSpec
	var objs, cons []string
	var outs []mdo.Var
	units := map[string]string{}
	for rows.Next() {
		var role, name, unit, desc string
		var lo, hi sql.NullFloat64
		var integer bool
		if err := rows.Scan(&role, &name, &unit, &desc, &lo, &hi, &integer); err != nil {
			return nil, fmt.Errorf("store: reading the variables of %s: %w", s.path, err)
		}
		switch role {
		case "design":
			design = append(design, mdo.DesignSpec{Name: name, Unit: unit, Lower: lo.Float64, Upper: hi.Float64, Integer: integer})
		case "objective":
			objs = append(objs, name)
			units[name] = unit
		case "constraint":
			cons = append(cons, name)
			units[name] = unit
		case "output":
			outs = append(outs, mdo.Var{Name: name, Unit: unit, Description: desc, Min: lo.Float64, Max: hi.Float64})
		}
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: reading the variables of %s: %w", s.path, err)
	}
	lay := newLayout(design, objs, cons, outs)
	lay.units = units
	return lay, nil
}

// Path returns the store's file name.
func (s *Store) Path() string { return s.path }

// Run returns the provenance of the stored run; ok is false when no run
// has begun in this store.
func (s *Store) Run() (m RunMeta, ok bool) {
	if s.meta == nil {
		return RunMeta{}, false
	}
	m = *s.meta
	m.Rows = s.Rows()
	return m, true
}

// Rows returns the number of committed evaluation rows.
func (s *Store) Rows() int {
	if s.w != nil {
		rows, _ := s.w.committedRows()
		return rows
	}
	return s.rows
}

// Check refuses a store whose run came from another script or seed: the
// error names both hashes or both seeds. A store in which no run has
// begun passes.
func (s *Store) Check(script string, seed uint64) error {
	if s.meta == nil {
		return nil
	}
	if h := ScriptHash(script); h != s.meta.ScriptSHA256 {
		return fmt.Errorf("store: %s holds a run of another script (stored script SHA-256 %s, this script %s); refusing to mix them: use a new file", s.path, s.meta.ScriptSHA256, h)
	}
	if seed != s.meta.Seed {
		return fmt.Errorf("store: %s holds a run with seed %d, this run has seed %d; refusing to mix them: use a new file or the stored seed", s.path, s.meta.Seed, seed)
	}
	return nil
}

// inTx runs fn inside BEGIN IMMEDIATE … COMMIT on the pinned connection.
func (s *Store) inTx(fn func() error) error {
	s.txMu.Lock()
	defer s.txMu.Unlock()
	ctx := context.Background()
	if _, err := s.conn.ExecContext(ctx, "BEGIN IMMEDIATE"); err != nil {
		return err
	}
	if err := fn(); err != nil {
		_, _ = s.conn.ExecContext(ctx, "ROLLBACK")
		return err
	}
	if _, err := s.conn.ExecContext(ctx, "COMMIT"); err != nil {
		_, _ = s.conn.ExecContext(ctx, "ROLLBACK")
		return err
	}
	return nil
}

// Close commits what is queued (a run that did not reach End keeps its
// evaluations), stops the writer and closes the file; it returns a
// failed commit of the writer.
func (s *Store) Close() error {
	if s.db == nil {
		return nil
	}
	first := s.stopWriter()
	s.keptMu.Lock()
	s.kept = nil
	s.keptMu.Unlock()
	if len(s.stmts) > 0 {
		_ = s.conn.Raw(func(any) error {
			for _, st := range s.stmts {
				st.Close()
			}
			return nil
		})
		s.stmts = nil
	}
	if s.conn != nil {
		if err := s.conn.Close(); err != nil && first == nil {
			first = err
		}
	}
	if err := s.db.Close(); err != nil && first == nil {
		first = fmt.Errorf("store: closing %s: %w", s.path, err)
	}
	s.db, s.conn = nil, nil
	return first
}

// goVersion is the Go version recorded in the provenance.
func goVersion() string { return runtime.Version() }

// PickedUp implements mdo.PickUpRecorder: it checks that the stored run
// came from script and seed (see Check) and returns its evaluations for
// mdo.Evaluator.PickUp. It is the one call a caller picking a run up
// needs; a store in which no run has begun gives none.
func (s *Store) PickedUp(script string, seed uint64) ([]*mdo.Evaluation, error) {
	if err := s.Check(script, seed); err != nil {
		return nil, err
	}
	return s.Evaluations()
}
