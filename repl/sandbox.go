package repl

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"couplet/mdo/external"
	"couplet/repl/cell"
	"couplet/repl/symbols"
	"couplet/repl/symbols/trusted"
)

// TrustFlag is the command-line flag that lifts the sandbox.
const TrustFlag = "--trust-script"

// AllowProgramFlag is the command-line flag, repeatable, that approves
// one external program for a sandboxed script.
const AllowProgramFlag = "--allow-program"

// Policy decides which packages a script may import and which external
// programs it may run.
type Policy struct {
	// Trusted lifts the sandbox: the trusted-only standard packages (file
	// system, processes) become importable too, and every external
	// program may run.
	Trusted bool
	// Programs are the external programs the user approved on the
	// command line (AllowProgramFlag) for a sandboxed script.
	Programs []string
}

// Gate returns the approval of external programs under the policy, which
// a script gets from cell.Programs() and passes to external.New.
func (p Policy) Gate() *external.Gate {
	if p.Trusted {
		return external.AllowAll()
	}
	return external.Allow(fmt.Sprintf("run with %s PATH to approve one program, or with %s if you trust the script", AllowProgramFlag, TrustFlag), p.Programs...)
}

// allowed returns the import paths a script may use under the policy.
func (p Policy) allowed() map[string]bool {
	out := map[string]bool{cell.ImportPath: true}
	for key := range symbols.Symbols {
		out[pathOfKey(key)] = true
	}
	if p.Trusted {
		for key := range trusted.Symbols {
			out[pathOfKey(key)] = true
		}
	}
	return out
}

// pathOfKey turns a symbol-table key "path/name" into the import path.
func pathOfKey(key string) string {
	if i := strings.LastIndex(key, "/"); i >= 0 {
		return key[:i]
	}
	return key
}

// Importable returns the sorted import paths a script may use.
func (p Policy) Importable() []string {
	var out []string
	for k := range p.allowed() {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// RefusedImportError reports an import the sandbox does not allow. It is
// raised before any code of the script runs.
type RefusedImportError struct {
	Cell, Line int
	Path       string
	// Trusted reports whether the package would be available with the
	// sandbox lifted.
	Trusted bool
	// Command, if not empty, is the session command whose expression
	// holds the import (e.g. "@coupling"); Cell is then 0.
	Command string
}

// Error implements error.
func (e *RefusedImportError) Error() string {
	where := fmt.Sprintf("cell %d, line %d", e.Cell, e.Line)
	if e.Command != "" {
		where = e.Command
	}
	why := fmt.Sprintf("%s: import %q refused by the sandbox: study scripts may import only the framework and a curated set of standard packages (see @imports), so that a script cannot touch files, the network, other processes or memory outside the interpreter; results are written through the framework into the study's output folder.",
		where, e.Path)
	if e.Trusted {
		return why + " If you trust this script, run it again with " + TrustFlag + "."
	}
	return why + " " + TrustFlag + " lifts the sandbox for trusted scripts, but even then the interpreter does not carry package " + strconv.Quote(e.Path) + "."
}

// check refuses the first import that the policy does not allow.
func (p Policy) check(cellNo int, refs []importRef) error {
	ok := p.allowed()
	var lifted map[string]bool
	for _, r := range refs {
		if ok[r.path] {
			continue
		}
		if lifted == nil {
			lifted = Policy{Trusted: true}.allowed()
		}
		return &RefusedImportError{Cell: cellNo, Line: r.line, Path: r.path, Trusted: lifted[r.path]}
	}
	return nil
}
