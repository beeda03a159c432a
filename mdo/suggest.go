package mdo

import (
	"sort"
	"strings"
)

// closestNames returns the names of vars nearest to a misspelt name: those
// within a few edits of it (of the whole name, or of the part after the
// first dot, so that a name given without its prefix is found too),
// nearest first, at most five. When none is that near it falls back to
// the names that share the name's first dotted part (at most twelve).
func closestNames(name string, vars []Var) []string {
	type near struct {
		name string
		d    int
	}
	limit := max(1, len(name)/4)
	var best []near
	for _, v := range vars {
		d := editDistance(name, v.Name)
		if _, rest, ok := strings.Cut(v.Name, "."); ok {
			d = min(d, editDistance(name, rest))
		}
		if d <= limit && d < len(name) {
			best = append(best, near{v.Name, d})
		}
	}
	sort.SliceStable(best, func(i, j int) bool {
		if best[i].d != best[j].d {
			return best[i].d < best[j].d
		}
		return best[i].name < best[j].name
	})
	if len(best) > 0 {
		out := make([]string, 0, min(5, len(best)))
		for _, b := range best[:min(5, len(best))] {
			out = append(out, b.name)
		}
		return out
	}
	prefix := strings.SplitN(name, ".", 2)[0]
	var same []string
	for _, v := range vars {
		if strings.HasPrefix(v.Name, prefix) {
			same = append(same, v.Name)
		}
	}
	if len(same) > 12 {
		return nil
	}
	sort.Strings(same)
	return same
}

// editDistance is the optimal string alignment distance of a and b (the
// Levenshtein distance with a swap of two neighbouring letters counted as
// one edit), on bytes.
func editDistance(a, b string) int {
	prev2 := make([]int, len(b)+1)
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(b)]
}
