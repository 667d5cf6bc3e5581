package calc

import (
	"fmt"
	"math/cmplx"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
	"zport/site/view"
)

// noiseAnalysis is the noise at the gain's output (or a node the user
// names): the densities over the sweep, output and referred to the gain's
// input, the rms over a band with each source's share, and the noise gain
// of an opamp reference. It asks the engine's "noise" key.
var noiseAnalysis = Analysis{
	Key:   "noise",
	Title: "Noise",
	Settings: []Setting{
		{Name: "temperature", Symbol: "T", Meaning: "analysis temperature: the resistors’ and transistors’ noise, and the transistors’ VT = kT/q", Unit: "K", Default: "300", Range: "above 0 K, at most 1000 K"},
		{Name: "output", Symbol: "node", Meaning: "output, NODE or NODE,NODE (empty: the gain’s output)", Default: "", Range: "a node of the circuit"},
		{Name: "band.from", Symbol: "from", Meaning: "start of the band for the rms (empty: the sweep’s start)", Unit: "Hz", Default: "", Range: "above 0 Hz"},
		{Name: "band.to", Symbol: "to", Meaning: "end of the band for the rms (empty: the sweep’s end)", Unit: "Hz", Default: "", Range: "above the start"},
	},
	Ask:     noiseAsk,
	Section: noiseSection,
	Columns: noiseColumns,
	Copy:    noiseCopy,
	Compare: noiseCompared,
}

// noiseCompared are the noise figures a pinned design is set beside.
func noiseCompared(c *Context) []Compared {
	cur := api.Noise.Result(c.Resp)
	if cur == nil {
		return nil
	}
	of := func(get func(n *api.NoiseResult) *float64) func(r *api.Response) *float64 {
		return func(r *api.Response) *float64 {
			if n := api.Noise.Result(r); n != nil {
				return get(n)
			}
			return nil
		}
	}
	at := " at " + value.Format(cur.Spot.Frequency, "Hz", view.Sig)
	rows := []Compared{
		{ID: "noiseOutput", Label: "Output noise density" + at, Unit: cur.Unit, Real: of(func(n *api.NoiseResult) *float64 { return n.Spot.Output })},
		{ID: "noiseRms", Label: "Output noise, rms over the band", Unit: "V", Real: of(func(n *api.NoiseResult) *float64 { return n.RMS.Output })},
	}
	if cur.Source != "" {
		rows = append(rows, Compared{ID: "noiseInput", Label: "Referred to the input" + at, Unit: cur.InputUnit,
			Real: of(func(n *api.NoiseResult) *float64 { return n.Spot.Input })})
	}
	return rows
}

// noiseAsk asks for the noise when there is an output to read it at (the
// gain's, or one the user names) and a band (the settings', else the
// sweep's): without them the rest of the panel still answers.
func noiseAsk(req *api.Request, c *Context) *api.ErrorBody {
	q := &api.NoiseRequest{Output: strings.TrimSpace(c.Values["output"])}
	// The one temperature of the request: a transistor's VT is taken at
	// it as well as every noise density.
	t, err := value.Parse(strings.TrimSpace(c.Values["temperature"]), "")
	if err == nil && !(t > 0 && t <= api.MaxTemperature) {
		err = fmt.Errorf("the analysis temperature is in kelvin, above 0 and at most %g K (300 K is about 27 °C); got %s", api.MaxTemperature, c.Values["temperature"])
	}
	if err != nil {
		return &api.ErrorBody{Param: "noise.temperature", Message: "temperature: " + err.Error()}
	}
	req.Temperature = &t
	band := &api.NoiseBand{}
	for _, end := range []struct {
		name string
		dst  **float64
		form string
	}{{"band.from", &band.From, c.Form.Sweep.From}, {"band.to", &band.To, c.Form.Sweep.To}} {
		s := strings.TrimSpace(c.Values[end.name])
		if s == "" {
			s = strings.TrimSpace(end.form)
			if s == "" {
				continue
			}
		}
		v, err := value.Parse(s, "Hz")
		if err != nil {
			return &api.ErrorBody{Param: "noise." + end.name, Message: "noise band: " + err.Error()}
		}
		*end.dst = &v
	}
	hasGain := req.Gain != nil || c.Entry != nil && c.Entry.Gain != nil
	if q.Output == "" && !hasGain || band.From == nil && band.To == nil {
		return nil
	}
	q.Band = band
	api.Noise.Ask(req, q)
	return nil
}

