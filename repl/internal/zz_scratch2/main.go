package main

import (
	"fmt"
	"os"
	"reflect"

	"couplet/repl/symbols"

	"github.com/traefik/yaegi/interp"
)

func main() {
	i := interp.New(interp.Options{Stdout: os.Stdout, Stderr: os.Stderr})
	i.Use(symbols.Symbols)
	for _, src := range []string{
		`import "fmt"`,
		"func side() int { fmt.Println(\"SIDE\"); return 1 }\nfunc two() (int, int) { fmt.Println(\"TWO\"); return 1, 2 }\nfunc none() { fmt.Println(\"NONE\") }",
		`x := 42`,
		`none()`,
		`side()`,
		`x`,
		`two()`,
		`x`,
		`none()`,
		`fmt.Println("P")`,
		`fmt.Sprint("S")`,
		`var y float64 = 2`,
		`none()`,
		`b := undefinedthing + 1`,
		"\n\nc := 1\nd := c.Foo",
		"var q = 3\ntype T struct{A int}\nfunc (t T) String() string { return fmt.Sprint(\"T\", t.A) }",
		`any(T{4})`,
		"w := 1\n\nfunc() { var m map[string]int\n m[\"a\"] = 1 }()",
		"arr := []int{1}\n_ = arr[5]",
		`any(q)`,
		`any(fmt.Errorf("e"))`,
		"if true {\n  var p *T\n  _ = p.A\n}",
	} {
		v, err := eval(i, src)
		fmt.Printf("SRC %q\n  -> valid=%v ", src, v.IsValid())
		if v.IsValid() && err == nil {
			fmt.Printf("kind=%v type=%v val=%v ", v.Kind(), v.Type(), v)
			if v.Kind() == 20 && !v.IsNil() { fmt.Printf("elem=%T %v", v.Interface(), v.Interface()) }
		}
		fmt.Printf("err=%v (%T)\n", err, err)
		if p, ok := err.(interp.Panic); ok {
			fmt.Printf("  panic value %v stack:\n%s\n", p.Value, p.Stack)
		}
	}
}

func eval(i *interp.Interpreter, src string) (v reflect.Value, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("recovered: %v", r)
		}
	}()
	return i.Eval(src)
}
