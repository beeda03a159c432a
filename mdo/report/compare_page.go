package report

import (
	"bytes"
	"context"
	"fmt"
	"html/template"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"couplet/mdo/plot"
	"couplet/mdo/runfolder"
)

// ComparisonFile is the page WriteComparison writes.
const ComparisonFile = runfolder.ComparisonFile

// OccupiedError is an output folder of a comparison that holds the files
// of a run or of an earlier comparison.
type OccupiedError struct {
	Dir   string
	Files []string
	// Run is true when the files are a run's (a case store, a summary,
	// a report...), which a comparison never replaces.
	Run bool
}

// notComparisonFile reports whether a file Occupied found is not one a
// comparison writes (its page and its figures, in the folder itself).
func notComparisonFile(name string) bool {
	if strings.Contains(name, "/") {
		return true
	}
	lower := strings.ToLower(name)
	return name != ComparisonFile && !strings.HasSuffix(lower, ".svg") && !strings.HasSuffix(lower, ".png")
}

// Error names the folder, a few of its files and the way out.
func (e *OccupiedError) Error() string {
	files := e.Files
	more := ""
	if len(files) > 4 {
		files, more = files[:4], fmt.Sprintf(" and %d more", len(e.Files)-4)
	}
	if e.Run {
		return fmt.Sprintf("%s holds the files of a run (%s%s), which a comparison never replaces: choose another folder",
			e.Dir, strings.Join(files, ", "), more)
	}
	return fmt.Sprintf("%s holds an earlier comparison (%s%s): choose another folder, or have it replaced",
		e.Dir, strings.Join(files, ", "), more)
}

// WriteComparisonOptions complete WriteComparison.
type WriteComparisonOptions struct {
	// Replace clears the folder's files of a run or comparison first
	// (runfolder.Clear) instead of refusing it.
	Replace bool
	// Generated is the time stamped on the page; default now.
	Generated time.Time
}

