package disciplines

import (
	"errors"
	"math"
	"testing"
)

func TestTailAreaForVolume(t *testing.T) {
	// Tail-volume method, S·l = V·S_w·ℓref, with the arm as the tail sits:
	// at its position while its root fits ahead of the end station, held
	// with its root trailing edge at the end station beyond.
	unit, err := newSurface("htail", 1, 3, 0.3, 45, 0.04)
	if err != nil {
		t.Fatal(err)
	}
	const xPos, xEnd, xAC = 27.6, 30.0, 18.0
	tests := []struct {
		name   string
		q      float64
		atEnd  bool
		wantOK bool
	}{
		{"small tail at its position", 40, false, true},
		{"large tail held at the end station", 800, true, true},
		{"requirement beyond any arm", 5000, true, false},
	}
	for _, c := range tests {
		s, arm, err := TailAreaForVolume("htail.volume", c.q/100, c.q, unit, xPos, xEnd, xAC)
		if !c.wantOK {
			var ie *InputError
			if !errors.As(err, &ie) || ie.Var != "htail.volume" {
				t.Errorf("%s: err %v, want one naming htail.volume", c.name, err)
			}
			continue
		}
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if relErr(s*arm, c.q) > 1e-12 {
			t.Errorf("%s: S·l = %g, want %g", c.name, s*arm, c.q)
		}
		tail, err := newSurface("htail", s, 3, 0.3, 45, 0.04)
		if err != nil {
			t.Fatal(err)
		}
		apex := tailApex(&tail, xPos, xEnd)
		if got := apex + tail.quarterMAC() - xAC; math.Abs(got-arm) > 1e-9 {
			t.Errorf("%s: arm %g, but the placed tail's is %g", c.name, arm, got)
		}
		rootTE := apex + tail.RootChord
		if c.atEnd && math.Abs(rootTE-xEnd) > 1e-9 || !c.atEnd && !(rootTE < xEnd && math.Abs(arm-(xPos-xAC)) < 1e-12) {
			t.Errorf("%s: root trailing edge at %g m, arm %g m", c.name, rootTE, arm)
		}
	}
	// continuous where the placements meet
	kappa := unit.RootChord - unit.quarterMAC()
	sSwitch := math.Pow((xEnd-xPos)/kappa, 2)
	qSwitch := sSwitch * (xPos - xAC)
	a, _, _ := TailAreaForVolume("htail.volume", 1, qSwitch*(1-1e-9), unit, xPos, xEnd, xAC)
	b, _, _ := TailAreaForVolume("htail.volume", 1, qSwitch*(1+1e-9), unit, xPos, xEnd, xAC)
	if relErr(a, sSwitch) > 1e-6 || relErr(b, sSwitch) > 1e-6 {
		t.Errorf("areas %g and %g either side of the switch, want %g", a, b, sSwitch)
	}
}

func TestTailOverlappingWingShowsNegativeClearance(t *testing.T) {
	// A wing far aft with a large tail: the tail's leading edge lies ahead
	// of the wing's trailing edge, and the geometry discipline's
	// layout.wing_tail_clearance is negative; the same aircraft with the
	// wing forward and a small tail is clear.
	tests := []struct {
		name          string
		position, vol float64
		overlap       bool
	}{
		{"wing aft, large tail", 0.40, 0.3, true},
		{"wing forward, small tail", 0.30, 0.1, false},
	}
	for _, c := range tests {
		g := NewGeometry(DefaultGeometryOptions())
		in := defaultValues(g.Inputs())
		in[geoInPosition], in[geoInHTailVolume] = c.position, c.vol
		out := make([]float64, len(g.Outputs()))
		if err := g.Compute(in, out); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		clr := out[varPosition(g.Outputs(), "layout.wing_tail_clearance")]
		conf, err := g.Layout(in)
		if err != nil {
			t.Fatal(err)
		}
		// check the sign against the edges themselves at the root and at
		// the tail's tip station
		w, h := conf.Wing, conf.HTail
		y := 0.5 * math.Min(w.Span, h.Span)
		byHand := math.Min(conf.HTailApex-(conf.WingApex+w.RootChord),
			conf.HTailApex+h.LeadingEdgeX(y)-(conf.WingApex+w.LeadingEdgeX(y)+w.ChordAt(y)))
		if math.Abs(clr-byHand) > 1e-12 {
			t.Errorf("%s: clearance %g m, edges give %g m", c.name, clr, byHand)
		}
		if c.overlap != (clr < 0) {
			t.Errorf("%s: clearance %g m, want overlap %v", c.name, clr, c.overlap)
		}
		t.Logf("%s: clearance %.2f m, tail span ratio %.2f, wing overhang %.2f m, tail overhang %.2f m", c.name, clr,
			out[varPosition(g.Outputs(), "layout.tail_span_ratio")], out[varPosition(g.Outputs(), "layout.wing_overhang")],
			out[varPosition(g.Outputs(), "layout.tail_overhang")])
	}
}

func TestLayoutConstraintsNameAircraftOutputs(t *testing.T) {
	// Every ready-made layout constraint reads an output of the aircraft.
	sys, err := NewAircraft(DefaultAircraftConfig())
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range LayoutConstraints(2) {
		if p := sys.Producer(c.Name); p != "geometry" {
			t.Errorf("constraint on %s: produced by %q, want geometry", c.Name, p)
		}
	}
}
