package api

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strings"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/mna"
	"zport/engine/noise"
	"zport/engine/numeric"
	"zport/engine/value"
)

// This file holds the "noise" analysis, answered by package
// zport/engine/noise: output and input-referred noise densities over the
// sweep, the rms over a band with each source's share, and the noise gain.

// NoiseRequest is the "noise" key; every field is optional.
type NoiseRequest struct {
	// Output is where the noise is read: "NODE" (to gnd) or "NODE,NODE".
	// Empty means the gain's output.
	Output string `json:"output,omitempty"`
	// Temperature is the request's temperature written here, where a
	// noise request naturally says it: the two are one setting (the
	// transistors' VT and every density are taken at it), so giving both
	// with different values is an error.
	Temperature *float64 `json:"temperature,omitempty"`
	// Band is the band the rms is taken over; an end left out is the
	// sweep's.
	Band *NoiseBand `json:"band,omitempty"`
}

// NoiseBand is a frequency band in hertz.
type NoiseBand struct {
	From *float64 `json:"from,omitempty"`
	To   *float64 `json:"to,omitempty"`
}

// NoisePlotted is how many of the largest contributors carry their
// density over the sweep (NoiseContributor.Density).
const NoisePlotted = 5

// NoiseResult is the "noise" key of a response. Densities are one-sided,
// per √Hz; a value that is not finite is null.
type NoiseResult struct {
	// Node is the output, "NODE" or "NODE,NODE"; Source the input the
	// noise is referred to (the gain's source), empty without a gain.
	Node        string  `json:"node"`
	Source      string  `json:"source,omitempty"`
	Temperature float64 `json:"temperature"`
	Band        struct {
		From float64 `json:"from"`
		To   float64 `json:"to"`
	} `json:"band"`
	// Unit is the output density's unit, "V/√Hz"; InputUnit the input's,
	// "V/√Hz" for a vsource and "A/√Hz" for an isource.
	Unit      string `json:"unit"`
	InputUnit string `json:"inputUnit,omitempty"`
	// Frequency is the sweep's grid (the spot frequency alone without a
	// sweep); Output and Input the densities there. Input is the output
	// density over |G|, G the gain from Source to Node.
	Frequency []float64  `json:"frequency"`
	Output    []*float64 `json:"output"`
	Input     []*float64 `json:"input,omitempty"`
	// Spot is the same at the request's spot frequency.
	Spot NoiseSpot `json:"spot"`
	// RMS is the output noise over the band, and the same referred to the
	// input through the largest |G| in the band.
	RMS struct {
		Output *float64 `json:"output"`
		Input  *float64 `json:"input"`
	} `json:"rms"`
	// Bandwidth is the equivalent noise bandwidth of G over the band,
	// ∫|G|²df / max|G|², in hertz; PeakGain is max|G| and PeakAt where it
	// is. Null without a gain.
	Bandwidth *float64 `json:"bandwidth"`
	PeakGain  *float64 `json:"peakGain"`
	PeakAt    *float64 `json:"peakAt"`
	// Integration says how the band was integrated and how well.
	Integration NoiseIntegration `json:"integration"`
	// Contributors are the noise sources, largest first.
	Contributors []NoiseContributor `json:"contributors"`
	// NoiseGain is the reference opamp's noise gain 1/β (1 + Zf/Zi for
	// the inverting family) over Frequency, and EnTransfer the closed-loop
	// transfer from its en to the output, NoiseGain·T/(1 + T); both
	// absent when the reference is not an opamp.
	NoiseGain  []*Complex `json:"noiseGain,omitempty"`
	EnTransfer []*Complex `json:"enTransfer,omitempty"`
	Notes      []string   `json:"notes"`
}

// NoiseSpot is the noise at the spot frequency.
type NoiseSpot struct {
	Frequency float64  `json:"frequency"`
	Output    *float64 `json:"output"`
	Input     *float64 `json:"input"`
}

// NoiseIntegration describes the band integral.
type NoiseIntegration struct {
	Method string `json:"method"`
	// Error is the estimated relative error of the output noise power
	// (the rms's is half of it).
	Error       *float64 `json:"error"`
	Evaluations int      `json:"evaluations"`
	Converged   bool     `json:"converged"`
}

