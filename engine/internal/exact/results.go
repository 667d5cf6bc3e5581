package exact

import "zport/engine/circuit"

// Port is a node pair (A is the + side).
type Port struct{ A, B int }

// Gain asks for the gain from independent source Source (part index) to
// the node pair OutA − OutB.
type Gain struct{ Source, OutA, OutB int }

// PortResult holds one port's quantities; nil where the equations that
// define one are singular (the quantity is infinite or undefined).
type PortResult struct {
	Z0, TShort, TOpen, Z *Complex
}

// GainResult holds the gain's quantities, nil where undefined.
type GainResult struct {
	G0, GInf, G *Complex
}

// Result is everything at one frequency.
type Result struct {
	T     *Complex
	Ports []PortResult
	Gain  *GainResult
}

// Analyze computes the quantities of c at f for reference part ref.
func Analyze(c *circuit.Circuit, ref int, f float64, ports []Port, gain *Gain) *Result {
	res := &Result{}
	k := (&system{c: c, s: Setup{F: f}, w: jw(f)}).gain(&c.Parts[ref])
	// T = −k·c with the port as the circuit has it.
	ret := func(s Setup) *Complex {
		s.F, s.Ref, s.Mode, s.Source = f, ref, Test, -1
		sol, err := Solve(c, s)
		if err != nil {
			return nil
		}
		t := neg(mul(k, sol.Control(ref)))
		return &t
	}
	// v is the voltage of node pair (a, b) for setup s.
	v := func(s Setup, a, b int) *Complex {
		s.F, s.Ref = f, ref
		sol, err := Solve(c, s)
		if err != nil {
			return nil
		}
		x := sol.V(a, b)
		return &x
	}
	res.T = ret(Setup{})
	for _, p := range ports {
		drv := drivers(c, p.A, p.B)
		inj := &[2]int{p.A, p.B}
		var pr PortResult
		pr.Z0 = v(Setup{Mode: Zero, Open: drv, Inject: inj, Source: -1}, p.A, p.B)
		pr.Z = v(Setup{Mode: Full, Open: drv, Inject: inj, Source: -1}, p.A, p.B)
		pr.TOpen = ret(Setup{Open: drv})
		if len(drv) > 0 {
			pr.TShort = ret(Setup{}) // the driver, zeroed, is the short
		} else {
			pr.TShort = ret(Setup{Short: &[2]int{p.A, p.B}})
		}
		res.Ports = append(res.Ports, pr)
	}
	if gain != nil {
		res.Gain = &GainResult{
			G0:   v(Setup{Mode: Zero, Source: gain.Source}, gain.OutA, gain.OutB),
			GInf: v(Setup{Mode: Nullor, Source: gain.Source}, gain.OutA, gain.OutB),
			G:    v(Setup{Mode: Full, Source: gain.Source}, gain.OutA, gain.OutB),
		}
	}
	return res
}

func jw(f float64) Complex {
	pi, _ := newF().SetString(piText)
	w := newF().SetFloat64(f)
	w.Mul(w, pi)
	w.Mul(w, newF().SetFloat64(2))
	return Complex{newF(), w}
}

// drivers are the voltage sources wired exactly across nodes a and b.
func drivers(c *circuit.Circuit, a, b int) []int {
	var d []int
	for i, p := range c.Parts {
		if p.Kind == circuit.VSource && (p.Nodes[0] == a && p.Nodes[1] == b || p.Nodes[0] == b && p.Nodes[1] == a) {
			d = append(d, i)
		}
	}
	return d
}

// Blackman returns Z₀·(1 + T short)/(1 + T open), nil when a term is nil
// or 1 + T open is zero.
func (p PortResult) Blackman() *Complex {
	if p.Z0 == nil || p.TShort == nil || p.TOpen == nil {
		return nil
	}
	one := cf(1, 0)
	den := add(one, *p.TOpen)
	if den.isZero() {
		return nil
	}
	z := quo(mul(*p.Z0, add(one, *p.TShort)), den)
	return &z
}
