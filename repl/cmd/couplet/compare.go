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
	out := fs.String("out", "", "write the comparison page (comparison.html and the overlaid figures) into this folder, created if need be; it must not hold a run")
	replace := fs.Bool("replace", false, "clear the files of an earlier comparison in --out DIR first")
	// flags may come before, between or after the folders
	folders, err := parseFlags("compare", fs, args, nil)
	if errors.Is(err, errHelp) {
		compareHelp(stdout, fs)
		return 0
	}
	if err == nil {
		err = outFolder(*out)
	}
	if err != nil {
		return usageFailed(stderr, "compare", err)
	}
	if *replace && *out == "" {
		fmt.Fprintln(stderr, "couplet compare: --replace clears the --out folder: give --out DIR too")
		return 2
	}
	if len(folders) == 0 {
		fmt.Fprintf(stderr, "couplet compare: no folder given: %s\n", compareUsage)
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

// compareHelp prints the usage of `couplet compare`.
func compareHelp(w io.Writer, fs *flag.FlagSet) {
	fmt.Fprintf(w, `usage: %s

Compares two or more result folders (those couplet run or @report wrote,
each with a summary.json) side by side on the terminal; a script's folder
stands for every result it holds. A folder that holds no result is refused.
With --out DIR the comparison page, with the optimisation histories, Pareto
fronts and planforms overlaid, is written into DIR too.

flags:
`, compareUsage)
	printFlags(w, fs)
}
