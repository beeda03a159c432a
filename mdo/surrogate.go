package mdo

import (
	"fmt"
	"slices"
	"strings"
)

// SurrogateDiscipline is a discipline whose outputs are estimates of a
// surrogate model (fitted to samples of an analysis) rather than the
// analysis itself. A study whose system holds one says so in its result
// (Result.Surrogates): in the result's text, summary.json and the report.
type SurrogateDiscipline interface {
	Discipline
	// Surrogate describes the model: its kind, what it stands in for, the
	// samples it was fitted to and its cross-validation error.
	Surrogate() string
}

// SurrogateUse is a surrogate model in a study's system and the numbers
// of the result that come from it.
type SurrogateUse struct {
	// Discipline is the name of the surrogate discipline and Model its
	// description (SurrogateDiscipline.Surrogate).
	Discipline, Model string
	// Outputs are the variables the model estimates.
	Outputs []string
	// Affects are the study's objectives and constraints whose values
	// depend on those estimates: directly, through the disciplines
	// downstream of them, or (conservatively) computed by a function,
	// which may read them.
	Affects []string
}

// String describes the use in one sentence.
func (u SurrogateUse) String() string {
	s := fmt.Sprintf("the values of %s from discipline %q are estimates of a surrogate model (%s)", strings.Join(u.Outputs, ", "), u.Discipline, u.Model)
	if len(u.Affects) > 0 {
		s += "; so are those of " + strings.Join(u.Affects, ", ")
	}
	return s
}

// SurrogateCaution is the statement that goes with numbers from a
// surrogate.
const SurrogateCaution = "a surrogate's number is an estimate of the analysis it was fitted to: confirm a design found on it with the true analysis"

// surrogateUses finds the surrogate disciplines of the study's system
// and what they affect.
func (s *Study) surrogateUses() []SurrogateUse {
	if s.System == nil {
		return nil
	}
	discs := s.System.Disciplines()
	var uses []SurrogateUse
	for _, d := range discs {
		sd, ok := d.(SurrogateDiscipline)
		if !ok {
			continue
		}
		u := SurrogateUse{Discipline: d.Name(), Model: sd.Surrogate()}
		// the variables downstream of the estimates
		reach := map[string]bool{}
		for _, v := range d.Outputs() {
			u.Outputs = append(u.Outputs, v.Name)
			reach[v.Name] = true
		}
		for grown := true; grown; {
			grown = false
			for _, o := range discs {
				reads := slices.ContainsFunc(o.Inputs(), func(v Var) bool { return reach[v.Name] })
				if !reads {
					continue
				}
				for _, v := range o.Outputs() {
					if !reach[v.Name] {
						reach[v.Name], grown = true, true
					}
				}
			}
		}
		for _, o := range s.Objectives {
			if o.Func != nil || reach[o.Name] {
				u.Affects = append(u.Affects, o.Name)
			}
		}
		for _, c := range s.Constraints {
			if c.Func != nil || reach[c.Name] {
				u.Affects = append(u.Affects, c.Name)
			}
		}
		uses = append(uses, u)
	}
	return uses
}

// surrogateText is the result text's account of its surrogates.
func (r *Result) surrogateText() string {
	if len(r.Surrogates) == 0 {
		return ""
	}
	var b strings.Builder
	for _, u := range r.Surrogates {
		fmt.Fprintf(&b, "SURROGATE: %s\n", u)
	}
	fmt.Fprintf(&b, "(%s)\n", SurrogateCaution)
	return b.String()
}
