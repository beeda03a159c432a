package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"slices"
	"strings"
	"time"
)

// flagValue is what the usage and the error messages say of a flag's
// value: its placeholder and what is allowed.
type flagValue struct {
	arg  string // the placeholder in the usage, e.g. "DIR"
	want string // what a value must be
}

// flagValues describes the value of every flag of the commands that
// takes one. A flag missing here is a switch (true or false).
var flagValues = map[string]flagValue{
	"out":             {"DIR", "a folder"},
	"seed":            {"N", seedWant},
	"timeout":         {"D", "a duration above zero, e.g. 90s, 5m or 1h30m (leave the flag out for no limit)"},
	"memory-cap":      {"SIZE", sizeWant},
	"allow-program":   {"PATH", "the path of a program"},
	"workers-on":      {"URL", "the URL of a NATS server, e.g. nats://host:4222"},
	"local-workers":   {"N", "a whole number from 1 to 256"},
	"cluster-token":   {"TOKEN", "the server's token"},
	"cluster-creds":   {"FILE", "a NATS credentials file"},
	"redeliver-after": {"D", "a duration of at least 100ms, e.g. 30s or 2m"},
	"connect":         {"URL", "the URL of a NATS server, e.g. nats://host:4222"},
	"name":            {"NAME", "a name"},
	"workspace":       {"DIR", "a folder"},
	"parallel":        {"N", "a whole number of 1 or more"},
	"listen":          {"HOST:PORT", "HOST:PORT with a port from 0 to 65535, e.g. 0.0.0.0:4222"},
	"store":           {"DIR", "a folder"},
	"prefix":          {"P", "the start of variable names, e.g. mass. or wing.area"},
}

// seedWant is what --seed allows.
const seedWant = "a decimal whole number from 0 to 18446744073709551615, written without sign, leading zeros or spaces"

// positiveDuration is a flag of a duration above zero.
type positiveDuration struct{ d *time.Duration }

// String implements flag.Value.
func (p positiveDuration) String() string {
	if p.d == nil || *p.d == 0 {
		return ""
	}
	return p.d.String()
}

// Set implements flag.Value.
func (p positiveDuration) Set(s string) error {
	d, err := time.ParseDuration(s)
	if err != nil {
		return err
	}
	if d <= 0 {
		return fmt.Errorf("%v is not above zero", d)
	}
	*p.d = d
	return nil
}

// recorded wraps a flag's value to keep the value a failed Set was
// given, so that the message can name it with what is allowed.
type recorded struct {
	flag.Value
	name   string
	failed *flagFailure
}

// flagFailure is a value a flag refused.
type flagFailure struct {
	name, value string
}

// Set implements flag.Value.
func (r *recorded) Set(s string) error {
	err := r.Value.Set(s)
	if err != nil && r.failed.name == "" {
		*r.failed = flagFailure{name: r.name, value: s}
	}
	return err
}

// IsBoolFlag reports whether the flag is a switch, as the flag package
// asks.
func (r *recorded) IsBoolFlag() bool {
	b, ok := r.Value.(interface{ IsBoolFlag() bool })
	return ok && b.IsBoolFlag()
}

// commandTitle is how messages name a command: "couplet run", or "the
// notebook session" for the command without a name.
func commandTitle(cmd string) string {
	if cmd == "couplet" {
		return "the notebook session"
	}
	return "couplet " + cmd
}

