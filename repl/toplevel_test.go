package repl

import (
	"context"
	"errors"
	"strings"
	"testing"
)

// Ordinary Go at the top level of a cell behaves as in the body of a
// compiled Go function, and the cell's variables stay visible to later
// cells. Each probe failed (or gave another answer) when the cell went to
// the interpreter's top level as it is; the wanted output is what
// compiled Go prints (go1.22 or later: range over an integer, one loop
// variable per iteration).
func TestTopLevelIsOrdinaryGo(t *testing.T) {
	pair := "func f() (int, int) { return 1, 2 }\n"
	tests := []struct {
		name  string
		cells []string
		want  string
	}{
		{"multi-value := inside if", []string{pair + "if true {\n\tv, w := f()\n\tfmt.Println(v, w)\n}"}, "1 2\n"},
		{"multi-value := inside for", []string{pair + "for i := 0; i < 2; i++ {\n\tv, w := f()\n\tfmt.Println(v+w, i)\n}"}, "3 0\n3 1\n"},
		{"multi-value := inside a switch case", []string{pair + "switch {\ncase true:\n\tv, w := f()\n\tfmt.Println(v * w)\n}"}, "2\n"},
		{"indexing a result field at top level", []string{
			"result := &mdo.Result{Best: &mdo.Evaluation{Design: []float64{3, 4}}}",
			"v := result.Best.Design[0]\nv"}, "3\n"},
		{"indexing in the cell that makes the result", []string{
			"result := &mdo.Result{Best: &mdo.Evaluation{Design: []float64{3, 4}}}\nv := result.Best.Design[1]\nv"}, "4\n"},
		{"variables of a multi-value := reach later cells", []string{pair + "a, b := f()", "a + b"}, "3\n"},
		{"a closure over a top-level variable, across cells", []string{"n := 0\ninc := func() { n++ }\ninc()\ninc()\nn", "inc()\nn"}, "2\n3\n"},
		{"goto and a label", []string{"i := 0\nloop:\nif i < 3 {\n\ti++\n\tgoto loop\n}\ni"}, "3\n"},
		{"labelled break and continue", []string{"k := 0\nouter:\nfor i := 0; i < 3; i++ {\n\tfor j := 0; j < 3; j++ {\n\t\tif j == 1 {\n\t\t\tcontinue outer\n\t\t}\n\t\tif i == 2 {\n\t\t\tbreak outer\n\t\t}\n\t\tk++\n\t}\n}\nk"}, "2\n"},
		{"type switch", []string{"var x any = 2.5\nswitch y := x.(type) {\ncase int:\n\tfmt.Println(\"int\", y)\ncase float64:\n\tfmt.Println(\"float\", y)\n}"}, "float 2.5\n"},
		{"defer runs once, at the end of the cell", []string{"defer fmt.Println(\"deferred\")\nfmt.Println(\"first\")"}, "first\ndeferred\n"},
		{"defer with recover", []string{"defer func() {\n\tif r := recover(); r != nil {\n\t\tfmt.Println(\"recovered\", r)\n\t}\n}()\npanic(\"stall\")"}, "recovered stall\n"},
		{"select", []string{"ch := make(chan int, 1)\nch <- 4\nselect {\ncase v := <-ch:\n\tfmt.Println(\"got\", v)\ndefault:\n\tfmt.Println(\"none\")\n}"}, "got 4\n"},
		{"method value of a framework type", []string{"r := &mdo.Result{}\nfeasible := r.Feasible\nfeasible()"}, "false\n"},
		{"method value with arguments, taken before the receiver changes", []string{"st := mdo.Minimize(\"mass.takeoff\")\nstr := st.String\nst = mdo.Maximize(\"range\")\nstr()"}, "minimise mass.takeoff\n"},
		{"method expression of a framework type", []string{"feasible := (*mdo.Result).Feasible\nfeasible(&mdo.Result{})"}, "false\n"},
		{"method expression called at once", []string{"(*mdo.Result).Feasible(&mdo.Result{})"}, "false\n"},
		{"comma-ok forms at top level", []string{"m := map[string]int{\"a\": 1}\nw, ok := m[\"b\"]\nvar x any = 3\ns, isString := x.(string)\nfmt.Println(w, ok, s == \"\", isString)"}, "0 false true false\n"},
		{"method value of a cell's own type", []string{"type wing struct{ span float64 }\nfunc (w wing) half() float64 { return w.span / 2 }\nw := wing{30}\nh := w.half\nh()"}, "15\n"},
		{"generic function, type arguments inferred from a function literal", []string{"func mapTo[T, U any](xs []T, f func(T) U) []U {\n\tvar out []U\n\tfor _, x := range xs {\n\t\tout = append(out, f(x))\n\t}\n\treturn out\n}\nmapTo([]int{1, 2}, func(i int) float64 { return float64(i) / 2 })"}, "[0.5 1]\n"},
		{"a generic function of an earlier cell", []string{"func sum[T int | float64](xs ...T) T {\n\tvar s T\n\tfor _, x := range xs {\n\t\ts += x\n\t}\n\treturn s\n}", "if true {\n\ta, b := sum(1, 2), sum(0.5, 0.25)\n\tfmt.Println(a, b)\n}"}, "3 0.75\n"},
		{"a method declared in an earlier cell", []string{"type wing struct{ span float64 }\nfunc (w *wing) grow(d float64) { w.span += d }", "w := &wing{30}\nif w != nil {\n\tw.grow(2)\n}\nw.span"}, "32\n"},
		{"return ends the cell", []string{"fmt.Println(\"a\")\nif true {\n\treturn\n}\nfmt.Println(\"b\")"}, "a\n"},
		{"a block's := does not touch the top-level variable", []string{"x := 1\nif true {\n\tx := 2\n\t_ = x\n}\nx"}, "1\n"},
		{"range over an integer", []string{"s := 0\nfor i := range 4 {\n\ts += i\n}\ns"}, "6\n"},
		{"range over an integer variable, changing the copy", []string{"n := int64(3)\nc := 0\nfor i := range n {\n\ti += 10\n\tc++\n}\nc"}, "3\n"},
		{"one loop variable per iteration", []string{"var fs []func() int\nfor i := 0; i < 3; i++ {\n\tfs = append(fs, func() int { return i })\n}\nfs[0]() + fs[2]()"}, "2\n"},
		{"one range variable per iteration", []string{"var fs []func() string\nfor _, s := range []string{\"a\", \"b\"} {\n\tfs = append(fs, func() string { return s })\n}\nfs[0]() + fs[1]()"}, "ab\n"},
		{"redeclaring err beside a new variable", []string{pair + "a, err := f()\nb, err := f()\n_ = err\na + b"}, "2\n"},
		{"a var declaration starts at zero each run", []string{"var n int\nn++\nn", "var n int\nn++\nn"}, "1\n1\n"},
		{"a var group with and without values", []string{"var (\n\ta = 2\n\tb float64\n\tc, d = \"x\", 'y'\n)\nfmt.Println(a, b, c, d)"}, "2 0 x 121\n"},
		{"a cell's type used inside an if body", []string{"type pt struct{ x, y float64 }\nif true {\n\tp := pt{1, 2}\n\tfmt.Println(p.x + p.y)\n}"}, "3\n"},
		{"a function refers to a variable declared after it in the cell", []string{"func twice() int { return 2 * k }\nk := 21\ntwice()"}, "42\n"},
		{"a variable's type changes in a later cell", []string{"x := 1", "x := \"one\"\nx + \"!\""}, "one!\n"},
		{"a variable of a type from a package scripts cannot import", []string{"import \"couplet/optimizers/designmap\"\nsrc := designmap.RecordedFigures(designmap.Spec{X: \"z1\", Y: \"z2\"})\nif src != nil {\n\ta, b := 1, 2\n\tfmt.Println(a+b, src != nil)\n}", "src == nil", "other := designmap.RecordedFigures(designmap.Spec{X: \"z2\", Y: \"z1\"})\nother == nil"}, "3 true\nfalse\nfalse\n"},
		{"an older settings literal the interpreter accepts still runs", []string{"s := optimizers.NSGA2{Population: 28}\ns.Evolution.Population"}, "28\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, errb := newTest(t, Options{})
			defer s.Close()
			for i, src := range tc.cells {
				if c := s.Exec(context.Background(), src); c.Err != nil {
					t.Fatalf("cell %d: %v", i+1, c.Err)
				}
			}
			if errb.Len() > 0 {
				t.Errorf("stderr: %s", errb)
			}
			if out.String() != tc.want {
				t.Errorf("output %q, want %q", out.String(), tc.want)
			}
		})
	}
}

