package optimizers

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strconv"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/store"
)

// optimumWith runs Sextant on a study that edit changes, and returns the
// optimal objective and the report.
func optimumWith(t *testing.T, mk func() (*mdo.Study, error), edit func(*mdo.Study), o Sextant) (float64, *StartsReport) {
	t.Helper()
	s, err := mk()
	if err != nil {
		t.Fatal(err)
	}
	edit(s)
	res, rep, err := o.Explore(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Feasible() || rep.Sensitivity == nil {
		t.Fatalf("%s: no converged feasible optimum (f = %g, stop %v)", s.Name, res.Objective(), res.Stop)
	}
	return res.Objective(), rep
}

// TestLimitCostsAgainstReoptimisation: the multiplier of each active
// constraint, in user units, agrees within 1 % with the central
// difference of the optimum re-optimised with the limit moved by ±δ (the
// issue's requirement), and the derivative with respect to a fixed
// parameter with the optimum re-optimised at the parameter ± δ.
func TestLimitCostsAgainstReoptimisation(t *testing.T) {
	tests := []struct {
		name  string
		study func() (*mdo.Study, error)
		k     int // constraint
		delta float64
		slow  bool
	}{
		{"Sellar MDF, y1 >= 3.16", SellarMDF, 0, 0.01, false},
		{"Sellar IDF, y1 >= 3.16", SellarIDF, 0, 0.01, false},
		{"g06, g1 <= 0", G06, 0, 0.05, false},
		{"g06, g2 <= 0", G06, 1, 0.05, false},
		{"g09, g1 <= 0", G09, 0, 0.05, false},
		{"welded beam, tau <= 13600", WeldedBeam, 0, 10, false},
		// the optimum on a kink of the engine sizing (see
		// TestSextantBusinessJet); with the limit moved by ±0.002 the
		// re-optimisation from the baseline ends elsewhere (35 247 kg, not
		// converged), so δ is 0.0005
		{"business jet, tail span ratio <= 0.6", businessJetExample, 6, 0.0005, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.slow && testing.Short() {
				t.Skip("three runs of the business jet")
			}
			_, rep := optimumWith(t, tc.study, func(*mdo.Study) {}, Sextant{})
			var cost *mdo.LimitCost
			s, _ := tc.study()
			name := s.Constraints[tc.k].Name
			for i := range rep.Sensitivity.Limits {
				if rep.Sensitivity.Limits[i].Constraint == name {
					cost = &rep.Sensitivity.Limits[i]
				}
			}
			if cost == nil || !cost.Active {
				t.Fatalf("constraint %s not active: %+v", name, rep.Sensitivity.Limits)
			}
			move := func(d float64) func(*mdo.Study) {
				return func(s *mdo.Study) {
					c := &s.Constraints[tc.k]
					if c.Kind == mdo.LessEqual {
						c.Upper += d
					} else {
						c.Lower += d
					}
				}
			}
			fp, _ := optimumWith(t, tc.study, move(tc.delta), Sextant{})
			fm, _ := optimumWith(t, tc.study, move(-tc.delta), Sextant{})
			fd := (fp - fm) / (2 * tc.delta)
			if math.Abs(cost.PerUnit-fd) > 0.01*math.Abs(fd) {
				t.Errorf("d f*/d limit of %s: multiplier %.6g, re-optimised %.6g", name, cost.PerUnit, fd)
			}
		})
	}
	t.Run("Sellar, x fixed", func(t *testing.T) {
		fixX := func(x float64) func(*mdo.Study) {
			return func(s *mdo.Study) {
				s.Design = s.Design[1:]
				s.Fixed = map[string]float64{"x": x}
			}
		}
		o := Sextant{Parameters: []string{"x"}}
		_, rep := optimumWith(t, SellarMDF, fixX(0.5), o)
		fp, _ := optimumWith(t, SellarMDF, fixX(0.51), o)
		fm, _ := optimumWith(t, SellarMDF, fixX(0.49), o)
		fd := (fp - fm) / 0.02
		got := rep.Sensitivity.Parameters[0].PerUnit
		if math.Abs(got-fd) > 0.01*math.Abs(fd) {
			t.Errorf("d f*/dx: %.6g, re-optimised %.6g", got, fd)
		}
	})
}

