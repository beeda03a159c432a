package repl

import (
	"context"
	"maps"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo/store"
)

// Three more scripts of a research engineer: a series of optimisations
// in a loop over the wing sweep, compared (sweep_series); a discipline of
// the script's own coupled with the aircraft's through a shared design
// variable and an output it reads (noise_discipline); and a long search
// that is cut short and picked up from its results.db (long_search).

// sweepLine is a line cell 2 of sweep_series prints.
var sweepLine = regexp.MustCompile(`sweep (\d+)°: fuel +([\d.]+) kg, wing +([\d.]+) m², aspect ratio +([\d.]+), feasible (true|false)`)

func TestUserScriptsOfASeries(t *testing.T) {
	if testing.Short() {
		t.Skip("replays four optimisations; TestUserScriptMistakes checks the failures under -short")
	}
	t.Run("sweep_series", func(t *testing.T) {
		r := replayScript(t, "sweep_series", 0)
		if r.err != nil {
			t.Fatal(r.err)
		}
		lines := sweepLine.FindAllStringSubmatch(r.output(t, 2), -1)
		if len(lines) != 4 {
			t.Fatalf("cell 2 printed %d sweep lines, want 4:\n%s", len(lines), r.output(t, 2))
		}
		// the published result is the one of least fuel among the
		// feasible optima
		least, leastSweep := math.Inf(1), ""
		for _, l := range lines {
			fuel, _ := strconv.ParseFloat(l[2], 64)
			if l[5] == "true" && fuel < least {
				least, leastSweep = fuel, l[1]
			}
		}
		if len(r.results) != 1 || r.results[0].Study != "sweep_"+leastSweep {
			t.Fatalf("published %d results, want the one of sweep %s° (least fuel %g kg)", len(r.results), leastSweep, least)
		}
		res := r.results[0]
		checkFeasibleBest(t, r, res)
		sweep, _ := strconv.ParseFloat(leastSweep, 64)
		if s := res.Get("wing.sweep"); s != sweep {
			t.Errorf("%s: wing.sweep %g at its optimum, want the fixed %g", res.Study, s, sweep)
		}
		// no other sweep's optimal wing does better at this sweep: each,
		// analysed by the model itself at the published sweep, burns
		// more fuel or breaks a limit (the study's constraints)
		rj := disciplines.Kestrel()
		sys, err := rj.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range lines {
			if l[1] == leastSweep {
				continue
			}
			area, _ := strconv.ParseFloat(l[3], 64)
			ar, _ := strconv.ParseFloat(l[4], 64)
			p := map[string]float64{}
			for k, v := range rj.Parameters {
				p[k] = v
			}
			p["wing.sweep"], p["wing.area"], p["wing.aspect_ratio"] = sweep, area, ar
			sol, err := sys.Analyze(context.Background(), p)
			if err != nil {
				continue // the wing does not analyse at this sweep
			}
			ok := sol.Get("perf.takeoff_field_length") <= 1600 && sol.Get("perf.landing_field_length") <= 1400 && sol.Get("stability.static_margin_takeoff") >= 0.05
			if fuel := sol.Get("mass.fuel"); ok && fuel < res.Objective()*(1-1e-3) {
				t.Errorf("the %s° optimum's wing (%g m², aspect ratio %g) at %g° burns %.1f kg, less than the %.1f kg found there", l[1], area, ar, sweep, fuel, res.Objective())
			}
		}
		if _, err := os.Stat(filepath.Join(r.dir, "sweep_series", "comparison.html")); err != nil {
			t.Errorf("no comparison page: %v", err)
		}
	})
	t.Run("noise_discipline", func(t *testing.T) {
		r := replayScript(t, "noise_discipline", 0)
		if r.err != nil {
			t.Fatal(r.err)
		}
		res := r.result(t, "quiet_regional_jet")
		checkFeasibleBest(t, r, res)
		// the script's discipline computed its invented correlation from
		// the aircraft's outputs
		want := 92 + 15*math.Log10(res.Get("mass.takeoff")/40000) - 8*math.Log2(res.Get("engine.bypass_ratio"))
		if n := res.Get("noise.takeoff"); !relClose(n, want, 1e-12) {
			t.Errorf("noise.takeoff = %.12g, want the script's correlation %.12g", n, want)
		}
		// a higher bypass ratio lowers the specific fuel consumption
		// (common practice (no source)): with the noise limit not
		// binding, the least fuel is at the largest bypass ratio allowed
		if b := res.Get("engine.bypass_ratio"); b != 3 {
			t.Errorf("engine.bypass_ratio %g at the optimum, want its upper bound 3", b)
		}
		if res.Sensitivity == nil {
			t.Fatal("Sextant gave no sensitivity")
		}
		// the engines are sized for the take-off field, the study's limit
		// (engine.sizing_field_length): the model itself, at the
		// optimum's wing and 2 m² either side, gives the same field length
		// to rounding, so its limit has no cost to give (it is reported
		// as not defined); the landing field length, which the wing
		// sets, has one, and a longer field saves fuel
		rj := disciplines.Kestrel()
		sys, err := rj.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		for _, da := range []float64{-2, 0, 2} {
			p := maps.Clone(rj.Parameters)
			p["wing.area"], p["engine.bypass_ratio"] = res.Get("wing.area")+da, res.Get("engine.bypass_ratio")
			sol, err := sys.Analyze(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			if f := sol.Get("perf.takeoff_field_length"); !relClose(f, 1600, 1e-9) {
				t.Errorf("wing %+g m² from the optimum: take-off field %.12g m, want the 1 600 m the engines are sized for", da, f)
			}
		}
		for _, l := range res.Sensitivity.Limits {
			switch l.Constraint {
			case "perf.takeoff_field_length":
				if !l.Active || !math.IsNaN(l.PerUnit) || !strings.Contains(l.NotDefined, "does not vary with the design") {
					t.Errorf("take-off field limit %+v: want active and not defined", l)
				}
			case "perf.landing_field_length":
				if !l.Active || l.NotDefined != "" || !(l.PerUnit < 0) {
					t.Errorf("landing field limit %+v: want active with a negative cost", l)
				}
			}
		}
	})
}

// The long search cut short (here at its 40th iteration, where it says
// so: the test cancels the run on the word) and picked up from its
// results.db ends at the best point, bit for bit, and with the
// evaluations of the search that was not cut short.
func TestUserScriptPickedUp(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a long search three times; TestPrincipalStoreAgreesWithSummary picks up under -short")
	}
	text, err := os.ReadFile(filepath.Join("testdata", "scripts", "long_search.study"))
	if err != nil {
		t.Fatal(err)
	}
	src := strings.NewReplacer("import (\n", "import (\n\t\"fmt\"\n",
		"if err := cell.Attach(study)", "study.Progress = func(p mdo.Progress) {\n\tif p.Iteration == 40 {\n\t\tfmt.Println(\"interrupt\")\n\t}\n}\nif err := cell.Attach(study)").Replace(string(text))
	file := writeStudy(t, "long_search", src)
	whole := filepath.Join(t.TempDir(), "whole")
	if stderr, err := runInto(t, context.Background(), file, whole, nil); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	dir := filepath.Join(t.TempDir(), "cut")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	if _, err := runInto(t, ctx, file, dir, func(o *RunOptions) { o.Stdout = &cancelOn{word: "interrupt", cancel: cancel} }); err != nil {
		t.Logf("the run cut short: %v", err)
	}
	cut, err := store.ReadSummary(filepath.Join(dir, "long_search", "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if stderr, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.PickUp = true }); err != nil {
		t.Fatalf("--pick-up: %v\n%s", err, stderr)
	}
	a, err := store.ReadSummary(filepath.Join(whole, "long_search", "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	b, err := store.ReadSummary(filepath.Join(dir, "long_search", "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if cut.Evaluations == 0 || cut.Evaluations >= a.Evaluations || b.PickedUp != cut.Evaluations {
		t.Errorf("cut short after %d of %d evaluations, %d picked up", cut.Evaluations, a.Evaluations, b.PickedUp)
	}
	if a.Best == nil || b.Best == nil || a.Best.ID != b.Best.ID || math.Float64bits(float64(a.Best.Objective)) != math.Float64bits(float64(b.Best.Objective)) || a.Evaluations != b.Evaluations {
		t.Errorf("picked up: %d evaluations, best %+v; the search not cut short: %d, best %+v", b.Evaluations, b.Best, a.Evaluations, a.Best)
	}
}
