// Command sellarprog is the test program of package external: the
// functions discipline of the Sellar problem (Sellar, Batill & Renaud,
// AIAA 96-0714, 1996), f = x² + z2 + y1 + exp(−y2), g1 = y1, g2 = y2, as
// a program that reads "name = value" lines from input.txt and writes
// "name = value" lines to standard output.
//
// Its first argument chooses a way to misbehave: "ok" (none), "exit"
// (writes to standard error and exits with status 3), "garbage" (writes
// no number for f), "hang" (writes "hanging" to hang.txt, then blocks
// until killed) and "json" (writes out.json instead of standard output).
package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"time"
)

func main() {
	mode := "ok"
	if len(os.Args) > 1 {
		mode = os.Args[1]
	}
	f, err := os.Open("input.txt")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(2)
	}
	v := map[string]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		name, val, ok := strings.Cut(sc.Text(), "=")
		if !ok {
			continue
		}
		x, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if err != nil {
			fmt.Fprintf(os.Stderr, "sellarprog: %s: %v\n", name, err)
			os.Exit(2)
		}
		v[strings.TrimSpace(name)] = x
	}
	fv := v["x"]*v["x"] + v["z2"] + v["y1"] + math.Exp(-v["y2"])
	switch mode {
	case "exit":
		fmt.Fprintln(os.Stderr, "sellarprog: solver diverged at iteration 12")
		os.Exit(3)
	case "garbage":
		fmt.Println("f = ******")
		return
	case "hang":
		os.WriteFile("hang.txt", []byte("hanging\n"), 0o644)
		time.Sleep(time.Hour)
	case "json":
		b, _ := json.Marshal(map[string]float64{"f": fv, "g1": v["y1"], "g2": v["y2"]})
		os.WriteFile("out.json", b, 0o644)
		return
	}
	fmt.Printf("f = %s\ng1 = %s\ng2 = %s\n", strconv.FormatFloat(fv, 'g', -1, 64),
		strconv.FormatFloat(v["y1"], 'g', -1, 64), strconv.FormatFloat(v["y2"], 'g', -1, 64))
}
