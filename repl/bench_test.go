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
