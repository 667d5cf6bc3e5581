package noise

import (
	"math"

	"zport/engine/circuit"
	"zport/engine/mna"
)

// The exact SI defining constants (BIPM, The International System of
// Units, 9th ed., 2019).
const (
	// Boltzmann is k in J/K.
	Boltzmann = 1.380649e-23
	// Charge is the elementary charge q in C.
	Charge = 1.602176634e-19
)

// Kinds of noise source, as Source.Kind and the contract name them.
const (
	Thermal = "thermal" // a resistor's 4kTR, or an inoise's thermal=
	Shot    = "shot"    // an inoise's shot=: 2qI
	En      = "en"      // an opamp's input voltage noise
	In      = "in"      // an opamp's input current noise, one per input
	VNoise  = "vnoise"  // a vnoise's density=
	INoise  = "inoise"  // an inoise's density=
)

// Density is a noise density with a 1/f corner: the one-sided power
// spectral density is Level²·(1 + Corner/f) (common practice).
type Density struct {
	Level  float64 // V/√Hz or A/√Hz: the white level
	Corner float64 // Hz; 0 for white noise
}

// PSD is the power spectral density at f > 0, in V²/Hz or A²/Hz.
func (d Density) PSD(f float64) float64 {
	p := d.Level * d.Level
	if d.Corner > 0 {
		p *= 1 + d.Corner/f
	}
	return p
}

// Source is one noise generator of a circuit, uncorrelated with every
// other one.
type Source struct {
	// Name is the part's name, with .en, .in+ or .in- for an opamp's.
	Name string
	// Kind is one of Thermal, Shot, En, In, VNoise, INoise.
	Kind string
	// Part is the index of the part in circuit.Circuit.Parts.
	Part int
	// Unit is "V" or "A": Density is in V/√Hz or A/√Hz.
	Unit    string
	Density Density
	// RHS is where a unit source enters the equations M·x = b: its
	// entries of b. A current source from unknown i into unknown j is
	// b_j = 1, b_i = −1; a voltage source in a branch equation is 1 in
	// that branch's row.
	RHS []mna.Term
	// Through, when not nil, scales RHS at frequency f: an opamp's en
	// reaches its gain source's branch equation multiplied by A(s).
	Through func(f float64) complex128
}

// Transfer is the source's transfer to the output at f, from the adjoint
// solution z for that output (see feedback.Analyzer.Adjoint): V per volt
// or per ampere of the source.
func (s *Source) Transfer(z []complex128, f float64) complex128 {
	h := mna.Dot(s.RHS, z)
	if s.Through != nil {
		h *= s.Through(f)
	}
	return h
}

// Sources lists the noise generators of the circuit whose equations are
// sys, at temperature T in kelvin, in the order of the circuit's parts.
func Sources(sys *mna.System, T float64) []Source {
	// Most parts give one source of at most two terms; a circuit may
	// have thousands of resistors, so the terms share one array.
	n := len(sys.C.Parts)
	g := gen{sys: sys, T: T, out: make([]Source, 0, n), terms: make([]mna.Term, 0, 2*n)}
	for i := range sys.C.Parts {
		g.part(i)
	}
	return g.out
}

// gen collects the sources of one circuit.
type gen struct {
	sys   *mna.System
	T     float64
	out   []Source
	terms []mna.Term // backing array of the sources' RHS
}

// rhs returns the terms as a slice of g.terms.
func (g *gen) rhs(t ...mna.Term) []mna.Term {
	start := len(g.terms)
	g.terms = append(g.terms, t...)
	return g.terms[start:len(g.terms):len(g.terms)]
}

