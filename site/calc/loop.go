package calc

import (
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
	w.KV("Return ratio T at "+value.Format(r.Frequency, "Hz", view.Sig), func() {
		w.Complex(view.Complex{Z: r.ReturnRatio, DB: true, Attrs: []string{"data-quantity", "T"}})
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
		w.Text(" rather than a published rule. Phase margin is 180° + ∠T at the crossover, with the phase of T followed continuously from the lowest frequency of the sweep; gain margin is −20·log₁₀|T| where that phase reaches −180°.")
		w.Close("p")
	}
	if s := r.Sweep; s != nil && len(s.Frequency) > 0 {
		b := loopChart(c)
		w.Figures(b.SVG())
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
		Traces:  []plot.Trace{{Name: "T", Class: "t", Values: view.Values(s.ReturnRatio)}},
		HLines: []plot.HLine{
			{Panel: plot.MagPanel, Value: 0, Label: "|T| = 1", Class: "unity"},
			{Panel: plot.PhasePanel, Value: -180, Label: "−180°", Class: "m180"},
		},
		NoStyle: true,
	}
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

func loopColumns(c *Context) []Column {
	r := c.Resp
	if r.Reference == "" {
		return nil
	}
	if s := r.Sweep; s != nil {
		return []Column{{Name: "T", Complex: s.ReturnRatio}}
	}
	return []Column{{Name: "T", Complex: []*api.Complex{r.ReturnRatio}}}
}

func loopCopy(m *Markdown, c *Context) {
	r := c.Resp
	if r.Reference == "" {
		return
	}
	at := "T at " + value.Format(r.Frequency, "Hz", view.Sig)
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
	}
	m.Table([]string{"Loop", "Value"}, rows...)
}
