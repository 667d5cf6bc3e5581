package render

import (
	"math"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/value"
	"zport/site/plot"
)

// The design-aid panels. Every number shown carries data-aid (tolerance,
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
		if span > 0 && finite(span) {
			d = min(max(2, int(math.Ceil(-math.Log10(span)))+3), 9)
		}
		return func(v float64) string { return fixedDegrees(v, d) }
	}
	n := sig
	if span > 0 && mag > 0 && finite(span) && finite(mag) {
		n = min(max(sig, int(math.Ceil(math.Log10(mag/span)))+3), 12)
	}
	return func(v float64) string {
		switch unit {
		case "":
			return plainN(v, n)
		case "V/V":
			return plainN(v, n) + " V/V"
		}
		s := value.Format(v, unit, n)
		if strings.Contains(s, "×10^") {
			s = plainN(v, n) + " " + unit
		}
		return s
	}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

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
	if !finite(x) {
		return "—"
	}
	if x == 0 {
		return "0 %"
	}
	s := plainN(x*100, 3) + " %"
	if x > 0 {
		s = "+" + s
	}
	return s
}

// numSpan writes one number with its data attributes.
func (w *writer) numSpan(text string, v *float64, attrs ...string) {
	if v == nil {
		w.elem("span", "—", append(append([]string{"class", "num"}, attrs...), "data-null", "true")...)
		return
	}
	w.elem("span", text, append(append([]string{"class", "num"}, attrs...), "data-value", num(*v))...)
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
// each. id prefixes the element ids.
func TolerancePanel(res *api.ToleranceResult, id string) string {
	var w writer
	w.open("div", "class", "aid-panel tol-panel", "id", id+"-tol-panel", "data-aid", "tolerance",
		"data-seed", strconv.FormatUint(res.Seed, 10), "data-trials", strconv.Itoa(res.Trials),
		"data-done", strconv.Itoa(res.Done), "data-distribution", res.Distribution)
	w.open("p", "class", "aid-head")
	if res.Done < res.Trials {
		w.text("Partial result: " + strconv.Itoa(res.Done) + " of " + strconv.Itoa(res.Trials) + " trials")
	} else {
		w.text(strconv.Itoa(res.Done) + " Monte Carlo trials")
	}
	w.text(" at " + value.Format(res.Frequency, "Hz", sig) + ", " + res.Distribution + " distribution")
	if res.Distribution == "normal" {
		w.text(" (tolerance = 3σ)")
	}
	w.text(", seed " + strconv.FormatUint(res.Seed, 10))
	if c := res.Corners; c != nil {
		how := "all combinations"
		if c.Method == "sensitivity" {
			how = "two per quantity, chosen by the sign of each part’s effect"
		}
		w.text("; " + strconv.Itoa(c.Done) + " worst-case corners (" + how + ")")
	}
	w.text(".")
	if res.Failed > 0 {
		w.text(" " + strconv.Itoa(res.Failed) + " trials could not be analyzed (see the notes).")
	}
	w.close("p")

	w.open("details", "class", "aid-varied")
	w.elem("summary", "What varied: "+strconv.Itoa(len(res.Parts))+" parameters")
	w.open("div", "class", "table-wrap")
	w.open("table", "class", "aid-small")
	w.open("thead")
	w.open("tr")
	for _, h := range []string{"Parameter", "Nominal", "Spread", "Low limit", "High limit"} {
		w.elem("th", h, "scope", "col")
	}
	w.close("tr")
	w.close("thead")
	w.open("tbody")
	for _, p := range res.Parts {
		w.open("tr")
		w.elem("th", p.Name, "scope", "row", "class", "port-name")
		w.elem("td", magnitude(p.Nominal, p.Unit), "class", "num")
		spread := "min–typ"
		if p.Tolerance != nil {
			spread = "±" + plainN(*p.Tolerance*100, 3) + " %"
		}
		w.elem("td", spread)
		w.elem("td", magnitude(p.Low, p.Unit), "class", "num")
		w.elem("td", magnitude(p.High, p.Unit), "class", "num")
		w.close("tr")
	}
	w.close("tbody")
	w.close("table")
	w.close("div")
	w.close("details")

	aidNotes(&w, res.Notes)

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
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-small aid-targets-table")
		w.elem("caption", "Targets: the fraction of trials that miss each")
		undefined := false
		for _, tg := range res.Targets {
			undefined = undefined || tg.Undefined > 0
		}
		w.open("thead")
		w.open("tr")
		heads := []string{"A trial misses when", "Misses", "Fraction"}
		if undefined {
			heads = append(heads, "Undefined")
		}
		for _, h := range heads {
			w.elem("th", h, "scope", "col")
		}
		w.close("tr")
		w.close("thead")
		w.open("tbody")
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
			w.open("tr", "class", class)
			w.elem("th", title+op+magnitude(t.Value, q.Unit), "scope", "row")
			w.open("td")
			misses := float64(t.Misses)
			w.numSpan(strconv.Itoa(t.Misses)+" of "+strconv.Itoa(res.Done), &misses, "data-aid", "tolerance", "data-quantity", "target", "data-index", strconv.Itoa(i), "data-stat", "misses")
			w.close("td")
			w.open("td")
			frac := t.Fraction
			w.numSpan(percentOf(frac), &frac, "data-aid", "tolerance", "data-quantity", "target", "data-index", strconv.Itoa(i), "data-stat", "fraction")
			w.close("td")
			if undefined {
				w.elem("td", strconv.Itoa(t.Undefined), "class", "num")
			}
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
	}

	w.open("div", "class", "table-wrap")
	w.open("table", "class", "results aid-table tol-table")
	w.elem("caption", "Spread at "+value.Format(res.Frequency, "Hz", sig)+": percentiles over the trials, the Monte Carlo range, and the worst case by corners", "class", "offscreen")
	w.open("thead")
	w.open("tr")
	w.elem("th", "Quantity", "scope", "col")
	w.elem("th", "Nominal", "scope", "col")
	for _, p := range aidsPercentiles(res) {
		w.elem("th", num(p)+" %", "scope", "col")
	}
	w.open("th", "scope", "col")
	w.text("Monte Carlo")
	w.elem("span", "min … max", "class", "hint")
	w.close("th")
	w.open("th", "scope", "col")
	w.text("Corners")
	w.elem("span", "worst case min … max", "class", "hint")
	w.close("th")
	w.close("tr")
	w.close("thead")
	w.open("tbody")
	for _, q := range shown {
		f := formats[q.ID]
		attr := func(stat string) []string {
			return []string{"data-aid", "tolerance", "data-quantity", q.ID, "data-stat", stat}
		}
		w.open("tr", "data-quantity-id", q.ID)
		w.open("th", "scope", "row")
		w.text(q.Title)
		if q.Undefined > 0 {
			w.elem("span", strconv.Itoa(q.Undefined)+" trials undefined", "class", "hint")
		}
		w.close("th")
		w.open("td", "data-label", "Nominal")
		w.numSpan(f(deref(q.Nominal)), q.Nominal, attr("nominal")...)
		w.close("td")
		for _, p := range q.Percentiles {
			label := num(p.P) + " %"
			w.open("td", "data-label", label)
			w.numSpan(f(deref(p.Value)), p.Value, attr("p"+num(p.P))...)
			w.close("td")
		}
		w.open("td", "data-label", "Monte Carlo min … max", "class", "range-cell")
		w.numSpan(f(deref(q.Min)), q.Min, attr("min")...)
		w.numSpan(f(deref(q.Max)), q.Max, attr("max")...)
		w.close("td")
		w.open("td", "data-label", "Corners min … max", "class", "range-cell")
		if c := q.Corners; c != nil {
			w.numSpan(f(deref(c.Min)), c.Min, attr("cornerMin")...)
			w.numSpan(f(deref(c.Max)), c.Max, attr("cornerMax")...)
			cornerNote(&w, q)
		} else {
			w.elem("span", "not run", "class", "hint")
		}
		w.close("td")
		w.close("tr")
	}
	w.close("tbody")
	w.close("table")
	w.close("div")

	w.open("div", "class", "plot-grid aid-hists")
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
		w.open("figure", "class", "plot hist", "data-quantity-id", q.ID)
		w.svg(h.SVG())
		w.close("figure")
	}
	w.close("div")
	w.close("div")
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
	return plainN(x*100, 3) + " %"
}

