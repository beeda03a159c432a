package disciplines

import (
	"context"
	"strings"
	"testing"

	"couplet/mdo"
)

func TestCabinAislesFromStudy(t *testing.T) {
	// 14 CFR 25.817: with one aisle at most three seats on each side of
	// it. A study of the assembled aircraft refuses 8 abreast with one
	// aisle with the same message as NewFuselage, and accepts it with two.
	_, direct := NewFuselage(Cabin{Passengers: 76, SeatsAbreast: 8, Aisles: 1, SeatPitch: 0.79}, 1.6, 2.8)
	if direct == nil || !strings.Contains(direct.Error(), "25.817") {
		t.Fatalf("NewFuselage with 8 abreast and one aisle: %v, want the 25.817 refusal", direct)
	}
	tests := []struct {
		aisles float64
		ok     bool
	}{{1, false}, {2, true}}
	for _, c := range tests {
		rj := Kestrel()
		sys, err := rj.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		fixed := copyMap(rj.Parameters)
		fixed["cabin.seats_abreast"] = 8
		fixed["cabin.aisles"] = c.aisles
		st := &mdo.Study{
			Name: "cabin", System: sys,
			Design:     []mdo.DesignVar{mdo.Continuous("wing.area", 70, 90)},
			Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")},
			Fixed:      fixed, Workers: 1,
		}
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		e, err := ev.EvaluateOne(context.Background(), ev.ToUnit([]float64{78}))
		if err != nil {
			t.Fatal(err)
		}
		if c.ok {
			if e.Err != "" {
				t.Errorf("8 abreast, two aisles: %s", e.Err)
			}
			continue
		}
		if !strings.Contains(e.Err, direct.Error()) {
			t.Errorf("8 abreast, one aisle, from a study: %q, want it to contain NewFuselage's %q", e.Err, direct.Error())
		}
	}
}
