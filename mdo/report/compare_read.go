package report

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"

	"couplet/mdo"
	"couplet/mdo/store"
)

// Compared is one result of a comparison: its label (a column of the
// table), its summary, whose values the table shows, and the result
// itself when it is known, from which the plots and the checklist flags
// are drawn and the units and constraint relations taken.
type Compared struct {
	// Label heads the result's column: the result folder's name, or the
	// study's name for a result in memory.
	Label string
	// Folder is the result folder it was read from ("" for a result in
	// memory).
	Folder string
	// Summary is the result's summary.json (or the summary of the result
	// in memory, store.NewSummary).
	Summary store.Summary
	// Result is the result rebuilt from the folder's results.db, or the
	// result in memory; nil when the folder has no readable case store
	// (then Missing says why).
	Result  *mdo.Result
	Missing string
}

// NotAResultError is a folder given to ReadCompared that holds no result.
type NotAResultError struct {
	// Path is the folder as given.
	Path string
	// Reason says what is missing.
	Reason string
}

// Error names the folder and the reason.
func (e *NotAResultError) Error() string {
	return fmt.Sprintf("%s is not a result folder: %s", e.Path, e.Reason)
}

// ReadCompared reads the results of the given folders for Compare, in
// order. Each folder is either a result folder written by WriteRun
// (summary.json, and results.db beside it for the plots) or a script's
// folder written by WriteIndex, which stands for every result it lists,
// in its order. A folder that is neither is a *NotAResultError naming
// it. A result folder without a readable results.db is still compared:
// its plots are left out, with the reason in Missing.
func ReadCompared(dirs ...string) ([]Compared, error) {
	var out []Compared
	for _, d := range dirs {
		info, err := os.Stat(d)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			return nil, &NotAResultError{Path: d, Reason: "it does not exist"}
		case err != nil:
			return nil, fmt.Errorf("report: %w", err)
		case !info.IsDir():
			return nil, &NotAResultError{Path: d, Reason: "it is a file, not a folder"}
		}
		idx, err := ReadIndex(d)
		if errors.Is(err, fs.ErrNotExist) {
			return nil, &NotAResultError{Path: d, Reason: "it holds no " + SummaryFile + " (couplet run writes one into each result folder and into the script's folder)"}
		}
		if err != nil {
			return nil, &NotAResultError{Path: d, Reason: err.Error()}
		}
		if len(idx.Results) == 0 {
			c, err := readResult(d, d, idx.Summary)
			if err != nil {
				return nil, err
			}
			out = append(out, c)
			continue
		}
		for _, line := range idx.Results {
			sub := filepath.Join(d, filepath.FromSlash(line.Folder))
			if line.Folder == "" || !filepath.IsLocal(filepath.FromSlash(line.Folder)) {
				return nil, &NotAResultError{Path: d, Reason: fmt.Sprintf("its %s lists the result folder %q, which is not a folder inside it", SummaryFile, line.Folder)}
			}
			s, err := store.ReadSummary(filepath.Join(sub, SummaryFile))
			if err != nil {
				return nil, &NotAResultError{Path: sub, Reason: fmt.Sprintf("listed by %s, but %v", filepath.Join(d, SummaryFile), err)}
			}
			c, err := readResult(sub, sub, s)
			if err != nil {
				return nil, err
			}
			out = append(out, c)
		}
	}
	labelFolders(out)
	return out, nil
}

// readResult checks a result folder's summary and reads its case store.
func readResult(path, dir string, s store.Summary) (Compared, error) {
	if s.Study == "" && s.Best == nil && len(s.Front) == 0 {
		return Compared{}, &NotAResultError{Path: path, Reason: "its " + SummaryFile + " is not the summary of a result"}
	}
	if s.Best == nil && len(s.Front) == 0 {
		reason := "its " + SummaryFile + " records no best point nor front"
		if s.Note != "" {
			reason += " (" + s.Note + ")"
		}
		return Compared{}, &NotAResultError{Path: path, Reason: reason}
	}
	c := Compared{Folder: dir, Summary: s}
	p := filepath.Join(dir, StoreFile)
	if _, err := os.Stat(p); err != nil {
		c.Missing = "no " + StoreFile + " in " + dir
		return c, nil
	}
	st, err := store.Open(p)
	if err != nil {
		c.Missing = err.Error()
		return c, nil
	}
	defer st.Close()
	r, err := st.Result()
	if err != nil {
		c.Missing = err.Error()
		return c, nil
	}
	c.Result = r
	return c, nil
}

// labelFolders labels each folder's result by the folder's name, or by
// its path where two names are the same; a folder given twice gets " (2)"
// the second time.
func labelFolders(cs []Compared) {
	seen := map[string]int{}
	for _, c := range cs {
		seen[filepath.Base(c.Folder)]++
	}
	for i := range cs {
		if b := filepath.Base(cs[i].Folder); seen[b] == 1 {
			cs[i].Label = b
		} else {
			cs[i].Label = filepath.Clean(cs[i].Folder)
		}
	}
	NumberLabels(cs)
}

// NumberLabels numbers the labels that repeat, in order: the second
// "sellar" becomes "sellar (2)", the third "sellar (3)".
func NumberLabels(cs []Compared) {
	seen := map[string]int{}
	for i := range cs {
		l := cs[i].Label
		seen[l]++
		if n := seen[l]; n > 1 {
			cs[i].Label = l + " (" + strconv.Itoa(n) + ")"
		}
	}
}

// ComparedResults makes results in memory ready for Compare: each is
// labelled by its study's name (a second result of the same name gets
// " (2)", and so on) and summarised as its summary.json would be.
func ComparedResults(results ...*mdo.Result) ([]Compared, error) {
	out := make([]Compared, 0, len(results))
	for i, r := range results {
		if r == nil {
			return nil, fmt.Errorf("report: result %d of %d to compare is nil", i+1, len(results))
		}
		out = append(out, Compared{Label: r.Study, Summary: store.NewSummary(r, store.SummaryOptions{}), Result: r})
	}
	NumberLabels(out)
	return out, nil
}
