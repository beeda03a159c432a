package mdo

import (
	"fmt"
	"sort"
	"strings"
	"text/tabwriter"
)

// CatalogueEntry is one variable of a system's catalogue: its
// specification, the discipline that produces it ("" for a parameter,
// an input nobody produces) and the disciplines that read it.
type CatalogueEntry struct {
	Var
	Producer  string
	Consumers []string
}

// Catalogue lists the variables of a system whose names start with
// prefix ("" lists all), sorted by name, each with its producer and
// consumers. A prefix that matches no variable is an error naming the
// prefix and the closest variable names.
func (s *System) Catalogue(prefix string) ([]CatalogueEntry, error) {
	readers := map[string][]string{}
	for _, d := range s.discs {
		for _, v := range d.Inputs() {
			readers[v.Name] = append(readers[v.Name], d.Name())
		}
	}
	var out []CatalogueEntry
	for _, v := range s.vars.All() {
		if !strings.HasPrefix(v.Name, prefix) {
			continue
		}
		out = append(out, CatalogueEntry{Var: v, Producer: s.Producer(v.Name), Consumers: readers[v.Name]})
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("mdo: no variable of the system starts with %q; %s", prefix, suggestPrefix(s.vars.Names(), prefix))
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out, nil
}

// suggestPrefix names the groups of variables (their first name segment,
// with its dot) for a prefix that matches none.
func suggestPrefix(names []string, prefix string) string {
	seen := map[string]bool{}
	var groups []string
	for _, n := range names {
		g, _, dotted := strings.Cut(n, ".")
		if dotted {
			g += "."
		}
		if !seen[g] {
			seen[g] = true
			groups = append(groups, g)
		}
	}
	sort.Strings(groups)
	return "the variables' prefixes are " + strings.Join(groups, ", ")
}

// FormatCatalogue formats a catalogue as an aligned text table: name,
// unit, default, validity range, producer, consumers, description.
func FormatCatalogue(entries []CatalogueEntry) string {
	var b strings.Builder
	w := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "name\tunit\tdefault\trange\tproducer\tconsumers\tdescription")
	for _, e := range entries {
		fmt.Fprintf(w, "%s\t%s\t%s\t%s\t%s\t%s\t%s\n", e.Name, e.unit(), fmtNum(e.Default), e.validity(),
			e.producer(), e.consumers(), e.Description)
	}
	w.Flush()
	return b.String()
}

// CatalogueMarkdown formats a catalogue as a Markdown table, one row per
// variable, under no heading (the caller gives the page its own).
func CatalogueMarkdown(entries []CatalogueEntry) string {
	var b strings.Builder
	b.WriteString("| name | unit | default | validity range | producer | consumers | description |\n")
	b.WriteString("|---|---|---|---|---|---|---|\n")
	cell := func(s string) string { return strings.ReplaceAll(s, "|", `\|`) }
	for _, e := range entries {
		fmt.Fprintf(&b, "| `%s` | %s | %s | %s | %s | %s | %s |\n", e.Name, cell(e.unit()), fmtNum(e.Default),
			e.validity(), cell(e.producer()), cell(e.consumers()), cell(e.Description))
	}
	return b.String()
}

func (e CatalogueEntry) unit() string {
	if e.Unit == "" {
		return "-"
	}
	return e.Unit
}

func (e CatalogueEntry) validity() string {
	if e.Unbounded() {
		return "unbounded"
	}
	return fmt.Sprintf("[%s, %s]", fmtNum(e.Min), fmtNum(e.Max))
}

func (e CatalogueEntry) producer() string {
	if e.Producer == "" {
		return "(parameter)"
	}
	return e.Producer
}

func (e CatalogueEntry) consumers() string {
	if len(e.Consumers) == 0 {
		return "(none)"
	}
	return strings.Join(e.Consumers, ", ")
}
