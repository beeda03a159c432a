// Package repl is couplet's notebook: an embedded Go interpreter (yaegi)
// that exposes the framework and a curated set of standard packages, a
// session of numbered cells with commands of its own, study files that
// save and replay a session, and the headless runner behind
// `couplet run`.
//
// # How a cell reaches the interpreter
//
// A cell is ordinary Go: every statement that compiles in the body of a
// Go function compiles in a cell, and the variables it declares at its
// top level stay visible to later cells. The interpreter has faults of
// its own at its top level (a multi-value := inside an if body, indexing
// a field there, defer, return, a type switch, a panic placed on the
// enclosing statement), so a cell is rewritten before the interpreter
// sees it (transform.go), never the interpreter patched:
//
//   - The cell is type-checked with go/types, against the interpreter's
//     symbol tables (symtypes.go rebuilds the packages from their reflect
//     values) and against what earlier cells declared (their functions,
//     types, constants and variables, kept as source).
//   - Its function, type and constant declarations go to package level as
//     they are; its statements become the body of a function that the
//     session calls. Each variable the top level declares (by := or var)
//     is hoisted to a package-level var of the type go/types found, and
//     its declaration becomes an assignment, so later cells see it.
//   - The trailing expression hands all its values to the session, which
//     shows them: a call's error is shown, not dropped.
//   - Around faults the interpreter also has inside functions: a method
//     value of a framework type becomes a closure over its receiver, a
//     generic call gets the type arguments go/types inferred, a range over
//     an integer becomes a counted loop, a range over a function (Go
//     1.23: for x := range seq, seq a func(yield func(T) bool)) becomes
//     the call of seq with the body as yield (rangefunc.go), a value of a
//     cell's type with a String or Error method printed by package fmt
//     (or shown) is handed over with its method's text (shown.go), an
//     errors.As whose target is of a cell's type becomes a loop of the
//     cell's own over the error's tree (errchain.go), and a loop
//     variable that a closure captures gets a copy per iteration, as in
//     Go 1.22.
//   - Each statement of the body records its cell line first, so a panic
//     reports the line of the statement that panicked. A function or
//     function literal of a cell that can panic by itself records its
//     lines too, in a variable of its call, and a deferred function
//     wraps the value of a panic with its cell and line (placed.go):
//     a panic in an earlier cell's function names that cell and line, and
//     an objective that panics in an optimiser is a failed evaluation
//     whose reason names them. The cell's recover calls unwrap the value.
//   - A variable of an earlier cell that the cell declares again and
//     reads first (x := x + 1) is read from a copy taken before the
//     cell's declarations replace it.
//
// Every rewrite keeps the cell's lines, so the errors of the type check
// and of the interpreter name the line of the cell. A cell the type check
// refuses is reported with the compiler's message and not run, except for
// two things the interpreter accepts and compiled Go does not: a literal
// that sets a promoted field (older settings literals such as
// optimizers.NSGA2{Population: 28}) and a package member the symbol
// tables do not list; such a cell goes to the interpreter's top level as
// it is. The generic functions of compiled packages (slices, maps, cmp)
// are out of reach either way, and the error says so.
//
// Results of a session are conceptual-design estimates; they are not for
// certification, flight or airworthiness decisions.
package repl

// Version is the tool version written in the header of study files and
// in summary.json.
const Version = "0.1.0"
