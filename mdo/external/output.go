package external

import (
	"encoding/json"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"couplet/mdo"
)

// Read says how one output is read from the program's answers. Outputs
// without a Read are read by their named marker ("name = number").
type Read struct {
	// Output is the output variable this entry reads.
	Output string
	// Pattern, if set, is a regular expression whose first capture group
	// is the number (text output only).
	Pattern string
	// Key, if set, is the marker name or JSON member to read instead of
	// the output's name.
	Key string
	// Unit is the unit the program writes; empty means the output's
	// declared unit.
	Unit string
}

// reader reads one output.
type reader struct {
	key  string
	re   *regexp.Regexp
	unit string
}

// number is a decimal floating-point number as programs write them
// (Fortran's D exponent included).
const number = `[-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eEdD][-+]?[0-9]+)?|[-+]?(?i:nan|inf(?:inity)?)`

// newReaders compiles the reading of every output.
func newReaders(outputs []mdo.Var, reads []Read, jsonFile bool) ([]reader, error) {
	index := map[string]int{}
	rs := make([]reader, len(outputs))
	for i, v := range outputs {
		index[v.Name] = i
		rs[i] = reader{key: v.Name, unit: v.Unit}
	}
	seen := map[string]bool{}
	for _, r := range reads {
		k, ok := index[r.Output]
		if !ok {
			return nil, fmt.Errorf("Read names %q, which is not an output of the program", r.Output)
		}
		if seen[r.Output] {
			return nil, fmt.Errorf("Read names output %q twice", r.Output)
		}
		seen[r.Output] = true
		if r.Key != "" {
			rs[k].key = r.Key
		}
		if r.Unit != "" {
			if _, err := Convert(1, r.Unit, outputs[k].Unit); err != nil {
				return nil, fmt.Errorf("Read of %s: unit %q: %w", r.Output, r.Unit, err)
			}
			rs[k].unit = r.Unit
		}
		if r.Pattern != "" {
			if jsonFile {
				return nil, fmt.Errorf("Read of %s: a Pattern reads text, but the output file is JSON", r.Output)
			}
			re, err := regexp.Compile(r.Pattern)
			if err != nil {
				return nil, fmt.Errorf("Read of %s: Pattern %q: %w", r.Output, r.Pattern, err)
			}
			if re.NumSubexp() < 1 {
				return nil, fmt.Errorf("Read of %s: Pattern %q has no capture group for the number", r.Output, r.Pattern)
			}
			rs[k].re = re
		}
	}
	for i := range rs {
		if rs[i].re == nil && !jsonFile {
			rs[i].re = regexp.MustCompile(`(?m)^[ \t]*` + regexp.QuoteMeta(rs[i].key) + `[ \t]*=[ \t]*(` + number + `)`)
		}
	}
	return rs, nil
}

// BadOutputError reports an answer that could not be read.
type BadOutputError struct {
	Output string
	// Reason says what was wrong; Text quotes the start of what was read.
	Reason string
	Text   string
}

// Error implements error.
func (e *BadOutputError) Error() string {
	return fmt.Sprintf("bad output: %s: %s (the program wrote %q)", e.Output, e.Reason, e.Text)
}

// parseNumber reads a number as a program writes it.
func parseNumber(s string) (float64, error) {
	s = strings.TrimSpace(s)
	s = strings.NewReplacer("d", "e", "D", "e").Replace(s)
	return strconv.ParseFloat(s, 64)
}

// readText reads every output from text into out, in declared units.
func readText(text []byte, rs []reader, outputs []mdo.Var, out []float64) error {
	for i, r := range rs {
		m := r.re.FindSubmatch(text)
		if m == nil {
			return &BadOutputError{Output: outputs[i].Name, Reason: fmt.Sprintf("no match for %s", r.re), Text: clip(string(text), 200)}
		}
		x, err := parseNumber(string(m[1]))
		if err != nil {
			return &BadOutputError{Output: outputs[i].Name, Reason: fmt.Sprintf("%q is not a number", m[1]), Text: clip(string(m[0]), 200)}
		}
		if err := store(x, r, outputs[i], out, i, string(m[0])); err != nil {
			return err
		}
	}
	return nil
}

// readJSON reads every output from a JSON object into out.
func readJSON(text []byte, rs []reader, outputs []mdo.Var, out []float64) error {
	var obj map[string]json.RawMessage
	if err := json.Unmarshal(text, &obj); err != nil {
		return &BadOutputError{Output: outputs[0].Name, Reason: "the output file is not a JSON object: " + err.Error(), Text: clip(string(text), 200)}
	}
	for i, r := range rs {
		raw, ok := obj[r.key]
		if !ok {
			return &BadOutputError{Output: outputs[i].Name, Reason: fmt.Sprintf("the JSON object has no member %q", r.key), Text: clip(string(text), 200)}
		}
		var x float64
		if err := json.Unmarshal(raw, &x); err != nil {
			return &BadOutputError{Output: outputs[i].Name, Reason: fmt.Sprintf("member %q is not a number", r.key), Text: clip(string(raw), 200)}
		}
		if err := store(x, r, outputs[i], out, i, string(raw)); err != nil {
			return err
		}
	}
	return nil
}

// store converts x to the output's unit and writes it to out[i].
func store(x float64, r reader, v mdo.Var, out []float64, i int, text string) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &BadOutputError{Output: v.Name, Reason: "the value is not finite", Text: clip(text, 200)}
	}
	y, err := Convert(x, r.unit, v.Unit)
	if err != nil {
		return &BadOutputError{Output: v.Name, Reason: err.Error(), Text: clip(text, 200)}
	}
	out[i] = y
	return nil
}
