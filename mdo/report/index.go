package report

import (
	"bytes"
	"encoding/json"
	"fmt"
	"html/template"
	"os"
	"path/filepath"

	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// IndexEntry is one result of a script's folder: the sub-folder WriteRun
// wrote it into and its summary.
type IndexEntry struct {
	Folder  string
	Summary store.Summary
}

// IndexSummary is the summary.json of a script's folder: the summary of
// its principal result (the last one the script handed over), so that
// the folder's study, seed, evaluations and best stay where a single
// result puts them, with the list of every result's sub-folder.
type IndexSummary struct {
	store.Summary
	// Principal is the sub-folder of the principal result.
	Principal string        `json:"principal"`
	Results   []IndexResult `json:"results"`
}

// IndexResult is one line of a script's folder's summary.
type IndexResult struct {
	Folder      string `json:"folder"`
	Study       string `json:"study"`
	Optimizer   string `json:"optimizer"`
	Evaluations int    `json:"evaluations"`
	Stop        string `json:"stop"`
	// Objective and Feasible are the best point's (one objective);
	// FrontPoints counts the points of a front (several).
	Objective   *store.Number `json:"objective,omitempty"`
	Feasible    *bool         `json:"feasible,omitempty"`
	FrontPoints int           `json:"front_points,omitempty"`
	// Report is the result's report, relative to the folder.
	Report string `json:"report"`
}

// WriteIndex writes the summary.json and index.html of a script's
// folder dir, whose results are in the sub-folders the entries name (each
// written by WriteRun); the principal result is the last entry. The
// principal result's case store and report are also linked into dir as
// results.db and report.html (hard links, or copies where the file system
// has none), so that dir holds the principal result's summary, case store
// and report under the names a single result gives them. It returns the
// files written.
func WriteIndex(dir string, entries []IndexEntry) ([]string, error) {
	if len(entries) == 0 {
		return nil, fmt.Errorf("report: an index of no results in %s", dir)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("report: output folder: %w", err)
	}
	last := entries[len(entries)-1]
	sum := IndexSummary{Summary: last.Summary, Principal: last.Folder}
	for _, e := range entries {
		line := IndexResult{Folder: e.Folder, Study: e.Summary.Study, Optimizer: e.Summary.Optimizer,
			Evaluations: e.Summary.Evaluations, Stop: e.Summary.Stop, FrontPoints: len(e.Summary.Front),
			Report: e.Folder + "/" + ReportFile}
		if b := e.Summary.Best; b != nil {
			obj, feas := b.Objective, b.Feasible
			line.Objective, line.Feasible = &obj, &feas
		}
		sum.Results = append(sum.Results, line)
	}
	b, err := json.MarshalIndent(sum, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("report: encoding the index summary: %w", err)
	}
	p := filepath.Join(dir, SummaryFile)
	if err := runfolder.WriteFile(p, append(b, '\n')); err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	var page bytes.Buffer
	if err := indexPage.Execute(&page, indexView{Caution: Caution, Results: sum.Results, Principal: last.Folder}); err != nil {
		return []string{p}, fmt.Errorf("report: the index page: %w", err)
	}
	q := filepath.Join(dir, runfolder.IndexFile)
	if err := runfolder.WriteFile(q, page.Bytes()); err != nil {
		return []string{p}, fmt.Errorf("report: %w", err)
	}
	written := []string{p, q}
	for _, name := range []string{StoreFile, ReportFile} {
		src := filepath.Join(dir, last.Folder, name)
		if _, err := os.Lstat(src); err != nil {
			continue // the principal result has none (a report left out)
		}
		dst := filepath.Join(dir, name)
		if err := runfolder.LinkFile(src, dst); err != nil {
			return written, fmt.Errorf("report: the principal result's %s: %w", name, err)
		}
		written = append(written, dst)
	}
	return written, nil
}

// ReadIndex reads the summary.json of a folder: a script's folder lists
// its results (Results not empty); a single result's folder lists none.
func ReadIndex(dir string) (IndexSummary, error) {
	var s IndexSummary
	b, err := os.ReadFile(filepath.Join(dir, SummaryFile))
	if err != nil {
		return s, fmt.Errorf("report: %w", err)
	}
	if err := json.Unmarshal(b, &s); err != nil {
		return s, fmt.Errorf("report: reading %s: %w", filepath.Join(dir, SummaryFile), err)
	}
	return s, nil
}

// indexView is what the index page shows.
type indexView struct {
	Caution, Principal string
	Results            []IndexResult
}

var indexPage = template.Must(template.New("index").Funcs(template.FuncMap{
	"num": func(n *store.Number) string {
		if n == nil {
			return ""
		}
		return fmt.Sprintf("%.7g", float64(*n))
	},
	"deref": func(b *bool) bool { return *b },
}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Results of the script</title>
<style>` + style + `</style>
</head>
<body>
<h1>Results of the script</h1>
<p class="caution" id="caution"><strong>Caution.</strong> {{.Caution}}</p>
<p>Each result the script handed over has a folder of its own, with its case store (results.db), summary, evaluations, plots and report. The folder's summary.json is that of the principal result, {{.Principal}}, with this list; its results.db and report.html are the principal result's too.</p>
<table id="results">
<tr><th>folder</th><th>study</th><th>optimiser</th><th>evaluations</th><th>stop</th><th>best objective</th><th>best point</th><th>report</th></tr>
{{range .Results}}<tr><td>{{.Folder}}</td><td>{{.Study}}</td><td>{{.Optimizer}}</td><td class="num">{{.Evaluations}}</td><td>{{.Stop}}</td><td class="num">{{if .Objective}}{{num .Objective}}{{else if .FrontPoints}}front of {{.FrontPoints}}{{end}}</td><td>{{if .Feasible}}{{if deref .Feasible}}<span class="verdict-feasible">feasible</span>{{else}}<span class="verdict-infeasible">INFEASIBLE</span>{{end}}{{end}}</td><td><a href="{{.Report}}">{{.Report}}</a></td></tr>
{{end}}</table>
</body>
</html>
`))