// TestSensitivityShown: the sensitivity of a converged Sextant run is
// the result's (Result.Sensitivity), and the result's text, summary.json
// and report all show it: each limit with its cost in objective units
// per unit, and the fixed parameter asked for.
func TestSensitivityShown(t *testing.T) {
	s, err := SellarMDF()
	if err != nil {
		t.Fatal(err)
	}
	s.Design = s.Design[1:]
	s.Fixed = map[string]float64{"x": 0.5}
	res, rep, err := Sextant{Parameters: []string{"x"}}.Explore(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	sens := res.Sensitivity
	if sens == nil || sens != rep.Sensitivity {
		t.Fatalf("Result.Sensitivity %v, report's %v", sens, rep.Sensitivity)
	}
	var g1 *mdo.LimitCost
	for i := range sens.Limits {
		if sens.Limits[i].Constraint == "g1" {
			g1 = &sens.Limits[i]
		}
	}
	if g1 == nil || !g1.Active || len(sens.Parameters) != 1 {
		t.Fatalf("sensitivity %+v: want g1 active and the parameter x", sens)
	}
	if txt := res.String(); !strings.Contains(txt, "post-optimality sensitivity of f") || !strings.Contains(txt, mdo.SensitivityCaution) {
		t.Errorf("the result's text lacks its sensitivity:\n%s", txt)
	}
	sum := store.NewSummary(res, store.SummaryOptions{})
	b, err := json.Marshal(sum)
	if err != nil {
		t.Fatal(err)
	}
	var back struct {
		Sensitivity struct {
			Objective string
			Limits    []struct {
				Constraint string
				Active     bool
				PerUnit    float64 `json:"per_unit"`
			}
			Parameters []struct {
				Parameter string
				PerUnit   float64 `json:"per_unit"`
			}
		}
	}
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	js := back.Sensitivity
	if js.Objective != "f" || len(js.Limits) != len(sens.Limits) || len(js.Parameters) != 1 || js.Parameters[0].PerUnit != sens.Parameters[0].PerUnit {
		t.Errorf("summary.json sensitivity %+v, result's %+v", js, sens)
	}
	for _, l := range js.Limits {
		if l.Constraint == "g1" && (!l.Active || l.PerUnit != g1.PerUnit) {
			t.Errorf("summary.json g1 %+v, result's %+v", l, *g1)
		}
	}
	var html bytes.Buffer
	if err := report.Write(&html, res, report.Options{}); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{`<h2 id="sensitivity">Post-optimality sensitivity</h2>`, "<td>g1</td><td>lower</td>", strconv.FormatFloat(g1.PerUnit, 'g', 7, 64), "<td>x</td>"} {
		if !strings.Contains(html.String(), w) {
			t.Errorf("report lacks %q", w)
		}
	}
}

// TestMultipliersAgainstKKT: Sextant's limit costs are the Lagrange
// multipliers of the KKT conditions, checked on a problem whose
// multiplier is known in closed form, and an active limit whose
// multiplier is no derivative (a constraint that does not vary with the
// design, or one of two with the same gradient) is reported as not
// defined, with the reason, instead of a number.
//
// The problem is Example 12.3 of Nocedal & Wright, Numerical
// Optimization, 2nd ed. (from memory): minimise x1 + x2 subject to
// x1² + x2² ≤ 2; optimum (−1, −1), where ∇f = −λ∇c gives λ* = 1/2, so
// raising the limit b by one unit changes f* = −√(2b) by −λ* = −0.5.
// Without the check the flat limit was priced at −9 999.995 (the
// subproblem's elastic price) and the circle's λ* split 0.488 + 0.012
// between its two copies.
func TestMultipliersAgainstKKT(t *testing.T) {
	study := func(extra ...mdo.Constraint) *mdo.Study {
		s, _, err := funcStudy("kkt", []float64{-2, -2}, []float64{2, 2}, []string{"f", "c", "c_again", "held"},
			func(in, out []float64) error {
				x1, x2 := in[0], in[1]
				out[0] = x1 + x2
				out[1] = x1*x1 + x2*x2
				// the circle again, its gradient the same to 1e-9 (the
				// subproblem's interior-point solver needs rows that
				// differ, as a model's rounding makes them)
				out[2] = x1*x1 + x2*x2 + 1e-9*x1
				// held at its limit whatever the design, to rounding
				// (as a take-off field length by engines sized to it)
				out[3] = 1 + 1e-12*(x1+1)
				return nil
			})
		if err != nil {
			t.Fatal(err)
		}
		s.Objectives = []mdo.Objective{mdo.Minimize("f")}
		s.Constraints = append([]mdo.Constraint{mdo.AtMost("c", 2)}, extra...)
		return s
	}
	const lambda = 0.5 // Nocedal & Wright, Example 12.3
	tests := []struct {
		name       string
		study      *mdo.Study
		notDefined map[string]string // constraint -> part of the reason
	}{
		{"circle", study(), nil},
		{"circle and a limit the design does not move", study(mdo.AtMost("held", 1)),
			map[string]string{"held": "does not vary with the design"}},
		{"the circle twice", study(mdo.AtMost("c_again", 2)),
			map[string]string{"c": "the multipliers are not unique", "c_again": "the multipliers are not unique"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			res, rep, err := Sextant{}.Explore(context.Background(), tc.study)
			if err != nil {
				t.Fatal(err)
			}
			if !res.Feasible() || rep.Sensitivity == nil {
				t.Fatalf("no converged feasible optimum (f = %g, stop %v: %s)", res.Objective(), res.Stop, res.StopDetail)
			}
			if f := res.Objective(); math.Abs(f+2) > 1e-6 {
				t.Errorf("f* = %.9g, want −2 at (−1, −1)", f)
			}
			sens := rep.Sensitivity
			for _, l := range sens.Limits {
				if !l.Active {
					t.Errorf("%s: not active: %+v", l.Constraint, l)
					continue
				}
				why, undefined := tc.notDefined[l.Constraint]
				switch {
				case undefined && (!strings.Contains(l.NotDefined, why) || !math.IsNaN(l.PerUnit)):
					t.Errorf("%s: d f*/d limit %g, not defined %q; want NaN and a reason with %q", l.Constraint, l.PerUnit, l.NotDefined, why)
				case !undefined && (l.NotDefined != "" || math.Abs(l.PerUnit+lambda) > 1e-5):
					t.Errorf("%s: d f*/d limit %g (not defined %q), want −λ* = %g", l.Constraint, l.PerUnit, l.NotDefined, -lambda)
				}
			}
			// the result's text, summary.json and the report say why
			var html bytes.Buffer
			if err := report.Write(&html, res, report.Options{}); err != nil {
				t.Fatal(err)
			}
			js, err := json.Marshal(store.NewSummary(res, store.SummaryOptions{}))
			if err != nil {
				t.Fatal(err)
			}
			for name, why := range tc.notDefined {
				for _, w := range []struct{ where, text, want string }{
					{"text", res.String(), "active  not defined: "},
					{"summary.json", string(js), `"constraint":"` + name + `"`},
					{"summary.json", string(js), `"per_unit":null`},
					{"summary.json", string(js), `"not_defined":"`},
					{"report", html.String(), `<td class="num">not defined</td>`},
				} {
					if !strings.Contains(w.text, w.want) || !strings.Contains(w.text, why) {
						t.Errorf("the %s does not say why %s has no sensitivity (%q, %q):\n%s", w.where, name, w.want, why, w.text)
					}
				}
			}
		})
	}
}