// NoiseTrace is the name of a source's trace on the noise chart: its name
// and kind, "R1 (thermal)". (A part's name alone would also be the
// data-name of the design aids' input for that part.)
func NoiseTrace(k api.NoiseContributor) string { return k.Name + " (" + kindText[k.Kind] + ")" }

// kindText says what a contributor is.
var kindText = map[string]string{
	"thermal": "thermal", "shot": "shot, 2qI", "en": "op-amp eₙ", "in": "op-amp iₙ",
	"vnoise": "noise voltage", "inoise": "noise current",
}

func noiseSection(w *view.Writer, c *Context) {
	n := api.Noise.Result(c.Resp)
	if n == nil {
		if c.Entry == nil {
			w.Section(c.ID, "noise", "Noise")
			w.Explain("Choose a gain, or name an output node under the noise settings, to see the noise at that output.")
			w.Close("section")
		}
		return
	}
	w.Section(c.ID, "noise", "Noise at "+n.Node)
	text := "Thermal noise of every resistor at " + kelvin(n.Temperature) +
		" (except those marked noise=off, such as the load), the op amps’ eₙ and iₙ and the noise sources, each independent, carried to " +
		n.Node + " by one adjoint solve per frequency."
	if n.Source != "" {
		text += " Referred to the input " + n.Source + " by dividing by |gain|."
	}
	if c.Entry != nil {
		text += " The stage’s noise parameters are invented defaults, not the data of any part."
	}
	w.Explain(text)
	at := " at " + value.Format(n.Spot.Frequency, "Hz", view.Sig)
	band := value.Format(n.Band.From, "Hz", 4) + " to " + value.Format(n.Band.To, "Hz", 4)
	w.Open("dl", "class", "kv")
	w.KV("Output noise density"+at, func() { w.Real(n.Spot.Output, n.Unit, "—", "data-quantity", "noiseOutput") })
	if n.Source != "" {
		w.KV("Referred to the input "+n.Source+at, func() { w.Real(n.Spot.Input, n.InputUnit, "—", "data-quantity", "noiseInput") })
	}
	w.KV("Output noise, "+band, func() { w.Real(n.RMS.Output, "V rms", "—", "data-quantity", "noiseRms") })
	if n.Source != "" {
		w.KV("Referred to the input, through the peak gain", func() {
			w.Real(n.RMS.Input, strings.TrimSuffix(n.InputUnit, "/√Hz")+" rms", "—", "data-quantity", "noiseRmsInput")
			if n.PeakGain != nil && n.PeakAt != nil {
				w.Text(" ")
				w.Elem("span", "|gain| "+view.Magnitude(*n.PeakGain, gainUnit(n.InputUnit))+" at "+value.Format(*n.PeakAt, "Hz", 4), "class", "detail")
			}
		})
		w.KV("Equivalent noise bandwidth of the gain", func() { w.Real(n.Bandwidth, "Hz", "—", "data-quantity", "noiseBandwidth") })
	}
	w.KV("Temperature", func() {
		w.Elem("span", kelvin(n.Temperature), "data-quantity", "noiseTemperature", "data-value", view.Num(n.Temperature))
	})
	w.KV("Band integral", func() {
		w.Text(strconv.Itoa(n.Integration.Evaluations) + " frequencies, estimated error ")
		w.Ratio(n.Integration.Error, nil, "data-quantity", "noiseError")
		w.Text(" of the power")
	})
	w.Close("dl")
	noiseTable(w, n)
	w.Figures(noiseCharts(c, n)...)
	w.Notes("notes", n.Notes)
	w.Close("section")
}

// kelvin writes a temperature as typed: 300 K, 77 K, 293.15 K.
func kelvin(t float64) string { return strconv.FormatFloat(t, 'g', 6, 64) + " K" }

// gainUnit is the unit of the gain to an input of density unit u.
func gainUnit(u string) string {
	if u == "A/√Hz" {
		return "V/A"
	}
	return "V/V"
}

// noiseRows is how many of the largest sources the table and the copied
// results list; the rest are summed in one line (a circuit may have
// thousands of resistors).
const noiseRows = 12

// noiseRest sums the sources after the first noiseRows: their number and
// their share of the power.
func noiseRest(n *api.NoiseResult) (count int, share float64) {
	for _, k := range n.Contributors[min(len(n.Contributors), noiseRows):] {
		count++
		if k.Share != nil {
			share += *k.Share
		}
	}
	return count, share
}