// part adds the noise sources of part i. A new element kind gets its
// noise here: one call of current for each uncorrelated noise current
// between two unknowns (node voltages, mna.NodeVar; −1 for gnd; internal
// nodes of the kind's stamp alike), one call of branch for each noise
// voltage that enters a branch equation.
func (g *gen) part(i int) {
	p := &g.sys.C.Parts[i]
	n := p.Noise
	node := func(k int) int { return mna.NodeVar(p.Nodes[k]) }
	switch p.Kind {
	case circuit.Resistor:
		if !n.Off {
			g.current(i, p.Name, Thermal, node(0), node(1), Density{Level: math.Sqrt(4 * Boltzmann * g.T / p.Value)})
		}
	case circuit.OpAmp:
		// en in series with the gain source's differential input: the
		// branch equation V(out) − A·(V+ − V−) = A·en. in: one source at
		// each input, to gnd.
		if n.V > 0 {
			g.branch(i, p.Name+".en", En, g.sys.Branch[i], Density{n.V, n.VCorner}, p.Amp.Gain)
		}
		if n.I > 0 {
			d := Density{n.I, n.ICorner}
			g.current(i, p.Name+".in+", In, -1, node(0), d)
			g.current(i, p.Name+".in-", In, -1, node(1), d)
		}
	case circuit.BJT:
		// Collector shot noise 2q·Ic from C to E, base shot noise 2q·Ib
		// from the internal base B′ to E, and rb's thermal noise from B
		// to B′; rπ and ro are the model's and noiseless (P. R. Gray,
		// P. J. Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design of
		// Analog Integrated Circuits, 5th ed., 2009, ch. 11 [memory]).
		d := p.Dev
		ic := d.Ic
		if ic == 0 {
			ic = d.Gm * circuit.ThermalVoltage(g.T) // gm= given: Ic = gm·VT
		}
		c, b, e := node(0), node(1), node(2)
		bi := b
		if v := g.sys.InternalVar(i); v >= 0 {
			bi = v
			g.current(i, p.Name+".rb", Thermal, b, bi, Density{Level: math.Sqrt(4 * Boltzmann * g.T / d.Rb)})
		}
		g.current(i, p.Name+".ic", Shot, c, e, Density{Level: math.Sqrt(2 * Charge * ic)})
		if d.Beta > 0 {
			g.current(i, p.Name+".ib", Shot, bi, e, Density{Level: math.Sqrt(2 * Charge * ic / d.Beta)})
		}
	case circuit.MOS:
		// The channel's thermal noise 4kT·γ·gm from D to S (same source
		// [memory]; γ = 2/3 for a long channel); ro is noiseless.
		d := p.Dev
		g.current(i, p.Name+".id", Thermal, node(0), node(2), Density{Level: math.Sqrt(4 * Boltzmann * g.T * d.Gamma * d.Gm)})
	case circuit.VNoise:
		g.branch(i, p.Name, VNoise, g.sys.Branch[i], Density{n.V, n.VCorner}, nil)
	case circuit.INoise:
		switch {
		case n.Shot > 0:
			g.current(i, p.Name, Shot, node(0), node(1), Density{Level: math.Sqrt(2 * Charge * n.Shot)})
		case n.Thermal > 0:
			g.current(i, p.Name, Thermal, node(0), node(1), Density{Level: math.Sqrt(4 * Boltzmann * g.T * n.Thermal)})
		default:
			g.current(i, p.Name, INoise, node(0), node(1), Density{n.I, n.ICorner})
		}
	}
}

// current adds a noise current of density d from unknown from into
// unknown to (−1 for gnd); one with both ends at gnd drives nothing and is
// left out.
func (g *gen) current(part int, name, kind string, from, to int, d Density) {
	var t [2]mna.Term
	n := 0
	if to >= 0 {
		t[n] = mna.Term{I: to, V: 1}
		n++
	}
	if from >= 0 {
		t[n] = mna.Term{I: from, V: -1}
		n++
	}
	if n == 0 {
		return
	}
	g.out = append(g.out, Source{Name: name, Kind: kind, Part: part, Unit: "A", Density: d, RHS: g.rhs(t[:n]...)})
}

// branch adds a noise voltage of density d in the branch equation row,
// scaled by through(f) when not nil.
func (g *gen) branch(part int, name, kind string, row int, d Density, through func(float64) complex128) {
	g.out = append(g.out, Source{Name: name, Kind: kind, Part: part, Unit: "V", Density: d,
		RHS: g.rhs(mna.Term{I: row, V: 1}), Through: through})
}
