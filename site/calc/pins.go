package calc

import (
	"encoding/json"
	"strconv"
	"sync"

	"zport/engine/api"
	"zport/site/plot"
)

// MaxPins bounds the designs a calculator keeps pinned for comparison.
const MaxPins = 4

// MaxPinName bounds a pin's name, in bytes (it travels in the share link).
const MaxPinName = 40

// Pin is a design kept for comparison: its name, its slot (1 … MaxPins,
// which sets its line style and its keys in the share link) and the
// design itself — a stage's parameters, or circuit text with its
// reference, ports and gain. A pin is analyzed at the calculator's
// current spot frequency, sweep and analysis settings, so that it
// compares with the current design point for point.
type Pin struct {
	Name string `json:"name"`
	Slot int    `json:"slot"`

	Params map[string]string `json:"params,omitempty"`

	Circuit   string        `json:"circuit,omitempty"`
	Reference string        `json:"reference,omitempty"`
	Ports     []string      `json:"ports,omitempty"`
	Gain      *api.GainSpec `json:"gain,omitempty"`
}

// Pinned is a pin with its analysis, as an analysis reads it from its
// Context.
type Pinned struct {
	Pin
	// Resp is the pinned design's answer, nil when it could not be
	// analyzed (Err says why).
	Resp *api.Response
	Err  *api.ErrorBody
}

// Style is how the pin is drawn in every chart.
func (p *Pinned) Style() PinStyle {
	s := PinStyle{Slot: p.Slot, Name: p.Name, Class: "pin" + strconv.Itoa(p.Slot)}
	if p.Slot >= 1 && p.Slot <= len(pinDashes) {
		s.Dash = pinDashes[p.Slot-1]
	}
	return s
}

// PinStyle is a pin's look: its legend name, its colour class (a chart
// colours class "trace-pin1" through --zplot-pin1, see plot.CSS) and its
// dash pattern (an SVG stroke-dasharray), one of MaxPins distinct ones, so
// that pins stay apart in a print without colour.
type PinStyle struct {
	Slot  int
	Name  string
	Class string
	Dash  string
}

// pinDashes are the pins' dash patterns, by slot; the current design's
// traces are solid and its secondary traces (Z₀, g∞) dash "7 4".
var pinDashes = [MaxPins]string{"1.5 3", "10 3 2 3", "12 5", "5 2 1.5 2 1.5 2"}

// PinTraces overlays the pinned designs on a chart of any kind: trace
// builds one pin's trace from its response, named and drawn in the pin's
// style, and reports false where the response has nothing to draw (the
// pin lacks the port, or its sweep). Pins that could not be analyzed are
// left out.
//
//	b.Traces = append(b.Traces, calc.PinTraces(c, func(r *api.Response, s calc.PinStyle) (plot.Trace, bool) {
//		if r.Sweep == nil || r.Sweep.Gain == nil {
//			return plot.Trace{}, false
//		}
//		return s.Trace("g", r.Sweep.Gain.G), true
//	})...)
func PinTraces[T any](c *Context, trace func(r *api.Response, s PinStyle) (T, bool)) []T {
	var out []T
	for i := range c.Pins {
		p := &c.Pins[i]
		if p.Resp == nil {
			continue
		}
		if t, ok := trace(p.Resp, p.Style()); ok {
			out = append(out, t)
		}
	}
	return out
}

// BodePins is PinTraces for a Bode chart whose points are the current
// sweep's: values picks a pin's column from its response (nil when it has
// none), of names the quantity in the legend ("Z" gives "Z · Pin 1").
func (c *Context) BodePins(of string, values func(r *api.Response) []*api.Complex) []plot.Trace {
	n := 0
	if s := c.Resp.Sweep; s != nil {
		n = len(s.Frequency)
	}
	return PinTraces(c, func(r *api.Response, s PinStyle) (plot.Trace, bool) {
		if r.Sweep == nil {
			return plot.Trace{}, false
		}
		v := values(r)
		if v == nil || len(v) != n {
			return plot.Trace{}, false
		}
		return s.Trace(of, v), true
	})
}

// Trace is a Bode trace of values drawn in the pin's style.
func (s PinStyle) Trace(of string, values []*api.Complex) plot.Trace {
	name := s.Name
	if of != "" {
		name = of + " · " + s.Name
	}
	vals := make([]complex128, len(values))
	for i, v := range values {
		vals[i] = v.Value()
	}
	return plot.Trace{Name: name, Class: s.Class, Values: vals, Dash: s.Dash}
}

