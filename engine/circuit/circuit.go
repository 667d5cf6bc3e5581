package circuit

import (
	"math"
	"sort"
)

// Kind is the kind of a part.
type Kind int

// The part kinds, in the order of the table in the package doc.
const (
	Resistor Kind = iota
	Capacitor
	Inductor
	VSource
	ISource
	VCVS
	VCCS
	CCVS
	CCCS
	OpAmp
	BJT
	MOS
	// VNoise and INoise are noise sources: in every analysis but noise a
	// VNoise is a 0 V source (a short with a branch current) and an INoise
	// is open.
	VNoise
	INoise
)

var kindNames = [...]string{"resistor", "capacitor", "inductor", "vsource", "isource", "vcvs", "vccs", "ccvs", "cccs", "opamp", "bjt", "mos", "vnoise", "inoise"}

func (k Kind) String() string {
	if k < 0 || int(k) >= len(kindNames) {
		return "unknown"
	}
	return kindNames[k]
}

// Controlled reports whether parts of kind k have a gain that can serve as
// the reference for a return ratio: the controlled sources, the opamp's
// internal gain source, and a transistor's transconductance.
func (k Kind) Controlled() bool {
	switch k {
	case VCVS, VCCS, CCVS, CCCS, OpAmp, BJT, MOS:
		return true
	}
	return false
}

// Transistor reports whether k is bjt or mos.
func (k Kind) Transistor() bool { return k == BJT || k == MOS }

// VoltageOutput reports whether the part forces a voltage between its first
// two nodes (and so carries a branch current that can be sensed).
func (k Kind) VoltageOutput() bool {
	return k == Inductor || k == VSource || k == VCVS || k == CCVS || k == VNoise
}

// Gnd is the index of the reference node.
const Gnd = 0

// Part is one line of circuit text.
type Part struct {
	Kind Kind
	Name string
	// Nodes are the part's terminals by position: A B, P N, FROM TO, for
	// an opamp PLUS MINUS OUT, for a bjt C B E and for a mos D G S.
	Nodes []int
	// Value is the resistance, capacitance, inductance, source value, gain,
	// transconductance or transresistance, by kind; for a transistor its
	// transconductance gm, the gain of its reference source.
	Value float64
	// Ctrl holds the sensed node pair (CP, CN) of a vcvs or vccs.
	Ctrl [2]int
	// Sense is the index in Circuit.Parts of the part whose current a ccvs
	// or cccs senses.
	Sense int
	// Amp is set for an opamp.
	Amp *Amp
	// Dev is set for a bjt or a mos.
	Dev *Device
	// Noise is what the line says about the part's noise.
	Noise Noise
	// Line and Col locate the part's name in the text (1-based).
	Line, Col int
}

// Amp holds an opamp's model. A zero GBW, P2, Rid, Rcm, Cid or Ccm means
// absent. Cid is the differential input capacitance (between the inputs),
// Ccm the common-mode one (each input to gnd), in parallel with Rid and
// Rcm.
type Amp struct {
	A0, GBW, P2, Rid, Rcm, Ro float64
	Cid, Ccm                  float64
}

// Noise is what a part's line says about its noise; package
// zport/engine/noise turns it into noise sources. The zero value is a
// part's default: a resistor is noisy, an opamp is noiseless.
type Noise struct {
	// Off marks a resistor noiseless (noise=off): a load or a model
	// resistance that is not a physical resistor of the design.
	Off bool
	// V is a voltage density in V/√Hz (an opamp's en, a vnoise's density)
	// and VCorner its 1/f corner in hertz (0: none); I and ICorner are the
	// same for a current density in A/√Hz (an opamp's in, an inoise's
	// density). The power density is V²·(1 + VCorner/f).
	V, VCorner, I, ICorner float64
	// Shot is the DC current in amperes whose shot noise an inoise is
	// (shot=); Thermal the conductance in siemens whose thermal noise it
	// is at the analysis temperature (thermal=).
	Shot, Thermal float64
}

// Gain returns the open-loop gain A(s) at s = j2πf.
func (a *Amp) Gain(f float64) complex128 {
	s := complex(0, 2*math.Pi*f)
	g := complex(a.A0, 0)
	if a.GBW > 0 {
		g /= 1 + s/complex(2*math.Pi*a.GBW/a.A0, 0)
	}
	if a.P2 > 0 {
		g /= 1 + s/complex(2*math.Pi*a.P2, 0)
	}
	return g
}

// Port is a named node pair.
type Port struct {
	Name      string
	A, B      int
	Line, Col int
}

// Circuit is parsed circuit text.
type Circuit struct {
	Parts []Part
	Ports []Port
	// Nodes holds the node names by index; Nodes[Gnd] is "gnd".
	Nodes []string
	// Temperature is the analysis temperature in kelvin that the
	// transistors' bias-dependent values were derived at (and that a
	// noise analysis uses).
	Temperature float64

	parts map[string]int
	nodes map[string]int
}

// Part returns the part called name.
func (c *Circuit) Part(name string) (*Part, bool) {
	i, ok := c.parts[name]
	if !ok {
		return nil, false
	}
	return &c.Parts[i], true
}

// PartIndex returns the index in Parts of the part called name.
func (c *Circuit) PartIndex(name string) (int, bool) {
	i, ok := c.parts[name]
	return i, ok
}

// Node returns the index of the node called name.
func (c *Circuit) Node(name string) (int, bool) {
	i, ok := c.nodes[name]
	return i, ok
}

// Port returns the port called name.
func (c *Circuit) Port(name string) (*Port, bool) {
	for i := range c.Ports {
		if c.Ports[i].Name == name {
			return &c.Ports[i], true
		}
	}
	return nil, false
}

// References lists, sorted, the names of parts that can serve as the
// reference element: controlled sources, opamps and transistors.
func (c *Circuit) References() []string {
	var r []string
	for _, p := range c.Parts {
		if p.Kind.Controlled() {
			r = append(r, p.Name)
		}
	}
	sort.Strings(r)
	return r
}

// Sources lists, sorted, the names of the independent sources.
func (c *Circuit) Sources() []string {
	var r []string
	for _, p := range c.Parts {
		if p.Kind == VSource || p.Kind == ISource {
			r = append(r, p.Name)
		}
	}
	sort.Strings(r)
	return r
}

// Gain returns the controlled gain of p at frequency f: K, G or R by kind,
// A(s) for an opamp, gm for a transistor.
func (p *Part) Gain(f float64) complex128 {
	if p.Kind == OpAmp {
		return p.Amp.Gain(f)
	}
	return complex(p.Value, 0)
}