// NoiseContributor is one noise source.
type NoiseContributor struct {
	Name string `json:"name"`
	// Kind is "thermal", "shot", "en", "in", "vnoise" or "inoise".
	Kind string `json:"kind"`
	// Part is the circuit part it belongs to.
	Part string `json:"part"`
	// Level is the source's own white density (Unit "V/√Hz" or "A/√Hz"),
	// Corner its 1/f corner in hertz (0: white).
	Level  float64 `json:"level"`
	Unit   string  `json:"unit"`
	Corner float64 `json:"corner"`
	// RMS is its share of the output noise over the band, and Share the
	// fraction of the total output noise power it makes.
	RMS   *float64 `json:"rms"`
	Share *float64 `json:"share"`
	// Spot is its output density at the spot frequency; Density over
	// Frequency, given for the NoisePlotted largest.
	Spot    *float64   `json:"spot"`
	Density []*float64 `json:"density,omitempty"`
}

// densityUnit is the unit of a source's density by its Unit.
var densityUnit = map[string]string{"V": "V/√Hz", "A": "A/√Hz"}

const noiseMethod = "adjoint system per frequency (Rohrer, Nagel, Meyer, Weber 1971); band integral by adaptive 15-point Gauss–Kronrod over ln f, error estimate |Kronrod − Gauss|"

// Noise is the "noise" analysis.
var Noise = Register("noise", noiseRun).Before(noiseBefore)

// noiseSetup is a "noise" request resolved against the prepared request.
type noiseSetup struct {
	node     string
	out      [2]int // node pair
	T        float64
	from, to float64
}

// resolve checks q against p and fills in the defaults.
func (q *NoiseRequest) resolve(p *Prepared) (*noiseSetup, error) {
	// One temperature for the whole request: the one the transistors'
	// VT = kT/q was taken at is the one their and the resistors' noise is.
	st := &noiseSetup{T: p.Circuit.Temperature}
	st.node = q.Output
	if st.node == "" {
		g := p.Analyzer.Gain
		if g == nil {
			return nil, fieldErr("noise.output", "name the output node (\"NODE\" or \"NODE,NODE\"): the request has no gain to take it from")
		}
		st.node = g.OutputName
	}
	a, b, bad := nodePair(p.Circuit, st.node)
	if bad != "" {
		return nil, fieldErr("noise.output", "%s", bad)
	}
	st.out = [2]int{a, b}
	if s := p.Req.Sweep; s != nil {
		st.from, st.to = s.From, s.To
	}
	if b := q.Band; b != nil {
		if b.From != nil {
			st.from = *b.From
		}
		if b.To != nil {
			st.to = *b.To
		}
	}
	switch {
	case st.from == 0 && st.to == 0:
		return nil, fieldErr("noise.band", "give the band (from, to in Hz): the request has no sweep to take it from")
	case !(st.from > 0) || math.IsInf(st.from, 0):
		return nil, fieldErr("noise.band.from", "the band must start above 0 Hz (the integral runs over log f); got %g", st.from)
	case !(st.to > st.from) || math.IsInf(st.to, 0):
		return nil, fieldErr("noise.band.to", "the band must end above its start, %s; got %g Hz", value.Format(st.from, "Hz", 4), st.to)
	}
	return st, nil
}

// nodePair reads "NODE" (to gnd) or "NODE,NODE" of c; bad says what is
// wrong, "" when nothing is.
func nodePair(c *circuit.Circuit, s string) (a, b int, bad string) {
	x, y, pair := strings.Cut(s, ",")
	x, y = strings.TrimSpace(x), strings.TrimSpace(y)
	a, ok := c.Node(x)
	if !ok {
		return 0, 0, "no node called " + value.Quote(x)
	}
	b = circuit.Gnd
	if pair {
		if b, ok = c.Node(y); !ok {
			return 0, 0, "no node called " + value.Quote(y)
		}
	}
	if a == b {
		return 0, 0, "the output " + value.Quote(s) + " has both ends on one node"
	}
	return a, b, ""
}

