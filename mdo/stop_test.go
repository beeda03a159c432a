package mdo

import (
	"encoding/json"
	"strings"
	"testing"
)

// The stored text of every reason reads back as the same reason, and the
// text is the one results.db and summary.json have always held (so stores
// written before StopReason existed still read).
func TestStopReasonText(t *testing.T) {
	tests := []struct {
		reason StopReason
		text   string
	}{
		{NotStopped, ""},
		{StopConverged, "converged"},
		{StopBudget, "budget"},
		{StopIterations, "iterations"},
		{StopComplete, "complete"},
		{StopCancelled, "cancelled"},
		{StopDeadline, "deadline"},
	}
	for _, tc := range tests {
		if got := tc.reason.String(); got != tc.text {
			t.Errorf("StopReason(%d).String() = %q, want %q", int(tc.reason), got, tc.text)
		}
		back, err := ParseStopReason(tc.text)
		if err != nil || back != tc.reason {
			t.Errorf("ParseStopReason(%q) = %v, %v; want %v", tc.text, back, err, tc.reason)
		}
		js, err := json.Marshal(struct{ Stop StopReason }{tc.reason})
		if err != nil || string(js) != `{"Stop":"`+tc.text+`"}` {
			t.Errorf("JSON of %v = %s, %v", tc.reason, js, err)
		}
		var got struct{ Stop StopReason }
		if err := json.Unmarshal(js, &got); err != nil || got.Stop != tc.reason {
			t.Errorf("JSON %s read back as %v, %v", js, got.Stop, err)
		}
	}
}

// An unknown text is an error that names it and lists the allowed ones;
// an out-of-range reason does not marshal.
func TestStopReasonBadText(t *testing.T) {
	_, err := ParseStopReason("finished")
	if err == nil || !strings.Contains(err.Error(), `"finished"`) || !strings.Contains(err.Error(), "converged, budget, iterations, complete, cancelled, deadline") {
		t.Errorf("ParseStopReason(\"finished\") error = %v, want one naming the text and the allowed reasons", err)
	}
	if _, err := StopReason(99).MarshalText(); err == nil {
		t.Error("StopReason(99) marshalled without an error")
	}
	if got := StopReason(99).String(); got != "StopReason(99)" {
		t.Errorf("StopReason(99).String() = %q", got)
	}
}
