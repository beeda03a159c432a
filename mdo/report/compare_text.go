package report

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
)

// String returns the comparison as text: a heading line, then each
// section's title and its rows, one column per result, the notes and
// the page written (Page).
func (c *Comparison) String() string {
	var b strings.Builder
	_ = c.WriteText(&b)
	return b.String()
}

// WriteText writes the comparison as text (String).
func (c *Comparison) WriteText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "comparison of %d results (conceptual estimates, not for certification, flight or airworthiness decisions)\n", len(c.Results))
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprint(tw, "\tunit")
	for _, r := range c.Results {
		fmt.Fprintf(tw, "\t%s", r.Label)
	}
	fmt.Fprintln(tw)
	for _, s := range c.Sections {
		// empty cells keep the section's title in the table's columns
		fmt.Fprintf(tw, "%s%s\n", s.Title, strings.Repeat("\t", len(c.Results)+1))
		for _, row := range s.Rows {
			fmt.Fprintf(tw, "  %s\t%s", row.Name, orDash(row.Unit))
			for _, cell := range row.Cells {
				fmt.Fprintf(tw, "\t%s", cell.Text)
			}
			fmt.Fprintln(tw)
		}
	}
	if err := tw.Flush(); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	for _, n := range c.Notes {
		fmt.Fprintf(&b, "note: %s\n", n)
	}
	if c.Page != "" {
		fmt.Fprintf(&b, "wrote %s\n", c.Page)
	}
	// tabwriter pads the last column too: no trailing blanks
	lines := strings.Split(b.String(), "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " ")
	}
	if _, err := io.WriteString(w, strings.Join(lines, "\n")); err != nil {
		return fmt.Errorf("report: writing the comparison: %w", err)
	}
	return nil
}
