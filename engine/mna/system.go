package mna

import (
	"math"

	"zport/engine/circuit"
	"zport/engine/dd"
)

type entry struct {
	i, j int
	v    float64
	lo   float64 // v + lo is the coefficient in double-double (a conductance 1/R)
}

// Control is one controlled source written as k(s)·r·c(s)ᵀ.
type Control struct {
	Part int // index in Circuit.Parts
	// R is where the output enters the equations; C0 + s·C1 reads the
	// control signal.
	R, C0, C1 []Term
}

// Term is one coefficient of a sparse vector: V, or V + Lo in
// double-double where V is rounded (a sensed resistor's 1/R).
type Term struct {
	I  int
	V  float64
	Lo float64
}

// System holds a circuit's equations in a form quick to assemble at any
// frequency.
type System struct {
	C *circuit.Circuit
	// N is the number of unknowns: node voltages (nodes 1… of the circuit,
	// then internal nodes) followed by branch currents.
	N int
	// Nodes is the number of node-voltage unknowns, internal ones included.
	Nodes int
	// Branch maps a part index to its branch-current unknown, or −1.
	Branch []int
	// Internal names the internal nodes (an opamp's node behind ro, a bjt's
	// base behind rb), indexed from len(C.Nodes)-1.
	Internal []string

	inner    []int // part index → its internal node's unknown, or −1
	g, c     []entry
	Controls []Control
	ctrlOf   []int // part index → index in Controls, or −1
}

// InternalVar returns the unknown of part i's internal node (an opamp's
// node behind ro, a bjt's base behind rb), or −1 when it has none.
func (s *System) InternalVar(i int) int { return s.inner[i] }

// NodeVar returns the unknown of circuit node n, or −1 for gnd.
func NodeVar(n int) int { return n - 1 }