// A cell that fails names the real cause on the line of the cell where
// it is, as compiled Go would: a panic on the line of the panic, not on
// the enclosing statement; a compile error with the compiler's wording.
func TestTopLevelErrorsNameTheCauseAndLine(t *testing.T) {
	tests := []struct {
		name, cell string
		kind       string
		line       int
		msg        string
	}{
		{"panic inside an if", "x := 1\nif x > 0 {\n\tfmt.Println(\"a\")\n\tpanic(\"boom\")\n}", "panic", 4, "boom"},
		{"panic inside a loop inside an if", "if true {\n\tfor i := 0; i < 3; i++ {\n\t\tif i == 2 {\n\t\t\tpanic(fmt.Sprint(\"at \", i))\n\t\t}\n\t}\n}", "panic", 4, "at 2"},
		{"runtime error in a switch case", "xs := []float64{1}\nswitch {\ncase len(xs) > 0:\n\tk := 3\n\t_ = xs[k]\n}", "panic", 5, "index out of range"},
		{"panic in a function the cell calls: the line of the call", "func stall() {\n\tpanic(\"stall\")\n}\nfmt.Print()\nstall()", "panic", 5, "stall"},
		{"undefined name inside an if body", "x := 1\nif x > 0 {\n\ty := x + undefinedThing\n\t_ = y\n}", "compile", 3, "undefined: undefinedThing"},
		{"no such field, with the type", "r := &mdo.Result{}\nif r != nil {\n\tv := r.Bestt\n\t_ = v\n}", "compile", 3, "r.Bestt undefined (type *mdo.Result has no field or method Bestt"},
		{"a generic function of a compiled package", "import \"slices\"\nxs := []int{3, 1, 2}\nslices.Sort(xs)", "compile", 3, "undefined: slices.Sort; the functions of package slices are generic"},
		{"a := with no new variable", "a := 1\na := 2", "compile", 2, "no new variables on left side of :="},
		{"wrong number of values", "func f() (int, int) { return 1, 2 }\nif true {\n\tv := f()\n\t_ = v\n}", "compile", 3, "assignment mismatch: 1 variable but f returns 2 values"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, _ := newTest(t, Options{})
			defer s.Close()
			c := s.Exec(context.Background(), tc.cell)
			var ce *CellError
			if !errors.As(c.Err, &ce) {
				t.Fatalf("error %v (%T), want a *CellError", c.Err, c.Err)
			}
			if ce.Kind != tc.kind || ce.Line != tc.line || !strings.Contains(ce.Msg, tc.msg) {
				t.Errorf("got %q (kind %s, line %d), want kind %s line %d containing %q", ce, ce.Kind, ce.Line, tc.kind, tc.line, tc.msg)
			}
		})
	}
}

