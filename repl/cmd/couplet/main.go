// Command couplet is the notebook and headless runner of the couplet MDO
// framework.
//
//	couplet [--out DIR [--replace]] [--seed N] [--memory-cap SIZE] [--trust-script] [--allow-program PATH]...   interactive notebook session
//	couplet run FILE.study --out DIR [--seed N] [--timeout D] [--memory-cap SIZE] [--trust-script] [--allow-program PATH]... [--quiet] [--every-output] [--pick-up | --replace] [spreading flags]
//	couplet worker --connect URL [flags]                  answer the analyses of runs spread over a cluster
//	couplet hub [--listen HOST:PORT] [--cluster-token TOKEN] [--store DIR]   a JetStream server for workers
//	couplet compare FOLDER... [--out DIR [--replace]]     compare results side by side
//	couplet vars [--prefix P] [--markdown]                list the aircraft model's variables
//	couplet imports [--trust-script]                      list the importable packages
//	couplet version
//
// A bad flag or argument is named with its value and what is allowed
// (flags.go), once, and exits 2.
//
// Exit status: 0 on success; 1 when the script fails (a cell fails, the
// sandbox refuses an import, every evaluation of the published study
// failed), the time limit is reached (the folder is still written), or
// the run ends abnormally; 2 on a usage error only (a bad flag or argument, an output
// folder that cannot be used or picked up, a study file that cannot be
// read or whose header is garbled). `couplet help` and --help print the
// whole usage.
//
// couplet run runs the script in a process of its own, this program
// started again (see supervise.go and child.go): a panic in a goroutine
// the script starts, unbounded recursion or memory past --memory-cap
// (default half of the machine's memory) ends that process, not the run;
// the run then writes the output folder of the result published before,
// read back from its case store, says what ended the process and exits 1.
// The notebook session works the same way (notebook.go and
// notebook_child.go): the terminal side stays in this process, the cells
// run in an interpreter process, and when that dies the session says what
// ended it, writes the results published before and goes on in a fresh
// interpreter that keeps the cells. Programs the cells started end with
// the interpreter process (leftovers.go).
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/chzyer/readline"

	"couplet/mdo"
	"couplet/repl"
)

func main() { os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) }

// settings are the flags shared by the commands.
type settings struct {
	out     string
	seed    string
	timeout time.Duration
	trust   bool
	quiet   bool
	pickUp  bool
	replace bool
	every   bool
	// programs are the external programs approved with --allow-program.
	programs pathList
	memory   string
	// spread are the flags that spread the analyses over workers.
	spread spreadSettings
}

// errHelp is returned by parse when the flags ask for the usage.
var errHelp = errors.New("help requested")

// notebookFlags are the flags of the notebook session; couplet run takes
// them and the rest of flagSet's.
var notebookFlags = []string{"out", "replace", "seed", "memory-cap", "trust-script", "allow-program"}

// importsFlags are the flags of couplet imports.
var importsFlags = []string{"trust-script"}

// flagSet declares the flags of the notebook session, couplet run and
// couplet imports.
func flagSet(name string, st *settings) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.StringVar(&st.out, "out", "", "the output folder, created if need be (run: required; the notebook session writes its reports there)")
	fs.StringVar(&st.seed, "seed", "", "seed overriding the one the script declares: "+seedWant)
	fs.Var(positiveDuration{&st.timeout}, "timeout", "time limit of the whole replay, e.g. 90s or 5m; what the study had by then is written")
	fs.BoolVar(&st.trust, strings.TrimPrefix(repl.TrustFlag, "--"), false, "lift the sandbox: the script may import every package the interpreter carries, use files and start any program (trusted scripts only)")
	fs.Var(&st.programs, strings.TrimPrefix(repl.AllowProgramFlag, "--"), "approve one external program (an executable's path) that the script may run through mdo/external; repeatable; a trusted script may run any")
	fs.BoolVar(&st.quiet, "quiet", false, "do not echo the cells' output")
	fs.BoolVar(&st.pickUp, "pick-up", false, "continue the results.db an interrupted run of the same study file and seed left in --out: its evaluations are picked up, not analysed again; any change to the file is refused")
	fs.BoolVar(&st.replace, "replace", false, "clear every file of the run or session --out holds first, then start afresh")
	fs.BoolVar(&st.every, "every-output", false, "write every output of the analyses to evaluations.csv, not only the status, design, objectives, constraints and margins (results.db keeps them all)")
	spreadFlags(fs, &st.spread)
	fs.StringVar(&st.memory, "memory-cap", "", "memory cap of the process that runs the script, e.g. 512MiB or 4GiB (at least 128MiB); past it that process ends and what it published is written (default half of the machine's memory)")
	return fs
}

