package repl

import (
	"context"
	"errors"
	"fmt"
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
		{"range over a function, with break and continue", []string{"func count(n int) func(func(int) bool) {\n\treturn func(yield func(int) bool) {\n\t\tfor i := 0; i < n; i++ {\n\t\t\tif !yield(i) {\n\t\t\t\treturn\n\t\t\t}\n\t\t}\n\t}\n}", "s := 0\nfor x := range count(10) {\n\tif x == 5 {\n\t\tbreak\n\t}\n\tif x%2 == 1 {\n\t\tcontinue\n\t}\n\ts += x\n}\ns"}, "6\n"},
		{"range over a function of two values, returning from inside", []string{"func pairs(xs []string) func(func(int, string) bool) {\n\treturn func(yield func(int, string) bool) {\n\t\tfor i, v := range xs {\n\t\t\tif !yield(i, v) {\n\t\t\t\treturn\n\t\t\t}\n\t\t}\n\t}\n}\nfunc find(xs []string, w string) (int, bool) {\n\tfor i, v := range pairs(xs) {\n\t\tif v == w {\n\t\t\treturn i, true\n\t\t}\n\t}\n\treturn -1, false\n}", "fmt.Println(find([]string{\"wing\", \"tail\"}, \"tail\"))\nfmt.Println(find(nil, \"fin\"))"}, "1 true\n-1 false\n"},
		{"range over a function: continue and break of an outer loop", []string{"func pairs(xs []string) func(func(int, string) bool) {\n\treturn func(yield func(int, string) bool) {\n\t\tfor i, v := range xs {\n\t\t\tif !yield(i, v) {\n\t\t\t\treturn\n\t\t\t}\n\t\t}\n\t}\n}\nn := 0\nouter:\nfor i := 0; i < 3; i++ {\n\tfor j := range pairs([]string{\"a\", \"b\", \"c\"}) {\n\t\tif j == 1 {\n\t\t\tcontinue outer\n\t\t}\n\t\tif i == 2 {\n\t\t\tbreak outer\n\t\t}\n\t\tn++\n\t}\n}\nn"}, "2\n"},
		{"range over a function: a variable per iteration, nested loops, the = form", []string{"func count(n int) func(func(int) bool) {\n\treturn func(yield func(int) bool) {\n\t\tfor i := 0; i < n; i++ {\n\t\t\tif !yield(i) {\n\t\t\t\treturn\n\t\t\t}\n\t\t}\n\t}\n}", "var fs []func() int\nfor x := range count(3) {\n\tfs = append(fs, func() int { return x })\n}\nt := 0\nfor a := range count(3) {\n\tfor b := range count(3) {\n\t\tif b > a {\n\t\t\tbreak\n\t\t}\n\t\tt++\n\t}\n}\nvar last int\nfor last = range count(4) {\n}\nfmt.Println(fs[0](), fs[2](), t, last)"}, "0 2 6 3\n"},
		{"range over a cell's function declaration, labelled, return ends the cell", []string{"func three(yield func() bool) {\n\t_ = yield() && yield() && yield()\n}\nc := 0\nL:\nfor range three {\n\tc++\n\tif c == 2 {\n\t\tbreak L\n\t}\n}\nfmt.Println(c)\nfor range three {\n\treturn\n}\nfmt.Println(\"not reached\")"}, "2\n"},
		{"printing a cell's type with a String method", []string{"type kg float64\nfunc (k kg) String() string { return fmt.Sprintf(\"%.1f kg\", float64(k)) }\nm := kg(3)\nfmt.Println(m, fmt.Sprint(m, m))\nfmt.Printf(\"%v|%s|%.2f|%6.1f|%#v\\n\", m, m, m, m, m)\nm"}, "3.0 kg 3.0 kg 3.0 kg\n3.0 kg|3.0 kg|3.00|   3.0|3\n3.0 kg\n"},
		{"printing a cell's types with pointer String and Error methods, in a function", []string{"type rib struct{ n int }\nfunc (r *rib) String() string { return fmt.Sprint(\"rib \", r.n) }\ntype fault struct{}\nfunc (fault) Error() string { return \"spar fault\" }\nfunc describe(r *rib) string { return fmt.Sprintf(\"%v and %v\", r, fault{}) }\nvar none *rib\nfmt.Println(describe(&rib{2}), none)"}, "rib 2 and spar fault <nil>\n"},
		{"errors.As and %w with a cell's error types", []string{"import \"errors\"\ntype stallErr struct{ speed float64 }\nfunc (e *stallErr) Error() string { return fmt.Sprintf(\"stall at %g m/s\", e.speed) }\ntype code int\nfunc (c code) Error() string { return fmt.Sprint(\"code \", int(c)) }\nvar err error = fmt.Errorf(\"climb: %w\", &stallErr{52})\nvar se *stallErr\nfmt.Println(err, errors.As(err, &se), se.speed)\nvar c code\njoined := errors.Join(errors.New(\"a\"), fmt.Errorf(\"b: %w\", code(7)))\nfmt.Println(errors.As(joined, &c), c)\nvar none *stallErr\nfmt.Println(errors.As(errors.New(\"plain\"), &none), none == nil)"}, "climb: stall at 52 m/s true 52\ntrue code 7\nfalse true\n"},
		{"a var declaration's value keeps the cell's rewrites", []string{"type kg float64\nfunc (k kg) String() string { return fmt.Sprint(float64(k), \" kg\") }\nvar s = fmt.Sprint(kg(2))\nvar (\n\tn    = 2\n\ttext string = fmt.Sprint(kg(n))\n)\nfmt.Println(s, text)"}, "2 kg 2 kg\n"},
		{"a variable declared again reads its earlier value", []string{"x := 1", "x := x + 1\nx", "x"}, "2\n2\n"},
		{"a slice declared again by appending to it", []string{"xs := []int{1, 2}", "fmt.Println(len(xs))\nxs := append(xs, 3)\nlen(xs)"}, "2\n3\n"},
		{"a variable declared again with another type from its value", []string{"n := 3", "n := fmt.Sprint(n) + \" wings\"\nn"}, "3 wings\n"},
		{"a generic type with a method", []string{"type pair[T any] struct{ a, b T }\nfunc (p pair[T]) sum(f func(T, T) T) T { return f(p.a, p.b) }\np := pair[int]{1, 2}\np.sum(func(a, b int) int { return a + b })"}, "3\n"},
		{"a generic type with a pointer method and two type parameters", []string{"type entry[K comparable, V any] struct {\n\tk K\n\tv V\n}\nfunc (e *entry[K, V]) set(v V) { e.v = v }\ne := &entry[string, float64]{\"span\", 30}\ne.set(32)\ne.v"}, "32\n"},
		{"a recover at the top of the cell gets the value itself", []string{"defer func() {\n\tr := recover()\n\ts, isString := r.(string)\n\tfmt.Println(isString, s)\n}()\npanic(\"flutter\")"}, "true flutter\n"},
		{"a recover in a caller gets the value the callee panicked with", []string{"func bad() { panic(fmt.Sprint(\"spar \", 2)) }\nfunc safe() (r any) {\n\tdefer func() { r = recover() }()\n\tbad()\n\treturn nil\n}\nfmt.Printf(\"%T %v\\n\", safe(), safe())"}, "string spar 2\n"},
		{"a recover at the top of the cell gets the value of a function of an earlier cell", []string{"func fly() { panic(fmt.Errorf(\"stall at %d\", 3)) }", "defer func() {\n\tr := recover()\n\t_, isErr := r.(error)\n\tfmt.Println(isErr, r)\n}()\nfly()"}, "true stall at 3\n"},
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
		{"panic in a function the cell calls: the line in the function", "func stall() {\n\tpanic(\"stall\")\n}\nfmt.Print()\nstall()", "panic", 2, "stall"},
		{"undefined name inside an if body", "x := 1\nif x > 0 {\n\ty := x + undefinedThing\n\t_ = y\n}", "compile", 3, "undefined: undefinedThing"},
		{"no such field, with the type", "r := &mdo.Result{}\nif r != nil {\n\tv := r.Bestt\n\t_ = v\n}", "compile", 3, "r.Bestt undefined (type *mdo.Result has no field or method Bestt"},
		{"a generic function of a compiled package", "import \"slices\"\nxs := []int{3, 1, 2}\nslices.Sort(xs)", "compile", 3, "undefined: slices.Sort; the functions of package slices are generic"},
		{"a defer inside a range over a function", "func two(yield func(int) bool) {\n\t_ = yield(1) && yield(2)\n}\nfor x := range two {\n\tdefer fmt.Println(x)\n}", "compile", 5, "a defer inside a range over a function is not supported"},
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

// A panic in code a cell declares (a function, a closure, a method, a
// function of an earlier cell) is reported on the line of the statement
// that panicked, not on the line of the cell that called it; a panic in
// an earlier cell's code names that cell and line beside the running
// cell's line.
func TestPanicIsPlacedInsideTheFunction(t *testing.T) {
	tests := []struct {
		name           string
		cells          []string // the last one fails
		line           int
		atCell, atLine int
		msg            string
	}{
		{"a function", []string{"func stall(v float64) {\n\tif v < 60 {\n\t\tpanic(fmt.Sprintf(\"stall at %g m/s\", v))\n\t}\n}\nstall(80)\nstall(50)"}, 3, 0, 0, "stall at 50 m/s"},
		{"a closure", []string{"check := func(cl float64) {\n\tif cl > 1.5 {\n\t\tpanic(\"beyond the maximum lift coefficient\")\n\t}\n}\ncheck(1.2)\ncheck(1.8)"}, 3, 0, 0, "beyond the maximum lift coefficient"},
		{"a method of a cell's type", []string{"type spar struct{ loads []float64 }\nfunc (s spar) load(i int) float64 {\n\tx := s.loads[i]\n\treturn x\n}\nsp := spar{loads: []float64{1, 2}}\nsp.load(1)\nsp.load(5)"}, 3, 0, 0, "runtime error: index out of range"},
		{"a pointer method through a nil receiver", []string{"type rib struct{ n int }\nfunc (r *rib) count() int {\n\tk := 1\n\treturn r.n + k\n}\nvar r *rib\nr.count()"}, 4, 0, 0, "runtime error: invalid memory address or nil pointer dereference"},
		{"a function of an earlier cell", []string{"func mass(parts []float64, i int) float64 {\n\ts := 0.0\n\ts += parts[i]\n\treturn s\n}", "fmt.Println(mass([]float64{1}, 0))\nmass([]float64{1}, 3)"}, 2, 1, 3, "out of range"},
		{"through a function of another earlier cell", []string{"func inner(x float64) float64 {\n\tif x > 1 {\n\t\tpanic(fmt.Sprint(\"x = \", x))\n\t}\n\treturn x\n}", "func outer(x float64) float64 {\n\treturn 2 * inner(x)\n}", "y := 3.0\nif y > 0 {\n\touter(y)\n}"}, 3, 1, 3, "x = 3"},
		{"the body of a range over a function", []string{"func count(n int) func(func(int) bool) {\n\treturn func(yield func(int) bool) {\n\t\tfor i := 0; i < n; i++ {\n\t\t\tif !yield(i) {\n\t\t\t\treturn\n\t\t\t}\n\t\t}\n\t}\n}\nxs := []int{1}\nfor i := range count(3) {\n\tfmt.Println(xs[i])\n}"}, 12, 0, 0, "runtime error: index out of range"},
		{"an iterator that goes on after the loop stopped", []string{"func bad(yield func(int) bool) {\n\tyield(1)\n\tyield(2)\n}\nfor x := range bad {\n\t_ = x\n\tbreak\n}"}, 3, 0, 0, "range function continued iteration after function for loop body returned false"},
		{"a closure a framework function calls back", []string{"import \"sort\"\nxs := []float64{3, 1, 2}\nsort.Slice(xs, func(i, j int) bool {\n\tif xs[i] == 2 {\n\t\tpanic(\"no order\")\n\t}\n\treturn xs[i] < xs[j]\n})"}, 5, 0, 0, "no order"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, _ := newTest(t, Options{})
			defer s.Close()
			for i, src := range tc.cells[:len(tc.cells)-1] {
				if c := s.Exec(context.Background(), src); c.Err != nil {
					t.Fatalf("cell %d: %v", i+1, c.Err)
				}
			}
			c := s.Exec(context.Background(), tc.cells[len(tc.cells)-1])
			var ce *CellError
			if !errors.As(c.Err, &ce) {
				t.Fatalf("error %v (%T), want a *CellError", c.Err, c.Err)
			}
			if ce.Kind != "panic" || ce.Cell != len(tc.cells) || ce.Line != tc.line || ce.AtCell != tc.atCell || ce.AtLine != tc.atLine || !strings.Contains(ce.Msg, tc.msg) {
				t.Errorf("got %q (cell %d, line %d, at cell %d, line %d), want cell %d, line %d, at cell %d, line %d, containing %q",
					ce, ce.Cell, ce.Line, ce.AtCell, ce.AtLine, len(tc.cells), tc.line, tc.atCell, tc.atLine, tc.msg)
			}
			if tc.atCell > 0 && !strings.Contains(ce.Error(), fmt.Sprintf("(in the code of cell %d, line %d)", tc.atCell, tc.atLine)) {
				t.Errorf("message %q does not name cell %d, line %d", ce, tc.atCell, tc.atLine)
			}
		})
	}
}

