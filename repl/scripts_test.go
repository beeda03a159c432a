package repl

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"couplet/disciplines"
	"couplet/mdo"
	"couplet/mdo/store"
)

// The scripts of testdata/scripts are written the way a research
// engineer writes them (a discipline of their own, cell functions as
// objectives and constraints, a front and a point picked from it, a
// design of experiments and an optimisation from its best point, changed
// scenario parameters, a comparison, a sensitivity study) and with the
// mistakes they make (a misspelt name, bounds past a validity range, a
// constraint on an output that does not exist, a unit mistake, a problem
// with no feasible point, a panic in an objective, a loop that never
// ends, a failure after a result was published). Each is replayed
// headless (Run) and cell by cell in a session (Exec); both must say the
// same, and the outcome is checked against facts that do not come from
// the code under test: an optimum satisfies its first-order conditions,
// a front is non-dominated, a sensitivity predicts the re-optimised
// change, an error names the culprit.

// scriptReplay is what one script did, headless and in a session.
type scriptReplay struct {
	dir     string     // the headless run's output folder
	rec     *RunRecord // the headless run's record
	err     error      // the headless run's error
	stderr  string     // the headless run's standard error
	cells   []*Cell    // the session's cells
	sessErr string     // the session's standard error
	results []*mdo.Result
	session *Session
}

// replayScript replays testdata/scripts/name headless and in a session,
// and checks that both ran the same cells with the same output and the
// same failure.
func replayScript(t *testing.T, name string, timeout time.Duration) *scriptReplay {
	t.Helper()
	file := filepath.Join("testdata", "scripts", name+".study")
	r := &scriptReplay{dir: t.TempDir()}
	var stdout, stderr bytes.Buffer
	r.rec, r.err = Run(context.Background(), RunOptions{File: file, OutDir: r.dir, Stdout: &stdout, Stderr: &stderr, Timeout: timeout, Grace: 200 * time.Millisecond})
	r.stderr = stderr.String()
	if timeout > 0 {
		return r // a time limit stops the two at different points
	}
	text, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	f, err := ParseStudy(string(text))
	if err != nil {
		t.Fatal(err)
	}
	var sessErr bytes.Buffer
	sessDir := t.TempDir()
	s, err := NewSession(Options{Stderr: &sessErr, OutDir: sessDir, Script: string(text)})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	r.session = s
	for _, c := range f.Cells {
		cl := s.Exec(context.Background(), c.Source)
		r.cells = append(r.cells, cl)
		if cl.Err != nil {
			break
		}
	}
	r.sessErr = sessErr.String()
	r.results = s.Env().Published()
	if r.rec == nil || len(r.rec.Cells) != len(r.cells) {
		t.Fatalf("%s: the session ran %d cells, the headless run %v", name, len(r.cells), r.rec)
	}
	for i, c := range r.cells {
		h := r.rec.Cells[i]
		// the folders differ (a comparison says where it wrote its page)
		if a, b := strings.ReplaceAll(c.Output, sessDir, "OUT"), strings.ReplaceAll(h.Output, r.dir, "OUT"); a != b {
			t.Errorf("%s: cell %d: session output\n%s\nheadless output\n%s", name, i+1, a, b)
		}
		if fmt.Sprint(c.Err) != fmt.Sprint(h.Err) {
			t.Errorf("%s: cell %d: session error %v, headless error %v", name, i+1, c.Err, h.Err)
		}
	}
	return r
}

// result is the published result of the study named study.
func (r *scriptReplay) result(t *testing.T, study string) *mdo.Result {
	t.Helper()
	for _, res := range r.results {
		if res.Study == study {
			return res
		}
	}
	t.Fatalf("no result of study %s was published", study)
	return nil
}

// summary reads the summary.json the headless run wrote for study.
func (r *scriptReplay) summary(t *testing.T, study string) store.Summary {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(r.dir, study, "summary.json"))
	if err != nil {
		t.Fatalf("the headless run wrote no summary of %s: %v", study, err)
	}
	var s store.Summary
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}

