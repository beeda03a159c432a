package mdo

import (
	"fmt"
	"sort"
	"strings"
)

// DSM returns the design structure matrix of the system as text. Rows and
// columns are the disciplines in execution order; the diagonal holds the
// row number, and the cell in row i, column j is marked when discipline i
// feeds discipline j (above the diagonal: feed-forward; below: feedback).
// Coupled groups are boxed by their group letter, and the coupling
// variables of each cell are listed under the matrix.
func (s *System) DSM() string {
	var order []int
	groupOf := map[int]int{}
	for gi, g := range s.groups {
		for _, d := range g.discs {
			order = append(order, d)
			groupOf[d] = gi
		}
	}
	pos := make([]int, len(s.discs))
	for p, d := range order {
		pos[d] = p
	}
	feeds := map[[2]int][]string{}
	for to, ins := range s.inIdx {
		for _, v := range ins {
			if from := s.producer[v]; from >= 0 && from != to {
				k := [2]int{from, to}
				feeds[k] = append(feeds[k], s.vars.At(v).Name)
			}
		}
	}
	width := 0
	for _, d := range s.discs {
		if l := len(d.Name()); l > width {
			width = l
		}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "design structure matrix: %d disciplines, %d groups (row feeds column)\n", len(s.discs), len(s.groups))
	fmt.Fprintf(&b, "%*s   ", width+4, "")
	for p := range order {
		fmt.Fprintf(&b, "%3d", p+1)
	}
	b.WriteString("   group\n")
	for p, d := range order {
		fmt.Fprintf(&b, "%3d %-*s   ", p+1, width, s.discs[d].Name())
		for _, c := range order {
			switch {
			case c == d:
				b.WriteString("  ■")
			case len(feeds[[2]int{d, c}]) > 0 && pos[c] > p:
				b.WriteString("  >")
			case len(feeds[[2]int{d, c}]) > 0:
				b.WriteString("  <")
			default:
				b.WriteString("  .")
			}
		}
		gi := groupOf[d]
		g := s.groups[gi]
		label := fmt.Sprintf("   %c", 'A'+rune(gi%26))
		if g.coupled {
			label += fmt.Sprintf(" coupled, %s", s.settings[gi].Method)
		}
		b.WriteString(label + "\n")
	}
	b.WriteString("couplings ( > feed-forward, < feedback):\n")
	keys := make([][2]int, 0, len(feeds))
	for k := range feeds {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		if pos[keys[i][0]] != pos[keys[j][0]] {
			return pos[keys[i][0]] < pos[keys[j][0]]
		}
		return pos[keys[i][1]] < pos[keys[j][1]]
	})
	for _, k := range keys {
		fmt.Fprintf(&b, "  %s -> %s: %s\n", s.discs[k[0]].Name(), s.discs[k[1]].Name(), listNames(feeds[k], dsmListLimit))
	}
	return b.String()
}

// String summarises the system: its groups in execution order and its
// parameters.
func (s *System) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "system: %d disciplines, %d variables, %d parameters\n", len(s.discs), s.vars.Len(), len(s.params))
	for gi, g := range s.groups {
		kind := "single"
		if g.coupled {
			kind = "coupled, " + s.settings[gi].Method.String()
		}
		fmt.Fprintf(&b, "  %c: {%s} (%s)\n", 'A'+rune(gi%26), strings.Join(g.names, ", "), kind)
	}
	return b.String()
}

// dsmListLimit is the number of coupling variables a DSM line names before
// it summarises the rest.
const dsmListLimit = 12

// listNames joins names, summarising those beyond limit as "… and N more".
func listNames(names []string, limit int) string {
	if len(names) <= limit {
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("%s, … and %d more", strings.Join(names[:limit], ", "), len(names)-limit)
}