// New writes the circuit's equations.
func New(c *circuit.Circuit) *System {
	s := &System{C: c, Branch: make([]int, len(c.Parts)), ctrlOf: make([]int, len(c.Parts))}
	nodes := len(c.Nodes) - 1
	for i := range s.ctrlOf {
		s.ctrlOf[i] = -1
		s.Branch[i] = -1
	}
	// Internal nodes first, so node unknowns come before branch currents.
	inner := make([]int, len(c.Parts))
	s.inner = inner
	for i, p := range c.Parts {
		inner[i] = -1
		if p.Kind == circuit.OpAmp && p.Amp.Ro > 0 {
			inner[i] = nodes
			s.Internal = append(s.Internal, p.Name+".o")
			nodes++
		}
		if p.Kind == circuit.BJT && p.Dev.Rb > 0 {
			inner[i] = nodes
			s.Internal = append(s.Internal, p.Name+".b")
			nodes++
		}
	}
	s.Nodes = nodes
	n := nodes
	for i, p := range c.Parts {
		if p.Kind.VoltageOutput() || p.Kind == circuit.OpAmp {
			s.Branch[i] = n
			n++
		}
	}
	s.N = n
	for i, p := range c.Parts {
		a, b := -1, -1
		if len(p.Nodes) >= 2 {
			a, b = NodeVar(p.Nodes[0]), NodeVar(p.Nodes[1])
		}
		br := s.Branch[i]
		switch p.Kind {
		case circuit.Resistor:
			s.conductance(&s.g, a, b, dd.Recip(p.Value))
		case circuit.Capacitor:
			s.conductance(&s.c, a, b, dd.F(p.Value))
		case circuit.Inductor:
			s.branchKCL(a, b, br)
			s.branchV(a, b, br)
			s.add(&s.c, br, br, -p.Value)
		case circuit.VSource, circuit.VNoise:
			// A noise source is 0 V here; package noise drives its branch.
			s.branchKCL(a, b, br)
			s.branchV(a, b, br)
		case circuit.ISource, circuit.INoise:
			// Only in the right-hand side.
		case circuit.VCVS, circuit.CCVS:
			s.branchKCL(a, b, br)
			s.branchV(a, b, br)
			ctl := Control{Part: i, R: []Term{{I: br, V: 1}}}
			s.control(&ctl, p)
			s.ctrlOf[i] = len(s.Controls)
			s.Controls = append(s.Controls, ctl)
		case circuit.VCCS, circuit.CCCS:
			// Output current K·x drawn from FROM (a) into TO (b): KCL rows
			// count currents leaving a node, so the injection is −1 at TO.
			var r []Term
			if b >= 0 {
				r = append(r, Term{I: b, V: 1})
			}
			if a >= 0 {
				r = append(r, Term{I: a, V: -1})
			}
			ctl := Control{Part: i, R: r}
			s.control(&ctl, p)
			s.ctrlOf[i] = len(s.Controls)
			s.Controls = append(s.Controls, ctl)
		case circuit.OpAmp:
			plus, minus, out := NodeVar(p.Nodes[0]), NodeVar(p.Nodes[1]), NodeVar(p.Nodes[2])
			if p.Amp.Rid > 0 {
				s.conductance(&s.g, plus, minus, dd.Recip(p.Amp.Rid))
			}
			if p.Amp.Rcm > 0 {
				s.conductance(&s.g, plus, -1, dd.Recip(p.Amp.Rcm))
				s.conductance(&s.g, minus, -1, dd.Recip(p.Amp.Rcm))
			}
			src := out
			if inner[i] >= 0 {
				src = inner[i]
				s.conductance(&s.g, src, out, dd.Recip(p.Amp.Ro))
			}
			s.branchKCL(src, -1, br)
			s.branchV(src, -1, br)
			ctl := Control{Part: i, R: []Term{{I: br, V: 1}}}
			ctl.C0 = pair(plus, minus, dd.F(1))
			s.ctrlOf[i] = len(s.Controls)
			s.Controls = append(s.Controls, ctl)
			if p.Amp.Cid > 0 {
				s.conductance(&s.c, plus, minus, dd.F(p.Amp.Cid))
			}
			if p.Amp.Ccm > 0 {
				s.conductance(&s.c, plus, -1, dd.F(p.Amp.Ccm))
				s.conductance(&s.c, minus, -1, dd.F(p.Amp.Ccm))
			}
		case circuit.BJT:
			// Hybrid-π: gm·v(B′, E) drawn from C into E, the reference's
			// rank-one term; rπ, Cπ across B′–E, Cμ across B′–C, ro across
			// C–E, rb from B to the internal base B′ when present.
			c, b, e := NodeVar(p.Nodes[0]), NodeVar(p.Nodes[1]), NodeVar(p.Nodes[2])
			d := p.Dev
			bi := b
			if inner[i] >= 0 {
				bi = inner[i]
				s.conductance(&s.g, b, bi, dd.Recip(d.Rb))
			}
			s.conductance(&s.g, bi, e, dd.Recip(d.Rpi))
			if d.Ro > 0 {
				s.conductance(&s.g, c, e, dd.Recip(d.Ro))
			}
			if d.Cpi > 0 {
				s.conductance(&s.c, bi, e, dd.F(d.Cpi))
			}
			if d.Cmu > 0 {
				s.conductance(&s.c, bi, c, dd.F(d.Cmu))
			}
			ctl := Control{Part: i, R: pair(e, c, dd.F(1)), C0: pair(bi, e, dd.F(1))}
			s.ctrlOf[i] = len(s.Controls)
			s.Controls = append(s.Controls, ctl)
		case circuit.MOS:
			// gm·v(G, S) drawn from D into S, the reference's rank-one
			// term; ro across D–S, Cgs, Cgd; the body transconductance
			// gmb·v(B, S) is never a reference, so it is stamped as fixed
			// entries of G (rows count currents leaving a node).
			dn, g, sn := NodeVar(p.Nodes[0]), NodeVar(p.Nodes[1]), NodeVar(p.Nodes[2])
			d := p.Dev
			if d.Ro > 0 {
				s.conductance(&s.g, dn, sn, dd.Recip(d.Ro))
			}
			if d.Cgs > 0 {
				s.conductance(&s.c, g, sn, dd.F(d.Cgs))
			}
			if d.Cgd > 0 {
				s.conductance(&s.c, g, dn, dd.F(d.Cgd))
			}
			if d.Gmb > 0 {
				bulk := NodeVar(d.Bulk)
				s.add(&s.g, dn, bulk, d.Gmb)
				s.add(&s.g, dn, sn, -d.Gmb)
				s.add(&s.g, sn, bulk, -d.Gmb)
				s.add(&s.g, sn, sn, d.Gmb)
			}
			ctl := Control{Part: i, R: pair(sn, dn, dd.F(1)), C0: pair(g, sn, dd.F(1))}
			s.ctrlOf[i] = len(s.Controls)
			s.Controls = append(s.Controls, ctl)
		}
	}
	return s
}

// ControlOf returns the index in Controls of part i's gain term, or −1.
func (s *System) ControlOf(part int) int { return s.ctrlOf[part] }

func pair(a, b int, v dd.Float) []Term {
	var t []Term
	if a >= 0 {
		t = append(t, Term{a, v.Hi, v.Lo})
	}
	if b >= 0 {
		t = append(t, Term{b, -v.Hi, -v.Lo})
	}
	return t
}

func (s *System) control(ctl *Control, p circuit.Part) {
	switch p.Kind {
	case circuit.VCVS, circuit.VCCS:
		ctl.C0 = pair(NodeVar(p.Ctrl[0]), NodeVar(p.Ctrl[1]), dd.F(1))
	case circuit.CCVS, circuit.CCCS:
		ctl.C0, ctl.C1 = s.Current(p.Sense)
	}
}

