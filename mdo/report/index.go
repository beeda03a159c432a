package report

import (
	"bytes"
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"html/template"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// IndexEntry is one result of a script's folder: the sub-folder WriteRun
// wrote it into and its summary.
type IndexEntry struct {
	Folder  string
	Summary Record
}

// IndexSummary is the summary.json of a script's folder: the summary of
// its principal result (the last one the script handed over), so that
// the folder's study, seed, evaluations and best stay where a single
// result puts them, with the list of every result's sub-folder.
type IndexSummary struct {
	Record
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
// folder dir, listing every result the folder holds: the entries, just
// written into the sub-folders they name (each by WriteRun), and the
// results written there before, by an earlier report of this session, by
// an interpreter of it that died, or by the run that a pick-up continues
// (see Listed for what counts as a result and the order). No result the
// folder holds drops out of its index, and a result written again into
// its folder replaces its line. The principal result is the last entry:
// summary.json is its summary, with the list, and its case store and
// report are also linked into dir as results.db and report.html (hard
// links, or copies where the file system has none), so that dir holds
// the principal result's summary, case store and report under the names
// a single result gives them; where the principal result has no case
// store (or no report), dir has none either: an earlier principal's is
// removed. The linked or copied results.db is a complete database on
// its own once the result's run has ended (see store.LinkFile), before
// its store is closed. Nothing is read or written through a symbolic
// link. It returns the files written.
func WriteIndex(dir string, entries []IndexEntry) ([]string, error) {
	if len(entries) == 0 {
		return nil, fmt.Errorf("report: an index of no results in %s", dir)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("report: output folder: %w", err)
	}
	listed, err := Listed(dir, entries)
	if err != nil {
		return nil, err
	}
	last := entries[len(entries)-1]
	sum := IndexSummary{Record: last.Summary, Principal: last.Folder}
	for _, e := range listed {
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
		dst := filepath.Join(dir, name)
		if _, err := os.Lstat(src); err != nil {
			// the principal result has none (no store recorded its run, a
			// report left out): an earlier principal's would stand beside
			// this one's summary
			for _, old := range []string{dst, dst + "-wal", dst + "-shm"} {
				if err := os.Remove(old); err != nil && !errors.Is(err, fs.ErrNotExist) {
					return written, fmt.Errorf("report: removing the earlier principal result's %s: %w", name, err)
				}
			}
			continue
		}
		link := runfolder.LinkFile
		if name == StoreFile {
			link = linkStore
		}
		if err := link(src, dst); err != nil {
			return written, fmt.Errorf("report: the principal result's %s: %w", name, err)
		}
		written = append(written, dst)
	}
	return written, nil
}

// linkStore links the principal result's case store into the script's
// folder: a hard link, or a copy SQLite makes, complete even while the
// store is open (store.LinkFile). The tests make it store.CopyFile, as
// on a file system without hard links.
var linkStore = store.LinkFile

// Listed returns the results a script's folder dir lists once entries
// are written into it, in the order of its index:
//
//   - first the results its summary.json listed already, in that order
//     (a line whose folder no longer holds a result is dropped; one whose
//     folder an entry names takes the entry's summary, in its place);
//   - then the results the folder holds that its summary.json did not
//     list (written by a process that died before it wrote the index), by
//     the start time in their summary, then by folder name;
//   - then the entries not listed yet, in the order given.
//
// A result is a sub-folder of dir (itself, not a symbolic link) whose
// summary.json (a regular file, not a link) is the summary of a result:
// it names its study and why the run stopped. A comparison's folder is
// not one. A summary.json of dir that is a symbolic link, or not an
// index, lists nothing; nothing is read through a link.
func Listed(dir string, entries []IndexEntry) ([]IndexEntry, error) {
	given := map[string]IndexEntry{}
	for _, e := range entries {
		given[e.Folder] = e
	}
	var out []IndexEntry
	placed := map[string]bool{}
	place := func(e IndexEntry) {
		out = append(out, e)
		placed[e.Folder] = true
	}
	if b, err := runfolder.ReadFile(filepath.Join(dir, SummaryFile)); err == nil {
		var old IndexSummary
		if json.Unmarshal(b, &old) == nil {
			for _, line := range old.Results {
				if placed[line.Folder] {
					continue
				}
				if e, ok := given[line.Folder]; ok {
					place(e)
					continue
				}
				if s, ok := resultIn(dir, line.Folder); ok {
					place(IndexEntry{Folder: line.Folder, Summary: s})
				}
			}
		}
	}
	subs, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("report: reading the output folder: %w", err)
	}
	var found []IndexEntry
	for _, d := range subs {
		name := d.Name()
		if !d.IsDir() || placed[name] {
			continue
		}
		if _, ok := given[name]; ok {
			continue
		}
		if s, ok := resultIn(dir, name); ok {
			found = append(found, IndexEntry{Folder: name, Summary: s})
		}
	}
	slices.SortStableFunc(found, func(a, b IndexEntry) int {
		return cmp.Or(cmp.Compare(a.Summary.Timestamps.Started, b.Summary.Timestamps.Started), cmp.Compare(a.Folder, b.Folder))
	})
	for _, e := range found {
		place(e)
	}
	for _, e := range entries {
		if !placed[e.Folder] {
			place(given[e.Folder])
		}
	}
	return out, nil
}

// resultIn reads the summary of the result in dir's sub-folder name: ok
// is false when name is not a plain folder name, the folder is a
// symbolic link or a comparison's, or it holds no summary of a result
// (a summary.json that is a link does not count).
func resultIn(dir, name string) (Record, bool) {
	var s Record
	if name == "" || name != filepath.Base(name) || strings.HasPrefix(name, ".") {
		return s, false
	}
	sub := filepath.Join(dir, name)
	if fi, err := os.Lstat(sub); err != nil || !fi.IsDir() {
		return s, false
	}
	if _, err := os.Lstat(filepath.Join(sub, runfolder.ComparisonFile)); err == nil {
		return s, false
	}
	b, err := runfolder.ReadFile(filepath.Join(sub, SummaryFile))
	if err != nil || json.Unmarshal(b, &s) != nil {
		return s, false
	}
	return s, s.Study != "" && s.Stop != ""
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
<p>Each result written into this folder has a sub-folder of its own, with its case store (results.db), summary, evaluations, plots and report. The list holds every result the folder holds, in the order they were first listed here (results new to the list follow in the order they were written); a result written again into its sub-folder keeps its line. The folder's summary.json is that of the principal result, {{.Principal}} (the last written), with this list; its results.db and report.html are the principal result's too.</p>
<table id="results">
<tr><th>folder</th><th>study</th><th>optimiser</th><th>evaluations</th><th>stop</th><th>best objective</th><th>best point</th><th>report</th></tr>
{{range .Results}}<tr{{if eq .Folder $.Principal}} class="principal"{{end}}><td>{{.Folder}}{{if eq .Folder $.Principal}} (principal){{end}}</td><td>{{.Study}}</td><td>{{.Optimizer}}</td><td class="num">{{.Evaluations}}</td><td>{{.Stop}}</td><td class="num">{{if .Objective}}{{num .Objective}}{{else if .FrontPoints}}front of {{.FrontPoints}}{{end}}</td><td>{{if .Feasible}}{{if deref .Feasible}}<span class="verdict-feasible">feasible</span>{{else}}<span class="verdict-infeasible">INFEASIBLE</span>{{end}}{{end}}</td><td><a href="{{.Report}}">{{.Report}}</a></td></tr>
{{end}}</table>
</body>
</html>
`))
