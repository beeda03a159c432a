package mdo

// Unit returns the unit of a name of the result: the unit declared for an
// objective or constraint of that name (Objective.Unit, Constraint.Unit),
// else that of the output variable of that name, else "".
func (r *Result) Unit(name string) string {
	for _, o := range r.Objectives {
		if o.Name == name && o.Unit != "" {
			return o.Unit
		}
	}
	for _, c := range r.Constraints {
		if c.Name == name && c.Unit != "" {
			return c.Unit
		}
	}
	for _, v := range r.Outputs {
		if v.Name == name {
			return v.Unit
		}
	}
	return ""
}

// declaredUnits are the units declared for the study's objectives and
// constraints, by name (what RunInfo.Units carries).
func (s *Study) declaredUnits() map[string]string {
	out := map[string]string{}
	for _, o := range s.Objectives {
		if o.Unit != "" {
			out[o.Name] = o.Unit
		}
	}
	for _, c := range s.Constraints {
		if c.Unit != "" {
			out[c.Name] = c.Unit
		}
	}
	return out
}
