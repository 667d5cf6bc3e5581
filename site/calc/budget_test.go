package calc

import (
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"zport/engine/api"
)

// ticking replaces the clock with one that advances by step at every
// reading, so that the spot analysis seems to take exactly step.
func ticking(t *testing.T, step time.Duration) {
	t.Helper()
	at := time.Unix(0, 0)
	now = func() time.Time {
		at = at.Add(step)
		return at
	}
	t.Cleanup(func() { now = time.Now })
}

func TestAnalyzeWithinBudget(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M ro=100\nport o out gnd\n"
	req := api.Request{Circuit: text, Reference: "U1", Ports: []string{"o"}, Frequency: 1e3,
		Sweep: &api.SweepSpec{From: 10, To: 1e8, Points: 400}}
	ticking(t, time.Millisecond)
	for _, tc := range []struct {
		budget time.Duration
		used   int // -1: no cut
	}{
		{0, -1},                      // no bound
		{400 * time.Millisecond, -1}, // 400 points at 1 ms fit exactly
		{399 * time.Millisecond, 399},
		{50 * time.Millisecond, 50},
		{minCutPoints * time.Millisecond, minCutPoints},
		{(minCutPoints - 1) * time.Millisecond, 0}, // too few to be worth a chart: none
	} {
		resp, cut, err := analyzeWithin(req, tc.budget, nil)
		if err != nil {
			t.Fatal(err)
		}
		switch {
		case tc.used < 0:
			if cut != nil || resp.Sweep == nil || len(resp.Sweep.Frequency) != 400 {
				t.Errorf("budget %v: cut %+v, want the whole sweep", tc.budget, cut)
			}
		case cut == nil || cut.Requested != 400 || cut.Used != tc.used || cut.PerPoint != 1:
			t.Errorf("budget %v: cut %+v, want %d of 400 points at 1 ms", tc.budget, cut, tc.used)
		case tc.used == 0:
			if resp.Sweep != nil || resp.Margins != nil || resp.Ports == nil {
				t.Errorf("budget %v: want the spot results without a sweep", tc.budget)
			}
		default:
			s := resp.Sweep.Frequency
			if len(s) != tc.used || !scalar.EqualWithinRel(s[0], 10, 1e-12) || !scalar.EqualWithinRel(s[len(s)-1], 1e8, 1e-12) {
				t.Errorf("budget %v: sweep of %d points from %g to %g", tc.budget, len(s), s[0], s[len(s)-1])
			}
		}
	}
	// Compute passes the budget on and reports the cut; the link keeps
	// the points asked for.
	out := Compute(Form{Circuit: text, Reference: "U1", Ports: []string{"o"}, Frequency: "1k",
		Sweep: SweepForm{From: "10", To: "100M", Points: "400"}, Budget: 100})
	if out.Error != nil || out.SweepCut == nil || out.SweepCut.Used != 100 || !strings.Contains(out.State, "points=400") {
		t.Errorf("Compute with a budget: cut %+v, state %q, error %v", out.SweepCut, out.State, out.Error)
	}
	if !strings.Contains(out.HTML, "100 points") {
		t.Errorf("the panel does not say how many points it shows")
	}
}
