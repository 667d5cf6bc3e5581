package exact

import "zport/engine/circuit"

// RefMode is what the reference element does in one set of equations.
type RefMode int

const (
	// Full keeps the reference's gain k.
	Full RefMode = iota
	// Zero sets its gain to zero.
	Zero
	// Test replaces its output by an independent source of value 1.
	Test
	// Nullor makes its output whatever holds its control signal at zero.
	Nullor
)

// Setup is one set of equations.
type Setup struct {
	F    float64
	Ref  int // part index of the reference element
	Mode RefMode
	// Open lists voltage sources removed (open circuits carrying no
	// current).
	Open []int
	// Short, when set, joins a node pair by a 0 V source.
	Short *[2]int
	// Inject, when set, drives 1 A into node Inject[0] out of Inject[1].
	Inject *[2]int
	// Source, when ≥ 0, is the independent source set to 1 (V or A); every
	// other independent source is zero.
	Source int
}

// Solution is the node voltages and sensed currents of one Setup.
type Solution struct {
	c   *circuit.Circuit
	x   []Complex
	s   Setup
	sys *system
}

// V returns V(a) − V(b).
func (s *Solution) V(a, b int) Complex { return sub(s.node(a), s.node(b)) }

func (s *Solution) node(n int) Complex {
	if n == circuit.Gnd {
		return zero()
	}
	return s.x[n-1]
}

// Control returns the control signal of part i (a node-voltage difference
// or a sensed current).
func (s *Solution) Control(i int) Complex { return s.sys.control(s.x, i) }

// system is the unknowns' layout of one Setup.
type system struct {
	c      *circuit.Circuit
	s      Setup
	w      Complex // jω
	n      int
	inner  []int // part → internal node unknown (opamp with ro), or −1
	branch []int // part → branch current unknown, or −1
	short  int   // unknown of the port short's current, or −1
	free   int   // unknown of the nullor's output, or −1
	open   map[int]bool
}

// Solve writes and solves the equations of setup for c.
func Solve(c *circuit.Circuit, setup Setup) (*Solution, error) {
	sys := &system{c: c, s: setup, open: map[int]bool{}, short: -1, free: -1}
	for _, o := range setup.Open {
		sys.open[o] = true
	}
	sys.w = jw(setup.F)
	n := len(c.Nodes) - 1
	sys.inner = make([]int, len(c.Parts))
	sys.branch = make([]int, len(c.Parts))
	for i, p := range c.Parts {
		sys.inner[i], sys.branch[i] = -1, -1
		if p.Kind == circuit.OpAmp && p.Amp.Ro > 0 {
			sys.inner[i] = n
			n++
		}
	}
	for i, p := range c.Parts {
		voltage := p.Kind == circuit.Inductor || p.Kind == circuit.VSource && !sys.open[i] ||
			p.Kind == circuit.VCVS || p.Kind == circuit.CCVS || p.Kind == circuit.OpAmp
		if voltage {
			sys.branch[i] = n
			n++
		}
	}
	if setup.Short != nil {
		sys.short = n
		n++
	}
	if setup.Mode == Nullor {
		sys.free = n
		n++
	}
	sys.n = n
	a := make([][]Complex, n)
	for i := range a {
		a[i] = make([]Complex, n)
		for j := range a[i] {
			a[i][j] = zero()
		}
	}
	b := make([]Complex, n)
	for i := range b {
		b[i] = zero()
	}
	sys.write(a, b)
	x, err := solve(a, b)
	if err != nil {
		return nil, err
	}
	return &Solution{c: c, x: x, s: setup, sys: sys}, nil
}

func nodeVar(n int) int { return n - 1 }

// addTo adds v at (i, j) when both are unknowns.
func addTo(a [][]Complex, i, j int, v Complex) {
	if i >= 0 && j >= 0 {
		a[i][j] = add(a[i][j], v)
	}
}