// output is the session's output of cell n (1-based).
func (r *scriptReplay) output(t *testing.T, n int) string {
	t.Helper()
	if n > len(r.cells) {
		t.Fatalf("cell %d did not run", n)
	}
	return r.cells[n-1].Output
}

// relClose reports whether a and b agree within rel of b.
func relClose(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Abs(b) }

// checkFeasibleBest checks that a result's best point is feasible with
// every margin at least zero, and that the headless run wrote the same
// best point into its summary.
func checkFeasibleBest(t *testing.T, r *scriptReplay, res *mdo.Result) {
	t.Helper()
	if !res.Feasible() {
		t.Fatalf("%s: best point infeasible", res.Study)
	}
	for i, m := range res.Best.Margins {
		if m < 0 {
			t.Errorf("%s: constraint %s violated by %g", res.Study, res.Constraints[i].Name, -m)
		}
	}
	sum := r.summary(t, res.Study)
	if sum.Best == nil || sum.Best.ID != res.Best.ID || float64(sum.Best.Objective) != res.Objective() {
		t.Errorf("%s: summary.json best %+v, the session's #%d %g", res.Study, sum.Best, res.Best.ID, res.Objective())
	}
}

func TestUserScripts(t *testing.T) {
	tests := []struct {
		name  string
		short bool // replayed under -short too
		check func(t *testing.T, r *scriptReplay)
	}{
		{"cost_discipline", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			res := r.result(t, "regional_jet_trip_cost")
			checkFeasibleBest(t, r, res)
			// the disciplines of the script computed what they say:
			// payload 95 kg × 76 passengers, cost 0.9 × fuel + 0.004 ×
			// empty mass (the script's invented prices)
			if p := res.Get("mission.payload"); p != 95*76 {
				t.Errorf("mission.payload = %g, want 95 × 76 = 7220", p)
			}
			want := 0.9*res.Get("mass.fuel") + 0.004*res.Get("mass.empty")
			if c := res.Get("cost.trip"); !relClose(c, want, 1e-12) {
				t.Errorf("cost.trip = %.9g, want 0.9 × fuel + 0.004 × empty = %.9g", c, want)
			}
			// a shorter field needs a larger wing and more thrust, a
			// costlier trip: the take-off limit binds at the optimum
			if f := res.Get("perf.takeoff_field_length"); !relClose(f, 1600, 1e-6) {
				t.Errorf("take-off field %g m at the optimum, want its limit 1600 m active", f)
			}
			if !strings.Contains(r.output(t, 1), "cabin_load, trip_cost") {
				t.Errorf("cell 1 does not name the producers: %q", r.output(t, 1))
			}
		}},
		{"cell_functions", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			res := r.result(t, "regional_jet_fuel_per_seat")
			checkFeasibleBest(t, r, res)
			// the objective and the wing loading are the cell functions
			// of the outputs: fuel / 76 passengers / 3 (3 000 km in
			// thousands), take-off mass / wing area
			if f, want := res.Objective(), res.Get("mass.fuel")/76/3; !relClose(f, want, 1e-12) {
				t.Errorf("objective %.9g, want fuel/76/3 = %.9g", f, want)
			}
			if wl, want := res.Best.Constraints[0], res.Get("mass.takeoff")/res.Get("wing.area"); !relClose(wl, want, 1e-12) || wl > 470 {
				t.Errorf("wing loading %g, want take-off mass / area = %g, at most 470", wl, want)
			}
			if f := res.Get("perf.takeoff_field_length"); !relClose(f, 1600, 1e-6) {
				t.Errorf("take-off field %g m, want its limit 1600 m active at the least fuel", f)
			}
			if got := strings.TrimSpace(r.output(t, 3)); got != fmt.Sprint(res.Get("mass.takeoff")/res.Get("wing.area")) {
				t.Errorf("cell 3 shows %q, want the wing loading of the optimum", got)
			}
		}},
		{"front_pick", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			res := r.result(t, "regional_jet_fuel_vs_field")
			if len(res.Front) < 10 {
				t.Fatalf("front of %d points, want a trade (the wing sets the field length)", len(res.Front))
			}
			// non-dominated (Pareto 1896): no point is at least as good
			// in both objectives and better in one than another
			for i, a := range res.Front {
				if !a.Feasible {
					t.Errorf("front point #%d infeasible", a.ID)
				}
				for j, b := range res.Front {
					if i != j && a.Objectives[0] <= b.Objectives[0] && a.Objectives[1] <= b.Objectives[1] &&
						(a.Objectives[0] < b.Objectives[0] || a.Objectives[1] < b.Objectives[1]) {
						t.Errorf("front point #%d dominates #%d", a.ID, b.ID)
					}
				}
			}
			var pick *mdo.Evaluation
			for _, p := range res.Front {
				if p.Objectives[1] <= 1700 && (pick == nil || p.Objectives[0] < pick.Objectives[0]) {
					pick = p
				}
			}
			if pick == nil {
				t.Fatal("no front point within 1700 m")
			}
			if out := r.output(t, 3); !strings.Contains(out, fmt.Sprintf("pick #%d: area %.2f m2", pick.ID, pick.Design[0])) {
				t.Errorf("cell 3 picked %q, want #%d", out, pick.ID)
			}
			// the same design analysed again gives the same numbers
			again := fmt.Sprintf("again: fuel %.1f kg, field %.1f m", pick.Objectives[0], pick.Objectives[1])
			if out := r.output(t, 4); !strings.Contains(out, again) {
				t.Errorf("cell 4 %q, want %q", out, again)
			}
			if sum := r.summary(t, "regional_jet_fuel_vs_field"); len(sum.Front) != len(res.Front) {
				t.Errorf("summary.json front of %d points, the result's %d", len(sum.Front), len(res.Front))
			}
		}},
		{"doe_then_optimise", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			doe, opt := r.result(t, "wing_doe"), r.result(t, "wing_from_doe")
			checkFeasibleBest(t, r, doe)
			checkFeasibleBest(t, r, opt)
			if opt.Objective() > doe.Objective() {
				t.Errorf("the optimisation from the best sample ended heavier: %g > %g kg", opt.Objective(), doe.Objective())
			}
			checkFirstOrder(t, opt)
		}},
		{"forward_swept", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			aft, fwd := r.result(t, "aft_swept"), r.result(t, "forward_swept")
			checkFeasibleBest(t, r, aft)
			checkFeasibleBest(t, r, fwd)
			if s := fwd.Get("wing.sweep"); s < -30 || s > -15 {
				t.Errorf("forward-swept optimum sweep %g°, want within [-30, -15]", s)
			}
			// a forward-swept wing moves the neutral point forward: the
			// optimum sits on its take-off stability limit
			if sm := fwd.Get("stability.static_margin_takeoff"); sm < 0.05 || sm > 0.051 {
				t.Errorf("forward-swept static margin %g, want on its limit 0.05", sm)
			}
			if _, err := os.Stat(filepath.Join(r.dir, "sweep_direction", "comparison.html")); err != nil {
				t.Errorf("the comparison page was not written: %v", err)
			}
			for _, w := range []string{"aft_swept", "forward_swept", "wing.sweep"} {
				if !strings.Contains(r.output(t, 4), w) {
					t.Errorf("the comparison lacks %q", w)
				}
			}
		}},
		{"range_payload", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			ref, longer, heavier := r.result(t, "reference_mission"), r.result(t, "range_4000km"), r.result(t, "payload_9000kg")
			for _, res := range []*mdo.Result{ref, longer, heavier} {
				checkFeasibleBest(t, r, res)
			}
			if longer.Get("mass.fuel") <= ref.Get("mass.fuel") {
				t.Errorf("4 000 km burn %g kg, the 3 000 km mission %g kg", longer.Get("mass.fuel"), ref.Get("mass.fuel"))
			}
			// the sizing equation W0 = (Wcrew + Wpayload) / (1 - Wf/W0 -
			// We/W0) (Raymer, Aircraft Design: A Conceptual Approach,
			// eq. 3.4, from memory): 1 400 kg more payload adds more than
			// 1 400 kg of take-off mass
			if d := heavier.Get("mass.takeoff") - ref.Get("mass.takeoff"); d <= 1400 {
				t.Errorf("1 400 kg more payload added %g kg of take-off mass, want more than 1 400", d)
			}
			if !strings.Contains(r.output(t, 3), "comparison of 3 results") {
				t.Errorf("cell 3: %q", r.output(t, 3))
			}
		}},
		{"sensitivity", false, func(t *testing.T, r *scriptReplay) {
			if r.err != nil {
				t.Fatal(r.err)
			}
			base, longer := r.result(t, "landing_1300m"), r.result(t, "landing_1305m")
			checkFeasibleBest(t, r, base)
			checkFeasibleBest(t, r, longer)
			if base.Sensitivity == nil || !base.Sensitivity.Limits[0].Active {
				t.Fatalf("no sensitivity, or the landing limit inactive: %+v", base.Sensitivity)
			}
			// envelope theorem (Fiacco 1983): d f*/d b is the multiplier;
			// 5 m more landing field changes the optimum by 5 × it, to
			// first order
			predicted := 5 * base.Sensitivity.Limits[0].PerUnit
			found := longer.Objective() - base.Objective()
			if predicted >= 0 || !relClose(found, predicted, 0.05) {
				t.Errorf("5 m more landing field: predicted %g kg, the re-optimisation found %g kg", predicted, found)
			}
			for _, res := range []*mdo.Result{base, longer} {
				lim := map[string]float64{"landing_1300m": 1300, "landing_1305m": 1305}[res.Study]
				if f := res.Get("perf.landing_field_length"); !relClose(f, lim, 1e-6) {
					t.Errorf("%s: landing field %g m, want its limit %g m active", res.Study, f, lim)
				}
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if testing.Short() && !tc.short {
				t.Skip("replays an optimisation; TestUserScriptMistakes checks the failures under -short")
			}
			tc.check(t, replayScript(t, tc.name, 0))
		})
	}
}

