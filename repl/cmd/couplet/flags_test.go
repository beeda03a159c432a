package main

import (
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// A bad invocation exits 2 with one message, prefixed once by the
// command's name, that names the flag, the value given and what is
// allowed (no usage text after it, nothing on standard output).
func TestBadInvocations(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.study")
	if err := os.WriteFile(good, []byte("//~ cell 1\nx := 2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(dir, "a-file")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	// a folder that holds a finished run of the Sellar study, seed 1
	sellar := filepath.Join("..", "..", "..", "studies", "sellar.study")
	held := filepath.Join(dir, "held")
	if code, _, errs := runCmd("run", sellar, "--out", held, "--quiet"); code != 0 {
		t.Fatalf("the run that fills %s: exit %d, %s", held, code, errs)
	}
	missing := filepath.Join(dir, "none.study")
	empty := filepath.Join(dir, "empty")
	notebook := "--out, --replace, --seed, --memory-cap, --trust-script, --allow-program"
	run := "--allow-program, --cluster-creds, --cluster-token, --every-output, --local-workers, --memory-cap, --out, --pick-up, --quiet, --redeliver-after, --replace, --seed, --timeout, --trust-script, --workers-on"
	tests := []struct {
		name string
		args []string
		msg  string
	}{
		// unknown flags: named, the nearest flag suggested, the command's flags listed
		{"notebook, unknown flag", []string{"--bogus"}, "couplet: unknown flag --bogus (the notebook session takes " + notebook + "; couplet help describes them)"},
		{"notebook, a flag's start", []string{"--trust", "3"}, "couplet: unknown flag --trust; did you mean --trust-script? (the notebook session takes " + notebook + "; couplet help describes them)"},
		{"notebook, other dashes", []string{"--memory_cap", "1GiB"}, "couplet: unknown flag --memory_cap; did you mean --memory-cap? (the notebook session takes " + notebook + "; couplet help describes them)"},
		{"run, misspelt flag", []string{"run", good, "--out", dir, "--pickup"}, "couplet run: unknown flag --pickup; did you mean --pick-up? (couplet run takes " + run + "; couplet help describes them)"},
		{"imports, unknown flag", []string{"imports", "--bogus"}, "couplet imports: unknown flag --bogus (couplet imports takes --trust-script; couplet help describes them)"},
		{"compare, unknown flag", []string{"compare", "a", "b", "--bogus"}, "couplet compare: unknown flag --bogus (couplet compare takes --out, --replace; couplet compare --help describes them)"},
		{"worker, unknown flag", []string{"worker", "--bogus"}, "couplet worker: unknown flag --bogus (couplet worker takes --allow-program, --cluster-creds, --cluster-token, --connect, --name, --parallel, --trust-script, --verbose, --workspace; couplet worker --help describes them)"},
		{"hub, unknown flag", []string{"hub", "--bogus"}, "couplet hub: unknown flag --bogus (couplet hub takes --cluster-token, --listen, --store; couplet hub --help describes them)"},
		{"vars, unknown flag", []string{"vars", "--bogus"}, "couplet vars: unknown flag --bogus (couplet vars takes --markdown, --prefix; couplet vars --help describes them)"},
		{"bad syntax", []string{"---out", dir}, `couplet: bad flag syntax "---out": write a flag as --name or --name=value`},
		// flags of another command
		{"notebook, a flag of run", []string{"--timeout", "5m"}, "couplet: --timeout is a flag of couplet run; the notebook session takes " + notebook},
		{"imports, a flag of run", []string{"imports", "--out", dir}, "couplet imports: --out is a flag of couplet run and the notebook session; couplet imports takes --trust-script"},
		{"notebook, spreading", []string{"--local-workers", "2"}, "couplet: --workers-on and --local-workers go with couplet run; the notebook session analyses in its own process"},
		// bad values
		{"seed, not a number", []string{"run", good, "--out", dir, "--seed", "abc"}, `couplet run: --seed "abc": want ` + seedWant},
		{"seed, leading zero", []string{"--seed", "042"}, `couplet: --seed "042": want ` + seedWant},
		{"seed, too large", []string{"run", good, "--out", dir, "--seed", "18446744073709551616"}, `couplet run: --seed "18446744073709551616": want ` + seedWant},
		{"seed, no value", []string{"run", good, "--out", dir, "--seed"}, "couplet run: --seed needs a value (--seed N): " + seedWant},
		{"timeout, no unit", []string{"run", good, "--out", dir, "--timeout", "5"}, `couplet run: --timeout "5": want a duration above zero, e.g. 90s, 5m or 1h30m (leave the flag out for no limit)`},
		{"timeout, negative", []string{"run", good, "--out", dir, "--timeout=-1s"}, `couplet run: --timeout "-1s": want a duration above zero, e.g. 90s, 5m or 1h30m (leave the flag out for no limit)`},
		{"timeout, zero", []string{"run", good, "--out", dir, "--timeout", "0s"}, `couplet run: --timeout "0s": want a duration above zero, e.g. 90s, 5m or 1h30m (leave the flag out for no limit)`},
		{"memory cap, no unit", []string{"run", good, "--out", dir, "--memory-cap", "512"}, `couplet run: --memory-cap "512": want ` + sizeWant},
		{"memory cap, too small", []string{"--memory-cap", "64MiB"}, `couplet: --memory-cap "64MiB": want at least 128MiB, the interpreter needs that much to run`},
		{"memory cap, no value", []string{"run", good, "--out", dir, "--memory-cap"}, "couplet run: --memory-cap needs a value (--memory-cap SIZE): " + sizeWant},
		{"switch with a value", []string{"run", good, "--out", dir, "--quiet=maybe"}, `couplet run: --quiet "maybe": want true or false, or --quiet alone`},
		{"local workers, not a number", []string{"run", good, "--out", dir, "--local-workers", "two"}, `couplet run: --local-workers "two": want a whole number from 1 to 256`},
		{"redeliver after, no unit", []string{"run", good, "--out", dir, "--redeliver-after", "30"}, `couplet run: --redeliver-after "30": want a duration of at least 100ms, e.g. 30s or 2m`},
		{"parallel, not a number", []string{"worker", "--connect", "nats://127.0.0.1:1", "--parallel", "two"}, `couplet worker: --parallel "two": want a whole number of 1 or more`},
		{"vars, bad prefix", []string{"vars", "--prefix", "mass.fule"}, `couplet vars: --prefix "mass.fule": mdo: no variable of the system starts with "mass.fule"; the variables' prefixes are aero., aircraft., airport., cabin., cg., cruise., dive., engine., flap., fuselage., geometry., htail., layout., mass., mission., nacelle., perf., stability., vtail., weights., wing.`},
		// arguments
		{"run, nothing", []string{"run"}, "couplet run: need a study file and --out DIR: couplet run FILE.study --out DIR (couplet help describes the flags)"},
		{"run, no folder", []string{"run", good}, "couplet run: need --out DIR, the folder where the replay of " + good + " writes its results"},
		{"run, no file", []string{"run", "--out", dir}, "couplet run: need a study file: couplet run FILE.study --out DIR"},
		{"run, two files", []string{"run", good, good, "--out", dir}, "couplet run: 2 study files given (" + good + ", " + good + "): couplet run replays one"},
		{"missing study file", []string{"run", missing, "--out", filepath.Join(dir, "o1")}, "couplet run: reading the study file: open " + missing + ": no such file or directory"},
		{"notebook, an argument", []string{"--out", dir, "extra"}, `couplet: unexpected argument "extra": the notebook session takes flags only (a study file is replayed with couplet run FILE.study --out DIR)`},
		{"study file as a command", []string{good}, `couplet: unknown command "` + good + `": a study file is replayed with couplet run ` + good + ` --out DIR`},
		{"vars, an argument", []string{"vars", "mass."}, `couplet vars: unexpected argument "mass.": use --prefix mass. to list the variables whose names start with it`},
		{"unknown command", []string{"fly"}, `couplet: unknown command "fly": the commands are run, worker, hub, compare, vars, imports, version and help (couplet help describes them)`},
		// DIR problems
		{"run, DIR a file", []string{"run", good, "--out", file}, `couplet run: --out "` + file + `" is a file: want a folder (created if need be)`},
		{"notebook, DIR a file", []string{"--out", file}, `couplet: --out "` + file + `" is a file: want a folder (created if need be)`},
		{"compare, DIR a file", []string{"compare", held, held, "--out", file}, `couplet compare: --out "` + file + `" is a file: want a folder (created if need be)`},
		{"notebook, replace without DIR", []string{"--replace"}, "couplet: --replace clears the --out folder: give --out DIR too"},
		{"DIR holds another run", []string{"run", sellar, "--out", held}, "couplet run: " + held + " holds another run (results.db, report.html, summary.json, index.html and 8 more); --pick-up continues it if it was interrupted, --replace clears its files and runs afresh, or choose another folder"},
		{"pick up and replace", []string{"run", sellar, "--out", held, "--pick-up", "--replace"}, "couplet run: --pick-up continues the run in " + held + " and --replace clears it: choose one"},
		{"pick up another seed", []string{"run", sellar, "--out", held, "--pick-up", "--seed", "2"}, "couplet run: --pick-up: " + filepath.Join(held, "sellar", "results.db") + " holds a run with seed 1, not --seed 2; picking it up would mix the two. Pick it up with --seed 1, or run into a new folder"},
		{"pick up nothing", []string{"run", good, "--out", empty, "--pick-up"}, "couplet run: --pick-up: nothing to pick up in " + empty + ": none of its result folders holds a results.db of an interrupted run"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCmd(tc.args...)
			if code != 2 || errs != tc.msg+"\n" || out != "" {
				t.Errorf("couplet %s:\nexit %d, stdout %q, stderr\n%q\nwant exit 2, no output and\n%q", strings.Join(tc.args, " "), code, out, errs, tc.msg+"\n")
			}
		})
	}
}

// Every flag a usage lists is described, the descriptions line up in one
// column and no line is wider than 80 columns.
func TestUsageAligned(t *testing.T) {
	for _, args := range [][]string{{"help"}, {"worker", "--help"}, {"hub", "--help"}, {"compare", "--help"}, {"vars", "--help"}} {
		code, out, errs := runCmd(args...)
		if code != 0 || errs != "" {
			t.Fatalf("couplet %s: exit %d, stderr %q", strings.Join(args, " "), code, errs)
		}
		col := -1
		for _, l := range strings.Split(out, "\n") {
			if w := len([]rune(l)); w > 80 {
				t.Errorf("couplet %s: a line of %d columns: %q", strings.Join(args, " "), w, l)
			}
			if !strings.HasPrefix(l, "  --") {
				continue
			}
			flag, desc, ok := strings.Cut(strings.TrimPrefix(l, "  "), "  ")
			at := len(l) - len(strings.TrimLeft(desc, " "))
			if !ok || strings.TrimSpace(desc) == "" {
				t.Errorf("couplet %s: flag %s has no description", strings.Join(args, " "), flag)
				continue
			}
			if col >= 0 && at != col {
				t.Errorf("couplet %s: the description of %s starts at column %d, the others at %d", strings.Join(args, " "), flag, at, col)
			}
			col = at
		}
		if col < 0 {
			t.Errorf("couplet %s lists no flag:\n%s", strings.Join(args, " "), out)
		}
	}
	// couplet help shows every flag of the notebook session and of couplet
	// run in a synopsis and describes it
	_, help, _ := runCmd("help")
	synopsis, _, _ := strings.Cut(help, "\nflags of")
	flagSet("couplet", &settings{}).VisitAll(func(f *flag.Flag) {
		if !strings.Contains(synopsis, "--"+f.Name) || !strings.Contains(help, "\n  --"+f.Name+" ") {
			t.Errorf("couplet help does not show --%s in a synopsis and in the list of flags", f.Name)
		}
	})
}

// The README names every flag of the notebook session, couplet run,
// couplet worker and couplet hub.
func TestReadmeNamesEveryFlag(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	check := func(cmd string, fs *flag.FlagSet) {
		fs.VisitAll(func(f *flag.Flag) {
			if !regexp.MustCompile(`--` + regexp.QuoteMeta(f.Name) + `([^a-z-]|$)`).MatchString(readme) {
				t.Errorf("README.md does not name --%s of %s", f.Name, cmd)
			}
		})
	}
	check("couplet run", flagSet("run", &settings{}))
	for _, cmd := range []string{"worker", "hub"} {
		_, help, _ := runCmd(cmd, "--help")
		fs := flag.NewFlagSet(cmd, flag.ContinueOnError)
		for _, l := range strings.Split(help, "\n") {
			if name, ok := strings.CutPrefix(l, "  --"); ok {
				fs.Bool(strings.Fields(name)[0], false, "")
			}
		}
		check("couplet "+cmd, fs)
	}
}