// noiseBefore checks the request and asks the analyzer for the adjoint
// solution of the output at every point of the base answer.
func noiseBefore(p *Prepared, q *NoiseRequest) error {
	st, err := q.resolve(p)
	if err != nil {
		return err
	}
	var d []mna.Term
	if v := mna.NodeVar(st.out[0]); v >= 0 {
		d = append(d, mna.Term{I: v, V: 1})
	}
	if v := mna.NodeVar(st.out[1]); v >= 0 {
		d = append(d, mna.Term{I: v, V: -1})
	}
	p.Analyzer.Adjoint = d
	return nil
}

func noiseRun(p *Prepared, q *NoiseRequest, base *Response) (*NoiseResult, error) {
	st, err := q.resolve(p)
	if err != nil {
		return nil, err
	}
	a := p.Analyzer
	n := noise.New(a.Sys, st.T, a.InputRHS())
	m := len(n.Sources)
	r := &NoiseResult{Node: st.node, Temperature: st.T, Unit: "V/√Hz", Notes: []string{}, Contributors: make([]NoiseContributor, 0, m)}
	r.Band.From, r.Band.To = st.from, st.to
	r.Integration.Method = noiseMethod
	if g := a.Gain; g != nil {
		r.Source = g.SourceName
		r.InputUnit = "V/√Hz"
		if g.Unit(p.Circuit) == "V/A" {
			r.InputUnit = "A/√Hz"
		}
	}
	if m == 0 {
		r.Notes = append(r.Notes, "the circuit has no noise sources: no resistor without noise=off, no opamp with en or in, no vnoise or inoise")
	}

	// The band first: it ranks the sources.
	band, err := n.Band(a.AdjointAt, a.Sys.N, st.from, st.to)
	if err != nil {
		r.Notes = append(r.Notes, "the band could not be integrated: "+err.Error())
		band = noise.Band{Power: make([]float64, m)}
	} else {
		r.noiseBand(band, p)
	}
	spot := make([]float64, m)
	r.Spot.Frequency = p.Spot.F
	if p.Spot.Adjoint != nil {
		n.At(spot, p.Spot.Adjoint, p.Spot.F)
		out, in := noiseDensity(n, p.Spot.Adjoint, p.Spot.F)
		r.Spot.Output, r.Spot.Input = F(out), F(in)
	}
	if p.Spot.F == 0 {
		r.Notes = append(r.Notes, "at 0 Hz a 1/f noise is infinite: the spot densities are given where they are finite")
	}
	// Largest first; names are unique, so the order is total.
	order := make([]int, m)
	for k := range order {
		order[k] = k
	}
	slices.SortFunc(order, func(i, j int) int {
		if c := cmp.Compare(band.Power[j], band.Power[i]); c != 0 {
			return c
		}
		return strings.Compare(n.Sources[i].Name, n.Sources[j].Name)
	})
	each := make(floatArena, 0, 3*m)
	for _, k := range order {
		s := n.Sources[k]
		c := NoiseContributor{Name: s.Name, Kind: s.Kind, Part: p.Circuit.Parts[s.Part].Name, Level: s.Density.Level,
			Unit: densityUnit[s.Unit], Corner: s.Density.Corner, Spot: each.f(math.Sqrt(spot[k]))}
		if err == nil {
			c.RMS = each.f(math.Sqrt(band.Power[k]))
			if band.Total > 0 {
				c.Share = each.f(band.Power[k] / band.Total)
			}
		}
		r.Contributors = append(r.Contributors, c)
	}

	// Over the sweep, from the adjoint solutions its points made.
	pts := p.Points
	if pts == nil {
		pts = []feedback.Point{p.Spot}
	}
	plotted := order[:min(m, NoisePlotted)]
	for j := range plotted {
		r.Contributors[j].Density = make([]*float64, len(pts))
	}
	r.Frequency = make([]float64, len(pts))
	r.Output = make([]*float64, len(pts))
	if n.Input != nil {
		r.Input = make([]*float64, len(pts))
	}
	ngain := noiseGain(p)
	var zs []Complex // one backing array for the noise gains, as for the sweep
	if ngain != nil {
		r.NoiseGain, r.EnTransfer = make([]*Complex, len(pts)), make([]*Complex, len(pts))
		zs = make([]Complex, 0, 2*len(pts))
	}
	xs := make(floatArena, 0, len(pts)*(2+len(plotted)))
	for i, pt := range pts {
		r.Frequency[i] = pt.F
		if pt.Adjoint == nil {
			continue
		}
		out, in := noiseDensity(n, pt.Adjoint, pt.F)
		r.Output[i] = xs.f(out)
		if r.Input != nil {
			r.Input[i] = xs.f(in)
		}
		for j, k := range plotted {
			r.Contributors[j].Density[i] = xs.f(math.Sqrt(n.Of(k, pt.F)))
		}
		if ngain != nil {
			ng, en := ngain(pt)
			for _, v := range [2]struct {
				z   complex128
				dst **Complex
			}{{ng, &r.NoiseGain[i]}, {en, &r.EnTransfer[i]}} {
				if numeric.Finite(v.z) {
					zs = append(zs, Complex{real(v.z), imag(v.z)})
					*v.dst = &zs[len(zs)-1]
				}
			}
		}
	}
	return r, nil
}

