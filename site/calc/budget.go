package calc

import (
	"math"
	"time"

	"zport/engine/api"
	"zport/engine/circuit"
)

// SweepCut says that a sweep was shortened to fit Form.Budget: the spot
// analysis took PerPoint, so Requested points would have taken about
// PerPoint·Requested, and Used points were analyzed instead (0: the sweep
// was left out).
type SweepCut struct {
	Requested int     `json:"requested"`
	Used      int     `json:"used"`
	PerPoint  float64 `json:"perPointMs"` // milliseconds
}

// now is the clock analyzeWithin reads (a test replaces it).
var now = time.Now

// minCutPoints is the fewest points a shortened sweep keeps; below it the
// sweep is left out altogether, its charts and margins meaningless.
const minCutPoints = 20

// analyzeWithin answers req, keeping the sweep's estimated time within
// budget (none when budget ≤ 0). The estimate is the shortest of three
// single-frequency analyses, at the sweep's ends and middle: a sweep costs
// about that per point, and the shortest is the one least disturbed by a
// garbage collection or another task. The circuit is prepared once for
// all of them; parsed, when not nil, is its circuit text parsed already.
func analyzeWithin(req api.Request, budget time.Duration, parsed *circuit.Circuit) (*api.Response, *SweepCut, error) {
	var p *api.Prepared
	var err error
	if parsed != nil {
		p, err = api.PrepareParsed(req, parsed)
	} else {
		p, err = api.Prepare(req)
	}
	if err != nil {
		return nil, nil, err
	}
	sweep := p.Req.Sweep
	if budget <= 0 || sweep == nil {
		resp, err := p.Run()
		return resp, nil, err
	}
	per := time.Duration(math.MaxInt64)
	for _, f := range []float64{sweep.From, math.Sqrt(sweep.From * sweep.To), sweep.To} {
		t0 := now()
		if _, err := p.Analyzer.At(f); err != nil {
			per = 0 // Run reports the trouble
			break
		}
		per = min(per, now().Sub(t0))
	}
	if per*time.Duration(sweep.Points) <= budget {
		resp, err := p.Run()
		return resp, nil, err
	}
	cut := &SweepCut{Requested: sweep.Points, PerPoint: float64(per) / float64(time.Millisecond)}
	if n := int(budget / per); n >= minCutPoints {
		s := *sweep
		s.Points = n
		p.Req.Sweep = &s
		cut.Used = n
	} else {
		p.Req.Sweep = nil
	}
	resp, err := p.Run()
	return resp, cut, err
}