// parse parses the flags of the notebook session (name "couplet"),
// couplet run or couplet imports, placed before or after the positional
// arguments. It returns errHelp for -h or --help; any other error is a
// usage error, for the caller to print.
func parse(name string, args []string) (*settings, []string, error) {
	st := &settings{}
	fs := flagSet(name, st)
	var takes []string
	switch name {
	case "couplet":
		takes = notebookFlags
	case "imports":
		takes = importsFlags
	}
	pos, err := parseFlags(name, fs, args, takes)
	if err != nil {
		return nil, nil, err
	}
	switch name {
	case "couplet":
		// the spreading flags have a message of their own
		if err = st.spread.runOnly(); err == nil {
			err = onlyFlags(name, fs, notebookFlags)
		}
		if err == nil && st.replace && st.out == "" {
			err = errors.New("--replace clears the --out folder: give --out DIR too")
		}
	case "imports":
		err = onlyFlags(name, fs, importsFlags)
	}
	if err == nil {
		err = outFolder(st.out)
	}
	if err != nil {
		return nil, nil, err
	}
	return st, pos, nil
}

// outFolder refuses an --out that names something other than a folder.
func outFolder(dir string) error {
	if fi, err := os.Stat(dir); dir != "" && err == nil && !fi.IsDir() {
		return fmt.Errorf("--out %q is a file: want a folder (created if need be)", dir)
	}
	return nil
}

// usageFailed prints a usage error of a command, prefixed by its name
// ("couplet run:"), and returns exit status 2.
func usageFailed(stderr io.Writer, cmd string, err error) int {
	prefix := "couplet"
	if cmd != "couplet" {
		prefix += " " + cmd
	}
	fmt.Fprintf(stderr, "%s: %v\n", prefix, err)
	return 2
}

// seedOf parses the --seed flag: a decimal whole number in its plain
// form only (no sign, leading zero, space or base prefix), so that a seed
// reads the same to every reader ("0042" is refused, not read as 34 or
// 42).
func (st *settings) seedOf() (uint64, bool, error) {
	if st.seed == "" {
		return 0, false, nil
	}
	v, err := strconv.ParseUint(st.seed, 10, 64)
	if err != nil || strconv.FormatUint(v, 10) != st.seed {
		return 0, false, fmt.Errorf("--seed %q: want %s", st.seed, seedWant)
	}
	return v, true, nil
}

