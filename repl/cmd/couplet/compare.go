package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"

	"couplet/disciplines/drawings"
	"couplet/mdo/report"
	"couplet/mdo/runfolder"
)

// compareUsage is the usage line of `couplet compare`.
const compareUsage = "couplet compare FOLDER... [--out DIR [--replace]]"

// compareCommand is `couplet compare FOLDER... [--out DIR [--replace]]`:
// it compares two or more result folders (or one script's folder,
// standing for all its results) side by side on the terminal and, with
// --out, writes the comparison page into DIR. It returns the exit
// status: 0; 1 when the page cannot be written; 2 for a usage error: a
// bad flag, a folder that is not a result, fewer than two results, an
// output folder that holds a run or a comparison (without --replace) or
// that another process writes.
func compareCommand(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("compare", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "write the comparison page (comparison.html and the overlay figures) into this folder")
	replace := fs.Bool("replace", false, "clear the files of an earlier run or comparison in --out DIR first")
	fs.Usage = func() {} // a bad flag is named, then the usage line

	// flags may come before, between or after the folders
	var folders []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				usage(stdout) // as every command's --help
				return 0
			}
			fmt.Fprintf(stderr, "usage: %s\n", compareUsage)
			return 2
		}
		if fs.NArg() == 0 {
			break
		}
		folders = append(folders, fs.Arg(0))
		args = fs.Args()[1:]
	}
	if *replace && *out == "" {
		fmt.Fprintln(stderr, "couplet compare: --replace clears the --out folder: give --out DIR too")
		return 2
	}
	if len(folders) == 0 {
		fmt.Fprintf(stderr, "couplet compare: no folder given; usage: %s\n", compareUsage)
		return 2
	}
	results, err := report.ReadCompared(folders...)
	if err != nil {
		fmt.Fprintf(stderr, "couplet compare: %v\n", err)
		return 2
	}
	if len(results) < 2 {
		fmt.Fprintf(stderr, "couplet compare: %s holds %d result; give two or more result folders, or a script's folder with two or more results\n", folders[0], len(results))
		return 2
	}
	c, err := report.Compare(ctx, results, drawings.CompareOptions())
	if err != nil {
		fmt.Fprintf(stderr, "couplet compare: %v\n", err)
		return 1
	}
	if *out != "" {
		if code := writeComparison(ctx, *out, c, *replace, stderr); code != 0 {
			return code
		}
	}
	if err := c.WriteText(stdout); err != nil {
		fmt.Fprintf(stderr, "couplet compare: %v\n", err)
		return 1
	}
	return 0
}

// writeComparison writes the comparison page into dir and returns the
// exit status: 0, 2 for a folder that cannot be used, 1 for a failure to
// write.
func writeComparison(ctx context.Context, dir string, c *report.Comparison, replace bool, stderr io.Writer) int {
	if _, err := report.WriteComparison(ctx, dir, c, report.WriteComparisonOptions{Replace: replace}); err != nil {
		var occ *report.OccupiedError
		if errors.As(err, &occ) {
			hint := ""
			if !occ.Run {
				hint = " (--replace clears it)"
			}
			fmt.Fprintf(stderr, "couplet compare: %v%s\n", err, hint)
			return 2
		}
		fmt.Fprintf(stderr, "couplet compare: %v\n", err)
		var busy *runfolder.BusyError
		if errors.As(err, &busy) {
			return 2
		}
		return 1
	}
	return 0
}