// Current returns the sparse read-out I = (c0 + s·c1)ᵀx of the current
// through part i from its first node to its second.
func (s *System) Current(i int) (c0, c1 []Term) {
	p := s.C.Parts[i]
	a, b := NodeVar(p.Nodes[0]), NodeVar(p.Nodes[1])
	switch p.Kind {
	case circuit.Resistor:
		return pair(a, b, dd.Recip(p.Value)), nil
	case circuit.Capacitor:
		return nil, pair(a, b, dd.F(p.Value))
	}
	return []Term{{I: s.Branch[i], V: 1}}, nil
}

func (s *System) add(list *[]entry, i, j int, v float64) { s.addDD(list, i, j, dd.F(v)) }

func (s *System) addDD(list *[]entry, i, j int, v dd.Float) {
	if i >= 0 && j >= 0 {
		*list = append(*list, entry{i, j, v.Hi, v.Lo})
	}
}

func (s *System) conductance(list *[]entry, a, b int, g dd.Float) {
	s.addDD(list, a, a, g)
	s.addDD(list, b, b, g)
	s.addDD(list, a, b, g.Neg())
	s.addDD(list, b, a, g.Neg())
}

// branchKCL adds the branch current leaving node a and entering node b.
func (s *System) branchKCL(a, b, br int) {
	s.add(&s.g, a, br, 1)
	s.add(&s.g, b, br, -1)
}

// branchV writes V(a) − V(b) in the branch row.
func (s *System) branchV(a, b, br int) {
	s.add(&s.g, br, a, 1)
	s.add(&s.g, br, b, -1)
}

// Config selects the variant of the equations to assemble.
type Config struct {
	// F is the frequency in hertz.
	F float64
	// Ref is the index in Controls of the reference element, or −1.
	Ref int
	// RefGain keeps the reference's gain term; false sets it to zero.
	RefGain bool
	// Removed lists the parts (voltage sources) taken out: their branch
	// equation becomes I = 0.
	Removed []int
	// Short, when set, adds a 0 V source across the node pair; its branch
	// current is the unknown N (the last).
	Short *[2]int
}

// Size is the number of unknowns of the assembled system for cfg.
func (s *System) Size(cfg Config) int {
	if cfg.Short != nil {
		return s.N + 1
	}
	return s.N
}

// Assemble writes M(s) for cfg into dst (row-major, Size×Size, grown as
// needed) and returns it.
func (s *System) Assemble(dst []complex128, cfg Config) []complex128 {
	n := s.Size(cfg)
	if cap(dst) < n*n {
		dst = make([]complex128, n*n)
	}
	dst = dst[:n*n]
	clear(dst)
	w := 2 * math.Pi * cfg.F
	jw := complex(0, w)
	for _, e := range s.g {
		dst[e.i*n+e.j] += complex(e.v, 0)
	}
	if w != 0 {
		for _, e := range s.c {
			dst[e.i*n+e.j] += complex(0, w*e.v)
		}
	}
	for ci, ctl := range s.Controls {
		if ci == cfg.Ref && !cfg.RefGain {
			continue
		}
		k := s.C.Parts[ctl.Part].Gain(cfg.F)
		for _, r := range ctl.R {
			kr := k * complex(r.V, 0)
			for _, c := range ctl.C0 {
				dst[r.I*n+c.I] -= kr * complex(c.V, 0)
			}
			for _, c := range ctl.C1 {
				dst[r.I*n+c.I] -= kr * jw * complex(c.V, 0)
			}
		}
	}
	for _, pi := range cfg.Removed {
		br := s.Branch[pi]
		// I = 0: clear the row and the column, so the source's KCL
		// entries do not dwarf what else meets at its nodes.
		clear(dst[br*n : br*n+n])
		for i := 0; i < n; i++ {
			dst[i*n+br] = 0
		}
		dst[br*n+br] = 1
	}
	if cfg.Short != nil {
		a, b, br := NodeVar(cfg.Short[0]), NodeVar(cfg.Short[1]), s.N
		if a >= 0 {
			dst[a*n+br] += 1
			dst[br*n+a] += 1
		}
		if b >= 0 {
			dst[b*n+br] -= 1
			dst[br*n+b] -= 1
		}
	}
	return dst
}

// Scatter writes t into the dense vector dst (after clearing it).
func Scatter(dst []complex128, t []Term) {
	clear(dst)
	for _, e := range t {
		dst[e.I] += complex(e.V, 0)
	}
}

// Dot returns tᵀx for a sparse t.
func Dot(t []Term, x []complex128) complex128 {
	var s complex128
	for _, e := range t {
		s += complex(e.V, 0) * x[e.I]
	}
	return s
}
