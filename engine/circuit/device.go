package circuit

import (
	"math"
	"strings"
	"unicode/utf8"

	"zport/engine/value"
)

// Exact SI defining constants since 2019 (BIPM, The International System
// of Units, 9th ed., 2019).
const (
	Boltzmann        = 1.380649e-23    // J/K
	ElementaryCharge = 1.602176634e-19 // C
)

// DefaultTemperature is the analysis temperature when none is given, in
// kelvin.
const DefaultTemperature = 300.0

// ThermalVoltage is kT/q at kelvin, in volts: 25.852 mV at 300 K.
func ThermalVoltage(kelvin float64) float64 { return Boltzmann * kelvin / ElementaryCharge }

// DefaultGamma is the mos channel-noise factor γ when a line gives none: the
// long-channel value 2/3 (common textbook value, e.g. B. Razavi, Design of
// Analog CMOS Integrated Circuits, 2nd ed., 2017, ch. 7 [memory]).
const DefaultGamma = 2.0 / 3

// Device is a transistor's small-signal model at its bias point, as derived
// from its line. A zero resistance or capacitance is absent: Ro = 0 is an
// infinite output resistance, Rb = 0 no base resistance. Bias quantities a
// line did not give (Ic with gm=, Id without id=) are zero.
//
// A bjt (nodes C B E) is the hybrid-π model: Rb from B to an internal base
// node B′; Rpi and Cpi from B′ to E; Cmu from B′ to C; Ro from C to E; and
// the transconductance Gm·v(B′, E) driven from C to E. A mos (nodes D G S)
// is Cgs from G to S, Cgd from G to D, Ro from D to S, Gm·v(G, S) driven
// from D to S and, when Gmb > 0, Gmb·v(Bulk, S) driven from D to S.
type Device struct {
	// Gm is the transconductance: Ic/VT for a bjt given ic=, 2·Id/Vov for a
	// mos given id= and vov=, or the value of gm=. It is the gain of the
	// transistor's reference source (the part's Value).
	Gm float64
	Ro float64

	// bjt: what the line gave (Beta defaults to 100) …
	Ic, Beta, VA, FT, Rb float64
	// … and what follows: VT = kT/q (0 when gm= was given), Rpi = β/gm,
	// Cpi = gm/(2π·fT) − Cmu (0 without ft=).
	VT, Rpi, Cpi, Cmu float64

	// mos: what the line gave; Gamma is the channel-noise factor, 2/3
	// unless gamma= says otherwise.
	Id, Vov, Lambda, Cgs, Cgd, Gmb, Gamma float64
	// Bulk is the node of the bulk terminal, gnd unless b= names one.
	Bulk int
}

// Ib is a bjt's base bias current Ic/β (0 when the line gave no ic=), the
// base shot-noise current of a noise analysis.
func (d *Device) Ib() float64 {
	if d.Beta == 0 {
		return 0
	}
	return d.Ic / d.Beta
}

// given is an option value of a transistor line with its token.
type given struct {
	v   float64
	col int // column of the option's key
}

