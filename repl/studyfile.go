package repl

import (
	"fmt"
	"os"
	"regexp"
	"strconv"
	"strings"
)

// A study file is plain text: a header line naming the format and the
// tool version, then Go cells, each opened by a marker line:
//
//	//~ couplet-study 1 (couplet 0.1.0)
//
//	//~ cell 1
//	import "couplet/mdo"
//	sys, err := mdo.NewSystem(mdo.Sellar()...)
//
//	//~ cell 2
//	sys
//
// Both are Go line comments, so the file reads as Go and diffs cleanly.
// The number after "cell" is for the reader and ignored when loading. A
// file with no marker is a single cell; blank lines around cells are
// dropped.
const (
	// HeaderPrefix opens the header line of a study file.
	HeaderPrefix = "//~ couplet-study"
	// CellMarker opens the marker line of each cell.
	CellMarker = "//~ cell"
	// FormatVersion is the version of the study file format.
	FormatVersion = 1
)

// StudyFile is a parsed study file.
type StudyFile struct {
	// Header is the header line ("" when the file has none).
	Header string
	Cells  []StudyCell
}

// StudyCell is one cell of a study file.
type StudyCell struct {
	Source string
	// Line is the line of the file on which the cell's source starts.
	Line int
}

// Sources returns the cells' source texts.
func (f *StudyFile) Sources() []string {
	out := make([]string, len(f.Cells))
	for i, c := range f.Cells {
		out[i] = c.Source
	}
	return out
}

// ParseStudy parses the text of a study file.
func ParseStudy(text string) (*StudyFile, error) {
	// an editor's byte-order mark before the first line is not text
	text = strings.TrimPrefix(text, "\uFEFF")
	text = strings.ReplaceAll(text, "\r\n", "\n")
	lines := strings.Split(text, "\n")
	f := &StudyFile{}
	startLine := 1
	if len(lines) > 0 && strings.HasPrefix(lines[0], HeaderPrefix) {
		f.Header = lines[0]
		if err := checkHeader(lines[0]); err != nil {
			return nil, err
		}
		lines = lines[1:]
		startLine = 2
	}
	var cur []string
	curStart := startLine
	flush := func() {
		// Drop blank lines around the cell.
		lo, hi := 0, len(cur)
		for lo < hi && strings.TrimSpace(cur[lo]) == "" {
			lo++
		}
		for hi > lo && strings.TrimSpace(cur[hi-1]) == "" {
			hi--
		}
		if lo < hi {
			f.Cells = append(f.Cells, StudyCell{Source: strings.Join(cur[lo:hi], "\n"), Line: curStart + lo})
		}
		cur = nil
	}
	for i, l := range lines {
		if isMarker(l) {
			flush()
			curStart = startLine + i + 1
			continue
		}
		cur = append(cur, l)
	}
	flush()
	if len(f.Cells) == 0 {
		return nil, fmt.Errorf("repl: the study file has no code")
	}
	return f, nil
}

// headerRE is the form of a header line: the prefix, the format number
// and, optionally, the version of the tool that wrote it.
var headerRE = regexp.MustCompile(`^` + regexp.QuoteMeta(HeaderPrefix) + ` ([1-9][0-9]{0,8})( \(couplet [^()]+\))?[ \t]*$`)

// checkHeader refuses a header line that is garbled or of a format this
// version cannot read.
func checkHeader(line string) error {
	m := headerRE.FindStringSubmatch(line)
	if m == nil {
		return fmt.Errorf("repl: the header line %q is garbled: want %q (the format number, then optionally the tool version in parentheses)", line, Header())
	}
	v, _ := strconv.Atoi(m[1])
	if v > FormatVersion {
		return fmt.Errorf("repl: the study file is in format %d, written by a newer couplet; this is couplet %s, which reads format %d", v, Version, FormatVersion)
	}
	return nil
}

// isMarker reports a cell marker line.
func isMarker(l string) bool {
	l = strings.TrimRight(l, " \t")
	if !strings.HasPrefix(l, CellMarker) {
		return false
	}
	rest := l[len(CellMarker):]
	return rest == "" || rest[0] == ' ' || rest[0] == '\t'
}

// ReadStudy reads and parses a study file.
func ReadStudy(path string) (*StudyFile, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("repl: reading study file: %w", err)
	}
	f, err := ParseStudy(string(b))
	if err != nil {
		return nil, fmt.Errorf("repl: %s: %w", path, err)
	}
	return f, nil
}

// Header returns the header line written by this version of the tool.
func Header() string {
	return fmt.Sprintf("%s %d (couplet %s)", HeaderPrefix, FormatVersion, Version)
}

// FormatStudy returns the text of a study file holding the cells.
func FormatStudy(cells []string) string {
	var b strings.Builder
	b.WriteString(Header())
	b.WriteString("\n")
	for i, c := range cells {
		fmt.Fprintf(&b, "\n%s %d\n%s\n", CellMarker, i+1, strings.Trim(c, "\n"))
	}
	return b.String()
}

// WriteStudy writes the cells as a study file.
func WriteStudy(path string, cells []string) error {
	if err := os.WriteFile(path, []byte(FormatStudy(cells)), 0o644); err != nil {
		return fmt.Errorf("repl: writing study file: %w", err)
	}
	return nil
}

// firstChange describes where the study file text now differs from the
// text recorded before ("" when they are the same): the first cell that
// differs, one added or dropped, or the text outside the cells (header,
// markers, blank lines, line endings).
func firstChange(recorded, now string) string {
	if recorded == now {
		return ""
	}
	a, errA := ParseStudy(recorded)
	b, errB := ParseStudy(now)
	if errA != nil || errB != nil {
		return "the file differs from the recorded script"
	}
	for i := 0; i < len(a.Cells) && i < len(b.Cells); i++ {
		if a.Cells[i].Source != b.Cells[i].Source {
			return fmt.Sprintf("cell %d (from line %d) differs from the recorded script", i+1, b.Cells[i].Line)
		}
	}
	switch {
	case len(b.Cells) > len(a.Cells):
		return fmt.Sprintf("cell %d (from line %d) was added after the recorded script's %d cells", len(a.Cells)+1, b.Cells[len(a.Cells)].Line, len(a.Cells))
	case len(b.Cells) < len(a.Cells):
		return fmt.Sprintf("the file has %d cells, the recorded script %d: cell %d was removed", len(b.Cells), len(a.Cells), len(b.Cells)+1)
	case a.Header != b.Header:
		return fmt.Sprintf("the header line %q differs from the recorded %q", b.Header, a.Header)
	}
	return "the text between the cells (markers, blank lines or line endings) differs from the recorded script"
}
