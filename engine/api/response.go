package api

import (
	"encoding/json"
	"math"
	"strconv"
	"strings"

	"zport/engine/response"
)

// This file holds the "response" analysis: the closed-loop gain's step
// response, its frequency-response figures and the circuit's natural
// frequencies, answered by package zport/engine/response.

// ResponseRequest is the "response" key: {} or {"time": {…}}.
type ResponseRequest struct {
	Time *TimeAxis `json:"time,omitempty"`
}

// TimeAxis chooses the step's time axis: To seconds and Points samples,
// each chosen from the natural frequencies when absent.
type TimeAxis struct {
	To     *float64 `json:"to,omitempty"`
	Points *int     `json:"points,omitempty"`
}

// ResponseResult is the "response" key of a response.
type ResponseResult struct {
	// Unit of the gain, the step's values and Final: "V/V", or "Ω" for a
	// transimpedance (a current source's gain).
	Unit string `json:"unit"`
	// Step is the response to a unit step of the gain's source.
	Step StepSeries `json:"step"`
	// Time is the time axis the step was computed on, and whether it was
	// chosen automatically.
	Time TimeUsed `json:"time"`
	// Final is the value the step settles to (the gain at DC); null when
	// it does not settle.
	Final *float64 `json:"final"`
	// Overshoot is in percent of Final (0 without overshoot); null when
	// the step does not settle or settles to 0.
	Overshoot *float64 `json:"overshoot"`
	// Peak is where the overshoot peaks; null without overshoot.
	Peak *TimePoint `json:"peak"`
	// RiseTime is from 10 % to 90 % of Final; Rise gives the two times.
	RiseTime *float64 `json:"riseTime"`
	Rise     *Rise    `json:"rise"`
	// SettlingTime is from when the step stays within ±1 % and ±0.1 % of
	// Final.
	SettlingTime Settling `json:"settlingTime"`
	// Kind is "low-pass", "band-pass", "high-pass" or "flat": what the
	// frequency figures are measured against (Reference).
	Kind      string     `json:"kind"`
	Reference *Reference `json:"reference"`
	// Peaking is how far |g| rises above the low-frequency gain; null
	// without peaking (or for other kinds).
	Peaking *Peaking `json:"peaking"`
	// Bandwidth is the −3 dB frequency above the reference, in Hz;
	// LowerCorner the one below it, for band-pass and high-pass gains.
	Bandwidth   *float64 `json:"bandwidth"`
	LowerCorner *float64 `json:"lowerCorner,omitempty"`
	// Poles are the circuit's natural frequencies, by magnitude.
	Poles []ResponsePole `json:"poles"`
	// Stability is "stable", "marginal" or "unstable" — or NotComputed,
	// when the circuit's numbers stopped the analysis (a note says why)
	// and every figure is null.
	Stability string `json:"stability"`
	// Agreement is the worst relative difference between the realisation
	// the figures come from and the direct nodal solution.
	Agreement *float64 `json:"agreement"`
	Method    string   `json:"method"`
	Notes     []string `json:"notes"`
}

// StepSeries is the step response, value[i] at time[i].
type StepSeries struct {
	Time  Series `json:"time"`
	Value Series `json:"value"`
}

// Series is a list of numbers on the wire; one that is not finite (a step
// that has grown past float64) is written null and read back as NaN.
type Series []float64

// MarshalJSON writes the numbers, null for those that are not finite.
func (s Series) MarshalJSON() ([]byte, error) {
	b := make([]byte, 0, 2+len(s)*12)
	b = append(b, '[')
	for i, v := range s {
		if i > 0 {
			b = append(b, ',')
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			b = append(b, "null"...)
			continue
		}
		b = strconv.AppendFloat(b, v, 'g', -1, 64)
	}
	return append(b, ']'), nil
}

// UnmarshalJSON reads the numbers, NaN for null.
func (s *Series) UnmarshalJSON(b []byte) error {
	var raw []*float64
	if err := json.Unmarshal(b, &raw); err != nil {
		return err
	}
	*s = make(Series, len(raw))
	for i, v := range raw {
		(*s)[i] = math.NaN()
		if v != nil {
			(*s)[i] = *v
		}
	}
	return nil
}

// TimeUsed is the step's time axis as computed.
type TimeUsed struct {
	To     float64 `json:"to"`
	Points int     `json:"points"`
	Auto   bool    `json:"auto"`
}

// TimePoint is a value at a time.
type TimePoint struct {
	Time  float64 `json:"time"`
	Value float64 `json:"value"`
}

// Rise gives when the step reaches 10 % (From) and 90 % (To) of Final.
type Rise struct {
	From float64 `json:"from"`
	To   float64 `json:"to"`
}

// Settling holds the settling times to ±1 % and ±0.1 %, in seconds.
type Settling struct {
	Percent1  *float64 `json:"1"`
	Percent01 *float64 `json:"0.1"`
}