// admittance stamps y between unknowns p and q (−1 for gnd).
func admittance(a [][]Complex, p, q int, y Complex) {
	addTo(a, p, p, y)
	addTo(a, q, q, y)
	addTo(a, p, q, neg(y))
	addTo(a, q, p, neg(y))
}

// voltageBranch writes a branch current br leaving p and entering q, and
// the first half of its branch equation, V(p) − V(q).
func voltageBranch(a [][]Complex, p, q, br int) {
	one := cf(1, 0)
	addTo(a, p, br, one)
	addTo(a, q, br, neg(one))
	addTo(a, br, p, one)
	addTo(a, br, q, neg(one))
}

// gain is the controlled gain of part p at jω.
func (sys *system) gain(p *circuit.Part) Complex {
	if p.Kind != circuit.OpAmp {
		return cf(p.Value, 0)
	}
	am := p.Amp
	// a0 / ((1 + jω/ω1)(1 + jω/ω2)), ω1 = 2π·gbw/a0, ω2 = 2π·p2: the 2π
	// cancels, leaving f·a0/gbw and f/p2.
	den := cf(1, 0)
	f := newF().SetFloat64(sys.s.F)
	if am.GBW > 0 {
		t := newF().Mul(f, newF().SetFloat64(am.A0))
		t.Quo(t, newF().SetFloat64(am.GBW))
		den = mul(den, Complex{newF().SetFloat64(1), t})
	}
	if am.P2 > 0 {
		t := newF().Quo(f, newF().SetFloat64(am.P2))
		den = mul(den, Complex{newF().SetFloat64(1), t})
	}
	return quo(cf(am.A0, 0), den)
}

// controlRow returns the control signal of part i as coefficients on the
// unknowns: a node-voltage difference, or the sensed part's current.
func (sys *system) controlRow(i int) map[int]Complex {
	c := sys.c
	p := &c.Parts[i]
	row := map[int]Complex{}
	put := func(j int, v Complex) {
		if j < 0 {
			return
		}
		if old, ok := row[j]; ok {
			v = add(old, v)
		}
		row[j] = v
	}
	switch p.Kind {
	case circuit.VCVS, circuit.VCCS:
		put(nodeVar(p.Ctrl[0]), cf(1, 0))
		put(nodeVar(p.Ctrl[1]), cf(-1, 0))
	case circuit.OpAmp:
		put(nodeVar(p.Nodes[0]), cf(1, 0))
		put(nodeVar(p.Nodes[1]), cf(-1, 0))
	default:
		s := &c.Parts[p.Sense]
		sa, sb := nodeVar(s.Nodes[0]), nodeVar(s.Nodes[1])
		switch s.Kind {
		case circuit.Resistor:
			g := quo(cf(1, 0), cf(s.Value, 0))
			put(sa, g)
			put(sb, neg(g))
		case circuit.Capacitor:
			y := mul(sys.w, cf(s.Value, 0))
			put(sa, y)
			put(sb, neg(y))
		default:
			if br := sys.branch[p.Sense]; br >= 0 {
				put(br, cf(1, 0))
			}
			// A removed source carries no current: the row stays empty.
		}
	}
	return row
}

func (sys *system) control(x []Complex, i int) Complex {
	s := zero()
	for j, v := range sys.controlRow(i) {
		s = add(s, mul(v, x[j]))
	}
	return s
}

