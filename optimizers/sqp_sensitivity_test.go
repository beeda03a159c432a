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