// The trailing expression shows every value of a call with several
// results; a call's error is shown when it is not nil, so a misspelt
// name never shows as a silent 0.
func TestTrailingCallShowsItsError(t *testing.T) {
	setup := "st, _ := mdo.SellarStudy(mdo.MDF)\nr, err := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), st)\nif err != nil {\n\tpanic(err)\n}"
	tests := []struct {
		name, cell, want string
	}{
		{"misspelt name: the value and the error", `r.Lookup("y11")`, "0\nerror: mdo: the result of study \"sellar\" has no variable \"y11\"; similar: y1\n"},
		{"known name: the value alone", `v, _ := r.Lookup("y1")` + "\n" + `x, err := r.Lookup("y1")` + "\n_ = err\nv == x", "true\n"},
		{"two plain values", "func two() (int, string) { return 7, \"wing\" }\ntwo()", "7\nwing\n"},
		{"nil error of a single-result call is not shown", "func check() error { return nil }\ncheck()", ""},
		{"error of a single-result call", "func check() error { return fmt.Errorf(\"no lift\") }\ncheck()", "error: no lift\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, errb := newTest(t, Options{})
			defer s.Close()
			if c := s.Exec(context.Background(), setup); c.Err != nil {
				t.Fatal(c.Err)
			}
			out.Reset()
			if c := s.Exec(context.Background(), tc.cell); c.Err != nil {
				t.Fatal(c.Err)
			}
			if errb.Len() > 0 {
				t.Errorf("stderr: %s", errb)
			}
			if !strings.HasPrefix(out.String(), tc.want) || (tc.want == "" && out.Len() > 0) {
				t.Errorf("output %q, want %q", out.String(), tc.want)
			}
		})
	}
}

// A cell whose last line is a call that never returns is stopped by
// Interrupt, the call runs once (the body function hands its value over
// inside the cell, so the interpreter has no trailing call to run again
// for its value), and the session goes on.
func TestTrailingCallCanBeInterrupted(t *testing.T) {
	w, errb := serveInterrupted(t, Options{}, "spinning", "calls := 0\nfunc spin() int {\n\tcalls++\n\tfmt.Println(\"spinning\")\n\tfor {\n\t}\n}\n\nspin()\n\n\ncalls * 42\n")
	if !strings.Contains(errb.String(), "stopped: interrupted (Ctrl-C)") {
		t.Errorf("stderr %q, want the cell stopped by the interrupt", errb.String())
	}
	// the call ran once: the session went on with calls at 1
	if !strings.HasSuffix(w.buf.String(), "spinning\n42\n") {
		t.Errorf("the session did not go on after one call: %q (stderr %q)", w.buf.String(), errb.String())
	}
}

// @vars lists the cell's hoisted variables and none of the names the
// session declares for its own use.
func TestVarsListsTheCellsVariables(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	defer s.Close()
	serve(t, s, "func f() (int, string) { return 1, \"a\" }\nn, label := f()\n@vars\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	for _, w := range []string{"label  string", "n      int"} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("@vars %q does not list %q", out, w)
		}
	}
	if strings.Contains(out.String(), sessionPrefix) {
		t.Errorf("@vars %q lists the session's own names", out)
	}
}