// cornerNote says how the Monte Carlo range sits in the corner range: how
// much of the corner span it covers, and whether it reaches past a corner.
func cornerNote(w *writer, q api.QuantitySpread) {
	c := q.Corners
	if c == nil || c.Min == nil || c.Max == nil || q.Min == nil || q.Max == nil {
		return
	}
	switch {
	case c.MonteCarloBeyondMin || c.MonteCarloBeyondMax:
		w.elem("span", "Monte Carlo reaches past them", "class", "hint corner-beyond",
			"title", "The quantity is not monotonic in its parts, or normal draws passed the limits: the corners bound the worst case only of a quantity monotonic in each part.")
	case *c.Max > *c.Min:
		cover := (*q.Max - *q.Min) / (*c.Max - *c.Min)
		cls := "hint"
		if c.MonteCarloShortMin || c.MonteCarloShortMax {
			cls = "hint corner-short"
		}
		w.elem("span", "Monte Carlo spans "+plainN(math.Min(cover, 1)*100, 3)+" % of it", "class", cls,
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
	var w writer
	w.open("div", "class", "aid-panel std-panel", "id", id+"-std-panel", "data-aid", "standard",
		"data-series", res.Series, "data-capacitor-series", res.CapacitorSeries)
	w.elem("p", "Resistors from "+res.Series+", capacitors from "+res.CapacitorSeries+" (IEC 60063); effects at "+value.Format(res.Frequency, "Hz", sig)+".", "class", "aid-head")

	if len(res.Ratios) > 0 {
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-small std-ratios")
		w.elem("caption", "Ratios realized by a pair of series values")
		w.open("thead")
		w.open("tr")
		for _, h := range []string{"Ratio", "Wanted gain", "Best pair", "Ratio error", "Gain set", "Gain error"} {
			w.elem("th", h, "scope", "col")
		}
		w.close("tr")
		w.close("thead")
		w.open("tbody")
		for i, r := range res.Ratios {
			unit := unitOf(r.Num)
			attrs := func(stat string) []string {
				return []string{"data-aid", "standard", "data-quantity", "ratio", "data-index", strconv.Itoa(i), "data-stat", stat}
			}
			w.open("tr")
			w.open("th", "scope", "row")
			q := r.Num + "/" + r.Den
			if r.Plus1 {
				q = "1 + " + q
			}
			w.elem("span", q, "class", "port-name")
			if r.Title != "" {
				w.elem("span", r.Title, "class", "hint")
			}
			w.close("th")
			wanted := r.Wanted
			if r.Plus1 {
				wanted++
			}
			w.open("td", "data-label", "Wanted")
			w.numSpan(plainN(wanted, 5), &wanted, attrs("wanted")...)
			w.close("td")
			w.open("td", "data-label", "Best pair")
			nv, dv := r.NumValue, r.DenValue
			w.text(r.Num + " = ")
			w.numSpan(magnitude(nv, unit), &nv, attrs("num")...)
			w.text(", " + r.Den + " = ")
			w.numSpan(magnitude(dv, unit), &dv, attrs("den")...)
			w.close("td")
			w.open("td", "data-label", "Ratio error")
			re := r.RelErr
			w.numSpan(percent(re), &re, attrs("relErr")...)
			w.close("td")
			w.open("td", "data-label", "Gain set")
			g := r.Gain
			w.numSpan(plainN(g, 5), &g, attrs("gain")...)
			w.close("td")
			w.open("td", "data-label", "Gain error")
			ge := r.GainRelErr
			w.numSpan(percent(ge), &ge, attrs("gainRelErr")...)
			w.close("td")
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
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
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-small std-values")
		w.elem("caption", "Series values per part")
		w.open("thead")
		w.open("tr")
		w.elem("th", "Part", "scope", "col")
		w.elem("th", "Nominal", "scope", "col")
		for _, v := range res.Variants {
			w.elem("th", or(variantTitle[v.Name], v.Name), "scope", "col")
		}
		w.close("tr")
		w.close("thead")
		w.open("tbody")
		for _, n := range names {
			cells := values[n]
			w.open("tr")
			w.elem("th", n, "scope", "row", "class", "port-name")
			nominal := 0.0
			for _, c := range cells {
				if c.set {
					nominal = c.v.Nominal
				}
			}
			w.elem("td", magnitude(nominal, unitOf(n)), "class", "num")
			for vi, c := range cells {
				w.open("td", "data-label", or(variantTitle[res.Variants[vi].Name], res.Variants[vi].Name))
				if !c.set {
					w.text("—")
				} else {
					v := c.v.Value
					w.numSpan(magnitude(v, unitOf(n))+" ("+c.v.Series+")", &v, "data-aid", "standard", "data-variant", res.Variants[vi].Name, "data-quantity", n, "data-stat", "value")
					ch := c.v.Change
					w.elem("span", percent(ch), "class", "hint", "data-aid", "standard", "data-variant", res.Variants[vi].Name, "data-quantity", n, "data-stat", "change", "data-value", num(ch))
				}
				w.close("td")
			}
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
	}

	if len(res.Variants) > 0 {
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-small std-effects")
		w.elem("caption", "What the series values do: change of each magnitude, and of its phase")
		w.open("thead")
		w.open("tr")
		w.elem("th", "Quantity", "scope", "col")
		w.elem("th", "Nominal", "scope", "col")
		for _, v := range res.Variants {
			w.elem("th", or(variantTitle[v.Name], v.Name), "scope", "col")
		}
		w.close("tr")
		w.close("thead")
		w.open("tbody")
		row := func(title, qid, unit string, pick func(v api.SnapVariant) *api.SnapCompare) {
			first := pick(res.Variants[0])
			if first == nil {
				return
			}
			w.open("tr")
			w.elem("th", title, "scope", "row")
			w.open("td", "data-label", "Nominal")
			if first.Nominal != nil {
				w.text(polar(first.Nominal.Value(), unit))
			} else {
				w.text("—")
			}
			w.close("td")
			for _, v := range res.Variants {
				c := pick(v)
				w.open("td", "data-label", or(variantTitle[v.Name], v.Name))
				if c == nil {
					w.text("—")
				} else {
					w.numSpan(percent(deref(c.MagnitudeError)), c.MagnitudeError, "data-aid", "standard", "data-variant", v.Name, "data-quantity", qid, "data-stat", "magnitudeError")
					pd := ""
					if c.PhaseDifference != nil {
						pd = "phase " + signedDegrees(*c.PhaseDifference)
					}
					w.elem("span", pd, "class", "hint")
				}
				w.close("td")
			}
			w.close("tr")
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
			w.open("tr")
			w.elem("th", "phase margin", "scope", "row")
			w.elem("td", degrees(*pm), "data-label", "Nominal")
			for _, v := range res.Variants {
				w.open("td", "data-label", or(variantTitle[v.Name], v.Name))
				w.numSpan(degrees(deref(v.PhaseMargin)), v.PhaseMargin, "data-aid", "standard", "data-variant", v.Name, "data-quantity", "pm", "data-stat", "value")
				w.close("td")
			}
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
	}
	aidNotes(&w, res.Notes)
	w.close("div")
	return w.String()
}

// signedDegrees writes a small angle difference with three significant
// digits and its sign.
func signedDegrees(d float64) string {
	if d == 0 {
		return "0°"
	}
	s := plainN(d, 3) + "°"
	if d > 0 {
		s = "+" + s
	}
	return s
}

// ---- sensitivity ----

// SensitivityPanel renders the normalized sensitivities: for each port
// impedance, the gain and the phase margin, a bar chart of every
// parameter's sensitivity, largest first, beside a table of the same
// numbers with their error estimates.
func SensitivityPanel(res *api.SensitivityResult, id string) string {
	var w writer
	w.open("div", "class", "aid-panel sens-panel", "id", id+"-sens-panel", "data-aid", "sensitivity")
	w.open("p", "class", "explain")
	w.text("At " + value.Format(res.Frequency, "Hz", sig) + "; method: " + res.Method + ", h = " + plain(res.Step) + ". For the phase margin, the change in degrees per unit of ln p.")
	w.close("p")
	for qi, q := range res.Quantities {
		h := id + "-sens-" + strconv.Itoa(qi) + "-h"
		isPM := q.Quantity == "pm"
		w.open("section", "class", "sens-q", "data-quantity-id", q.ID, "aria-labelledby", h)
		w.open("h4", "id", h)
		w.text(q.Title)
		switch {
		case isPM && q.PhaseMargin != nil:
			w.text(" (" + degrees(*q.PhaseMargin) + ")")
		case q.Value != nil:
			unit := "Ω"
			if q.Quantity == "g" {
				unit = ""
			}
			w.text(" (" + polar(q.Value.Value(), unit) + ")")
		}
		w.close("h4")
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
		w.open("div", "class", "sens-grid")
		w.open("figure", "class", "plot bars")
		bars := plot.Bars{ID: id + "-sens-bars-" + strconv.Itoa(qi), Title: q.Title + ": " + sym, XLabel: sym,
			Labels: labels, Values: vals, Width: 420, NoStyle: true}
		w.svg(bars.SVG())
		w.close("figure")
		w.open("div", "class", "table-wrap")
		w.open("table", "class", "aid-small sens-table")
		w.elem("caption", q.Title+": sensitivity to each parameter, largest first", "class", "offscreen")
		w.open("thead")
		w.open("tr")
		w.elem("th", "Parameter", "scope", "col")
		w.elem("th", "Nominal", "scope", "col")
		w.elem("th", sym, "scope", "col")
		if !isPM {
			w.elem("th", "∂∠"+symbolOf(q)+"/∂ln p (°)", "scope", "col")
		}
		w.elem("th", "Error estimate", "scope", "col")
		w.close("tr")
		w.close("thead")
		w.open("tbody")
		for _, e := range q.Entries {
			attrs := []string{"data-aid", "sensitivity", "data-quantity", q.ID, "data-parameter", e.Parameter}
			w.open("tr")
			w.elem("th", e.Parameter, "scope", "row", "class", "port-name")
			w.elem("td", magnitude(e.Nominal, e.Unit), "class", "num")
			w.open("td")
			w.numSpan(sensText(e.Value), e.Value, append(attrs, "data-stat", "value")...)
			w.close("td")
			if !isPM {
				w.open("td")
				w.numSpan(sensText(e.Phase), e.Phase, append(attrs, "data-stat", "phase")...)
				w.close("td")
			}
			w.open("td")
			errText, errAttrs := "—", append(attrs, "data-stat", "error")
			if e.Error != nil {
				errText = plainN(*e.Error, 2)
				// An estimate above 1 % of the value: the difference
				// quotients straddle a fast change (a resonance, a pole
				// near the spot frequency); read the value with care.
				if e.Value != nil && *e.Error > 0.01*math.Abs(*e.Value) && *e.Error > 1e-9 {
					errAttrs = append(errAttrs, "title", "uncertain: the error estimate is above 1 % of the value", "data-poor", "true")
				}
			}
			w.numSpan(errText, e.Error, errAttrs...)
			w.close("td")
			w.close("tr")
		}
		w.close("tbody")
		w.close("table")
		w.close("div")
		w.close("div")
		w.close("section")
	}
	aidNotes(&w, res.Notes)
	w.close("div")
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
	return plainN(*x, 4)
}

// aidNotes lists an aid's notes, if it has any.
func aidNotes(w *writer, notes []string) {
	if len(notes) == 0 {
		return
	}
	w.open("ul", "class", "aid-notes")
	for _, n := range notes {
		w.elem("li", n)
	}
	w.close("ul")
}
