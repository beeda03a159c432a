package runfolder

import (
	"regexp"
	"strings"
)

// The names of a run folder's files that the tool keeps for itself.
const (
	// LockFile holds the lock of the run writing into the folder and
	// the process number of its holder (TakeLock).
	LockFile = ".couplet-lock"
	// ManifestFile lists the files a run's script wrote (Record), so
	// that Clear removes them with the rest of the run.
	ManifestFile = ".couplet-files"
	// IndexFile is the page of a script's folder that lists its
	// results, each in a sub-folder of its own.
	IndexFile = "index.html"
	// ComparisonFile is the page of a comparison of results.
	ComparisonFile = "comparison.html"
)

// storeName matches the case stores of a run (results.db, results-2.db,
// ...) and SQLite's journal files beside them.
var storeName = regexp.MustCompile(`^results(-[0-9]+)?\.db(-journal|-wal|-shm)?$`)

// Reserved reports whether name is a file name of the tool in a run
// folder, which a script may not write: the case stores and their journal
// files, summary.json, report.html, index.html, comparison.html,
// evaluations.csv, every
// plot (any .svg or .png file), the lock and the manifest.
func Reserved(name string) bool {
	switch {
	case name == LockFile || name == ManifestFile:
		return true
	case storeName.MatchString(name):
		return true
	case name == "summary.json" || name == "report.html" || name == "evaluations.csv" || name == IndexFile || name == ComparisonFile:
		return true
	}
	lower := strings.ToLower(name)
	return strings.HasSuffix(lower, ".svg") || strings.HasSuffix(lower, ".png")
}
