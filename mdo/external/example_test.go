package external_test

import (
	"fmt"
	"os"

	"couplet/mdo"
	"couplet/mdo/external"
)

// ExampleNew wraps a program as a discipline. Here the "program" is cat,
// which echoes its input file (fed on standard input) so the answer read
// back is the area the template wrote in square feet. A study script
// passes cell.Programs() instead of external.AllowAll().
func ExampleNew() {
	work, err := os.MkdirTemp("", "example-external-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(work)
	d, err := external.New(external.Program{
		Name:     "wing_deck",
		Inputs:   []mdo.Var{{Name: "wing.area", Unit: "m2", Min: 1, Max: 1000}},
		Outputs:  []mdo.Var{{Name: "wing.area_echo", Unit: "m2"}},
		Command:  []string{"cat"},
		Stdin:    true,
		Template: "SREF = @{wing.area unit=ft2 fmt=%.4f}\n",
		Read:     []external.Read{{Output: "wing.area_echo", Key: "SREF", Unit: "ft2"}},
		WorkDir:  work,
	}, external.AllowAll())
	if err != nil {
		fmt.Println(err)
		return
	}
	out := make([]float64, 1)
	if err := d.Compute([]float64{100}, out); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.4f m2 read back, %d run\n", out[0], d.Runs())
	// Output: 100.0000 m2 read back, 1 run
}
