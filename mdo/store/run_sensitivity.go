package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"

	"couplet/mdo"
)

// The keys of run_record that hold the objective and its unit of the
// best point's sensitivity (present when the result has one), and why
// the limits without one have none (present when there is such a limit:
// a JSON array of objects constraint, bound, not_defined, in the order of
// the sensitivity table, whose per_unit of those limits is NULL).
const (
	keySensitivityObjective  = "sensitivity_objective"
	keySensitivityUnit       = "sensitivity_unit"
	keySensitivityNotDefined = "sensitivity_not_defined"
)

// notDefinedLimit is one entry of keySensitivityNotDefined.
type notDefinedLimit struct {
	Constraint string `json:"constraint"`
	Bound      string `json:"bound"`
	NotDefined string `json:"not_defined"`
}

// sensitivitySchema creates the table of the best point's
// post-optimality sensitivity (mdo.Result.Sensitivity): one row per
// constraint limit (kind 'limit': name the constraint, bound "upper",
// "lower" or "target", value the limit) and per fixed parameter (kind
// 'parameter': value the parameter's), with per_unit the derivative of
// the optimal objective in per_unit_unit.
const sensitivitySchema = `
CREATE TABLE sensitivity (
	n INTEGER PRIMARY KEY,
	kind TEXT NOT NULL CHECK (kind IN ('limit', 'parameter')),
	name TEXT NOT NULL,
	bound TEXT NOT NULL DEFAULT '',
	value REAL,
	unit TEXT NOT NULL,
	active INTEGER NOT NULL DEFAULT 0,
	per_unit REAL,
	per_unit_unit TEXT NOT NULL
);
`

// sensitivityTable gives a store written before the sensitivity table
// the table when it is opened to continue its run; one opened for
// reading is read without it.
func (s *Store) sensitivityTable() error {
	ctx := context.Background()
	var n int
	if err := s.conn.QueryRowContext(ctx, "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = 'sensitivity'").Scan(&n); err != nil {
		return fmt.Errorf("store: reading the schema of %s: %w", s.path, err)
	}
	switch {
	case n > 0:
		return nil
	case s.readOnly:
		s.noSensitivity = true
		return nil
	}
	if err := s.inTx(func() error { _, err := s.conn.ExecContext(ctx, sensitivitySchema); return err }); err != nil {
		return fmt.Errorf("store: %s: adding the sensitivity table: %w", s.path, err)
	}
	return nil
}

// writeSensitivity replaces the stored sensitivity with the result's
// (none when it has none). The caller holds the transaction.
func (s *Store) writeSensitivity(ctx context.Context, sens *mdo.Sensitivity) error {
	if s.noSensitivity || s.noRecord {
		return nil
	}
	if _, err := s.conn.ExecContext(ctx, `DELETE FROM sensitivity`); err != nil {
		return err
	}
	obj, unit, why := "", "", ""
	if sens != nil {
		obj, unit = sens.Objective, sens.Unit
		var nd []notDefinedLimit
		for _, l := range sens.Limits {
			if l.NotDefined != "" {
				nd = append(nd, notDefinedLimit{l.Constraint, l.Bound, l.NotDefined})
			}
		}
		if nd != nil {
			b, err := json.Marshal(nd)
			if err != nil {
				return err
			}
			why = string(b)
		}
	}
	if err := s.setRecordValue(ctx, keySensitivityObjective, obj); err != nil {
		return err
	}
	if err := s.setRecordValue(ctx, keySensitivityUnit, unit); err != nil {
		return err
	}
	if err := s.setRecordValue(ctx, keySensitivityNotDefined, why); err != nil {
		return err
	}
	if sens == nil {
		return nil
	}
	const q = `INSERT INTO sensitivity (kind, name, bound, value, unit, active, per_unit, per_unit_unit) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`
	for _, l := range sens.Limits {
		if _, err := s.conn.ExecContext(ctx, q, "limit", l.Constraint, l.Bound, nanNull(l.Limit), l.Unit, l.Active, nanNull(l.PerUnit), sens.PerUnitLabel(l.Unit)); err != nil {
			return err
		}
	}
	for _, p := range sens.Parameters {
		if _, err := s.conn.ExecContext(ctx, q, "parameter", p.Parameter, "", nanNull(p.Value), p.Unit, false, nanNull(p.PerUnit), sens.PerUnitLabel(p.Unit)); err != nil {
			return err
		}
	}
	return nil
}

// readSensitivity reads the stored sensitivity back: nil when the
// result had none (no sensitivity_objective in run_record).
func (s *Store) readSensitivity(ctx context.Context, vals map[string]string) (*mdo.Sensitivity, error) {
	obj, ok := vals[keySensitivityObjective]
	if !ok || s.noSensitivity {
		return nil, nil
	}
	sens := &mdo.Sensitivity{Objective: obj, Unit: vals[keySensitivityUnit]}
	rows, err := s.conn.QueryContext(ctx, `SELECT kind, name, bound, value, unit, active, per_unit FROM sensitivity ORDER BY n`)
	if err != nil {
		return nil, fmt.Errorf("store: reading the sensitivity of %s: %w", s.path, err)
	}
	defer rows.Close()
	for rows.Next() {
		var kind, name, bound, unit string
		var value, perUnit sql.NullFloat64
		var active bool
		if err := rows.Scan(&kind, &name, &bound, &value, &unit, &active, &perUnit); err != nil {
			return nil, fmt.Errorf("store: reading the sensitivity of %s: %w", s.path, err)
		}
		v, d := float64(nullNumber(value)), float64(nullNumber(perUnit))
		if kind == "limit" {
			sens.Limits = append(sens.Limits, mdo.LimitCost{Constraint: name, Bound: bound, Limit: v, Unit: unit, Active: active, PerUnit: d})
		} else {
			sens.Parameters = append(sens.Parameters, mdo.ParameterCost{Parameter: name, Value: v, Unit: unit, PerUnit: d})
		}
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: reading the sensitivity of %s: %w", s.path, err)
	}
	if v := vals[keySensitivityNotDefined]; v != "" {
		var nd []notDefinedLimit
		if err := json.Unmarshal([]byte(v), &nd); err != nil {
			return nil, fmt.Errorf("store: reading the sensitivity of %s: run_record %s: %w", s.path, keySensitivityNotDefined, err)
		}
		for _, d := range nd {
			for i := range sens.Limits {
				if l := &sens.Limits[i]; l.Constraint == d.Constraint && l.Bound == d.Bound {
					l.NotDefined = d.NotDefined
				}
			}
		}
	}
	return sens, nil
}