// usage prints the whole usage: commands, flags and exit status.
func usage(w io.Writer) {
	fmt.Fprintf(w, `couplet %s — multidisciplinary design optimisation notebook for conceptual
aircraft design

usage:
  couplet [--out DIR [--replace]] [--seed N] [--memory-cap SIZE]
          [--trust-script] [--allow-program PATH]...
      the interactive notebook session; its cells run in a process of their own
  couplet run FILE.study --out DIR [--seed N] [--timeout D] [--memory-cap SIZE]
          [--trust-script] [--allow-program PATH]... [--quiet] [--every-output]
          [--pick-up | --replace]
          [--workers-on URL [--cluster-token TOKEN | --cluster-creds FILE]
           | --local-workers N] [--redeliver-after D]
      replay a saved study headless, the script in a process of its own, its
      analyses on worker processes if asked
  couplet worker --connect URL [--cluster-token TOKEN | --cluster-creds FILE]
          [--name NAME] [--workspace DIR] [--parallel N] [--trust-script]
          [--allow-program PATH]... [--verbose]
      answer the analyses of the runs spread over a cluster
  couplet hub [--listen HOST:PORT] [--cluster-token TOKEN] [--store DIR]
      a NATS JetStream server for workers on other machines
  couplet compare FOLDER... [--out DIR [--replace]]
      compare result folders (or the results of a script's folder) side by
      side; --out DIR writes the page with the overlaid figures
  couplet vars [--prefix P] [--markdown]
      list the aircraft model's variables
  couplet imports [--trust-script]
      list the packages a script may import
  couplet version
      print the version
  couplet help
      print this text (also -h, --help, and --help after couplet run)

couplet worker, hub, compare and vars --help describe their own flags.

flags of the notebook session and couplet run:
`, repl.Version)
	fs := flagSet("couplet", &settings{})
	printFlags(w, fs, notebookFlags...)
	fmt.Fprint(w, "\nflags of couplet run only:\n")
	var runOnly []string
	fs.VisitAll(func(f *flag.Flag) {
		if !slices.Contains(notebookFlags, f.Name) {
			runOnly = append(runOnly, f.Name)
		}
	})
	printFlags(w, fs, runOnly...)
	fmt.Fprint(w, `
exit status of run:
  0  the study ran to its end, or Ctrl-C interrupted it and it returned its
     best point so far
  1  the script failed: a cell failed, the sandbox refused an import, every
     evaluation of the published study failed, the time limit was reached
     (what the study had by then is written), or the run ended abnormally:
     the process running the script died (a panic in a goroutine, a stack
     overflow, memory past --memory-cap) or did not stop within the time
     limit; the result published before is written
  2  a usage error: a bad flag or argument, an output folder that cannot be
     used or picked up (another version of the study file, another --seed),
     a study file that cannot be read or whose header is garbled

Results are conceptual-design estimates, not for certification, flight or
airworthiness decisions; defer to the applicable regulations and licensed
engineering practice.
`)
}

// run is main without the exit, for tests.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	cmd := ""
	if len(args) > 0 && !strings.HasPrefix(args[0], "-") {
		cmd, args = args[0], args[1:]
	}
	switch cmd {
	case "":
		return interactive(args, stdin, stdout, stderr)
	case "run":
		return replay(args, stdout, stderr)
	case "imports":
		st, pos, err := parse("imports", args)
		if errors.Is(err, errHelp) {
			usage(stdout)
			return 0
		}
		if err == nil && len(pos) > 0 {
			err = fmt.Errorf("unexpected argument %q: couplet imports takes none", pos[0])
		}
		if err != nil {
			return usageFailed(stderr, "imports", err)
		}
		fmt.Fprintln(stdout, strings.Join(st.policy().Importable(), "\n"))
		return 0
	case "vars":
		return varsCommand(args, stdout, stderr)
	case "compare":
		return compareCommand(context.Background(), args, stdout, stderr)
	case "worker":
		return workerCommand(args, stdout, stderr)
	case "hub":
		return hubCommand(args, stdout, stderr)
	case "version":
		fmt.Fprintf(stdout, "couplet %s\n", repl.Version)
		return 0
	case "help", "-h", "--help":
		usage(stdout)
		return 0
	}
	if strings.HasSuffix(cmd, ".study") {
		fmt.Fprintf(stderr, "couplet: unknown command %q: a study file is replayed with couplet run %s --out DIR\n", cmd, cmd)
		return 2
	}
	fmt.Fprintf(stderr, "couplet: unknown command %q: the commands are run, worker, hub, compare, vars, imports, version and help (couplet help describes them)\n", cmd)
	return 2
}

