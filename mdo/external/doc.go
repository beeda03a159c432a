// Package external makes a discipline of a program outside the process:
// a panel code, a structural model, an engine deck — anything that reads
// an input file and writes its answers.
//
// A Program declares its inputs and outputs like any discipline (full
// mdo.Var specifications with units and validity ranges), plus the
// command to run, the text of the input file (a template), how the
// answers are read, a time limit and a retry count. New checks all of it
// and returns a *Discipline that a System takes like any other.
//
// # The input template
//
// The input file is the template with every marker replaced by a value.
// A marker is
//
//	@{name}                      the input "name" in its declared unit, shortest exact form
//	@{name fmt=%.6e}             with a number format: %e, %E, %f, %g or %G with optional flags, width, precision
//	@{name unit=ft2}             converted to another unit first (see Convert for the units known)
//	@{name unit=ft2 fmt=%.4f}    both, in either order
//
// "@@" writes a single "@", so "@@{" is a literal "@{". Every name must be
// an input of the program; an unknown name, option, unit or format is an
// error from New that names the marker. The default format writes the
// shortest decimal that reads back to the same float64, so a program that
// parses its input with full precision sees exactly the value the solver
// holds.
//
// # Reading the answers
//
// The program's answers come from its standard output, or from the file
// OutputFile it writes into its working folder. For each output:
//
//   - by default, a named marker: the first line "name = number" (spaces
//     optional, a unit may follow the number);
//   - Read[i].Pattern: a regular expression whose first capture group is
//     the number;
//   - when OutputFile ends in ".json", the file is a JSON object and each
//     output is the member of its name (or Read[i].Key).
//
// Read[i].Unit names the unit the program writes, converted to the
// output's declared unit. A missing, unreadable or non-finite answer is a
// failed analysis naming the output and quoting what was read.
//
// # Running
//
// Each run has a fresh working folder made with os.MkdirTemp under
// Program.WorkDir (give a per-study folder; the system's temporary folder
// when empty). The folder holds the input file; the command runs there.
// It is removed after a good run and kept after a failed one (the error
// names it). A run longer than Timeout is killed with its whole process
// group. On Linux a running program is also killed when the process that
// started it dies (a run or session killed with SIGKILL leaves none
// running); what the program itself started is the program's to end (a
// shell script should exec its last command). A failed run (non-zero exit, time-out, unreadable answer) is
// tried again up to Retries more times, each in a fresh folder; the last
// failure is returned as a *ProgramError with the exit status and the
// tail of the program's standard error. Inside mdo that is a failed
// evaluation of class discipline-failed.
//
// # The cache
//
// Answers are kept by a hash of the program's identity (its absolute path
// and the SHA-256 of the executable's content), its arguments and the
// filled input file: a point asked for again is answered without running
// the program. The cache is shared by every worker of an Evaluator and
// safe for concurrent use; workers asking for the same input at once wait
// for one run. A cached answer is the very float64s the program gave, so
// results stay bit-identical with any number of workers. A failure (after
// its retries) is kept too, so a coupled solver's fallbacks asking again
// for the same input do not pay the time limit again; a new Discipline
// (a new study) starts with an empty cache.
//
// # Allocation and trust
//
// Unlike the built-in disciplines, Compute allocates (the filled input,
// the process, the parsing): a System holding a Discipline from this
// package is not allocation-free, and the cost of an analysis is the
// program's.
//
// An external program is user code running with the user's rights. New
// takes a *Gate and refuses a program the gate does not approve. A Go
// program makes one with AllowAll or Allow; a study script cannot: it
// gets its session's gate from cell.Programs(), which approves every
// program only when the script is trusted (--trust-script) and otherwise
// only the programs named with --allow-program on the command line.
package external
