package view

import (
	"cmp"
	"math"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/numeric"
	"zport/engine/value"
	"zport/site/plot"
)

// The design-aid panels (see the package doc for their data attributes).
// Every number shown carries data-aid (tolerance,
// standard, sensitivity), data-quantity (the engine's quantity ID: z:PORT,
// phase:PORT, r:PORT, g, pm — or a part name for standard values),
// data-stat where one quantity has several numbers, and data-value with
// the engine's number in strconv's shortest round-trip form.

// spreadFormat returns how to write the numbers of one quantity in unit so
// that its percentiles, whose span is span, stay apart: enough significant
// digits (or, for degrees, decimals) to resolve a thousandth of the span.
func spreadFormat(unit string, mag, span float64) func(float64) string {
	if unit == "°" {
		d := 2
		if span > 0 && numeric.FiniteReal(span) {
			d = min(max(2, int(math.Ceil(-math.Log10(span)))+3), 9)
		}
		return func(v float64) string { return fixedDegrees(v, d) }
	}
	n := Sig
	if span > 0 && mag > 0 && numeric.FiniteReal(span) && numeric.FiniteReal(mag) {
		n = min(max(Sig, int(math.Ceil(math.Log10(mag/span)))+3), 12)
	}
	return func(v float64) string {
		switch unit {
		case "":
			return PlainN(v, n)
		case "V/V":
			return PlainN(v, n) + " V/V"
		}
		s := value.Format(v, unit, n)
		if strings.Contains(s, "×10^") {
			s = PlainN(v, n) + " " + unit
		}
		return s
	}
}

// fixedDegrees writes an angle with d decimals and a typographic minus.
func fixedDegrees(v float64, d int) string {
	s := strconv.FormatFloat(math.Abs(v), 'f', d, 64)
	if v < 0 && strings.Trim(s, "0.") != "" {
		s = "−" + s
	}
	return s + "°"
}

// percent writes a relative change as a signed percentage with three
// significant digits, e.g. "+2.59 %", "−8.51 %", "0 %".
func percent(x float64) string {
	if !numeric.FiniteReal(x) {
		return "—"
	}
	if x == 0 {
		return "0 %"
	}
	s := PlainN(x*100, 3) + " %"
	if x > 0 {
		s = "+" + s
	}
	return s
}

// within writes x as percent does, but "0 %" where x is within its error
// bound: a change the arithmetic cannot tell from none (the pair is exact,
// the snapped part equals the nominal one), never digits of rounding.
func within(x float64, bound *float64) string {
	if bound != nil && math.Abs(x) <= *bound {
		return percent(0)
	}
	return percent(x)
}

// boundAttrs adds data-error to attrs when there is a bound.
func boundAttrs(bound *float64, attrs ...string) []string {
	if bound != nil {
		attrs = append(attrs, "data-error", Num(*bound))
	}
	return attrs
}

// NumSpan writes one number with its data attributes.
func (w *Writer) NumSpan(text string, v *float64, attrs ...string) {
	if v == nil {
		w.Elem("span", "—", append(append([]string{"class", "num"}, attrs...), "data-null", "true")...)
		return
	}
	w.Elem("span", text, append(append([]string{"class", "num"}, attrs...), "data-value", Num(*v))...)
}

func deref(x *float64) float64 {
	if x == nil {
		return math.NaN()
	}
	return *x
}

// ---- tolerance ----

// relevant reports whether the tolerance panel lists quantity q: every
// |Z|, phase, gain and margin; Re Z only where it can reach zero or below
// (a negative resistance, as on one side of a Howland pump's balance) or a
// target names it.
func relevant(q api.QuantitySpread, res *api.ToleranceResult) bool {
	if q.Quantity != "r" {
		return true
	}
	for _, t := range res.Targets {
		if t.Quantity == "r" && t.Port == q.Port {
			return true
		}
	}
	low := math.Min(deref(q.Min), deref(q.Nominal))
	if c := q.Corners; c != nil && c.Min != nil {
		low = math.Min(low, *c.Min)
	}
	return low <= 0
}

