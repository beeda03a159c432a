package external

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"

	"couplet/mdo"
)

// DefaultTimeout is the time limit of one run when Program.Timeout is
// zero.
const DefaultTimeout = 10 * time.Minute

// DefaultInputFile is the input file's name when Program.InputFile is
// empty.
const DefaultInputFile = "input.txt"

// Program declares an external program as a discipline.
type Program struct {
	// Name is the discipline's name.
	Name string
	// Inputs and Outputs are full variable specifications, as for any
	// discipline.
	Inputs, Outputs []mdo.Var
	// Command is the program and its arguments. The program is looked up
	// on PATH when it has no slash; it runs in the run's working folder.
	Command []string
	// Template is the text of the input file (see the package doc for
	// its markers). InputFile is its name in the working folder
	// (DefaultInputFile when empty); Stdin also feeds it to the
	// program's standard input.
	Template  string
	InputFile string
	Stdin     bool
	// OutputFile, if set, is the file the program writes its answers to
	// (JSON when it ends in ".json"); empty means standard output.
	OutputFile string
	// Read says how outputs are read; outputs it does not name are read
	// by their named marker.
	Read []Read
	// Timeout is the time limit of one run (DefaultTimeout when zero);
	// Retries is how many more times a failed run is tried.
	Timeout time.Duration
	Retries int
	// WorkDir is the folder under which each run gets its working folder
	// (give one per study); empty means the system's temporary folder.
	WorkDir string
}

// Discipline is an external program as an mdo.Discipline. It is safe for
// use by every worker of an Evaluator at once.
type Discipline struct {
	p        Program
	path     string // absolute path of the executable
	identity string // path and content hash
	tmpl     *template
	readers  []reader
	jsonOut  bool
	cache    *cache
}

// New checks the declaration and returns the discipline. gate must
// approve the program (see Gate); the refusal is a *RefusedError.
func New(p Program, gate *Gate) (*Discipline, error) {
	fail := func(format string, a ...any) (*Discipline, error) {
		return nil, fmt.Errorf("external: discipline %q: "+format, append([]any{p.Name}, a...)...)
	}
	if p.Name == "" {
		return fail("Name is empty: give the discipline a name")
	}
	if len(p.Outputs) == 0 {
		return fail("Outputs is empty: the program must give at least one output")
	}
	if len(p.Command) == 0 || p.Command[0] == "" {
		return fail("Command is empty: give the program to run and its arguments")
	}
	if p.Timeout < 0 {
		return fail("Timeout = %v is not allowed (a positive duration, or zero for %v)", p.Timeout, DefaultTimeout)
	}
	if p.Retries < 0 {
		return fail("Retries = %d is not allowed (0 or more)", p.Retries)
	}
	for _, f := range []struct{ field, name string }{{"InputFile", p.InputFile}, {"OutputFile", p.OutputFile}} {
		if f.name != "" && (filepath.Base(f.name) != f.name || f.name == "." || f.name == "..") {
			return fail("%s = %q is not allowed (a plain file name inside the working folder)", f.field, f.name)
		}
	}
	path, err := exec.LookPath(p.Command[0])
	if err != nil {
		return fail("program %q: %w", p.Command[0], err)
	}
	path = canonical(path)
	if err := gate.check(p.Name, path); err != nil {
		return nil, err
	}
	sum, err := fileHash(path)
	if err != nil {
		return fail("program %s: %w", path, err)
	}
	tmpl, err := parseTemplate(p.Template, p.Inputs)
	if err != nil {
		return fail("%w", err)
	}
	jsonOut := strings.HasSuffix(strings.ToLower(p.OutputFile), ".json")
	rs, err := newReaders(p.Outputs, p.Read, jsonOut)
	if err != nil {
		return fail("%w", err)
	}
	if p.InputFile == "" {
		p.InputFile = DefaultInputFile
	}
	if p.Timeout == 0 {
		p.Timeout = DefaultTimeout
	}
	p.Inputs = append([]mdo.Var(nil), p.Inputs...)
	p.Outputs = append([]mdo.Var(nil), p.Outputs...)
	p.Command = append([]string(nil), p.Command...)
	return &Discipline{p: p, path: path, identity: path + "\x00" + sum, tmpl: tmpl, readers: rs, jsonOut: jsonOut, cache: newCache()}, nil
}

// fileHash returns the hex SHA-256 of the file at path.
func fileHash(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// Name implements mdo.Discipline.
func (d *Discipline) Name() string { return d.p.Name }

// Inputs implements mdo.Discipline.
func (d *Discipline) Inputs() []mdo.Var { return d.p.Inputs }

// Outputs implements mdo.Discipline.
func (d *Discipline) Outputs() []mdo.Var { return d.p.Outputs }

// Path returns the absolute path of the program.
func (d *Discipline) Path() string { return d.path }

// Runs returns how many times the program has been started (retries
// included; cached answers start nothing).
func (d *Discipline) Runs() int64 { return d.cache.runs.Load() }

// Compute implements mdo.Discipline: it fills the template, runs the
// program (or takes the cached answer for the same input) and reads the
// outputs. It allocates; see the package doc.
func (d *Discipline) Compute(in, out []float64) error {
	input, err := d.tmpl.fill(in, d.p.Inputs)
	if err != nil {
		return fmt.Errorf("filling the input template: %w", err)
	}
	h := sha256.New()
	io.WriteString(h, d.identity)
	for _, a := range d.p.Command[1:] {
		io.WriteString(h, "\x00"+a)
	}
	io.WriteString(h, "\x01")
	io.WriteString(h, input)
	key := string(h.Sum(nil))
	vals, err := d.cache.get(key, func() ([]float64, error) { return d.runWithRetries(input) })
	if err != nil {
		return err
	}
	copy(out, vals)
	return nil
}

// runWithRetries runs the program up to 1+Retries times.
func (d *Discipline) runWithRetries(input string) ([]float64, error) {
	var err error
	for attempt := 1; attempt <= 1+d.p.Retries; attempt++ {
		var vals []float64
		vals, err = d.runOnce(input)
		if err == nil {
			return vals, nil
		}
		if pe, ok := err.(*ProgramError); ok {
			pe.Attempts = attempt
		}
	}
	return nil, err
}
