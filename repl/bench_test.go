package repl

import (
	"context"
	"testing"
)

// studySetup builds, in a session, a maker of the Sellar MDF study with
// either declared objective and constraints (system variables, evaluated
// natively) or scripted ones (interpreted functions of the analysis).
const studySetup = `import (
	"math"

	"couplet/mdo"
	"couplet/optimizers"
)

func makeStudy(scripted bool) *mdo.Study {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		panic(err)
	}
	st := &mdo.Study{
		Name:    "sellar",
		System:  sys,
		Design:  []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)},
		Seed:    1,
		Workers: 1,
	}
	if !scripted {
		st.Objectives = []mdo.Objective{mdo.Minimize("f")}
		st.Constraints = []mdo.Constraint{mdo.AtLeast("g1", 3.16), mdo.AtMost("g2", 24)}
		return st
	}
	st.Objectives = []mdo.Objective{mdo.MinimizeFunc("f", func(v mdo.Values) float64 {
		x := v.Get("x")
		return x*x + v.Get("z2") + v.Get("y1") + math.Exp(-v.Get("y2"))
	})}
	st.Constraints = []mdo.Constraint{
		mdo.AtLeast("g1", 3.16).WithFunc(func(v mdo.Values) float64 { return v.Get("y1") }),
		mdo.AtMost("g2", 24).WithFunc(func(v mdo.Values) float64 { return v.Get("y2") }),
	}
	return st
}
`

// benchmarkSellar runs a fixed-budget Nelder–Mead on the Sellar study
// from a session cell.
func benchmarkSellar(b *testing.B, scripted string) {
	s, err := NewSession(Options{})
	if err != nil {
		b.Fatal(err)
	}
	if c := s.Exec(context.Background(), studySetup); c.Err != nil {
		b.Fatal(c.Err)
	}
	run := "res, err := optimizers.NelderMead{MaxEvaluations: 600}.Minimize(context.Background(), makeStudy(" + scripted + "))\nif err != nil {\n\tpanic(err)\n}\nres.Evaluations"
	if c := s.Exec(context.Background(), "import \"context\""); c.Err != nil {
		b.Fatal(c.Err)
	}
	timeOptimisation(b, s, run)
}

// BenchmarkSellarDeclared: objective and constraints named as system
// variables.
func BenchmarkSellarDeclared(b *testing.B) { benchmarkSellar(b, "false") }

// BenchmarkSellarScripted: the same objective and constraints as
// interpreted functions (aim: at most 1.5 times the declared time).
func BenchmarkSellarScripted(b *testing.B) { benchmarkSellar(b, "true") }

// BenchmarkNewSession is the cost of a fresh interpreter with every table.
func BenchmarkNewSession(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := NewSession(Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// jetSetup builds, in a session, a maker of the business-jet study (the
// invented Swiftlet S12) with declared or scripted objective and
// constraints.
const jetSetup = `import (
	"context"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/optimizers"
)

jet := disciplines.Swiftlet()
jetSys, err := jet.NewSystem()
if err != nil {
	panic(err)
}
func makeJet(scripted bool) *mdo.Study {
	st := &mdo.Study{
		Name:    "jet",
		System:  jetSys,
		Design:  []mdo.DesignVar{mdo.Continuous("wing.area", 100, 220), mdo.Continuous("wing.aspect_ratio", 1.8, 3.6)},
		Fixed:   jet.Parameters,
		Seed:    1,
		Workers: 1,
	}
	if !scripted {
		st.Objectives = []mdo.Objective{mdo.Minimize("mass.takeoff")}
		st.Constraints = []mdo.Constraint{mdo.AtMost("perf.takeoff_field_length", 2400), mdo.AtLeast("stability.static_margin_takeoff", 0.05)}
		return st
	}
	st.Objectives = []mdo.Objective{mdo.MinimizeFunc("mass.takeoff", func(v mdo.Values) float64 { return v.Get("mass.takeoff") })}
	st.Constraints = []mdo.Constraint{
		mdo.AtMost("perf.takeoff_field_length", 2400).WithFunc(func(v mdo.Values) float64 { return v.Get("perf.takeoff_field_length") }),
		mdo.AtLeast("stability.static_margin_takeoff", 0.05).WithFunc(func(v mdo.Values) float64 { return v.Get("stability.static_margin_takeoff") }),
	}
	return st
}
`

// benchmarkJet runs a fixed-budget Nelder–Mead on the business jet.
func benchmarkJet(b *testing.B, scripted string) {
	s, err := NewSession(Options{})
	if err != nil {
		b.Fatal(err)
	}
	if c := s.Exec(context.Background(), jetSetup); c.Err != nil {
		b.Fatal(c.Err)
	}
	run := "res, err := optimizers.NelderMead{MaxEvaluations: 100}.Minimize(context.Background(), makeJet(" + scripted + "))\nif err != nil {\n\tpanic(err)\n}\nres.Evaluations"
	timeOptimisation(b, s, run)
}

// BenchmarkBusinessJetDeclared: a coupled aircraft analysis per point,
// objective and constraints declared as system variables.
func BenchmarkBusinessJetDeclared(b *testing.B) { benchmarkJet(b, "false") }

// BenchmarkBusinessJetScripted: the same with interpreted objective and
// constraints (aim: at most 1.5 times the declared time).
func BenchmarkBusinessJetScripted(b *testing.B) { benchmarkJet(b, "true") }

// timeOptimisation runs the cell run (ending in the evaluation count) b.N
// times and reports evaluations per run and time per evaluation.
func timeOptimisation(b *testing.B, s *Session, run string) {
	b.Helper()
	b.ResetTimer()
	evals := 0
	for i := 0; i < b.N; i++ {
		c := s.Exec(context.Background(), run)
		if c.Err != nil {
			b.Fatal(c.Err)
		}
		evals = c.Value.(int)
	}
	b.ReportMetric(float64(evals), "evals/op")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*evals), "ns/eval")
}