// parseFlags parses the flags of command cmd, placed before, between or
// after the positional arguments, which it returns. It returns errHelp
// for -h or --help; any other error is a usage error whose message names
// the flag, the value given and what is allowed. takes are the flags the
// command takes, when fs holds more (those of couplet run); nil means all.
func parseFlags(cmd string, fs *flag.FlagSet, args []string, takes []string) ([]string, error) {
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	var failed flagFailure
	fs.VisitAll(func(f *flag.Flag) {
		if _, ok := f.Value.(*recorded); !ok {
			f.Value = &recorded{Value: f.Value, name: f.Name, failed: &failed}
		}
	})
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, errHelp
			}
			return nil, flagError(cmd, fs, takes, failed, err)
		}
		rest := fs.Args()
		if n := len(args) - len(rest); n > 0 && args[n-1] == "--" {
			// everything after -- is an argument
			return append(pos, rest...), nil
		}
		if len(rest) == 0 {
			return pos, nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// flagError turns an error of the flag package into a message that
// names the flag, the value given and what is allowed.
func flagError(cmd string, fs *flag.FlagSet, takes []string, failed flagFailure, err error) error {
	msg := err.Error()
	if failed.name != "" {
		want := "true or false, or --" + failed.name + " alone"
		if v, ok := flagValues[failed.name]; ok {
			want = v.want
		}
		return fmt.Errorf("--%s %q: want %s", failed.name, failed.value, want)
	}
	if name, ok := strings.CutPrefix(msg, "flag needs an argument: -"); ok {
		v := flagValues[name]
		return fmt.Errorf("--%s needs a value (--%s %s): %s", name, name, v.arg, v.want)
	}
	if name, ok := strings.CutPrefix(msg, "flag provided but not defined: -"); ok {
		if takes == nil {
			fs.VisitAll(func(f *flag.Flag) { takes = append(takes, f.Name) })
		}
		hint := ""
		if near := nearestFlag(name, takes); near != "" {
			hint = "; did you mean --" + near + "?"
		}
		help := "couplet help"
		if cmd != "couplet" && cmd != "run" && cmd != "imports" {
			help = "couplet " + cmd + " --help"
		}
		return fmt.Errorf("unknown flag --%s%s (%s takes %s; %s describes them)", name, hint, commandTitle(cmd), dashed(takes), help)
	}
	if arg, ok := strings.CutPrefix(msg, "bad flag syntax: "); ok {
		return fmt.Errorf("bad flag syntax %q: write a flag as --name or --name=value", arg)
	}
	return err
}

// nearestFlag returns the name of names that name stands for when it is
// spelt with other dashes, underscores or capitals (pickup, Pick_Up for
// pick-up), or is the start of that one name alone; otherwise "".
func nearestFlag(name string, names []string) string {
	plain := func(s string) string {
		return strings.ToLower(strings.NewReplacer("-", "", "_", "").Replace(s))
	}
	var starts []string
	for _, n := range names {
		if plain(n) == plain(name) {
			return n
		}
		if strings.HasPrefix(n, name) {
			starts = append(starts, n)
		}
	}
	if len(starts) == 1 {
		return starts[0]
	}
	return ""
}

// dashed lists flag names as they are typed: "--out, --seed".
func dashed(names []string) string {
	out := make([]string, len(names))
	for i, n := range names {
		out[i] = "--" + n
	}
	return strings.Join(out, ", ")
}

// onlyFlags refuses the flags set in fs that command cmd does not take:
// those of couplet run (or of the notebook session) only, which share the
// flag set.
func onlyFlags(cmd string, fs *flag.FlagSet, takes []string) error {
	var err error
	fs.Visit(func(f *flag.Flag) {
		if err != nil || slices.Contains(takes, f.Name) {
			return
		}
		of := "couplet run"
		if cmd != "couplet" && slices.Contains(notebookFlags, f.Name) {
			of += " and the notebook session"
		}
		err = fmt.Errorf("--%s is a flag of %s; %s takes %s", f.Name, of, commandTitle(cmd), dashed(takes))
	})
	return err
}

// printFlags lists the flags of fs, those of names only when names is not
// empty, with their placeholders, in two columns (as wide as every flag
// of fs needs), the descriptions wrapped to 80 columns.
func printFlags(w io.Writer, fs *flag.FlagSet, names ...string) {
	var rows [][2]string
	width := 0
	fs.VisitAll(func(f *flag.Flag) {
		left := "--" + f.Name
		if v, ok := flagValues[f.Name]; ok {
			left += " " + v.arg
		}
		width = max(width, len(left))
		if len(names) == 0 || slices.Contains(names, f.Name) {
			rows = append(rows, [2]string{left, f.Usage})
		}
	})
	for _, r := range rows {
		lines := wrap(r[1], 80-4-width-2)
		fmt.Fprintf(w, "  %-*s  %s\n", width, r[0], lines[0])
		for _, l := range lines[1:] {
			fmt.Fprintf(w, "  %-*s  %s\n", width, "", l)
		}
	}
}

// wrap cuts text into lines of at most n characters (a longer word
// stands alone).
func wrap(text string, n int) []string {
	var lines []string
	line := ""
	for _, word := range strings.Fields(text) {
		switch {
		case line == "":
			line = word
		case len([]rune(line))+1+len([]rune(word)) <= n:
			line += " " + word
		default:
			lines = append(lines, line)
			line = word
		}
	}
	return append(lines, line)
}
