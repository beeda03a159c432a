package repl

import (
	"fmt"
	"reflect"
	"regexp"
	"slices"
	"sort"
	"strings"
)

// A misspelt name of a package or a field in a struct literal gets the
// names the framework has near it, as a misspelt variable of the model
// does: "undefined: optimizers.NelderMaed; similar: NelderMead", "unknown
// field MaxEvals in struct literal of type optimizers.NelderMead; its
// fields near it: MaxEvaluations". A field of an embedded settings block
// written at the top of the literal (NSGA2{Population: 28}) is named
// with the block it belongs in.

// undefinedMemberRE finds the package and the name of an undefined
// member of a package.
var undefinedMemberRE = regexp.MustCompile(`undefined: (\w+)\.(\w+)`)

// unknownFieldRE finds the field and the type of an unknown field of a
// struct literal (the type check's wording and the interpreter's).
var unknownFieldRE = regexp.MustCompile(`unknown field (\w+) in struct literal(?: of type)? \*?(\w+)\.(\w+)`)

// nearHint returns the hint for a compile error about a misspelt member
// of a package the session imports or an unknown field of one of its
// struct types ("" when nothing is near).
func (s *Session) nearHint(msg string) string {
	_, local := s.importSpecs()
	pathOf := func(name string) string {
		for p, n := range local {
			if n == name {
				return p
			}
		}
		return ""
	}
	if m := unknownFieldRE.FindStringSubmatch(msg); m != nil {
		t := s.tableType(pathOf(m[2]), m[3])
		if t == nil {
			return ""
		}
		return fieldHint(m[1], m[2]+"."+m[3], t, m[2])
	}
	if m := undefinedMemberRE.FindStringSubmatch(msg); m != nil {
		syms := s.types.im.tables[pathOf(m[1])]
		names := make([]string, 0, len(syms))
		for n := range syms {
			names = append(names, n)
		}
		if near := nearNames(m[2], names); len(near) > 0 {
			return "; similar: " + m[1] + "." + strings.Join(near, ", "+m[1]+".")
		}
	}
	return ""
}

// tableType is the struct type named name of the package at path in the
// session's symbol tables (nil if there is none).
func (s *Session) tableType(path, name string) reflect.Type {
	v, ok := s.types.im.tables[path][name]
	if !ok || !v.IsValid() {
		return nil
	}
	t := v.Type()
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if t.Kind() != reflect.Struct {
		return nil
	}
	return t
}

// fieldHint names, for the unknown field f of a literal of the struct
// type t (typeName as the script writes it, pkg its package's name), the
// embedded settings block that has f, or the fields of t near it.
func fieldHint(f, typeName string, t reflect.Type, pkg string) string {
	var direct []string
	promoted := map[string]string{} // field of an embedded block → the block
	for i := 0; i < t.NumField(); i++ {
		sf := t.Field(i)
		if !sf.IsExported() {
			continue
		}
		direct = append(direct, sf.Name)
		if !sf.Anonymous || sf.Type.Kind() != reflect.Struct {
			continue
		}
		block := sf.Type.Name()
		if inner, ok := sf.Type.FieldByName(f); ok && inner.IsExported() {
			return fmt.Sprintf("; %s is a field of the embedded %s: write %s{%s: %s.%s{%s: …}}", f, block, typeName, block, pkg, block, f)
		}
		for j := 0; j < sf.Type.NumField(); j++ {
			if inner := sf.Type.Field(j); inner.IsExported() && !inner.Anonymous {
				promoted[inner.Name] = block
			}
		}
	}
	names := append([]string(nil), direct...)
	for n := range promoted {
		names = append(names, n)
	}
	near := nearNames(f, names)
	if len(near) == 0 {
		return "; its fields: " + strings.Join(direct, ", ")
	}
	for i, n := range near {
		if b, ok := promoted[n]; ok && !slices.Contains(direct, n) {
			near[i] = fmt.Sprintf("%s (of the embedded %s: %s{%s: %s.%s{%s: …}})", n, b, typeName, b, pkg, b, n)
		}
	}
	return "; its fields near it: " + strings.Join(near, ", ")
}

// nearNames returns the names within a few edits of name, ignoring case
// (at most a quarter of its letters, at least one), nearest first, at
// most five.
func nearNames(name string, names []string) []string {
	type near struct {
		name string
		d    int
	}
	limit := max(1, len(name)/4)
	var found []near
	for _, n := range names {
		if d := levenshtein(strings.ToLower(name), strings.ToLower(n)); d <= limit && n != name {
			found = append(found, near{n, d})
		}
	}
	sort.Slice(found, func(i, j int) bool {
		if found[i].d != found[j].d {
			return found[i].d < found[j].d
		}
		return found[i].name < found[j].name
	})
	var out []string
	for i := 0; i < len(found) && i < 5; i++ {
		out = append(out, found[i].name)
	}
	return out
}

// levenshtein is the edit distance of a and b (insertions, deletions and
// substitutions of bytes), by one row of the dynamic programme.
func levenshtein(a, b string) int {
	row := make([]int, len(b)+1)
	for j := range row {
		row[j] = j
	}
	for i := 1; i <= len(a); i++ {
		diag := row[0]
		row[0] = i
		for j := 1; j <= len(b); j++ {
			up := row[j]
			sub := diag
			if a[i-1] != b[j-1] {
				sub++
			}
			row[j] = min(up+1, row[j-1]+1, sub)
			diag = up
		}
	}
	return row[len(b)]
}