// An objective, a constraint or a discipline function of a cell that
// panics when an optimiser calls it makes a failed evaluation whose
// reason names the cell and line of the panic; the cell goes on, and a
// misspelt name read there is still the study's error.
func TestPanicInAFunctionAnOptimiserCalls(t *testing.T) {
	study := "st, _ := mdo.SellarStudy(mdo.MDF)\n"
	run := "r, err := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), st)\nfmt.Println(err)\nfmt.Println(r.Evaluations, r.Failed)\nfmt.Println(r.Best.Err)"
	tests := []struct {
		name, cell, want string
	}{
		{"objective", study + "st.Objectives = []mdo.Objective{mdo.MinimizeFunc(\"bad\", func(v mdo.Values) float64 {\n\tif v.Get(\"x\") >= 0 {\n\t\tpanic(\"objective broke\")\n\t}\n\treturn 1\n})}\n" + run,
			"<nil>\n3 3\nobjective bad panicked: objective broke (cell 1, line 4)\n"},
		{"constraint", study + "st.Constraints = []mdo.Constraint{mdo.AtMost(\"g\", 1).WithFunc(func(v mdo.Values) float64 {\n\tys := []float64{v.Get(\"y1\")}\n\treturn ys[1]\n})}\n" + run,
			"<nil>\n3 3\nconstraint g panicked: runtime error: index out of range (cell 1, line 4)\n"},
		{"declared in an earlier cell", "func obj(v mdo.Values) float64 {\n\tpanic(fmt.Sprint(\"no value at x = \", v.Get(\"x\") > -1))\n}\n", "<nil>\n3 3\nobjective f panicked: no value at x = true (cell 1, line 2)\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, _ := newTest(t, Options{})
			defer s.Close()
			cells := []string{tc.cell}
			if tc.name == "declared in an earlier cell" {
				cells = append(cells, study+"st.Objectives = []mdo.Objective{mdo.MinimizeFunc(\"f\", obj)}\n"+run)
			}
			for i, src := range cells {
				if c := s.Exec(context.Background(), src); c.Err != nil {
					t.Fatalf("cell %d: %v", i+1, c.Err)
				}
			}
			if out.String() != tc.want {
				t.Errorf("output %q, want %q", out.String(), tc.want)
			}
		})
	}
}

