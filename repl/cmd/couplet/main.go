// Command couplet is the notebook and headless runner of the couplet MDO
// framework.
//
//	couplet [--out DIR] [--seed N] [--trust-script]      interactive notebook session
//	couplet run FILE.study --out DIR [--seed N] [--timeout D] [--trust-script] [--quiet] [--pick-up]
//	couplet imports [--trust-script]                      list the importable packages
//	couplet version
//
// Exit status of run: 0 on success, 1 when a cell fails (the message names
// the file line, the cell and its line), 2 on a usage error.
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
	"strings"
	"time"

	"github.com/chzyer/readline"

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
}

// parse parses flags placed before or after the positional arguments.
func parse(name string, args []string, stderr io.Writer) (*settings, []string, error) {
	st := &settings{}
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.StringVar(&st.out, "out", "", "output folder of the study")
	fs.StringVar(&st.seed, "seed", "", "seed overriding the one the script declares")
	fs.DurationVar(&st.timeout, "timeout", 0, "time limit of the whole replay, e.g. 90s or 5m (run only)")
	fs.BoolVar(&st.trust, strings.TrimPrefix(repl.TrustFlag, "--"), false, "lift the sandbox: the script may use files and processes (trusted scripts only)")
	fs.BoolVar(&st.quiet, "quiet", false, "do not echo the cells' output (run only)")
	fs.BoolVar(&st.pickUp, "pick-up", false, "continue the results.db an interrupted run of the same script and seed left in --out (run only)")
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	return st, pos, nil
}

// seedOf parses the --seed flag.
func (st *settings) seedOf() (uint64, bool, error) {
	if st.seed == "" {
		return 0, false, nil
	}
	var v uint64
	if _, err := fmt.Sscan(st.seed, &v); err != nil {
		return 0, false, fmt.Errorf("--seed %q: want a whole number from 0 to 18446744073709551615", st.seed)
	}
	return v, true, nil
}

func usage(w io.Writer) {
	fmt.Fprintf(w, `couplet %s — multidisciplinary design optimisation notebook for conceptual aircraft design

usage:
  couplet [--out DIR] [--seed N] [%s]       interactive notebook session
  couplet run FILE.study --out DIR [--seed N] [--timeout D] [%s] [--quiet] [--pick-up]
                                                   replay a saved study headless
  couplet imports [%s]                    list the packages a script may import
  couplet version

Results are conceptual-design estimates, not for certification, flight or airworthiness
decisions; defer to the applicable regulations and licensed engineering practice.
`, repl.Version, repl.TrustFlag, repl.TrustFlag, repl.TrustFlag)
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
		st, _, err := parse("imports", args, stderr)
		if err != nil {
			return 2
		}
		fmt.Fprintln(stdout, strings.Join(repl.Policy{Trusted: st.trust}.Importable(), "\n"))
		return 0
	case "version":
		fmt.Fprintf(stdout, "couplet %s\n", repl.Version)
		return 0
	case "help", "-h", "--help":
		usage(stdout)
		return 0
	}
	fmt.Fprintf(stderr, "couplet: unknown command %q\n", cmd)
	usage(stderr)
	return 2
}

// isTerminal reports whether w is a terminal.
func isTerminal(w any) bool {
	f, ok := w.(*os.File)
	return ok && readline.IsTerminal(int(f.Fd()))
}

// replay is `couplet run`.
func replay(args []string, stdout, stderr io.Writer) int {
	st, pos, err := parse("run", args, stderr)
	if err != nil {
		return 2
	}
	if len(pos) != 1 || st.out == "" {
		fmt.Fprintln(stderr, "couplet run: need exactly one study file and --out DIR")
		usage(stderr)
		return 2
	}
	seed, seedSet, err := st.seedOf()
	if err != nil {
		fmt.Fprintln(stderr, "couplet run:", err)
		return 2
	}
	opts := repl.RunOptions{
		File: pos[0], OutDir: st.out, Seed: seed, SeedSet: seedSet, Timeout: st.timeout,
		Policy: repl.Policy{Trusted: st.trust}, Stdout: stdout, Stderr: stderr, PickUp: st.pickUp,
	}
	if st.quiet {
		opts.Stdout = io.Discard
	}
	if isTerminal(stdout) {
		opts.Progress = repl.NewProgress(stdout)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	rec, err := repl.Run(ctx, opts)
	if err != nil {
		fmt.Fprintln(stderr, "couplet run:", err)
		var ue *repl.UsageError
		if errors.As(err, &ue) {
			return 2
		}
		return 1
	}
	line := fmt.Sprintf("couplet run: %s: %d cells", filepath.Base(pos[0]), len(rec.Cells))
	if s := rec.Summary; s != nil {
		line += fmt.Sprintf(", %d evaluations", s.Evaluations)
		if s.Best != nil {
			state := "feasible"
			if !s.Best.Feasible {
				state = "infeasible"
			}
			line += fmt.Sprintf(", best objective %.6g (%s)", float64(s.Best.Objective), state)
		}
		if s.Front != nil {
			line += fmt.Sprintf(", front of %d points", len(s.Front))
		}
	}
	fmt.Fprintf(stderr, "%s; wrote %s\n", line, st.out)
	return 0
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
	st, pos, err := parse("couplet", args, stderr)
	if err != nil {
		return 2
	}
	if len(pos) > 0 {
		fmt.Fprintf(stderr, "couplet: unexpected argument %q\n", pos[0])
		usage(stderr)
		return 2
	}
	seed, seedSet, err := st.seedOf()
	if err != nil {
		fmt.Fprintln(stderr, "couplet:", err)
		return 2
	}
	term := isTerminal(stdin) && isTerminal(stdout)
	opts := repl.Options{
		Policy: repl.Policy{Trusted: st.trust}, Stdout: stdout, Stderr: stderr,
		OutDir: st.out, Seed: seed, SeedSet: seedSet,
	}
	if term {
		opts.Progress = repl.NewProgress(stdout)
	}
	s, err := repl.NewSession(opts)
	if err != nil {
		fmt.Fprintln(stderr, "couplet:", err)
		return 1
	}
	defer s.Close()
	// Ctrl-C while a cell runs cancels the cell, never the session.
	sig := make(chan os.Signal, 1)
	signal.Notify(sig, os.Interrupt)
	defer signal.Stop(sig)
	go func() {
		for range sig {
			if s.Interrupt() {
				fmt.Fprintln(stderr, "\n(cancelling the cell; Ctrl-C again stops it at once)")
			}
		}
	}()
	var in repl.LineReader
	if term {
		banner(stdout, st.trust)
		tr, err := repl.NewTermReader(s, historyFile())
		if err != nil {
			fmt.Fprintln(stderr, "couplet:", err)
			return 1
		}
		defer tr.Close()
		in = tr
	} else {
		in = repl.NewLineReader(stdin, nil)
	}
	if err := s.Serve(context.Background(), in); err != nil {
		fmt.Fprintln(stderr, "couplet:", err)
		return 1
	}
	return 0
}
