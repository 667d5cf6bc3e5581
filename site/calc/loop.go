package calc

import (
	"math"
	"math/cmplx"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// loop is the reference element's return ratio T at the spot frequency,
// and over the sweep the crossovers, margins and a verdict. The reference
// is part of the base request.
var loop = Analysis{
	Key:     "loop",
	Title:   "Loop",
	Section: loopSection,
	Columns: loopColumns,
	Copy:    loopCopy,
	Compare: loopCompared,
}

// verdictClass maps the engine's verdicts onto the panel's styles.
func verdictClass(v string) string {
	switch v {
	case "stable":
		return "verdict ok"
	case "margin below 45°":
		return "verdict low"
	case "unstable":
		return "verdict bad"
	}
	return "verdict none"
}

func loopSection(w *view.Writer, c *Context) {
	r := c.Resp
	if r.Reference == "" {
		return // no reference element: no loop to show (a note says so)
	}
	w.Section(c.ID, "loop", "Loop")
	w.Open("dl", "class", "kv")
	w.KV("Return ratio T at "+view.Magnitude(r.Frequency, "Hz"), func() {
		w.Complex(view.Complex{Z: r.ReturnRatio, DB: true, Attrs: []string{"data-quantity", "T"}, Bounded: true, Err: r.ReturnRatioError})
	})
	tForm := loopForm(r)
	if tForm != nil {
		w.KV("T by hand formula", func() {
			w.Complex(view.Complex{Z: tForm.Value, DB: true, Attrs: []string{"data-closed-form", "T"}})
		})
	}
	if m := r.Margins; m != nil {
		w.KV("Crossover, |T| = 1", func() { w.Real(m.Crossover, "Hz", "none in the sweep", "data-quantity", "fc") })
		w.KV("Phase margin", func() { w.Real(m.PhaseMargin, "°", "—", "data-quantity", "pm") })
		w.KV("Gain margin", func() {
			w.Real(m.GainMargin, "dB", "phase does not reach −180° in the sweep", "data-quantity", "gm")
		})
		w.KV("Verdict", func() {
			w.Elem("strong", m.Verdict, "class", verdictClass(m.Verdict), "data-quantity", "verdict")
			if m.VerdictDetail != "" {
				w.Text(" ")
				w.Elem("span", m.VerdictDetail, "class", "detail")
			}
		})
		if cl := m.Closure; cl != nil {
			w.KV("Rate of closure", func() {
				w.Elem("span", view.PlainN(cl.Rate, 3)+" dB/decade", "data-quantity", "closure", "data-value", view.Num(cl.Rate))
				w.Text(" between |A| of " + r.Reference + " (" + slope(cl.OpenLoopSlope) + ") and 1/β (" + slope(cl.NoiseGainSlope) + "): ")
				w.Elem("strong", cl.Verdict, "class", closureClass(cl.Verdict), "data-quantity", "closureVerdict")
			})
		}
		if len(m.Crossovers) > 1 {
			w.KV("All crossovers", func() {
				w.Open("ul", "class", "inline-list")
				for _, x := range m.Crossovers {
					dir := "rising"
					if x.Direction == "down" {
						dir = "falling"
					}
					w.Elem("li", value.Format(x.Frequency, "Hz", view.Sig)+" (|T| "+dir+", phase margin "+view.Degrees(x.PhaseMargin)+")")
				}
				w.Close("ul")
			})
		}
	}
	w.Close("dl")
	c.Comparison(w)
	if tForm != nil {
		w.Open("details", "class", "formulas")
		w.Elem("summary", "Hand formula for T and its source")
		w.Open("dl")
		w.Formula("T", tForm)
		w.Close("dl")
		w.Close("details")
	}
	if r.Margins != nil {
		w.Open("p", "class", "targets")
		w.Text("Targets: a phase margin of at least 45°, and about 60° for a well-damped step response, are ")
		w.Elem("em", "common practice")
		w.Text(" rather than a published rule. Phase margin is 180° + ∠T at the crossover, with the phase of T followed continuously from the lowest frequency of the sweep; gain margin is −20·log₁₀|T| where that phase reaches −180°. The rate of closure is how steeply |A| and 1/β = |A/T| approach each other where they meet: about 20 dB/decade is safe, about 40 marginal (")
		w.Elem("em", "common practice")
		w.Text(").")
		w.Close("p")
	}
	if s := r.Sweep; s != nil && len(s.Frequency) > 0 {
		b := loopChart(c)
		views := []string{b.SVG()}
		if m := r.Margins; m != nil && len(m.OpenLoop) == len(s.Frequency) {
			g := gainVsBeta(c)
			n := nyquistChart(c)
			views = append(views, g.SVG(), n.SVG())
		}
		w.Figures(views...)
	}
	w.Close("section")
}

// loopForm is the stage's hand formula for T, or nil.
func loopForm(r *api.Response) *api.Formula {
	if t := r.Topology; t != nil && t.ClosedForm != nil {
		return t.ClosedForm.ReturnRatio
	}
	return nil
}

// loopChart is T over the sweep with its crossovers and −180° crossings.
func loopChart(c *Context) plot.Bode {
	r := c.Resp
	s := r.Sweep
	b := plot.Bode{
		ID:      c.ID + "-plot-loop",
		Title:   "Return ratio T of " + r.Reference,
		Freq:    s.Frequency,
		MagUnit: "dB",
		Traces: append([]plot.Trace{{Name: "T", Class: "t", Values: view.Values(s.ReturnRatio)}},
			c.BodePins("T", func(r *api.Response) []*api.Complex { return r.Sweep.ReturnRatio })...),
		HLines: []plot.HLine{
			{Panel: plot.MagPanel, Value: 0, Label: "|T| = 1", Class: "unity"},
			{Panel: plot.PhasePanel, Value: -180, Label: "−180°", Class: "m180"},
		},
		NoStyle: true,
	}
	b.Width, b.Height = c.ChartSize(640, 400)
	if m := r.Margins; m != nil {
		for _, x := range m.Crossovers {
			b.Markers = append(b.Markers, plot.Marker{Freq: x.Frequency,
				Label: "crossover " + value.Format(x.Frequency, "Hz", 3) + ", PM " + view.Degrees(x.PhaseMargin), Class: "crossover"})
		}
		for _, pc := range m.PhaseCrossings {
			b.Markers = append(b.Markers, plot.Marker{Freq: pc.Frequency,
				Label: "−180° at " + value.Format(pc.Frequency, "Hz", 3) + ", GM " + view.DB(pc.GainMargin), Class: "gm"})
		}
	}
	return b
}

// slope writes a magnitude's slope in dB/decade with its sign.
func slope(x float64) string {
	s := view.PlainN(x, 2)
	if x > 0 {
		s = "+" + s
	}
	return s + " dB/decade"
}

// closureClass maps the closure verdicts onto the panel's styles.
func closureClass(v string) string {
	switch v {
	case "safe":
		return "verdict ok"
	case "marginal":
		return "verdict low"
	}
	return "verdict bad"
}

// gainVsBeta is the reference's own gain |A| against 1/β = |A/T| over the
// sweep: they meet at the crossover, and the angle between them there is
// the rate of closure.
func gainVsBeta(c *Context) plot.Bode {
	r := c.Resp
	s, m := r.Sweep, r.Margins
	b := plot.Bode{
		ID:      c.ID + "-plot-beta",
		Title:   "Open-loop gain of " + r.Reference + " against 1/β (noise gain)",
		Freq:    s.Frequency,
		MagUnit: "dB",
		Traces: []plot.Trace{
			{Name: "|A| of " + r.Reference, Class: "t", Values: view.Values(m.OpenLoop)},
			{Name: "1/β = |A/T|", Class: "g", Values: view.Values(m.NoiseGain), Dashed: true},
		},
		NoPhase: true,
		NoStyle: true,
	}
	b.Traces = append(b.Traces, c.BodePins("1/β", func(r *api.Response) []*api.Complex {
		if r.Margins == nil {
			return nil
		}
		return r.Margins.NoiseGain
	})...)
	b.Width, b.Height = c.ChartSize(640, 320)
	if cl := m.Closure; cl != nil {
		b.Markers = append(b.Markers, plot.Marker{Freq: cl.Frequency,
			Label: "crossover " + value.Format(cl.Frequency, "Hz", 3) + ", closure " + view.PlainN(cl.Rate, 2) + " dB/decade", Class: "crossover"})
	}
	return b
}

// nyquistChart is T over the sweep on the compressed polar plane, with the
// phase-margin and gain-margin points.
func nyquistChart(c *Context) plot.Nyquist {
	r := c.Resp
	s, m := r.Sweep, r.Margins
	n := plot.Nyquist{
		ID:      c.ID + "-plot-nyquist",
		Title:   "Nyquist plot of T of " + r.Reference + ", " + value.Format(s.Frequency[0], "Hz", 3) + " to " + value.Format(s.Frequency[len(s.Frequency)-1], "Hz", 3),
		Name:    "T of " + r.Reference,
		Freq:    s.Frequency,
		T:       view.Values(s.ReturnRatio),
		NoStyle: true,
	}
	n.Width, _ = c.ChartSize(640, 0)
	for _, x := range m.Crossovers {
		a := (x.PhaseMargin - 180) * math.Pi / 180
		n.Points = append(n.Points, plot.Point{Value: cmplx.Rect(1, a), Label: "PM " + view.Degrees(x.PhaseMargin), Class: "pm"})
	}
	for _, p := range m.PhaseCrossings {
		n.Points = append(n.Points, plot.Point{Value: complex(-math.Pow(10, -p.GainMargin/20), 0), Label: "GM " + view.DB(p.GainMargin), Class: "gm"})
	}
	return n
}

func loopColumns(c *Context) []Column {
	r := c.Resp
	if r.Reference == "" {
		return nil
	}
	if s := r.Sweep; s != nil {
		cols := []Column{{Name: "T", Complex: s.ReturnRatio}}
		if m := r.Margins; m != nil && len(m.OpenLoop) == len(s.Frequency) {
			cols = append(cols, Column{Name: "A", Complex: m.OpenLoop}, Column{Name: "noiseGain", Complex: m.NoiseGain})
		}
		return cols
	}
	return []Column{{Name: "T", Complex: []*api.Complex{r.ReturnRatio}}}
}

func loopCopy(m *Markdown, c *Context) {
	r := c.Resp
	if r.Reference == "" {
		return
	}
	at := "T at " + view.Magnitude(r.Frequency, "Hz")
	t := "—"
	if r.ReturnRatio != nil {
		T := r.ReturnRatio.Value()
		t = view.Polar(T, "") + " (" + view.Decibels(T) + ")"
	}
	rows := [][]string{{at, t}}
	if mg := r.Margins; mg != nil {
		opt := func(x *float64, unit string) string {
			if x == nil {
				return "—"
			}
			return view.Magnitude(*x, unit)
		}
		rows = append(rows,
			[]string{"Crossover", opt(mg.Crossover, "Hz")},
			[]string{"Phase margin", opt(mg.PhaseMargin, "°")},
			[]string{"Gain margin", opt(mg.GainMargin, "dB")},
			[]string{"Verdict", MD(mg.Verdict)})
		if cl := mg.Closure; cl != nil {
			rows = append(rows, []string{"Rate of closure", view.PlainN(cl.Rate, 3) + " dB/decade (" + cl.Verdict + ")"})
		}
	}
	m.Table([]string{"Loop", "Value"}, rows...)
}

// loopCompared compares T at the spot frequency and, over the sweep, the
// crossover and the margins.
func loopCompared(c *Context) []Compared {
	if c.Resp.Reference == "" {
		return nil
	}
	rows := []Compared{{ID: "T", Label: "T at " + value.Format(c.Resp.Frequency, "Hz", view.Sig), Unit: "",
		Complex: func(r *api.Response) *api.Complex { return r.ReturnRatio }}}
	if c.Resp.Margins == nil {
		return rows
	}
	margin := func(pick func(m *api.Margins) *float64) func(r *api.Response) *float64 {
		return func(r *api.Response) *float64 {
			if r.Margins == nil {
				return nil
			}
			return pick(r.Margins)
		}
	}
	return append(rows,
		Compared{ID: "fc", Label: "Crossover", Unit: "Hz", Real: margin(func(m *api.Margins) *float64 { return m.Crossover })},
		Compared{ID: "pm", Label: "Phase margin", Unit: "°", Real: margin(func(m *api.Margins) *float64 { return m.PhaseMargin })},
		Compared{ID: "gm", Label: "Gain margin", Unit: "dB", Real: margin(func(m *api.Margins) *float64 { return m.GainMargin })},
	)
}
