package store

import "couplet/mdo"

// SummarySensitivity is the post-optimality sensitivity of a summary's
// best point (mdo.Sensitivity): what each constraint limit costs and the
// derivative of the optimal objective with respect to each fixed
// parameter asked for, in the user's units.
type SummarySensitivity struct {
	Objective  string             `json:"objective"`
	Unit       string             `json:"unit,omitempty"`
	Caution    string             `json:"caution"`
	Limits     []SummaryLimit     `json:"limits,omitempty"`
	Parameters []SummaryParameter `json:"parameters,omitempty"`
}

// SummaryLimit is one constraint limit of a SummarySensitivity;
// PerUnit is d(optimal objective)/d(limit) in PerUnitUnit, null when
// NotDefined says why an active limit has none.
type SummaryLimit struct {
	Constraint  string `json:"constraint"`
	Bound       string `json:"bound"`
	Limit       Number `json:"limit"`
	Unit        string `json:"unit,omitempty"`
	Active      bool   `json:"active"`
	PerUnit     Number `json:"per_unit"`
	PerUnitUnit string `json:"per_unit_unit"`
	NotDefined  string `json:"not_defined,omitempty"`
}

// SummaryParameter is one fixed parameter of a SummarySensitivity;
// PerUnit is d(optimal objective)/d(parameter) in PerUnitUnit.
type SummaryParameter struct {
	Parameter   string `json:"parameter"`
	Value       Number `json:"value"`
	Unit        string `json:"unit,omitempty"`
	PerUnit     Number `json:"per_unit"`
	PerUnitUnit string `json:"per_unit_unit"`
}

// summarySensitivity converts a result's sensitivity (nil stays nil).
func summarySensitivity(s *mdo.Sensitivity) *SummarySensitivity {
	if s == nil {
		return nil
	}
	out := &SummarySensitivity{Objective: s.Objective, Unit: s.Unit, Caution: mdo.SensitivityCaution}
	for _, l := range s.Limits {
		out.Limits = append(out.Limits, SummaryLimit{Constraint: l.Constraint, Bound: l.Bound, Limit: Number(l.Limit), Unit: l.Unit,
			Active: l.Active, PerUnit: Number(l.PerUnit), PerUnitUnit: s.PerUnitLabel(l.Unit), NotDefined: l.NotDefined})
	}
	for _, p := range s.Parameters {
		out.Parameters = append(out.Parameters, SummaryParameter{Parameter: p.Parameter, Value: Number(p.Value), Unit: p.Unit,
			PerUnit: Number(p.PerUnit), PerUnitUnit: s.PerUnitLabel(p.Unit)})
	}
	return out
}
