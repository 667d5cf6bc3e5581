package calc

import (
	"math"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// closedLoop is what the gain does in time and frequency: the step
// response with its figures, the peaking and bandwidth of |g|, and the
// circuit's natural frequencies (the engine's "response" key). It shows
// wherever a gain is defined; its settings choose the step's time axis.
var closedLoop = Analysis{
	Key:   "response",
	Title: "Closed-loop response",
	Settings: []Setting{
		{Name: "to", Symbol: "t_end", Meaning: "step's time span", Unit: "s", Default: auto, Range: "auto (from the slowest natural frequency), or above 0 s"},
		{Name: "points", Symbol: "points", Meaning: "step's points", Default: auto, Range: "auto, or 10 to " + strconv.Itoa(maxStepPoints)},
	},
	Ask:     responseAsk,
	Section: responseSection,
	Copy:    responseCopy,
	Compare: responseCompared,
}

// responseCompared are the figures a pinned design is set beside.
func responseCompared(*Context) []Compared {
	of := func(get func(r *api.ResponseResult) *float64) func(r *api.Response) *float64 {
		return func(resp *api.Response) *float64 {
			if r := api.ClosedLoop.Result(resp); r != nil {
				return get(r)
			}
			return nil
		}
	}
	return []Compared{
		{ID: "overshoot", Label: "Overshoot (%)", Unit: "", Real: of(func(r *api.ResponseResult) *float64 { return r.Overshoot })},
		{ID: "riseTime", Label: "Rise time, 10–90 %", Unit: "s", Real: of(func(r *api.ResponseResult) *float64 { return r.RiseTime })},
		{ID: "settling1", Label: "Settling to ±1 %", Unit: "s", Real: of(func(r *api.ResponseResult) *float64 { return r.SettlingTime.Percent1 })},
		{ID: "bandwidth", Label: "−3 dB bandwidth", Unit: "Hz", Real: of(func(r *api.ResponseResult) *float64 { return r.Bandwidth })},
		{ID: "peaking", Label: "Peaking", Unit: "dB", Real: of(func(r *api.ResponseResult) *float64 {
			if r.Peaking == nil {
				return nil
			}
			return &r.Peaking.DB
		})},
	}
}

// The settings' paths, as errors name them (closedLoop.Field, written out
// because the analysis's own functions cannot refer to it).
const (
	responseTo     = "response.to"
	responsePoints = "response.points"
)

// auto is the setting that lets the engine choose.
const auto = "auto"

const (
	minStepPoints = 10
	maxStepPoints = 20000
)

// hasGain reports whether the calculator defines a gain.
func hasGain(c *Context) bool {
	if c.Entry != nil {
		return c.Entry.Gain != nil
	}
	return c.Form.Gain != nil
}

func responseAsk(req *api.Request, c *Context) *api.ErrorBody {
	var axis api.TimeAxis
	if s := strings.TrimSpace(c.Values["to"]); s != auto && s != "" {
		v, err := value.Parse(s, "s")
		if err != nil {
			return &api.ErrorBody{Param: responseTo, Message: "time span: " + err.Error()}
		}
		if !(v > 0) {
			return &api.ErrorBody{Param: responseTo, Message: "time span: must be above 0 s (or auto)"}
		}
		axis.To = &v
	}
	if s := strings.TrimSpace(c.Values["points"]); s != auto && s != "" {
		n, err := strconv.Atoi(s)
		if err != nil || n < minStepPoints || n > maxStepPoints {
			return &api.ErrorBody{Param: responsePoints, Message: "step points: a whole number from " +
				strconv.Itoa(minStepPoints) + " to " + strconv.Itoa(maxStepPoints) + " (or auto)"}
		}
		axis.Points = &n
	}
	if !hasGain(c) {
		return nil // the section says what is missing
	}
	q := &api.ResponseRequest{}
	if axis.To != nil || axis.Points != nil {
		q.Time = &axis
	}
	api.ClosedLoop.Ask(req, q)
	return nil
}

// percent writes a percentage.
func percent(x float64) string { return view.Plain(x) + " %" }

func responseSection(w *view.Writer, c *Context) {
	r := api.ClosedLoop.Result(c.Resp)
	if r == nil {
		if c.Entry == nil {
			w.Section(c.ID, "response", "Closed-loop response")
			w.Explain("Choose a gain (a source and an output) to see its step response, bandwidth and the circuit's natural frequencies.")
			w.Close("section")
		}
		return
	}
	g := c.Resp.Gain
	w.Section(c.ID, "response", "Closed-loop response")
	w.Open("p", "class", "explain")
	w.Text("What the gain from ")
	w.Elem("code", g.Source)
	w.Text(" to ")
	w.Elem("code", g.Output)
	w.Text(" does: its response to a unit step of ")
	w.Elem("code", g.Source)
	w.Text(", the peaking and bandwidth of |g|, and the circuit's natural frequencies (closed-loop poles), from the whole model, op-amp poles included.")
	w.Close("p")
	if r.Stability == api.NotComputed {
		w.Notes("response-notes", r.Notes)
		w.Close("section")
		return
	}
	unit := r.Unit
	w.Open("dl", "class", "kv response-figures")
	w.KV("Stability", func() {
		cls := "verdict ok"
		switch r.Stability {
		case "unstable":
			cls = "verdict bad"
		case "marginal":
			cls = "verdict low"
		}
		w.Elem("strong", r.Stability, "class", cls, "data-quantity", "stability")
	})
	w.KV("Final value", func() { w.Real(r.Final, unit, "none (does not settle)", "data-quantity", "final") })
	w.KV("Overshoot", func() {
		if r.Overshoot == nil {
			w.Real(nil, "", "—", "data-quantity", "overshoot")
			return
		}
		w.Elem("span", percent(*r.Overshoot), "data-quantity", "overshoot", "data-value", view.Num(*r.Overshoot))
		if r.Peak != nil {
			w.Text(" at ")
			w.Real(&r.Peak.Time, "s", "", "data-quantity", "peakTime")
		}
	})
	w.KV("Rise time, 10–90 %", func() { w.Real(r.RiseTime, "s", "—", "data-quantity", "riseTime") })
	w.KV("Settling to ±1 %", func() { w.Real(r.SettlingTime.Percent1, "s", "—", "data-quantity", "settling1") })
	w.KV("Settling to ±0.1 %", func() { w.Real(r.SettlingTime.Percent01, "s", "—", "data-quantity", "settling01") })
	if ref := r.Reference; ref != nil {
		label := "Low-frequency gain"
		switch r.Kind {
		case "band-pass":
			label = "Largest gain (band-pass)"
		case "high-pass":
			label = "High-frequency gain"
		}
		w.KV(label, func() {
			w.Real(&ref.Gain, unit, "—", "data-quantity", "referenceGain")
			if ref.Frequency != nil && *ref.Frequency > 0 {
				w.Text(" at ")
				w.Real(ref.Frequency, "Hz", "", "data-quantity", "referenceFrequency")
			}
		})
	}
	if r.Stability == "stable" && r.Kind == "low-pass" {
		w.KV("Peaking", func() {
			if r.Peaking == nil {
				w.Elem("span", "none", "class", "none", "data-quantity", "peaking", "data-null", "true")
				return
			}
			w.Elem("span", view.DB(r.Peaking.DB), "data-quantity", "peaking", "data-value", view.Num(r.Peaking.DB))
			w.Text(" at ")
			w.Real(&r.Peaking.Frequency, "Hz", "", "data-quantity", "peakingFrequency")
		})
	}
	w.KV("Bandwidth, −3 dB", func() { w.Real(r.Bandwidth, "Hz", "—", "data-quantity", "bandwidth") })
	if r.LowerCorner != nil {
		w.KV("Lower corner, −3 dB", func() { w.Real(r.LowerCorner, "Hz", "—", "data-quantity", "lowerCorner") })
	}
	w.Close("dl")
	w.Notes("response-notes", r.Notes)
	poleTable(w, r)
	chart := stepChart(c, r)
	w.Figures(chart.SVG())
	w.Open("details", "class", "formulas")
	w.Elem("summary", "How this is computed")
	w.Elem("p", "The nodal equations become a real pencil (G + sC)x = b with each op-amp pole as a state; the natural frequencies are where G + sC is singular, found by shift-and-invert and the QR algorithm, then refined as zeros of det(G + sC). "+
		"The step is propagated exactly with the matrix exponential; each figure is refined between samples. Rise time is from 10 % to 90 % of the final value; settling is the last time the step leaves the ±1 % or ±0.1 % band. "+
		"Peaking is measured above the gain at DC; the bandwidth is where |g| has fallen 3 dB below it. A pole's weight is its dominance index |residue|/|Re s| relative to the largest (Martins and Rommes); weight 0.2 or more counts as dominant. Second-order figures: overshoot exp(−π/√(4Q² − 1)), peaking Q²/√(Q² − ¼) (Ogata).")
	w.Close("details")
	w.Close("section")
}

// poleTable lists the natural frequencies, a conjugate pair on one row.
func poleTable(w *view.Writer, r *api.ResponseResult) {
	if len(r.Poles) == 0 {
		return
	}
	w.Elem("p", "Natural frequencies (closed-loop poles), slowest first; a pair on one row.", "class", "explain")
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results poles")
	w.Open("thead")
	w.Open("tr")
	for _, h := range []string{"", "Frequency", "Q", "ζ", "s (rad/s)", "Weight"} {
		w.Elem("th", h, "scope", "col")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for i, p := range r.Poles {
		if p.Im < 0 {
			continue // the pair's upper member says it
		}
		idx := strconv.Itoa(i)
		if p.Dominant {
			w.Open("tr", "class", "dominant")
		} else {
			w.Open("tr")
		}
		kind := "real pole"
		if p.Im > 0 {
			kind = "pair"
		}
		if p.Dominant {
			kind += ", dominant"
		}
		w.Elem("th", kind, "scope", "row")
		w.Open("td", "data-label", "Frequency")
		w.Real(&p.Frequency, "Hz", "", "data-pole", idx, "data-quantity", "poleFrequency")
		w.Close("td")
		w.Open("td", "data-label", "Q")
		w.Real(p.Q, "", "—", "data-pole", idx, "data-quantity", "poleQ")
		w.Close("td")
		w.Open("td", "data-label", "ζ")
		w.Real(p.Zeta, "", "—", "data-pole", idx, "data-quantity", "poleZeta")
		w.Close("td")
		w.Open("td", "data-label", "s (rad/s)")
		s := view.Plain(p.Re)
		if p.Im > 0 {
			s += " ± j" + view.Plain(p.Im)
		}
		w.Elem("span", s, "data-pole", idx, "data-quantity", "pole", "data-re", view.Num(p.Re), "data-im", view.Num(p.Im))
		w.Close("td")
		w.Open("td", "data-label", "Weight")
		w.Elem("span", view.PlainN(p.Weight, 2), "data-pole", idx, "data-quantity", "poleWeight", "data-value", view.Num(p.Weight))
		w.Close("td")
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
}

// stepChart is the step response with its final value and ±1 % band, and
// the peak and settling times marked.
func stepChart(c *Context, r *api.ResponseResult) plot.Time {
	g := c.Resp.Gain
	unit := r.Unit
	if unit == "V/V" {
		unit = ""
	}
	ylabel := "Step response (V/V)"
	if r.Unit == "Ω" {
		ylabel = "Step response (V per A, Ω)"
	}
	t := plot.Time{
		ID:      c.ID + "-plot-step",
		Title:   "Step response " + g.Source + " → " + g.Output + ", unit step of " + g.Source,
		Time:    r.Step.Time,
		Series:  []plot.Series{{Name: "step", Class: "g", Values: r.Step.Value}},
		Unit:    unit,
		YLabel:  ylabel,
		NoStyle: true,
	}
	// A pinned design's step, read on this step's time axis (each design
	// chooses its own span).
	t.Series = append(t.Series, PinTraces(c, func(resp *api.Response, s PinStyle) (plot.Series, bool) {
		p := api.ClosedLoop.Result(resp)
		if p == nil || len(p.Step.Time) < 2 {
			return plot.Series{}, false
		}
		return plot.Series{Name: s.Name, Class: s.Class, Dash: s.Dash, Values: resample(p.Step.Time, p.Step.Value, r.Step.Time)}, true
	})...)
	t.Width, t.Height = c.ChartSize(640, 320)
	if f := r.Final; f != nil && *f != 0 {
		t.HLines = append(t.HLines,
			plot.HLine{Value: *f, Label: "final " + value.Format(*f, unit, 4), Class: "final"},
			plot.HLine{Value: *f * 1.01, Class: "band"},
			plot.HLine{Value: *f * 0.99, Class: "band"})
	}
	if r.Peak != nil {
		t.Markers = append(t.Markers, plot.Marker{Freq: r.Peak.Time, Label: "peak, " + percent(*r.Overshoot), Class: "peak"})
	}
	if s := r.SettlingTime.Percent1; s != nil && *s > 0 {
		t.Markers = append(t.Markers, plot.Marker{Freq: *s, Label: "within ±1 % from " + value.Format(*s, "s", 3), Class: "settle"})
	}
	return t
}

func responseCopy(m *Markdown, c *Context) {
	r := api.ClosedLoop.Result(c.Resp)
	if r == nil {
		return
	}
	opt := func(x *float64, unit string) string {
		if x == nil {
			return "—"
		}
		if unit == "%" {
			return percent(*x)
		}
		return view.Magnitude(*x, unit)
	}
	rows := [][]string{
		{"Stability", r.Stability},
		{"Final value", opt(r.Final, r.Unit)},
		{"Overshoot", opt(r.Overshoot, "%")},
		{"Rise time, 10–90 %", opt(r.RiseTime, "s")},
		{"Settling to ±1 %", opt(r.SettlingTime.Percent1, "s")},
		{"Settling to ±0.1 %", opt(r.SettlingTime.Percent01, "s")},
	}
	if r.Peaking != nil {
		rows = append(rows, []string{"Peaking", view.DB(r.Peaking.DB) + " at " + view.Magnitude(r.Peaking.Frequency, "Hz")})
	}
	rows = append(rows, []string{"Bandwidth, −3 dB", opt(r.Bandwidth, "Hz")})
	if r.LowerCorner != nil {
		rows = append(rows, []string{"Lower corner, −3 dB", opt(r.LowerCorner, "Hz")})
	}
	m.Table([]string{"Closed-loop response " + MD(c.Resp.Gain.Source) + " → " + MD(c.Resp.Gain.Output), "Value"}, rows...)
	var poles [][]string
	for _, p := range r.Poles {
		if p.Im < 0 {
			continue
		}
		s := view.Plain(p.Re)
		if p.Im > 0 {
			s += " ± j" + view.Plain(p.Im)
		}
		q := "—"
		if p.Q != nil {
			q = view.Plain(*p.Q)
		}
		dom := ""
		if p.Dominant {
			dom = "dominant"
		}
		poles = append(poles, []string{view.Magnitude(p.Frequency, "Hz"), q, s, dom})
	}
	if len(poles) > 0 {
		m.Table([]string{"Natural frequency", "Q", "s (rad/s)", ""}, poles...)
	}
	for _, n := range r.Notes {
		m.Line("- " + MD(n))
	}
}

// resample reads the samples (ts, vs) at the times at, linearly between
// neighbours; outside ts's span it gives NaN, a gap in the chart.
func resample(ts, vs, at []float64) []float64 {
	out := make([]float64, len(at))
	j := 0
	for i, t := range at {
		for j+1 < len(ts) && ts[j+1] < t {
			j++
		}
		switch {
		case t < ts[0] || t > ts[len(ts)-1]:
			out[i] = math.NaN()
		case j+1 >= len(ts) || ts[j+1] == ts[j]:
			out[i] = vs[j]
		default:
			u := (t - ts[j]) / (ts[j+1] - ts[j])
			out[i] = vs[j] + u*(vs[j+1]-vs[j])
		}
	}
	return out
}
