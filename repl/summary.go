package repl

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"time"
)

// emptySummary is summary.json of a run whose script handed over no
// result (see cell.Publish); with a result, summary.json is the case
// store's summary (package mdo/store).
type emptySummary struct {
	Study       string  `json:"study"`
	Seed        *uint64 `json:"seed"`
	Evaluations int     `json:"evaluations"`
	Cells       int     `json:"cells"`
	ToolVersion string  `json:"tool_version"`
	Note        string  `json:"note"`
	Timestamps  struct {
		Started string `json:"started"`
	} `json:"timestamps"`
}

// writeEmptySummary writes DIR/summary.json for a run without a result.
func writeEmptySummary(dir, study string, seed *uint64, cells int, started time.Time) error {
	s := emptySummary{Study: study, Seed: seed, Cells: cells, ToolVersion: "couplet " + Version,
		Note: "the script handed over no result: call cell.Publish(result)"}
	s.Timestamps.Started = started.UTC().Format(time.RFC3339Nano)
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("repl: encoding summary: %w", err)
	}
	if err := os.WriteFile(filepath.Join(dir, "summary.json"), append(b, '\n'), 0o644); err != nil {
		return fmt.Errorf("repl: writing summary: %w", err)
	}
	return nil
}
