package mdo

import (
	"context"
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
		{StopStalled, "stalled"},
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

// The optimiser's words on its stop (Evaluator.SetStopDetail) reach the
// Result and its text; a Result without them shows no such line.
func TestStopDetail(t *testing.T) {
	for _, detail := range []string{"", "no feasible point found in 3 evaluations"} {
		st, err := SellarStudy(MDF)
		if err != nil {
			t.Fatal(err)
		}
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		if err := ev.Begin("test", nil); err != nil {
			t.Fatal(err)
		}
		if _, err := ev.EvaluateOne(context.Background(), ev.Start()); err != nil {
			t.Fatal(err)
		}
		ev.SetStopDetail(detail)
		r, err := ev.Finish(StopStalled)
		if err != nil {
			t.Fatal(err)
		}
		text := r.String()
		if r.StopDetail != detail || strings.Contains(text, "stopped:") != (detail != "") || !strings.Contains(text, "stalled after") {
			t.Errorf("StopDetail %q (set %q); text:\n%s", r.StopDetail, detail, text)
		}
		if detail != "" && !strings.Contains(text, "stopped: "+detail) {
			t.Errorf("the text does not give the detail:\n%s", text)
		}
	}
}
