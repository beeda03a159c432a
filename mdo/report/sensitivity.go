package report

import "couplet/mdo"

// sensView is the report's table of the post-optimality sensitivity.
type sensView struct {
	Objective, Caution string
	Limits             []sensRow
	Parameters         []sensRow
}

// sensRow is one limit or parameter of the table: Bound and State are
// empty for a parameter.
type sensRow struct{ Name, Bound, Value, Unit, State, Class, PerUnit, PerUnitUnit string }

// sensitivityOf tabulates r.Sensitivity, active limits first (nil when
// the result has none).
func sensitivityOf(r *mdo.Result) *sensView {
	s := r.Sensitivity
	if s == nil {
		return nil
	}
	v := &sensView{Objective: s.Objective, Caution: mdo.SensitivityCaution}
	for _, active := range []bool{true, false} {
		for _, l := range s.Limits {
			if l.Active != active {
				continue
			}
			row := sensRow{Name: l.Constraint, Bound: l.Bound, Value: num(l.Limit), Unit: orDash(l.Unit), State: "inactive", Class: "ok",
				PerUnit: num(l.PerUnit), PerUnitUnit: s.PerUnitLabel(l.Unit)}
			if active {
				row.State, row.Class = "active", "active"
			}
			if l.NotDefined != "" {
				row.PerUnit, row.PerUnitUnit = "not defined", l.NotDefined
			}
			v.Limits = append(v.Limits, row)
		}
	}
	for _, p := range s.Parameters {
		v.Parameters = append(v.Parameters, sensRow{Name: p.Parameter, Value: num(p.Value), Unit: orDash(p.Unit),
			PerUnit: num(p.PerUnit), PerUnitUnit: s.PerUnitLabel(p.Unit)})
	}
	return v
}
