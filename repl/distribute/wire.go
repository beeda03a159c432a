package distribute

import (
	"bytes"
	"encoding/gob"
	"fmt"
	"time"

	"couplet/mdo"
)

// runInfo is the runs bucket's entry of a run (JSON).
type runInfo struct {
	Run         string        `json:"run"`
	Build       string        `json:"build"`
	Script      string        `json:"script"`
	ScriptHash  string        `json:"script_sha256"`
	Seed        uint64        `json:"seed"`
	SeedSet     bool          `json:"seed_set"`
	AckWait     time.Duration `json:"ack_wait_ns"`
	Coordinator string        `json:"coordinator"`
}

// request is one analysis request on the work stream: request Index of
// batch Batch (from 1) of the run's spread Evaluator number Evaluator
// (from 1, in the order their first batches came).
type request struct {
	Evaluator   int
	Batch       uint64
	Index       int
	Fingerprint string
	Design      []float64
}

// reply is a worker's answer on the result stream: the result, or why
// the worker cannot give one, with the design it answers (a worker that
// replays the run checks it against its own). A reply with Ended set is
// the coordinator's word that Evaluator is served no more: its spread
// batches were Batch in all.
type reply struct {
	Evaluator int
	Batch     uint64
	Index     int
	Worker    string
	Design    []float64
	Result    mdo.AnalysisResult
	Refused   string
	Ended     bool
}

// notice is a worker's word to the coordinator (JSON).
type notice struct {
	Worker string `json:"worker"`
	Text   string `json:"text"`
}

// msgID is the message id of request (batch, index) of a run's spread
// Evaluator number ev and of its result.
func msgID(run string, ev int, batch uint64, index int) string {
	return fmt.Sprintf("%s.%d.%d.%d", run, ev, batch, index)
}

// encode writes v with gob (float64s keep their bits, NaN and ±Inf
// included).
func encode(v any) ([]byte, error) {
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(v); err != nil {
		return nil, fmt.Errorf("distribute: encoding %T: %w", v, err)
	}
	return b.Bytes(), nil
}

// decode reads what encode wrote.
func decode(data []byte, v any) error {
	if err := gob.NewDecoder(bytes.NewReader(data)).Decode(v); err != nil {
		return fmt.Errorf("distribute: decoding %T: %w", v, err)
	}
	return nil
}
