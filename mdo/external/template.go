package external

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"couplet/mdo"
)

// piece is one part of a parsed template: literal text, or a marker
// naming an input by its index.
type piece struct {
	text   string
	input  int // -1 for literal text
	unit   string
	format string // "" means the shortest exact form
}

// template is a parsed input template.
type template struct {
	pieces []piece
}

// formatRE matches the number formats a marker may ask for.
var formatRE = regexp.MustCompile(`^%[-+ 0#]*[0-9]*(\.[0-9]+)?[eEfgG]$`)

// parseTemplate parses text against the program's inputs.
func parseTemplate(text string, inputs []mdo.Var) (*template, error) {
	index := map[string]int{}
	for i, v := range inputs {
		index[v.Name] = i
	}
	t := &template{}
	var lit strings.Builder
	flush := func() {
		if lit.Len() > 0 {
			t.pieces = append(t.pieces, piece{text: lit.String(), input: -1})
			lit.Reset()
		}
	}
	for i := 0; i < len(text); {
		c := text[i]
		if c != '@' {
			lit.WriteByte(c)
			i++
			continue
		}
		if strings.HasPrefix(text[i:], "@@") {
			lit.WriteByte('@')
			i += 2
			continue
		}
		if !strings.HasPrefix(text[i:], "@{") {
			lit.WriteByte(c)
			i++
			continue
		}
		end := strings.IndexByte(text[i:], '}')
		if end < 0 {
			return nil, fmt.Errorf("template, line %d: marker %q is not closed with }", lineOf(text, i), clip(text[i:], 30))
		}
		body := text[i+2 : i+end]
		p, err := parseMarker(body, index, inputs)
		if err != nil {
			return nil, fmt.Errorf("template, line %d: marker @{%s}: %w", lineOf(text, i), body, err)
		}
		flush()
		t.pieces = append(t.pieces, p)
		i += end + 1
	}
	flush()
	return t, nil
}

// parseMarker parses the body of one marker.
func parseMarker(body string, index map[string]int, inputs []mdo.Var) (piece, error) {
	fields := strings.Fields(body)
	if len(fields) == 0 {
		return piece{}, fmt.Errorf("names no input (write @{name})")
	}
	k, ok := index[fields[0]]
	if !ok {
		names := make([]string, len(inputs))
		for i, v := range inputs {
			names[i] = v.Name
		}
		return piece{}, fmt.Errorf("%q is not an input of the program (inputs: %s)", fields[0], strings.Join(names, ", "))
	}
	p := piece{input: k, unit: inputs[k].Unit}
	for _, f := range fields[1:] {
		key, val, ok := strings.Cut(f, "=")
		switch {
		case ok && key == "unit":
			if _, err := Convert(1, inputs[k].Unit, val); err != nil {
				return piece{}, fmt.Errorf("unit=%s: %s is declared in %q: %w", val, fields[0], inputs[k].Unit, err)
			}
			p.unit = val
		case ok && key == "fmt":
			if !formatRE.MatchString(val) {
				return piece{}, fmt.Errorf("fmt=%s is not a number format (allowed: %%e, %%E, %%f, %%g or %%G with optional flags, width and precision, e.g. %%.6e)", val)
			}
			p.format = val
		default:
			return piece{}, fmt.Errorf("option %q is not known (allowed: unit=UNIT, fmt=FORMAT)", f)
		}
	}
	return p, nil
}

// fill writes the template with the input values in.
func (t *template) fill(in []float64, vars []mdo.Var) (string, error) {
	var b strings.Builder
	for _, p := range t.pieces {
		if p.input < 0 {
			b.WriteString(p.text)
			continue
		}
		x, err := Convert(in[p.input], vars[p.input].Unit, p.unit)
		if err != nil {
			return "", err
		}
		if p.format == "" {
			b.WriteString(strconv.FormatFloat(x, 'g', -1, 64))
		} else {
			fmt.Fprintf(&b, p.format, x)
		}
	}
	return b.String(), nil
}

// lineOf returns the 1-based line of byte offset i in text.
func lineOf(text string, i int) int { return strings.Count(text[:i], "\n") + 1 }

// clip shortens s to at most n bytes for a message.
func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n] + "…"
}