// isTerminal reports whether w is a terminal.
func isTerminal(w any) bool {
	f, ok := w.(*os.File)
	return ok && readline.IsTerminal(int(f.Fd()))
}

// replay is `couplet run`.
func replay(args []string, stdout, stderr io.Writer) int {
	st, pos, err := parse("run", args)
	if errors.Is(err, errHelp) {
		usage(stdout)
		return 0
	}
	if err != nil {
		return usageFailed(stderr, "run", err)
	}
	switch {
	case len(pos) == 0 && st.out == "":
		err = errors.New("need a study file and --out DIR: couplet run FILE.study --out DIR (couplet help describes the flags)")
	case len(pos) == 0:
		err = errors.New("need a study file: couplet run FILE.study --out DIR")
	case len(pos) > 1:
		err = fmt.Errorf("%d study files given (%s): couplet run replays one", len(pos), strings.Join(pos, ", "))
	case st.out == "":
		err = fmt.Errorf("need --out DIR, the folder where the replay of %s writes its results", pos[0])
	}
	if err != nil {
		return usageFailed(stderr, "run", err)
	}
	seed, seedSet, err := st.seedOf()
	if err == nil {
		err = st.spread.check()
	}
	if err != nil {
		return usageFailed(stderr, "run", err)
	}
	opts := repl.RunOptions{
		File: pos[0], OutDir: st.out, Seed: seed, SeedSet: seedSet, Timeout: st.timeout,
		Policy: st.policy(), Stdout: stdout, Stderr: stderr, PickUp: st.pickUp, Replace: st.replace,
		EveryOutput: st.every,
	}
	if st.quiet {
		opts.Stdout = io.Discard
	}
	memCap := defaultMemoryCap()
	if st.memory != "" {
		if memCap, err = parseSize("--memory-cap", st.memory); err != nil {
			return usageFailed(stderr, "run", err)
		}
	}
	ev, child := interpreterProcess()
	if !child {
		sv := &supervisor{opts: opts, args: args, cap: memCap, stdout: stdout, stderr: stderr}
		return sv.run()
	}
	opts.Guarded, opts.Watch = true, ev.watch
	return ev.exit(interpret(opts, &st.spread, pos[0], st.out, stdout, stderr))
}