// TolerancePanel renders a tolerance study's result: what varied, the
// targets' miss fractions, a table of each quantity's nominal value,
// percentiles, Monte Carlo range and corner range, and a histogram of
// each. id prefixes the element ids; width, when set, is a phone's narrow
// chart width, at which the histograms are drawn.
func TolerancePanel(res *api.ToleranceResult, id string, width int) string {
	var w Writer
	w.Open("div", "class", "aid-panel tol-panel", "id", id+"-tol-panel", "data-aid", "tolerance",
		"data-seed", strconv.FormatUint(res.Seed, 10), "data-trials", strconv.Itoa(res.Trials),
		"data-done", strconv.Itoa(res.Done), "data-distribution", res.Distribution)
	w.Open("p", "class", "aid-head")
	if res.Done < res.Trials {
		w.Text("Partial result: " + strconv.Itoa(res.Done) + " of " + strconv.Itoa(res.Trials) + " trials")
	} else {
		w.Text(strconv.Itoa(res.Done) + " Monte Carlo trials")
	}
	w.Text(" at " + value.Format(res.Frequency, "Hz", Sig) + ", " + res.Distribution + " distribution")
	if res.Distribution == "normal" {
		w.Text(" (tolerance = 3σ)")
	}
	w.Text(", seed " + strconv.FormatUint(res.Seed, 10))
	if c := res.Corners; c != nil {
		how := "all combinations"
		if c.Method == "sensitivity" {
			how = "two per quantity, chosen by the sign of each part’s effect"
		}
		w.Text("; " + strconv.Itoa(c.Done) + " worst-case corners (" + how + ")")
	}
	w.Text(".")
	if res.Failed > 0 {
		w.Text(" " + strconv.Itoa(res.Failed) + " trials could not be analyzed (see the notes).")
	}
	w.Close("p")

	w.Open("details", "class", "aid-varied")
	w.Elem("summary", "What varied: "+strconv.Itoa(len(res.Parts))+" parameters")
	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "aid-small")
	w.Open("thead")
	w.Open("tr")
	for _, h := range []string{"Parameter", "Nominal", "Spread", "Low limit", "High limit"} {
		w.Elem("th", h, "scope", "col")
	}
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for _, p := range res.Parts {
		w.Open("tr")
		w.Elem("th", p.Name, "scope", "row", "class", "port-name")
		w.Elem("td", Magnitude(p.Nominal, p.Unit), "class", "num")
		spread := "min–typ"
		if p.Tolerance != nil {
			spread = "±" + PlainN(*p.Tolerance*100, 3) + " %"
		}
		w.Elem("td", spread)
		w.Elem("td", Magnitude(p.Low, p.Unit), "class", "num")
		w.Elem("td", Magnitude(p.High, p.Unit), "class", "num")
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")
	w.Close("details")

	w.Notes("aid-notes", res.Notes)

	qs := map[string]api.QuantitySpread{}
	var shown []api.QuantitySpread
	for _, q := range res.Quantities {
		qs[q.ID] = q
		if relevant(q, res) {
			shown = append(shown, q)
		}
	}
	formats := map[string]func(float64) string{}
	for _, q := range res.Quantities {
		lo, hi, mag := math.Inf(1), math.Inf(-1), 0.0
		for _, v := range []*float64{q.Min, q.Max, q.Nominal} {
			if v != nil {
				lo, hi, mag = math.Min(lo, *v), math.Max(hi, *v), math.Max(mag, math.Abs(*v))
			}
		}
		span := hi - lo
		if len(q.Percentiles) == 5 && q.Percentiles[0].Value != nil && q.Percentiles[4].Value != nil {
			span = *q.Percentiles[4].Value - *q.Percentiles[0].Value
		}
		formats[q.ID] = spreadFormat(q.Unit, mag, span)
	}

	if len(res.Targets) > 0 {
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-small aid-targets-table")
		w.Elem("caption", "Targets: the fraction of trials that miss each")
		undefined := false
		for _, tg := range res.Targets {
			undefined = undefined || tg.Undefined > 0
		}
		w.Open("thead")
		w.Open("tr")
		heads := []string{"A trial misses when", "Misses", "Fraction"}
		if undefined {
			heads = append(heads, "Undefined")
		}
		for _, h := range heads {
			w.Elem("th", h, "scope", "col")
		}
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		for i, t := range res.Targets {
			qid := t.Quantity
			if t.Port != "" {
				qid += ":" + t.Port
			}
			q := qs[qid]
			title := q.Title
			if title == "" {
				title = qid
			}
			op := map[string]string{"<": " is below ", ">": " is above "}[t.Op]
			class := "miss-none"
			if t.Misses > 0 {
				class = "miss-some"
			}
			w.Open("tr", "class", class)
			w.Elem("th", title+op+Magnitude(t.Value, q.Unit), "scope", "row")
			w.Open("td")
			misses := float64(t.Misses)
			w.NumSpan(strconv.Itoa(t.Misses)+" of "+strconv.Itoa(res.Done), &misses, "data-aid", "tolerance", "data-quantity", "target", "data-index", strconv.Itoa(i), "data-stat", "misses")
			w.Close("td")
			w.Open("td")
			frac := t.Fraction
			w.NumSpan(percentOf(frac), &frac, "data-aid", "tolerance", "data-quantity", "target", "data-index", strconv.Itoa(i), "data-stat", "fraction")
			w.Close("td")
			if undefined {
				w.Elem("td", strconv.Itoa(t.Undefined), "class", "num")
			}
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
	}

	w.Open("div", "class", "table-wrap")
	w.Open("table", "class", "results aid-table tol-table")
	w.Elem("caption", "Spread at "+value.Format(res.Frequency, "Hz", Sig)+": percentiles over the trials, the Monte Carlo range, and the worst case by corners", "class", "offscreen")
	w.Open("thead")
	w.Open("tr")
	w.Elem("th", "Quantity", "scope", "col")
	w.Elem("th", "Nominal", "scope", "col")
	for _, p := range aidsPercentiles(res) {
		w.Elem("th", Num(p)+" %", "scope", "col")
	}
	w.Open("th", "scope", "col")
	w.Text("Monte Carlo")
	w.Elem("span", "min … max", "class", "hint")
	w.Close("th")
	w.Open("th", "scope", "col")
	w.Text("Corners")
	w.Elem("span", "worst case min … max", "class", "hint")
	w.Close("th")
	w.Close("tr")
	w.Close("thead")
	w.Open("tbody")
	for _, q := range shown {
		f := formats[q.ID]
		attr := func(stat string) []string {
			return []string{"data-aid", "tolerance", "data-quantity", q.ID, "data-stat", stat}
		}
		w.Open("tr", "data-quantity-id", q.ID)
		w.Open("th", "scope", "row")
		w.Text(q.Title)
		if q.Undefined > 0 {
			w.Elem("span", strconv.Itoa(q.Undefined)+" trials undefined", "class", "hint")
		}
		w.Close("th")
		w.Open("td", "data-label", "Nominal")
		w.NumSpan(f(deref(q.Nominal)), q.Nominal, attr("nominal")...)
		w.Close("td")
		for _, p := range q.Percentiles {
			label := Num(p.P) + " %"
			w.Open("td", "data-label", label)
			w.NumSpan(f(deref(p.Value)), p.Value, attr("p"+Num(p.P))...)
			w.Close("td")
		}
		w.Open("td", "data-label", "Monte Carlo min … max", "class", "range-cell")
		w.NumSpan(f(deref(q.Min)), q.Min, attr("min")...)
		w.NumSpan(f(deref(q.Max)), q.Max, attr("max")...)
		w.Close("td")
		w.Open("td", "data-label", "Corners min … max", "class", "range-cell")
		if c := q.Corners; c != nil {
			w.NumSpan(f(deref(c.Min)), c.Min, attr("cornerMin")...)
			w.NumSpan(f(deref(c.Max)), c.Max, attr("cornerMax")...)
			cornerNote(&w, q)
		} else {
			w.Elem("span", "not run", "class", "hint")
		}
		w.Close("td")
		w.Close("tr")
	}
	w.Close("tbody")
	w.Close("table")
	w.Close("div")

	w.Open("div", "class", "plot-grid aid-hists")
	for i, q := range shown {
		if q.Histogram == nil {
			continue
		}
		h := plot.Histogram{
			ID:      id + "-hist-" + strconv.Itoa(i),
			Title:   q.Title,
			XLabel:  q.Title + " at " + value.Format(res.Frequency, "Hz", 3),
			Unit:    q.Unit,
			Edges:   q.Histogram.Edges,
			Counts:  q.Histogram.Counts,
			Log:     q.Histogram.Scale == "log",
			Width:   480,
			Height:  230,
			NoStyle: true,
		}
		if width > 0 && width < h.Width {
			h.Width, h.Height = width, 250
		}
		if q.Nominal != nil {
			h.Markers = append(h.Markers, plot.Marker{Freq: *q.Nominal, Label: "nominal", Class: "nominal"})
		}
		if c := q.Corners; c != nil && c.Min != nil && c.Max != nil {
			h.Markers = append(h.Markers, plot.Marker{Freq: *c.Min, Label: "corner min", Class: "corner"},
				plot.Marker{Freq: *c.Max, Label: "corner max", Class: "corner"})
		}
		for _, t := range res.Targets {
			if t.Quantity == q.Quantity && t.Port == q.Port {
				h.Markers = append(h.Markers, plot.Marker{Freq: t.Value, Label: "target", Class: "target"})
			}
		}
		w.Figure(h.SVG(), "plot hist", "data-quantity-id", q.ID)
	}
	w.Close("div")
	w.Close("div")
	return w.String()
}

// aidsPercentiles are the percentiles of the first quantity (the engine
// gives the same ones for all).
func aidsPercentiles(res *api.ToleranceResult) []float64 {
	var ps []float64
	if len(res.Quantities) > 0 {
		for _, p := range res.Quantities[0].Percentiles {
			ps = append(ps, p.P)
		}
	}
	return ps
}

// percentOf writes a fraction as a percentage, "0 %" when it is zero.
func percentOf(x float64) string {
	if x == 0 {
		return "0 %"
	}
	return PlainN(x*100, 3) + " %"
}

// cornerNote says how the Monte Carlo range sits in the corner range: how
// much of the corner span it covers, and whether it reaches past a corner.
func cornerNote(w *Writer, q api.QuantitySpread) {
	c := q.Corners
	if c == nil || c.Min == nil || c.Max == nil || q.Min == nil || q.Max == nil {
		return
	}
	switch {
	case c.MonteCarloBeyondMin || c.MonteCarloBeyondMax:
		w.Elem("span", "Monte Carlo reaches past them", "class", "hint corner-beyond",
			"title", "The quantity is not monotonic in its parts, or normal draws passed the limits: the corners bound the worst case only of a quantity monotonic in each part.")
	case *c.Max > *c.Min:
		cover := (*q.Max - *q.Min) / (*c.Max - *c.Min)
		cls := "hint"
		if c.MonteCarloShortMin || c.MonteCarloShortMax {
			cls = "hint corner-short"
		}
		w.Elem("span", "Monte Carlo spans "+PlainN(math.Min(cover, 1)*100, 3)+" % of it", "class", cls,
			"title", "Random trials seldom put every part at a limit together: the corners are the extremes they miss.")
	}
}

// ---- standard values ----

// StandardPanel renders the standard-value snapping: the ratio pairs, each
// part's nearest and ratio-pair values, and what they do to every port
// impedance, the gain and the phase margin. units gives each part's unit
// ("Ω", "F"); a part not in it is taken for a resistor.
func StandardPanel(res *api.StandardValuesResult, id string, units map[string]string) string {
	unitOf := func(name string) string {
		if u := units[name]; u != "" {
			return u
		}
		return "Ω"
	}
	var w Writer
	w.Open("div", "class", "aid-panel std-panel", "id", id+"-std-panel", "data-aid", "standard",
		"data-series", res.Series, "data-capacitor-series", res.CapacitorSeries)
	w.Elem("p", "Resistors from "+res.Series+", capacitors from "+res.CapacitorSeries+" (IEC 60063); effects at "+value.Format(res.Frequency, "Hz", Sig)+".", "class", "aid-head")

	if len(res.Ratios) > 0 {
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-small std-ratios")
		w.Elem("caption", "Ratios realized by a pair of series values")
		w.Open("thead")
		w.Open("tr")
		for _, h := range []string{"Ratio", "Wanted gain", "Best pair", "Ratio error", "Gain set", "Gain error"} {
			w.Elem("th", h, "scope", "col")
		}
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		for i, r := range res.Ratios {
			unit := unitOf(r.Num)
			attrs := func(stat string) []string {
				return []string{"data-aid", "standard", "data-quantity", "ratio", "data-index", strconv.Itoa(i), "data-stat", stat}
			}
			w.Open("tr")
			w.Open("th", "scope", "row")
			q := r.Num + "/" + r.Den
			if r.Plus1 {
				q = "1 + " + q
			}
			w.Elem("span", q, "class", "port-name")
			if r.Title != "" {
				w.Elem("span", r.Title, "class", "hint")
			}
			w.Close("th")
			wanted := r.Wanted
			if r.Plus1 {
				wanted++
			}
			w.Open("td", "data-label", "Wanted")
			w.NumSpan(PlainN(wanted, 5), &wanted, attrs("wanted")...)
			w.Close("td")
			w.Open("td", "data-label", "Best pair")
			nv, dv := r.NumValue, r.DenValue
			w.Text(r.Num + " = ")
			w.NumSpan(Magnitude(nv, unit), &nv, attrs("num")...)
			w.Text(", " + r.Den + " = ")
			w.NumSpan(Magnitude(dv, unit), &dv, attrs("den")...)
			w.Close("td")
			w.Open("td", "data-label", "Ratio error")
			re := r.RelErr
			w.NumSpan(within(re, r.Errors.RelErr), &re, boundAttrs(r.Errors.RelErr, attrs("relErr")...)...)
			w.Close("td")
			w.Open("td", "data-label", "Gain set")
			g := r.Gain
			w.NumSpan(PlainN(g, 5), &g, attrs("gain")...)
			w.Close("td")
			w.Open("td", "data-label", "Gain error")
			ge := r.GainRelErr
			w.NumSpan(within(ge, r.Errors.GainRelErr), &ge, boundAttrs(r.Errors.GainRelErr, attrs("gainRelErr")...)...)
			w.Close("td")
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
	}

	// Values: one row per part, one column per variant.
	type cell struct {
		v   api.SnappedValue
		set bool
	}
	var names []string
	values := map[string][]cell{}
	for vi, v := range res.Variants {
		for _, x := range v.Values {
			if _, ok := values[x.Name]; !ok {
				names = append(names, x.Name)
				values[x.Name] = make([]cell, len(res.Variants))
			}
			values[x.Name][vi] = cell{x, true}
		}
	}
	variantTitle := map[string]string{"nearest": "nearest value", "ratios": "with the ratio pairs"}
	if len(names) > 0 {
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-small std-values")
		w.Elem("caption", "Series values per part")
		w.Open("thead")
		w.Open("tr")
		w.Elem("th", "Part", "scope", "col")
		w.Elem("th", "Nominal", "scope", "col")
		for _, v := range res.Variants {
			w.Elem("th", cmp.Or(variantTitle[v.Name], v.Name), "scope", "col")
		}
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		for _, n := range names {
			cells := values[n]
			w.Open("tr")
			w.Elem("th", n, "scope", "row", "class", "port-name")
			nominal := 0.0
			for _, c := range cells {
				if c.set {
					nominal = c.v.Nominal
				}
			}
			w.Elem("td", Magnitude(nominal, unitOf(n)), "class", "num")
			for vi, c := range cells {
				w.Open("td", "data-label", cmp.Or(variantTitle[res.Variants[vi].Name], res.Variants[vi].Name))
				if !c.set {
					w.Text("—")
				} else {
					v := c.v.Value
					w.NumSpan(Magnitude(v, unitOf(n))+" ("+c.v.Series+")", &v, "data-aid", "standard", "data-variant", res.Variants[vi].Name, "data-quantity", n, "data-stat", "value")
					ch := c.v.Change
					w.Elem("span", within(ch, c.v.Errors.Change), boundAttrs(c.v.Errors.Change, "class", "hint", "data-aid", "standard", "data-variant", res.Variants[vi].Name, "data-quantity", n, "data-stat", "change", "data-value", Num(ch))...)
				}
				w.Close("td")
			}
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
	}

	if len(res.Variants) > 0 {
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-small std-effects")
		w.Elem("caption", "What the series values do: change of each magnitude, and of its phase")
		w.Open("thead")
		w.Open("tr")
		w.Elem("th", "Quantity", "scope", "col")
		w.Elem("th", "Nominal", "scope", "col")
		for _, v := range res.Variants {
			w.Elem("th", cmp.Or(variantTitle[v.Name], v.Name), "scope", "col")
		}
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		row := func(title, qid, unit string, pick func(v api.SnapVariant) *api.SnapCompare) {
			first := pick(res.Variants[0])
			if first == nil {
				return
			}
			w.Open("tr")
			w.Elem("th", title, "scope", "row")
			w.Open("td", "data-label", "Nominal")
			if first.Nominal != nil {
				w.Text(Polar(first.Nominal.Value(), unit))
			} else {
				w.Text("—")
			}
			w.Close("td")
			for _, v := range res.Variants {
				c := pick(v)
				w.Open("td", "data-label", cmp.Or(variantTitle[v.Name], v.Name))
				if c == nil {
					w.Text("—")
				} else {
					w.NumSpan(within(deref(c.MagnitudeError), c.Errors.MagnitudeError), c.MagnitudeError, boundAttrs(c.Errors.MagnitudeError, "data-aid", "standard", "data-variant", v.Name, "data-quantity", qid, "data-stat", "magnitudeError")...)
					pd := ""
					if d := c.PhaseDifference; d != nil {
						if b := c.Errors.PhaseDifference; b != nil && math.Abs(*d) <= *b {
							pd = "phase " + signedDegrees(0)
						} else {
							pd = "phase " + signedDegrees(*d)
						}
					}
					w.Elem("span", pd, "class", "hint")
				}
				w.Close("td")
			}
			w.Close("tr")
		}
		for i, p := range res.Variants[0].Ports {
			i := i
			row("|Z| at "+p.Name, "z:"+p.Name, "Ω", func(v api.SnapVariant) *api.SnapCompare {
				if i < len(v.Ports) {
					return &v.Ports[i]
				}
				return nil
			})
		}
		row("gain", "g", "", func(v api.SnapVariant) *api.SnapCompare { return v.Gain })
		if pm := res.Variants[0].NominalPhaseMargin; pm != nil {
			w.Open("tr")
			w.Elem("th", "phase margin", "scope", "row")
			w.Elem("td", Degrees(*pm), "data-label", "Nominal")
			for _, v := range res.Variants {
				w.Open("td", "data-label", cmp.Or(variantTitle[v.Name], v.Name))
				w.NumSpan(Degrees(deref(v.PhaseMargin)), v.PhaseMargin, "data-aid", "standard", "data-variant", v.Name, "data-quantity", "pm", "data-stat", "value")
				w.Close("td")
			}
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
	}
	w.Notes("aid-notes", res.Notes)
	w.Close("div")
	return w.String()
}

// signedDegrees writes a small angle difference with three significant
// digits and its sign.
func signedDegrees(d float64) string {
	if d == 0 {
		return "0°"
	}
	s := PlainN(d, 3) + "°"
	if d > 0 {
		s = "+" + s
	}
	return s
}

// ---- sensitivity ----

// SensitivityPanel renders the normalized sensitivities: for each port
// impedance, the gain and the phase margin, a bar chart of every
// parameter's sensitivity, largest first, beside a table of the same
// numbers with their error estimates. width, when set, is a phone's narrow
// chart width, at which the bars are drawn.
func SensitivityPanel(res *api.SensitivityResult, id string, width int) string {
	var w Writer
	w.Open("div", "class", "aid-panel sens-panel", "id", id+"-sens-panel", "data-aid", "sensitivity")
	w.Open("p", "class", "explain")
	w.Text("At " + value.Format(res.Frequency, "Hz", Sig) + "; method: " + res.Method + ", h = " + Plain(res.Step) + ". For the phase margin, the change in degrees per unit of ln p.")
	w.Close("p")
	for qi, q := range res.Quantities {
		h := id + "-sens-" + strconv.Itoa(qi) + "-h"
		isPM := q.Quantity == "pm"
		w.Open("section", "class", "sens-q", "data-quantity-id", q.ID, "aria-labelledby", h)
		w.Open("h4", "id", h)
		w.Text(q.Title)
		switch {
		case isPM && q.PhaseMargin != nil:
			w.Text(" (" + Degrees(*q.PhaseMargin) + ")")
		case q.Value != nil:
			unit := "Ω"
			if q.Quantity == "g" {
				unit = ""
			}
			w.Text(" (" + Polar(q.Value.Value(), unit) + ")")
		}
		w.Close("h4")
		sym := "∂ln|" + symbolOf(q) + "|/∂ln p"
		if isPM {
			sym = "∂PM/∂ln p (°)"
		}
		var labels []string
		var vals []float64
		for _, e := range q.Entries {
			labels = append(labels, e.Parameter)
			vals = append(vals, deref(e.Value))
		}
		w.Open("div", "class", "sens-grid")
		bars := plot.Bars{ID: id + "-sens-bars-" + strconv.Itoa(qi), Title: q.Title + ": " + sym, XLabel: sym,
			Labels: labels, Values: vals, Width: 420, NoStyle: true}
		if width > 0 && width < bars.Width {
			bars.Width = width
		}
		w.Figure(bars.SVG(), "plot bars")
		w.Open("div", "class", "table-wrap")
		w.Open("table", "class", "aid-small sens-table")
		w.Elem("caption", q.Title+": sensitivity to each parameter, largest first", "class", "offscreen")
		w.Open("thead")
		w.Open("tr")
		w.Elem("th", "Parameter", "scope", "col")
		w.Elem("th", "Nominal", "scope", "col")
		w.Elem("th", sym, "scope", "col")
		if !isPM {
			w.Elem("th", "∂∠"+symbolOf(q)+"/∂ln p (°)", "scope", "col")
		}
		w.Elem("th", "Error estimate", "scope", "col")
		w.Close("tr")
		w.Close("thead")
		w.Open("tbody")
		for _, e := range q.Entries {
			attrs := []string{"data-aid", "sensitivity", "data-quantity", q.ID, "data-parameter", e.Parameter}
			w.Open("tr")
			w.Elem("th", e.Parameter, "scope", "row", "class", "port-name")
			w.Elem("td", Magnitude(e.Nominal, e.Unit), "class", "num")
			w.Open("td")
			w.NumSpan(sensText(e.Value), e.Value, append(attrs, "data-stat", "value")...)
			w.Close("td")
			if !isPM {
				w.Open("td")
				w.NumSpan(sensText(e.Phase), e.Phase, append(attrs, "data-stat", "phase")...)
				w.Close("td")
			}
			w.Open("td")
			errText, errAttrs := "—", append(attrs, "data-stat", "error")
			if e.Error != nil {
				errText = PlainN(*e.Error, 2)
				// An estimate above 1 % of the value: the difference
				// quotients straddle a fast change (a resonance, a pole
				// near the spot frequency); read the value with care.
				if e.Value != nil && *e.Error > 0.01*math.Abs(*e.Value) && *e.Error > 1e-9 {
					errAttrs = append(errAttrs, "title", "uncertain: the error estimate is above 1 % of the value", "data-poor", "true")
				}
			}
			w.NumSpan(errText, e.Error, errAttrs...)
			w.Close("td")
			w.Close("tr")
		}
		w.Close("tbody")
		w.Close("table")
		w.Close("div")
		w.Close("div")
		w.Close("section")
	}
	w.Notes("aid-notes", res.Notes)
	w.Close("div")
	return w.String()
}

// symbolOf is the letter of a sensitivity's quantity: Z or g.
func symbolOf(q api.SensitivityQuantity) string {
	if q.Quantity == "g" {
		return "g"
	}
	return "Z"
}

// sensText writes a sensitivity with four significant digits; one below
// 10⁻⁹ in size is written as zero to that precision.
func sensText(x *float64) string {
	if x == nil {
		return "—"
	}
	if math.Abs(*x) < 1e-9 {
		return "≈ 0"
	}
	return PlainN(*x, 4)
}