// design returns the form of pin p: f's, with p's design in place of f's.
func (f *Form) design(p Pin) Form {
	g := *f
	g.Pins, g.CSV, g.Fragment, g.Link = nil, false, nil, ""
	if f.Topology != "" {
		g.Params = p.Params
	} else {
		g.Circuit, g.Reference, g.Ports, g.Gain = p.Circuit, p.Reference, p.Ports, p.Gain
	}
	return g
}

// analyzePins analyzes every pin of f at f's spot frequency, settings and
// sweep — sweep, the grid the current design was analyzed on (shortened
// when the budget cut it) — taking answers from the cache where it can.
func analyzePins(f *Form, entry *api.CatalogEntry, sweep *api.SweepSpec) []Pinned {
	var out []Pinned
	for _, p := range f.Pins {
		out = append(out, analyzePin(f, entry, p, sweep))
	}
	return out
}

func analyzePin(f *Form, entry *api.CatalogEntry, p Pin, sweep *api.SweepSpec) Pinned {
	pd := Pinned{Pin: p}
	g := f.design(p)
	if entry != nil {
		g = g.withDefaults(*entry)
	}
	req, bad := g.request()
	if bad != nil {
		pd.Err = bad
		return pd
	}
	req.Sweep = sweep
	for _, a := range Analyses {
		if a.Ask != nil {
			if bad := a.Ask(&req, a.context(&g, entry, nil)); bad != nil {
				pd.Err = bad
				return pd
			}
		}
	}
	key, err := json.Marshal(req)
	if err != nil {
		pd.Err = &api.ErrorBody{Message: err.Error()}
		return pd
	}
	if r, e, ok := pinAnswers.get(string(key)); ok {
		pd.Resp, pd.Err = r, e
		return pd
	}
	resp, err := api.Analyze(req)
	if err != nil {
		b := api.Body(err)
		pd.Err = &b
	}
	pd.Resp = resp
	pinAnswers.put(string(key), pd.Resp, pd.Err)
	return pd
}

// pinAnswers keeps the last answers to pinned designs, by their whole
// request, so that an edit of the current design does not analyze the
// unchanged pins again.
var pinAnswers = answerCache{size: 4 * MaxPins}

type answerCache struct {
	mu   sync.Mutex
	size int
	keys []string // oldest first
	m    map[string]cachedAnswer
}

type cachedAnswer struct {
	resp *api.Response
	err  *api.ErrorBody
}

func (c *answerCache) get(key string) (*api.Response, *api.ErrorBody, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	a, ok := c.m[key]
	return a.resp, a.err, ok
}

func (c *answerCache) put(key string, resp *api.Response, err *api.ErrorBody) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil {
		c.m = map[string]cachedAnswer{}
	}
	if _, ok := c.m[key]; !ok {
		c.keys = append(c.keys, key)
	}
	c.m[key] = cachedAnswer{resp, err}
	for len(c.keys) > c.size {
		delete(c.m, c.keys[0])
		c.keys = c.keys[1:]
	}
}

// effectiveSweep is the grid an answer was computed on: the request's,
// shortened or left out where the budget cut it.
func effectiveSweep(req *api.SweepSpec, cut *SweepCut) *api.SweepSpec {
	if req == nil || cut == nil {
		return req
	}
	if cut.Used == 0 {
		return nil
	}
	s := *req
	s.Points = cut.Used
	return &s
}

// checkPins refuses pins a page could not have made: too many, a slot out
// of range or taken twice, a name too long.
func checkPins(pins []Pin) *api.ErrorBody {
	if len(pins) > MaxPins {
		return &api.ErrorBody{Param: "pins", Message: "at most " + strconv.Itoa(MaxPins) + " designs can be pinned"}
	}
	seen := map[int]bool{}
	for _, p := range pins {
		if p.Slot < 1 || p.Slot > MaxPins || seen[p.Slot] {
			return &api.ErrorBody{Param: "pins", Message: "pin slots are 1 to " + strconv.Itoa(MaxPins) + ", each used once"}
		}
		seen[p.Slot] = true
		if len(p.Name) > MaxPinName {
			return &api.ErrorBody{Param: "pins", Message: "a pin's name is limited to " + strconv.Itoa(MaxPinName) + " characters"}
		}
	}
	return nil
}