// floatArena hands out pointers into one backing array: a page recomputes the
// noise on every keystroke, and a pointer per number would be an
// allocation per number. Its capacity must cover every value handed out.
type floatArena []float64

// f stores x and returns a pointer to it, or nil when x is not finite.
func (a *floatArena) f(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	*a = append(*a, x)
	return &(*a)[len(*a)-1]
}

// noiseBand fills in what the band integral gives.
func (r *NoiseResult) noiseBand(band noise.Band, p *Prepared) {
	r.RMS.Output = F(band.RMS())
	r.Integration.Error = F(0)
	if band.Total > 0 {
		r.Integration.Error = F(band.Error / band.Total)
	}
	r.Integration.Evaluations, r.Integration.Converged = band.Evaluations, band.Converged
	if !band.Converged {
		r.Notes = append(r.Notes, fmt.Sprintf("the band integral did not reach its tolerance in %d evaluations: its estimated relative error is %.1g", band.Evaluations, band.Error/band.Total))
	}
	if g := p.Analyzer.Gain; g != nil && band.Peak > 0 {
		r.RMS.Input = F(band.RMS() / band.Peak)
		r.Bandwidth, r.PeakGain, r.PeakAt = F(band.Bandwidth()), F(band.Peak), F(band.PeakAt)
		r.Notes = append(r.Notes, fmt.Sprintf("the input rms is the output rms over the largest gain in the band, |G| = %s at %s; the noise bandwidth is that of G from %s to %s",
			value.Format(band.Peak, g.Unit(p.Circuit), 4), value.Format(band.PeakAt, "Hz", 4), r.Source, r.Node))
	}
}

// noiseDensity is the output density at f from the adjoint solution z,
// and the input-referred one (NaN without an input, or where the gain is
// zero); n.Of then gives each source's share at f.
func noiseDensity(n *noise.Analysis, z []complex128, f float64) (out, in float64) {
	total, g := n.Total(z, f)
	out, in = math.Sqrt(total), math.NaN()
	if n.Input != nil && g != 0 {
		in = out / cmplx.Abs(g)
	}
	return out, in
}

// noiseGain returns, when the reference is an opamp, the function giving
// its noise gain and its en's transfer at a point (see noise.NoiseGain),
// else nil.
func noiseGain(p *Prepared) func(pt feedback.Point) (ng, en complex128) {
	a := p.Analyzer
	if a.Ref < 0 || p.Circuit.Parts[a.Ref].Kind != circuit.OpAmp {
		return nil
	}
	part := &p.Circuit.Parts[a.Ref]
	br := a.Sys.Branch[a.Ref]
	return func(pt feedback.Point) (complex128, complex128) {
		k := part.Gain(pt.F)
		h := pt.Adjoint[br]
		return noise.NoiseGain(h, pt.T, k), k * h
	}
}
