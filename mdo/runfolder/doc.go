// Package runfolder guards a run's output folder: the names the tool
// keeps for itself (Reserved), writes that never follow a symbolic link
// (WriteFile: a temporary file in the folder renamed over the name), the
// old run's files a new run finds or clears (Occupied, Clear) and the
// lock that keeps a second run out while one writes (TakeLock).
//
// The package depends on the standard library alone, so that every
// writer of a run folder (the store, the plots, the report, a script's
// own files) can share it.
package runfolder
