package render

import (
	"strconv"
	"strings"
	"unicode/utf8"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
)

// values converts a sweep column; a null entry becomes NaN, a gap.
func values(v []*api.Complex) []complex128 {
	out := make([]complex128, len(v))
	for i, c := range v {
		out[i] = c.Value()
	}
	return out
}

// charts builds the panel's Bode charts: each port's impedance, the return
// ratio with its crossover and margins, and the closed-loop gain.
func (p *panel) charts() []plot.Bode {
	r := p.resp
	s := r.Sweep
	if s == nil || len(s.Frequency) == 0 {
		return nil
	}
	spot := []plot.Marker{}
	if r.Frequency >= s.Frequency[0] && r.Frequency <= s.Frequency[len(s.Frequency)-1] {
		spot = append(spot, plot.Marker{Freq: r.Frequency, Label: "spot " + value.Format(r.Frequency, "Hz", 3), Class: "spot"})
	}
	var charts []plot.Bode
	for i, ps := range s.Ports {
		charts = append(charts, plot.Bode{
			ID:      p.id + "-plot-port" + strconv.Itoa(i),
			Title:   portChartTitle(ps.Name, p.portTitle(ps.Name)),
			Freq:    s.Frequency,
			MagUnit: "Ω",
			Traces: []plot.Trace{
				{Name: "Z (Blackman)", Class: "z", Values: values(ps.Z)},
				{Name: "Z₀ (reference gain zero)", Class: "z0", Values: values(ps.Z0), Dashed: true},
			},
			Markers: spot,
			NoStyle: true,
		})
	}
	loop := plot.Bode{
		ID:      p.id + "-plot-loop",
		Title:   "Return ratio T of " + r.Reference,
		Freq:    s.Frequency,
		MagUnit: "dB",
		Traces:  []plot.Trace{{Name: "T", Class: "t", Values: values(s.ReturnRatio)}},
		HLines: []plot.HLine{
			{Panel: plot.MagPanel, Value: 0, Label: "|T| = 1", Class: "unity"},
			{Panel: plot.PhasePanel, Value: -180, Label: "−180°", Class: "m180"},
		},
		NoStyle: true,
	}
	if m := r.Margins; m != nil {
		for _, c := range m.Crossovers {
			loop.Markers = append(loop.Markers, plot.Marker{Freq: c.Frequency,
				Label: "crossover " + value.Format(c.Frequency, "Hz", 3) + ", PM " + degrees(c.PhaseMargin), Class: "crossover"})
		}
		for _, pc := range m.PhaseCrossings {
			loop.Markers = append(loop.Markers, plot.Marker{Freq: pc.Frequency,
				Label: "−180° at " + value.Format(pc.Frequency, "Hz", 3) + ", GM " + dB(pc.GainMargin), Class: "gm"})
		}
	}
	charts = append(charts, loop)
	if g := s.Gain; g != nil && r.Gain != nil {
		unit := r.Gain.Unit
		mag := "dB"
		if unit != "V/V" {
			mag = unit
		}
		charts = append(charts, plot.Bode{
			ID:      p.id + "-plot-gain",
			Title:   "Closed-loop gain " + r.Gain.Source + " → " + r.Gain.Output + " (" + unit + ")",
			Freq:    s.Frequency,
			MagUnit: mag,
			Traces: []plot.Trace{
				{Name: "g", Class: "g", Values: values(g.G)},
				{Name: "g∞ (ideal)", Class: "ginf", Values: values(g.GInf), Dashed: true},
			},
			Markers: spot,
			NoStyle: true,
		})
	}
	return charts
}

// maxChartTitle is the longest chart title, in characters, that fits on
// one line of a 640-unit chart in a wide sans-serif (DejaVu Sans, Debian's
// default, measured in Chromium: 76 characters fit, 98 were clipped). The
// chart does not wrap its title.
const maxChartTitle = 76

// portChartTitle names a port's impedance chart with the port's
// description when it fits, else with the description's main clause (the
// text before a parenthesis inside it), else with the port's name alone;
// the results table above always carries the whole description.
func portChartTitle(name, desc string) string {
	title := "|Z| and phase at port " + name
	if desc == "" {
		return title
	}
	if full := title + " (" + desc + ")"; utf8.RuneCountInString(full) <= maxChartTitle {
		return full
	}
	if i := strings.Index(desc, " ("); i > 0 {
		if short := title + " (" + desc[:i] + ")"; utf8.RuneCountInString(short) <= maxChartTitle {
			return short
		}
	}
	return title
}

func (p *panel) plots() {
	charts := p.charts()
	if len(charts) == 0 {
		return
	}
	w := &p.w
	h := p.id + "-plots-h"
	w.open("section", "class", "block plots", "aria-labelledby", h)
	w.elem("h3", "Over frequency", "id", h)
	s := p.resp.Sweep
	w.elem("p", "Sweep from "+value.Format(s.Frequency[0], "Hz", 4)+" to "+value.Format(s.Frequency[len(s.Frequency)-1], "Hz", 4)+
		", "+strconv.Itoa(len(s.Frequency))+" points, log-spaced. Move the pointer over a chart, or focus it with Tab and use the arrow keys, to read its values.", "class", "explain")
	w.open("div", "class", "plot-grid")
	for i := range charts {
		w.open("figure", "class", "plot")
		w.svg(charts[i].SVG())
		w.close("figure")
	}
	w.close("div")
	w.close("section")
}