// Reference is the gain the frequency figures are measured against and
// its frequency (0 for the low-frequency gain; null for the gain at high
// frequency).
type Reference struct {
	Gain      float64  `json:"gain"`
	Frequency *float64 `json:"frequency"`
}

// Peaking is a peak of |g| above the low-frequency gain.
type Peaking struct {
	DB        float64 `json:"db"`
	Frequency float64 `json:"frequency"`
}

// ResponsePole is one natural frequency s = re + j·im (rad/s).
type ResponsePole struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
	// Frequency is |s|/2π in Hz; Q and Zeta describe a complex pair
	// (null for a real pole).
	Frequency float64  `json:"frequency"`
	Q         *float64 `json:"q"`
	Zeta      *float64 `json:"zeta"`
	// Weight is the pole's dominance index |residue|/|re| relative to the
	// largest; Dominant marks a weight of 0.2 or more.
	Weight   float64 `json:"weight"`
	Dominant bool    `json:"dominant"`
}

// NotComputed is the stability of a response that could not be computed.
const NotComputed = "not computed"

// ClosedLoop is the "response" analysis. (Its Go name differs from its
// key because Response is the name of the whole answer.)
var ClosedLoop = Register("response", func(p *Prepared, q *ResponseRequest, _ *Response) (*ResponseResult, error) {
	g := p.Analyzer.Gain
	if g == nil {
		what := "the request has no \"gain\""
		if p.Stage != nil {
			what = "stage " + p.Stage.ID + " defines no gain and the request gives none"
		}
		return nil, fieldErr("gain", "the closed-loop response is that of a gain, and %s: give \"gain\": {\"source\": …, \"output\": …} with one of the sources %s", what, strings.Join(p.Circuit.Sources(), ", "))
	}
	var opt response.Options
	if t := q.Time; t != nil {
		if t.To != nil {
			if !(*t.To > 0) || math.IsInf(*t.To, 0) {
				return nil, fieldErr("response.time.to", "the time span must be above 0 s")
			}
			opt.To = *t.To
		}
		if t.Points != nil {
			if *t.Points < response.MinPoints || *t.Points > response.MaxPoints {
				return nil, fieldErr("response.time.points", "the step has %d to %d points", response.MinPoints, response.MaxPoints)
			}
			opt.Points = *t.Points
		}
	}
	unit := g.Unit(p.Circuit)
	if unit == "V/A" {
		unit = "Ω"
	}
	r, err := response.Analyze(p.Analyzer.Sys, g.Source, g.OutA, g.OutB, opt)
	if err != nil {
		// Trouble with the circuit's numbers (too large, an eigenvalue
		// iteration that fails) leaves the rest of the answer standing.
		return &ResponseResult{Unit: unit, Step: StepSeries{Time: Series{}, Value: Series{}}, Poles: []ResponsePole{},
			Stability: NotComputed, Method: response.Method, Notes: []string{"The closed-loop response was not computed: " + err.Error() + "."}}, nil
	}
	out := &ResponseResult{
		Unit:         unit,
		Step:         StepSeries{Time: r.Time, Value: r.Step},
		Time:         TimeUsed{To: r.To, Points: r.Points, Auto: opt.To == 0 && opt.Points == 0},
		Final:        F(r.Final),
		Overshoot:    F(r.Overshoot),
		RiseTime:     F(r.RiseTime),
		SettlingTime: Settling{Percent1: F(r.Settling1), Percent01: F(r.Settling01)},
		Kind:         r.Kind,
		Bandwidth:    F(r.Bandwidth),
		LowerCorner:  F(r.LowerCorner),
		Poles:        []ResponsePole{},
		Stability:    r.Stability.String(),
		Agreement:    F(r.Agreement),
		Method:       response.Method,
		Notes:        append([]string{}, r.Notes...),
	}
	if !math.IsNaN(r.PeakTime) {
		out.Peak = &TimePoint{Time: r.PeakTime, Value: r.Peak}
	}
	if !math.IsNaN(r.RiseTime) {
		out.Rise = &Rise{From: r.Rise10, To: r.Rise90}
	}
	if !math.IsNaN(r.Reference) {
		out.Reference = &Reference{Gain: r.Reference, Frequency: F(r.ReferenceFrequency)}
	}
	if !math.IsNaN(r.PeakingDB) {
		out.Peaking = &Peaking{DB: r.PeakingDB, Frequency: r.PeakingFrequency}
	}
	for _, pl := range r.Poles {
		out.Poles = append(out.Poles, ResponsePole{Re: real(pl.P), Im: imag(pl.P), Frequency: pl.Frequency(),
			Q: F(pl.Q()), Zeta: F(pl.Zeta()), Weight: pl.Weight, Dominant: pl.Dominant})
	}
	if len(r.Poles) > 0 && opt.To > 0 && opt.To < r.Settling01 {
		out.Notes = append(out.Notes, "The time span ends before the step settles to ±0.1 %; the figures are measured on the whole response all the same.")
	}
	return out, nil
})