// interpret runs the script in the interpreter process and returns the
// exit status.
func interpret(opts repl.RunOptions, sp *spreadSettings, file, out string, stdout, stderr io.Writer) int {
	if isTerminal(stdout) {
		opts.Progress = repl.NewProgress(stdout)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	ctx, release, err := sp.start(ctx, opts, stderr)
	if err != nil {
		fmt.Fprintln(stderr, "couplet run:", err)
		return 1
	}
	defer release()
	rec, err := repl.Run(ctx, opts)
	if err != nil {
		fmt.Fprintln(stderr, "couplet run:", err)
		var ue *repl.UsageError
		if errors.As(err, &ue) {
			return 2
		}
		return 1
	}
	fmt.Fprintf(stderr, "%s; wrote %s\n", doneLine(file, rec), out)
	return 0
}

// doneLine is the last line of a run that ended without an error: the
// cells, the evaluations, the best objective and whether it is feasible
// (when it is not, the constraint it violates most, as scaled, with its
// value: the line a headless run leaves says why), the size of a front.
func doneLine(file string, rec *repl.RunRecord) string {
	line := fmt.Sprintf("couplet run: %s: %d cells", filepath.Base(file), len(rec.Cells))
	if s := rec.Summary; s != nil {
		line += fmt.Sprintf(", %d evaluations", s.Evaluations)
		if s.Best != nil {
			state := "feasible"
			if !s.Best.Feasible {
				state = "infeasible" + worstViolation(rec.Result)
			}
			line += fmt.Sprintf(", best objective %.6g (%s)", float64(s.Best.Objective), state)
		}
		if s.Front != nil {
			line += fmt.Sprintf(", front of %d points", len(s.Front))
		}
	}
	return line
}

// worstViolation names the constraint the best point of r violates most
// (by its scaled violation) with its value, and how many it violates:
// "; worst of 2 violated: perf.takeoff_field_length <= 600 at 1308.62 m".
// "" when there is nothing to name.
func worstViolation(r *mdo.Result) string {
	if r == nil || r.Best == nil || len(r.Best.G) != len(r.Constraints) || len(r.Best.Constraints) != len(r.Constraints) {
		return ""
	}
	if !r.Best.Converged {
		return "; its analysis failed: " + r.Best.Err
	}
	worst, n := -1, 0
	for i, g := range r.Best.G {
		if g > 0 {
			n++
			if worst < 0 || g > r.Best.G[worst] {
				worst = i
			}
		}
	}
	if worst < 0 {
		return ""
	}
	c := r.Constraints[worst]
	value := fmt.Sprintf("%.6g", r.Best.Constraints[worst])
	if u := r.Unit(c.Name); u != "" && u != "-" {
		value += " " + u
	}
	return fmt.Sprintf("; worst of %d violated: %s at %s", n, c, value)
}

// historyFile is where the notebook keeps its input history.
func historyFile() string {
	home, err := os.UserHomeDir()
	if err != nil || home == "" {
		return ""
	}
	return filepath.Join(home, ".couplet-notebook-history")
}

// banner is what the notebook prints on a terminal before its first
// prompt.
func banner(w io.Writer, trusted bool) {
	fmt.Fprintf(w, "couplet %s notebook. @help for commands. Results are conceptual estimates,\nnot for certification, flight or airworthiness decisions.\n", repl.Version)
	if trusted {
		fmt.Fprintf(w, "sandbox lifted (%s): scripts may use files and processes.\n", repl.TrustFlag)
	}
}

// interactive is the notebook session.
func interactive(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	st, pos, err := parse("couplet", args)
	if errors.Is(err, errHelp) {
		usage(stdout)
		return 0
	}
	if err == nil && len(pos) > 0 {
		err = fmt.Errorf("unexpected argument %q: the notebook session takes flags only (a study file is replayed with couplet run FILE.study --out DIR)", pos[0])
	}
	if err != nil {
		return usageFailed(stderr, "couplet", err)
	}
	seed, seedSet, err := st.seedOf()
	if err != nil {
		return usageFailed(stderr, "couplet", err)
	}
	memCap := defaultMemoryCap()
	if st.memory != "" {
		if memCap, err = parseSize("--memory-cap", st.memory); err != nil {
			return usageFailed(stderr, "couplet", err)
		}
	}
	if ev, child := interpreterProcess(); child {
		return ev.exit(interpreterSession(ev, st, seed, seedSet, memCap))
	}
	if st.out != "" {
		lock, err := repl.GuardSessionFolder(st.out, st.replace)
		if err != nil {
			fmt.Fprintln(stderr, "couplet:", err)
			return 2
		}
		defer lock.Release()
	}
	// the interpreter process takes the folder as it is now: cleared
	// already if --replace asked for it
	childArgs := slices.DeleteFunc(slices.Clone(args), func(a string) bool {
		name, _, _ := strings.Cut(strings.TrimLeft(a, "-"), "=")
		return strings.HasPrefix(a, "-") && name == "replace"
	})
	n := &notebook{st: st, args: childArgs, cap: memCap, stdout: stdout, stderr: stderr}
	term := isTerminal(stdin) && isTerminal(stdout)
	var in repl.LineReader
	if term {
		banner(stdout, st.trust)
		tr, err := repl.NewTermReader(repl.Completions{Policy: st.policy(), Sources: n.sources}, historyFile())
		if err != nil {
			fmt.Fprintln(stderr, "couplet:", err)
			return 1
		}
		defer tr.Close()
		in = tr
	} else {
		in = repl.NewLineReader(stdin, nil)
	}
	return runNotebook(n, in)
}
