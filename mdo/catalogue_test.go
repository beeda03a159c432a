package mdo

import (
	"slices"
	"strings"
	"testing"
)

// The catalogue of the Sellar system names each variable's producer and
// readers as the disciplines of Sellar et al. (1996, AIAA 96-0714)
// declare them: y1 from discipline 1, read by discipline 2 and the
// functions; z1 a parameter read by both disciplines.
func TestCatalogue(t *testing.T) {
	sys, err := NewSystem(Sellar()...)
	if err != nil {
		t.Fatal(err)
	}
	all, err := sys.Catalogue("")
	if err != nil {
		t.Fatal(err)
	}
	if len(all) != sys.Vars().Len() {
		t.Errorf("the whole catalogue lists %d variables, the system has %d", len(all), sys.Vars().Len())
	}
	tests := []struct {
		prefix    string
		names     []string
		producer  string
		consumers []string
	}{
		{"y1", []string{"y1"}, "sellar1", []string{"sellar2", "sellar_functions"}},
		{"z1", []string{"z1"}, "", []string{"sellar1", "sellar2"}},
		{"g", []string{"g1", "g2"}, "sellar_functions", nil},
	}
	for _, tc := range tests {
		got, err := sys.Catalogue(tc.prefix)
		if err != nil {
			t.Fatalf("%q: %v", tc.prefix, err)
		}
		var names []string
		for _, e := range got {
			names = append(names, e.Name)
		}
		if !slices.Equal(names, tc.names) {
			t.Errorf("%q lists %v, want %v", tc.prefix, names, tc.names)
		}
		if got[0].Producer != tc.producer || !slices.Equal(got[0].Consumers, tc.consumers) {
			t.Errorf("%s: producer %q consumers %v, want %q %v", got[0].Name, got[0].Producer, got[0].Consumers, tc.producer, tc.consumers)
		}
	}
	if _, err := sys.Catalogue("mass."); err == nil || !strings.Contains(err.Error(), `"mass."`) || !strings.Contains(err.Error(), "y1, ") {
		t.Errorf("an unknown prefix: %v, want an error naming it and the prefixes there are", err)
	}
	text := FormatCatalogue(all)
	for _, want := range []string{"producer", "consumers", "(parameter)", "sellar2, sellar_functions", "[0, 1000]", "coupling variable of discipline 1"} {
		if !strings.Contains(text, want) {
			t.Errorf("the text catalogue lacks %q:\n%s", want, text)
		}
	}
	md := CatalogueMarkdown(all)
	if n := strings.Count(md, "\n"); n != len(all)+2 {
		t.Errorf("the Markdown table has %d lines, want a header, a rule and %d rows", n, len(all))
	}
	if !strings.Contains(md, "| `y1` | - | 1 | [0, 1000] | sellar1 | sellar2, sellar_functions | coupling variable of discipline 1 |") {
		t.Errorf("the Markdown row of y1 is wrong:\n%s", md)
	}
}
