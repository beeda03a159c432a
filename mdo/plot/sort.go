package plot

import (
	"slices"

	"couplet/mdo"
)

// sortByID sorts evaluations by ID.
func sortByID(evs []*mdo.Evaluation) {
	slices.SortStableFunc(evs, func(a, b *mdo.Evaluation) int { return a.ID - b.ID })
}