// checkFirstOrder checks the first-order conditions of a bound-
// constrained optimum whose constraints are all inactive: a small step of
// any design variable into its box does not lower the objective (at a
// bound, the step away from it; inside, both ways). The points are
// analysed by the aircraft model itself, outside the study.
func checkFirstOrder(t *testing.T, res *mdo.Result) {
	t.Helper()
	for i, m := range res.Best.Margins {
		if m < 1e-3*math.Max(1, math.Abs(res.Best.Constraints[i])) {
			t.Fatalf("constraint %s is active: the bound-only check does not apply", res.Constraints[i].Name)
		}
	}
	jet := disciplines.Swiftlet()
	sys, err := jet.NewSystem()
	if err != nil {
		t.Fatal(err)
	}
	at := func(x map[string]float64) float64 {
		p := map[string]float64{}
		for k, v := range jet.Parameters {
			p[k] = v
		}
		p["mission.range"] = 5.5e6
		for k, v := range x {
			p[k] = v
		}
		sol, err := sys.Analyze(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		return sol.Get("mass.takeoff")
	}
	best := res.DesignValues()
	f0 := at(best)
	if !relClose(f0, res.Objective(), 1e-8) {
		t.Fatalf("the optimum analysed again: %.10g kg, the result's %.10g kg", f0, res.Objective())
	}
	for _, d := range res.Design {
		h := 1e-3 * (d.Upper - d.Lower)
		x := best[d.Name]
		for _, step := range []float64{-h, h} {
			if x+step < d.Lower || x+step > d.Upper {
				continue
			}
			moved := map[string]float64{}
			for k, v := range best {
				moved[k] = v
			}
			moved[d.Name] = x + step
			if f := at(moved); f < f0-1e-8*f0 {
				t.Errorf("%s %+g from the optimum %g: take-off mass %.6f < %.6f kg", d.Name, step, x, f, f0)
			}
		}
	}
}

func TestUserScriptMistakes(t *testing.T) {
	tests := []struct {
		name    string
		timeout time.Duration
		short   bool
		// want are in the run's error, in order of appearance
		want []string
		// written is the study whose result folder must be written
		// before the failure ("" none)
		written string
		// stderr is in the headless run's standard error
		stderr []string
	}{
		{"bad_misspelt", 0, true, []string{"bad_misspelt.study:29: cell 2, line 10: panic:", `no variable "mass.take_off"`, "similar: mass.takeoff"}, "", nil},
		{"bad_bounds", 0, true, []string{"cell 1, line 26", "design variable wing.sweep", "bounds [20, 80] deg", "validity range [-70, 70]"}, "", nil},
		{"bad_constraint", 0, true, []string{"cell 1, line 28", `no variable "perf.balanced_field_length"`}, "", nil},
		{"bad_unit", 0, true, []string{"cell 1, line 29", "mission.range = 4000 m", "validity range [100000, 2e+07]"}, "", nil},
		{"bad_panic_objective", 0, true, []string{`study "fuel_per_seat": every one of its `, " evaluations failed", " × objective fuel_per_seat panicked: runtime error: index out of range (cell 1, line 17)"}, "",
			[]string{"cell 2 ran to its end, but code of the cells panicked", "× runtime error: index out of range (cell 1, line 17)"}},
		{"bad_late_failure", 0, false, []string{"bad_late_failure.study:42: cell 2, line 2: panic:", `no variable "wing.spam"`, "similar: wing.span"}, "before_the_failure",
			[]string{"the result handed over before the run stopped (study before_the_failure"}},
		{"bad_endless", 2 * time.Second, false, []string{"bad_endless.study:29: cell 2, line 3: stopped: the time limit of 2s was reached"}, "sellar", nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if testing.Short() && !tc.short {
				t.Skip("runs an optimisation first")
			}
			r := replayScript(t, tc.name, tc.timeout)
			if r.err == nil {
				t.Fatal("the run did not fail")
			}
			var ue *UsageError
			if errors.As(r.err, &ue) {
				t.Errorf("a mistake of the script is not a usage error: %v", r.err)
			}
			msg, at := r.err.Error(), 0
			for _, w := range tc.want {
				i := strings.Index(msg[at:], w)
				if i < 0 {
					t.Errorf("error %q lacks %q (after byte %d)", msg, w, at)
					continue
				}
				at += i + len(w)
			}
			for _, w := range tc.stderr {
				if !strings.Contains(r.stderr, w) {
					t.Errorf("stderr lacks %q:\n%s", w, r.stderr)
				}
				if r.session != nil && strings.Contains(w, "ran to its end") && !strings.Contains(r.sessErr, w) {
					t.Errorf("the session's stderr lacks %q:\n%s", w, r.sessErr)
				}
			}
			if tc.written != "" {
				sum := r.summary(t, tc.written)
				if sum.Best == nil || sum.Evaluations == 0 {
					t.Errorf("the earlier result's summary has no best point: %+v", sum)
				}
			}
		})
	}
	t.Run("bad_infeasible", func(t *testing.T) {
		// no error: the run ends with its best infeasible point and says
		// why it found no other
		r := replayScript(t, "bad_infeasible", 0)
		if r.err != nil {
			t.Fatal(r.err)
		}
		res := r.result(t, "short_field")
		if res.Feasible() {
			t.Fatal("a take-off in 600 m and a landing in 500 m were met")
		}
		// both limits lie far below what the box can reach (the largest
		// wing takes off in 1 300 m): both are violated
		for i, m := range res.Best.Margins {
			if m >= 0 {
				t.Errorf("constraint %s met at the best point", res.Constraints[i].Name)
			}
		}
		if !strings.Contains(res.StopDetail, "no feasible point found") {
			t.Errorf("stop detail %q does not say no feasible point was found", res.StopDetail)
		}
		if sum := r.summary(t, "short_field"); sum.Best == nil || sum.Best.Feasible {
			t.Errorf("summary.json best %+v, want the infeasible point", sum.Best)
		}
		if !regexp.MustCompile(`best point #\d+, INFEASIBLE`).MatchString(r.output(t, 1)) {
			t.Errorf("the result does not say it is infeasible: %q", r.output(t, 1))
		}
	})
}