// WriteComparison writes a comparison into the folder dir (created if
// need be): comparison.html, which shows the table and embeds the
// overlay figures, and each figure as NAME.svg and NAME.png. The folder
// is guarded as a run folder is: its lock is held while writing (a
// folder another process writes is a *runfolder.BusyError), a folder
// holding a run's files (a case store, a summary, a report, or a
// sub-folder holding them) is an *OccupiedError, and so is one holding
// an earlier comparison unless opt.Replace clears it; every file is written atomically, never
// through a symbolic link. A figure that cannot be drawn has the reason
// in its place. It returns the files written and sets c.Page.
func WriteComparison(ctx context.Context, dir string, c *Comparison, opt WriteComparisonOptions) ([]string, error) {
	if c == nil {
		return nil, fmt.Errorf("report: the comparison is nil")
	}
	lock, err := runfolder.TakeLock(dir)
	if err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	defer lock.Release()
	found, err := runfolder.Occupied(dir)
	if err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	if len(found) > 0 {
		if !opt.Replace || slices.ContainsFunc(found, notComparisonFile) {
			return nil, &OccupiedError{Dir: dir, Files: found, Run: slices.ContainsFunc(found, notComparisonFile)}
		}
		if err := runfolder.Clear(dir); err != nil {
			return nil, fmt.Errorf("report: %w", err)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("report: writing the comparison: %w", err)
	}
	figs := append([]*plot.Figure(nil), c.Figures...)
	files, err := saveFigures(dir, figs)
	if err != nil {
		return files, err
	}
	var b bytes.Buffer
	if err := c.writePage(&b, dir, figs, opt.Generated); err != nil {
		return files, err
	}
	p := filepath.Join(dir, ComparisonFile)
	if err := runfolder.WriteFile(p, b.Bytes()); err != nil {
		return files, fmt.Errorf("report: %w", err)
	}
	c.Page = p
	return append(files, p), nil
}

// WritePage writes the comparison's page (comparison.html, with the
// overlay figures inline) to w; links to the results' reports are
// relative to the folder dir the page will be in.
func (c *Comparison) WritePage(w io.Writer, dir string) error {
	var b bytes.Buffer
	if err := c.writePage(&b, dir, c.Figures, time.Time{}); err != nil {
		return err
	}
	if _, err := w.Write(b.Bytes()); err != nil {
		return fmt.Errorf("report: writing the comparison page: %w", err)
	}
	return nil
}

// comparisonView is what the comparison page shows.
type comparisonView struct {
	Title, Caution, Generated string
	// Span is the number of the table's columns.
	Span     int
	Heads    []comparisonHead
	Sections []CompareSection
	Figures  []figView
	Notes    []string
}

// comparisonHead is a result's column heading.
type comparisonHead struct{ Label, Report, Folder string }

// writePage renders the page with the given figures.
func (c *Comparison) writePage(w *bytes.Buffer, dir string, figs []*plot.Figure, gen time.Time) error {
	if gen.IsZero() {
		gen = time.Now()
	}
	v := comparisonView{Title: fmt.Sprintf("Comparison of %d results", len(c.Results)), Caution: Caution,
		Generated: gen.UTC().Format(time.RFC3339), Sections: c.Sections, Notes: c.Notes, Span: len(c.Results) + 2}
	for _, r := range c.Results {
		h := comparisonHead{Label: r.Label, Folder: r.Folder}
		if r.Folder != "" {
			rep := filepath.Join(r.Folder, ReportFile)
			if _, err := os.Stat(rep); err == nil {
				if rel, err := relativeLink(dir, rep); err == nil {
					h.Report = rel
				}
			}
		}
		v.Heads = append(v.Heads, h)
	}
	v.Figures = figureViews(figs, renderFigures(figs, nil))
	if err := comparisonPage.Execute(w, v); err != nil {
		return fmt.Errorf("report: the comparison page: %w", err)
	}
	return nil
}

// relativeLink returns the link from a page in dir to the file path.
func relativeLink(dir, path string) (string, error) {
	ad, err := filepath.Abs(dir)
	if err != nil {
		return "", err
	}
	ap, err := filepath.Abs(path)
	if err != nil {
		return "", err
	}
	rel, err := filepath.Rel(ad, ap)
	if err != nil {
		return "", err
	}
	return filepath.ToSlash(rel), nil
}

var comparisonPage = template.Must(template.New("comparison").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8" />
<meta name="viewport" content="width=device-width, initial-scale=1" />
<title>{{.Title}}</title>
<style>` + style + `td.absent { color: #888; font-style: italic; }
tr.section th { background: #dfe6f2; text-align: left; }
td.state-flagged { color: #8a5a00; font-weight: bold; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p class="caution" id="caution"><strong>Caution.</strong> {{.Caution}}</p>
<p>Each column is one result; the values are those of its summary.json (its best point, or the range over its Pareto front). A name a result does not have is shown as <em>absent</em>. The margin is how far the value lies inside its bound, in the constraint's unit (negative when violated); "active" marks a satisfied constraint within 0.1 % of its bound. Checklist flags are rules of thumb, not constraints. Generated {{.Generated}}.</p>
<table id="comparison">
<tr><th></th><th>unit</th>{{range .Heads}}<th>{{if .Report}}<a href="{{.Report}}">{{.Label}}</a>{{else}}{{.Label}}{{end}}</th>{{end}}</tr>
{{range .Sections}}<tr class="section"><th colspan="{{$.Span}}">{{.Title}}</th></tr>
{{range .Rows}}<tr><td>{{.Name}}</td><td>{{.Unit}}</td>{{range .Cells}}<td class="num{{if .Absent}} absent{{end}}{{if .State}} state-{{.State}}{{end}}">{{.Text}}</td>{{end}}</tr>
{{end}}{{end}}</table>

{{if .Figures}}
<h2 id="plots">Overlays</h2>
` + figuresAndNotes + `
<p class="caution">{{.Caution}}</p>
</body>
</html>
`))
