package cell

import (
	"fmt"
	"path/filepath"

	"couplet/disciplines/drawings"
	"couplet/mdo"
	"couplet/mdo/report"
)

// Compare compares two or more results side by side, as `couplet
// compare` does: each item is a result of this session (*mdo.Result) or
// the name of a result folder already written in the output folder
// (such as "sellar-2", after @report), or "." for every result the
// output folder's index lists. It returns the comparison, which shows
// as its table (design variables, objectives, constraints with their
// margins, checklist flags, evaluations, stop reasons). When name is not
// empty it also writes the comparison's page, comparison.html, with the
// overlay figures, into the output folder's sub-folder name (a plain
// name). A comparison of the same name written earlier is replaced (so
// that running the cell again, a replay or a pick-up write it afresh);
// a sub-folder holding a run's files is refused.
func (e *Env) Compare(name string, items ...any) (*report.Comparison, error) {
	if name != "" {
		if err := checkName(name); err != nil {
			return nil, fmt.Errorf("cell: Compare: %w", err)
		}
		if e.host.OutDir == "" {
			return nil, fmt.Errorf("cell: Compare(%q, ...): this session has no output folder to write the comparison into (start it with --out DIR, or pass \"\" as the name for the table alone)", name)
		}
	}
	var results []report.Compared
	for i, it := range items {
		switch v := it.(type) {
		case *mdo.Result:
			if v == nil {
				return nil, fmt.Errorf("cell: Compare: item %d is a nil result", i+1)
			}
			cs, err := report.ComparedResults(v)
			if err != nil {
				return nil, fmt.Errorf("cell: Compare: %w", err)
			}
			results = append(results, cs...)
		case string:
			if e.host.OutDir == "" {
				return nil, fmt.Errorf("cell: Compare: item %d, folder %q: this session has no output folder", i+1, v)
			}
			if !filepath.IsLocal(v) && v != "." {
				return nil, fmt.Errorf("cell: Compare: item %d, folder %q: want the name of a folder inside the output folder", i+1, v)
			}
			cs, err := report.ReadCompared(filepath.Join(e.host.OutDir, v))
			if err != nil {
				return nil, fmt.Errorf("cell: Compare: item %d: %w", i+1, err)
			}
			results = append(results, cs...)
		default:
			return nil, fmt.Errorf("cell: Compare: item %d is a %T; want a *mdo.Result or the name of a result folder", i+1, it)
		}
	}
	report.NumberLabels(results)
	c, err := report.Compare(e.Context(), results, drawings.CompareOptions())
	if err != nil {
		return nil, fmt.Errorf("cell: Compare: %w", err)
	}
	if name != "" {
		if _, err := report.WriteComparison(e.Context(), filepath.Join(e.host.OutDir, name), c, report.WriteComparisonOptions{Replace: true}); err != nil {
			return nil, fmt.Errorf("cell: Compare: %w", err)
		}
	}
	return c, nil
}