func (sys *system) write(a [][]Complex, b []Complex) {
	c, st := sys.c, sys.s
	for i := range c.Parts {
		p := &c.Parts[i]
		var pa, pb int = -1, -1
		if len(p.Nodes) >= 2 {
			pa, pb = nodeVar(p.Nodes[0]), nodeVar(p.Nodes[1])
		}
		br := sys.branch[i]
		switch p.Kind {
		case circuit.Resistor:
			admittance(a, pa, pb, quo(cf(1, 0), cf(p.Value, 0)))
		case circuit.Capacitor:
			admittance(a, pa, pb, mul(sys.w, cf(p.Value, 0)))
		case circuit.Inductor:
			voltageBranch(a, pa, pb, br)
			addTo(a, br, br, neg(mul(sys.w, cf(p.Value, 0))))
		case circuit.VSource:
			if sys.open[i] {
				continue
			}
			voltageBranch(a, pa, pb, br)
			if st.Source == i {
				b[br] = add(b[br], cf(1, 0))
			}
		case circuit.ISource:
			// Drives into TO (pb) from FROM (pa).
			if st.Source == i {
				if pb >= 0 {
					b[pb] = add(b[pb], cf(1, 0))
				}
				if pa >= 0 {
					b[pa] = add(b[pa], cf(-1, 0))
				}
			}
		case circuit.VCVS, circuit.CCVS:
			voltageBranch(a, pa, pb, br)
			sys.output(a, b, i, br, -1, -1)
		case circuit.VCCS, circuit.CCCS:
			// Output current drawn from FROM (pa) into TO (pb).
			sys.output(a, b, i, -1, pb, pa)
		case circuit.OpAmp:
			plus, minus, out := nodeVar(p.Nodes[0]), nodeVar(p.Nodes[1]), nodeVar(p.Nodes[2])
			if p.Amp.Rid > 0 {
				admittance(a, plus, minus, quo(cf(1, 0), cf(p.Amp.Rid, 0)))
			}
			if p.Amp.Rcm > 0 {
				g := quo(cf(1, 0), cf(p.Amp.Rcm, 0))
				admittance(a, plus, -1, g)
				admittance(a, minus, -1, g)
			}
			src := out
			if in := sys.inner[i]; in >= 0 {
				src = in
				admittance(a, src, out, quo(cf(1, 0), cf(p.Amp.Ro, 0)))
			}
			voltageBranch(a, src, -1, br)
			sys.output(a, b, i, br, -1, -1)
		}
	}
	if st.Short != nil {
		voltageBranch(a, nodeVar(st.Short[0]), nodeVar(st.Short[1]), sys.short)
	}
	if st.Inject != nil {
		if p := nodeVar(st.Inject[0]); p >= 0 {
			b[p] = add(b[p], cf(1, 0))
		}
		if q := nodeVar(st.Inject[1]); q >= 0 {
			b[q] = add(b[q], cf(-1, 0))
		}
	}
}

// output writes what controlled part i produces: for a voltage output the
// rest of its branch equation (row br), for a current output the current
// into node to out of node from. The reference follows the Setup's mode.
func (sys *system) output(a [][]Complex, b []Complex, i, br, to, from int) {
	p := &sys.c.Parts[i]
	mode := Full
	if i == sys.s.Ref {
		mode = sys.s.Mode
	}
	ctl := sys.controlRow(i)
	// inject adds v·(the unknown or constant) to the output.
	switch mode {
	case Full:
		k := sys.gain(p)
		for j, v := range ctl {
			kv := mul(k, v)
			if br >= 0 {
				addTo(a, br, j, neg(kv)) // V(p) − V(n) − k·ctl = 0
			} else {
				addTo(a, to, j, neg(kv)) // KCL rows count currents leaving
				addTo(a, from, j, kv)
			}
		}
	case Zero:
	case Test:
		if br >= 0 {
			b[br] = add(b[br], cf(1, 0))
		} else {
			if to >= 0 {
				b[to] = add(b[to], cf(1, 0))
			}
			if from >= 0 {
				b[from] = add(b[from], cf(-1, 0))
			}
		}
	case Nullor:
		s := sys.free
		if br >= 0 {
			addTo(a, br, s, cf(-1, 0))
		} else {
			addTo(a, to, s, cf(-1, 0))
			addTo(a, from, s, cf(1, 0))
		}
		for j, v := range ctl {
			addTo(a, s, j, v)
		}
	}
}