// noiseTable ranks the contributors.
func noiseTable(w *view.Writer, n *api.NoiseResult) {
	if len(n.Contributors) == 0 {
		return
	}
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results noise-table")
	w.Open("thead")
	w.Open("tr")
	for _, h := range []struct{ l, h string }{{"Source", ""}, {"Kind", ""}, {"Density", "of the source"},
		{"At the output", "at " + value.Format(n.Spot.Frequency, "Hz", 3)}, {"rms", "over the band"}, {"Share", "of the power"}} {
		w.Open("th", "scope", "col")
		w.Text(h.l)
		if h.h != "" {
			w.Elem("span", h.h, "class", "hint")
		}
		w.Close("th")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for _, k := range n.Contributors[:min(len(n.Contributors), noiseRows)] {
		w.Open("tr", "data-source", k.Name)
		w.Elem("th", k.Name, "scope", "row")
		w.Elem("td", kindText[k.Kind], "data-label", "Kind")
		level := view.Magnitude(k.Level, k.Unit)
		if k.Corner > 0 {
			level += ", 1/f below " + value.Format(k.Corner, "Hz", 3)
		}
		w.Elem("td", level, "data-label", "Density")
		w.Open("td", "data-label", "At the output")
		w.Real(k.Spot, n.Unit, "—", "data-quantity", "contributorSpot", "data-source", k.Name)
		w.Close("td")
		w.Open("td", "data-label", "rms")
		w.Real(k.RMS, "V", "—", "data-quantity", "contributorRms", "data-source", k.Name)
		w.Close("td")
		w.Open("td", "data-label", "Share")
		if k.Share != nil {
			w.Elem("span", view.PlainN(100**k.Share, 3)+" %", "data-quantity", "contributorShare", "data-source", k.Name, "data-value", view.Num(*k.Share))
		} else {
			w.Elem("span", "—", "data-quantity", "contributorShare", "data-source", k.Name, "data-null", "true")
		}
		w.Close("td")
		w.Close("tr")
	}
	if count, share := noiseRest(n); count > 0 {
		w.Open("tr", "class", "rest")
		w.Elem("th", "… "+strconv.Itoa(count)+" more", "scope", "row")
		w.Elem("td", "", "data-label", "Kind")
		w.Elem("td", "", "data-label", "Density")
		w.Elem("td", "", "data-label", "At the output")
		w.Elem("td", "", "data-label", "rms")
		w.Elem("td", view.PlainN(100*share, 3)+" % together", "data-label", "Share")
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
}

// noiseCharts are the output density with its largest contributors, the
// input-referred density, and the noise gain, over the sweep.
func noiseCharts(c *Context, n *api.NoiseResult) []string {
	if c.Resp.Sweep == nil || len(n.Frequency) < 2 {
		return nil
	}
	reals := func(v []*float64) []complex128 {
		out := make([]complex128, len(v))
		for i, x := range v {
			out[i] = cmplx.NaN() // a gap
			if x != nil {
				out[i] = complex(*x, 0)
			}
		}
		return out
	}
	// pinned is a pin's column of its noise result, as complex numbers.
	pinned := func(col func(n *api.NoiseResult) []*float64) func(r *api.Response) []*api.Complex {
		return func(r *api.Response) []*api.Complex {
			pn := api.Noise.Result(r)
			if pn == nil {
				return nil
			}
			v := col(pn)
			if v == nil {
				return nil
			}
			out := make([]*api.Complex, len(v))
			for i, x := range v {
				if x != nil {
					out[i] = &api.Complex{Re: *x}
				}
			}
			return out
		}
	}
	out := plot.Bode{ID: c.ID + "-plot-noise", Title: "Noise density at " + n.Node + " and its largest sources", Freq: n.Frequency,
		MagUnit: n.Unit, NoPhase: true, NoStyle: true, Markers: spotMarker(c.Resp),
		Traces: []plot.Trace{{Name: "total", Class: "noise", Values: reals(n.Output)}}}
	for _, k := range n.Contributors {
		if k.Density != nil {
			out.Traces = append(out.Traces, plot.Trace{Name: NoiseTrace(k), Values: reals(k.Density), Dashed: true})
		}
	}
	out.Traces = append(out.Traces, c.BodePins("total", pinned(func(n *api.NoiseResult) []*float64 { return n.Output }))...)
	out.Width, out.Height = c.ChartSize(640, 400)
	charts := []string{out.SVG()}
	if n.Input != nil {
		in := plot.Bode{ID: c.ID + "-plot-noise-in", Title: "Noise density referred to the input " + n.Source, Freq: n.Frequency,
			MagUnit: n.InputUnit, NoPhase: true, NoStyle: true, Markers: spotMarker(c.Resp),
			Traces: append([]plot.Trace{{Name: "input-referred", Class: "noise-in", Values: reals(n.Input)}},
				c.BodePins("input-referred", pinned(func(n *api.NoiseResult) []*float64 { return n.Input }))...)}
		in.Width, in.Height = c.ChartSize(640, 400)
		charts = append(charts, in.SVG())
	}
	if n.NoiseGain != nil {
		g := plot.Bode{ID: c.ID + "-plot-noise-gain", Title: "Noise gain of " + c.Resp.Reference, Freq: n.Frequency,
			MagUnit: "dB", NoPhase: true, NoStyle: true, Markers: spotMarker(c.Resp),
			Traces: append([]plot.Trace{
				{Name: "noise gain 1/β", Class: "ng", Values: view.Values(n.NoiseGain)},
				{Name: "eₙ → " + n.Node + " (closed loop)", Class: "en", Values: view.Values(n.EnTransfer), Dashed: true},
			}, c.BodePins("1/β", func(r *api.Response) []*api.Complex {
				if pn := api.Noise.Result(r); pn != nil {
					return pn.NoiseGain
				}
				return nil
			})...)}
		g.Width, g.Height = c.ChartSize(640, 320)
		charts = append(charts, g.SVG())
	}
	return charts
}

func noiseColumns(c *Context) []Column {
	n := api.Noise.Result(c.Resp)
	if n == nil {
		return nil
	}
	cols := []Column{{Name: "noise.output", Unit: n.Unit, Real: n.Output}}
	if n.Input != nil {
		cols = append(cols, Column{Name: "noise.input", Unit: n.InputUnit, Real: n.Input})
	}
	// The noise gain is the loop's column (noiseGain, A/T).
	for _, k := range n.Contributors {
		if k.Density != nil {
			cols = append(cols, Column{Name: "noise." + k.Name, Unit: n.Unit, Real: k.Density})
		}
	}
	return cols
}

func noiseCopy(m *Markdown, c *Context) {
	n := api.Noise.Result(c.Resp)
	if n == nil {
		return
	}
	opt := func(x *float64, unit string) string {
		if x == nil {
			return "—"
		}
		return view.Magnitude(*x, unit)
	}
	at := " at " + value.Format(n.Spot.Frequency, "Hz", view.Sig)
	rows := [][]string{{"Output density" + at, opt(n.Spot.Output, n.Unit)}}
	if n.Source != "" {
		rows = append(rows, []string{"Input-referred density" + at, opt(n.Spot.Input, n.InputUnit)})
	}
	band := value.Format(n.Band.From, "Hz", 4) + " to " + value.Format(n.Band.To, "Hz", 4)
	rows = append(rows, []string{"Output rms, " + band, opt(n.RMS.Output, "V")})
	if n.Source != "" {
		rows = append(rows, []string{"Input rms (through the peak gain)", opt(n.RMS.Input, strings.TrimSuffix(n.InputUnit, "/√Hz"))},
			[]string{"Equivalent noise bandwidth", opt(n.Bandwidth, "Hz")})
	}
	rows = append(rows, []string{"Temperature", kelvin(n.Temperature)})
	m.Table([]string{"Noise at " + MD(n.Node), "Value"}, rows...)
	var ks [][]string
	for _, k := range n.Contributors[:min(len(n.Contributors), noiseRows)] {
		share := "—"
		if k.Share != nil {
			share = view.PlainN(100**k.Share, 3) + " %"
		}
		ks = append(ks, []string{MD(k.Name), MD(kindText[k.Kind]), opt(k.RMS, "V"), share})
	}
	if count, share := noiseRest(n); count > 0 {
		ks = append(ks, []string{"… " + strconv.Itoa(count) + " more", "", "", view.PlainN(100*share, 3) + " % together"})
	}
	if len(ks) > 0 {
		m.Table([]string{"Noise source", "Kind", "rms at the output", "Share"}, ks...)
	}
}