// Only a function that can panic by itself records its lines (the
// recording costs a deferred call per call); the others are left as
// they are.
func TestOnlyFunctionsThatMayPanicRecordTheirLines(t *testing.T) {
	tests := []struct {
		name, fn string
		records  bool
	}{
		{"arithmetic on floats", "func f(x float64) float64 { return x*x/2 + 1 }", false},
		{"package math and conversions", "func f(x float64) int { return int(math.Sqrt(x)) }", false},
		{"a call of a cell function", "func g(x float64) float64 { return x }\nfunc f(x float64) float64 { return g(x) + 1 }", false},
		{"reading a map and a constant array index", "func f(m map[string]int) int {\n\tvar a [2]int\n\treturn m[\"x\"] + a[1]\n}", false},
		{"comma-ok assertion", "func f(v any) bool {\n\t_, ok := v.(string)\n\treturn ok\n}", false},
		{"indexing a slice", "func f(xs []float64) float64 { return xs[0] }", true},
		{"integer division", "func f(a, b int) int { return a / b }", true},
		{"a framework call", "func f(v mdo.Values) float64 { return v.Get(\"x\") }", true},
		{"a function value", "func f(g func() int) int { return g() }", true},
		{"following a pointer", "type w struct{ s float64 }\nfunc f(p *w) float64 { return p.s }", true},
		{"an assertion", "func f(v any) string { return v.(string) }", true},
		{"writing a map", "func f(m map[string]int) { m[\"a\"] = 1 }", true},
		{"panic", "func f() { panic(\"x\") }", true},
		{"a closure that indexes, inside one that does not", "func f() func([]int) int {\n\treturn func(xs []int) int { return xs[1] }\n}", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, _ := newTest(t, Options{})
			defer s.Close()
			p, err := s.transform(&Cell{Number: 1, Source: tc.fn})
			if err != nil {
				t.Fatal(err)
			}
			if got := strings.Contains(p.decls, placeVar); got != tc.records {
				t.Errorf("records its lines: %v, want %v\n%s", got, tc.records, p.decls)
			}
		})
	}
}