// device derives part's small-signal model from the options its line gave,
// reporting every inconsistency at the option it concerns, naming the part.
// It returns false after an error.
func (p *parser) device(n int, part *Part, opts map[string]given, bulk int) bool {
	name := part.Kind.String() + " " + part.Name
	ok := true
	errAt := func(key, format string, args ...any) {
		col := part.Col
		if g, has := opts[key]; has {
			col = g.col
		}
		p.errorf(n, col, name+": "+format, args...)
		ok = false
	}
	has := func(k string) bool { _, h := opts[k]; return h }
	v := func(k string) float64 { return opts[k].v }
	second := func(a, b string) string { // the later of two options on the line
		if opts[a].col > opts[b].col {
			return a
		}
		return b
	}
	d := &Device{}
	switch part.Kind {
	case BJT:
		if part.Nodes[0] == part.Nodes[2] {
			p.errorf(n, part.Col, "%s has its collector and emitter on one node, %s", name, p.c.Nodes[part.Nodes[0]])
			return false
		}
		d.Beta, d.Rb, d.Cmu, d.FT = 100, v("rb"), v("cmu"), v("ft")
		if has("beta") {
			d.Beta = v("beta")
		}
		switch {
		case has("gm") && has("ic"):
			errAt(second("gm", "ic"), "give gm= or ic=, not both (gm = ic/VT)")
		case has("ic"):
			d.Ic = v("ic")
			d.VT = ThermalVoltage(p.c.Temperature)
			d.Gm = d.Ic / d.VT
		case has("gm"):
			d.Gm = v("gm")
		default:
			p.errorf(n, part.Col, "%s needs its collector bias current ic= (or gm= directly)", name)
			return false
		}
		switch {
		case has("va") && has("ro"):
			errAt(second("va", "ro"), "give va= or ro=, not both (ro = va/ic)")
		case has("va") && d.Ic == 0:
			errAt("va", "va= needs ic= (ro = va/ic); with gm= give ro= instead")
		case has("va"):
			d.VA = v("va")
			d.Ro = d.VA / d.Ic
		case has("ro"):
			d.Ro = v("ro")
		}
		if !ok {
			return false
		}
		d.Rpi = d.Beta / d.Gm
		if d.FT > 0 {
			d.Cpi = d.Gm/(2*math.Pi*d.FT) - d.Cmu
			if d.Cpi < 0 {
				errAt("ft", "the derived Cπ = gm/(2π·ft) − cmu = %s is negative: with gm = %s, cmu = %s needs ft below %s",
					value.Format(d.Cpi, "F", 3), value.Format(d.Gm, "S", 4), value.Format(d.Cmu, "F", 3), value.Format(d.Gm/(2*math.Pi*d.Cmu), "Hz", 3))
				return false
			}
		}
	case MOS:
		if part.Nodes[0] == part.Nodes[2] {
			p.errorf(n, part.Col, "%s has its drain and source on one node, %s", name, p.c.Nodes[part.Nodes[0]])
			return false
		}
		d.Cgs, d.Cgd, d.Gmb, d.Bulk, d.Gamma = v("cgs"), v("cgd"), v("gmb"), bulk, DefaultGamma
		if has("gamma") {
			d.Gamma = v("gamma")
		}
		switch {
		case has("gm") && (has("id") || has("vov")):
			k := "id"
			if !has("id") {
				k = "vov"
			}
			errAt(second("gm", k), "give gm= or id= with vov=, not both (gm = 2·id/vov)")
		case has("id") && has("vov"):
			d.Id, d.Vov = v("id"), v("vov")
			d.Gm = 2 * d.Id / d.Vov
		case has("id"):
			errAt("id", "id= needs vov= (gm = 2·id/vov), or give gm= directly")
		case has("vov"):
			errAt("vov", "vov= needs id= (gm = 2·id/vov), or give gm= directly")
		case has("gm"):
			d.Gm = v("gm")
		default:
			p.errorf(n, part.Col, "%s needs gm=, or its drain bias current id= with vov=", name)
			return false
		}
		if !ok {
			return false
		}
		switch {
		case has("lambda") && has("ro"):
			errAt(second("lambda", "ro"), "give lambda= or ro=, not both (ro = 1/(lambda·id))")
		case has("lambda") && !has("id"):
			errAt("lambda", "lambda= needs id= (ro = 1/(lambda·id)); with gm= give ro= instead")
		case has("lambda"):
			d.Lambda = v("lambda")
			d.Ro = 1 / (d.Lambda * d.Id)
		case has("ro"):
			d.Ro = v("ro")
		}
	}
	if !ok {
		return false
	}
	if math.IsInf(d.Gm, 0) || math.IsInf(d.Rpi, 0) || math.IsInf(d.Ro, 0) {
		p.errorf(n, part.Col, "%s: its derived small-signal values are out of range", name)
		return false
	}
	part.Dev, part.Value = d, d.Gm
	return true
}

// levenshtein is the edit distance between a and b, in bytes (option keys
// and kind names are ASCII).
func levenshtein(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

// nearest returns the candidate closest to word — one that differs only in
// case first, else the smallest edit distance within about half the word —
// or "" when none is close enough to be a likely typo.
func nearest(word string, candidates []string) string {
	for _, c := range candidates {
		if strings.EqualFold(c, word) {
			return c
		}
	}
	best, bestD := "", 0
	limit := max(1, (utf8.RuneCountInString(word)+1)/2)
	for _, c := range candidates {
		d := levenshtein(strings.ToLower(word), strings.ToLower(c))
		if d <= limit && (best == "" || d < bestD) {
			best, bestD = c, d
		}
	}
	return best
}
