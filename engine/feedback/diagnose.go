package feedback

import (
	"errors"
	"fmt"
	"slices"
	"sort"
	"strings"

	"zport/engine/circuit"
	"zport/engine/mna"
	"zport/engine/value"
)

func fmtHz(f float64) string { return value.Format(f, "Hz", 4) }

// SingularError explains why the circuit equations have no unique solution,
// naming the nodes or parts involved.
type SingularError struct {
	F     float64
	Nodes []string
	Parts []string
	Msg   string
}

func (e *SingularError) Error() string { return e.Msg }

// explain turns a failed factorization into a SingularError that names what
// is wrong, by looking at the circuit's graph under cfg.
func (a *Analyzer) explain(err error, cfg mna.Config, context string) error {
	var s *mna.Singular
	if !errors.As(err, &s) {
		return err
	}
	if se := a.structure(cfg, context); se != nil {
		return se
	}
	ctx := ""
	if context != "" {
		ctx = " " + context
	}
	c := a.C
	// 3. The structure is sound, so the values cancel.
	where := ""
	if s.Index >= 0 && s.Index < len(c.Nodes)-1 {
		where = fmt.Sprintf(" (near node %s)", c.Nodes[s.Index+1])
	}
	return &SingularError{F: cfg.F, Msg: fmt.Sprintf("the circuit equations are singular at %s%s%s: controlled-source gains or part values cancel exactly, or impedances so unlike meet at one node (say 1 mΩ beside 10³⁰ Ω) that even double-double arithmetic, with some 32 digits, cannot tell them apart; change one of them", fmtHz(cfg.F), ctx, where)}
}

// structure checks the circuit's graph under cfg for the two ways a
// circuit's equations fail whatever its values: nodes that nothing ties to
// gnd, and loops of parts that each force a voltage. It returns nil when the
// structure is sound.
func (a *Analyzer) structure(cfg mna.Config, context string) *SingularError {
	c := a.C
	ctx := ""
	if context != "" {
		ctx = " " + context
	}
	removed := map[int]bool{}
	for _, r := range cfg.Removed {
		removed[r] = true
	}
	dc := cfg.F == 0
	refIdx := a.Ref
	// 1. Nodes with no path to gnd through parts that fix a voltage.
	uf := newUF(len(c.Nodes))
	for i, p := range c.Parts {
		switch p.Kind {
		case circuit.ISource, circuit.INoise, circuit.CCCS:
			continue
		case circuit.VCCS:
			// A transconductance whose control includes its own output
			// node acts as a conductance there (a diode-connected device).
			if i == refIdx && !cfg.RefGain {
				continue
			}
			out := [2]int{p.Nodes[0], p.Nodes[1]}
			if p.Ctrl[0] == out[0] || p.Ctrl[0] == out[1] || p.Ctrl[1] == out[0] || p.Ctrl[1] == out[1] {
				uf.union(out[0], out[1])
			}
			continue
		case circuit.Capacitor:
			if dc {
				continue
			}
		case circuit.VSource:
			if removed[i] {
				continue
			}
		case circuit.OpAmp:
			uf.union(p.Nodes[2], circuit.Gnd)
			if p.Amp.Rid > 0 {
				uf.union(p.Nodes[0], p.Nodes[1])
			}
			if p.Amp.Rcm > 0 || p.Amp.Ccm > 0 && !dc {
				uf.union(p.Nodes[0], circuit.Gnd)
				uf.union(p.Nodes[1], circuit.Gnd)
			}
			if p.Amp.Cid > 0 && !dc {
				uf.union(p.Nodes[0], p.Nodes[1])
			}
			continue
		case circuit.BJT, circuit.MOS:
			transistorTies(uf, p, dc, i == refIdx && !cfg.RefGain)
			continue
		}
		uf.union(p.Nodes[0], p.Nodes[1])
	}
	if cfg.Short != nil {
		uf.union(cfg.Short[0], cfg.Short[1])
	}
	sourceTies(uf, c, refIdx, cfg.RefGain)
	var floating []string
	for n := 1; n < len(c.Nodes); n++ {
		if uf.find(n) != uf.find(circuit.Gnd) {
			floating = append(floating, c.Nodes[n])
		}
	}
	if len(floating) > 0 {
		if dc {
			var caps []string
			for _, p := range c.Parts {
				if p.Kind == circuit.Capacitor && (slices.Contains(floating, c.Nodes[p.Nodes[0]]) || slices.Contains(floating, c.Nodes[p.Nodes[1]])) {
					caps = append(caps, p.Name)
				}
			}
			if len(caps) > 0 {
				return &SingularError{F: cfg.F, Nodes: floating, Parts: caps, Msg: fmt.Sprintf(
					"at DC (f = 0)%s, %s %s reached only through capacitors (%s), which are open at DC; add a DC path (a resistor to gnd) or analyze at f > 0",
					ctx, plural(len(floating), "node", "nodes"), list(floating), strings.Join(caps, ", "))}
			}
		}
		return &SingularError{F: cfg.F, Nodes: floating, Msg: fmt.Sprintf(
			"%s %s %s%s: no part that sets a voltage connects %s to gnd (current sources alone cannot)",
			plural(len(floating), "node", "nodes"), list(floating), plural(len(floating), "floats", "float"), ctx, plural(len(floating), "it", "them"))}
	}
	// 2. Loops of parts that force a voltage.
	vf := newUF(len(c.Nodes))
	type edge struct {
		a, b int
		name string
	}
	var edges []edge
	for i, p := range c.Parts {
		switch {
		case p.Kind == circuit.VSource && removed[i]:
			continue
		case p.Kind == circuit.VSource || p.Kind == circuit.VNoise || p.Kind == circuit.VCVS || p.Kind == circuit.CCVS || p.Kind == circuit.Inductor && dc:
			edges = append(edges, edge{p.Nodes[0], p.Nodes[1], p.Name})
		case p.Kind == circuit.OpAmp && p.Amp.Ro == 0:
			edges = append(edges, edge{p.Nodes[2], circuit.Gnd, p.Name + " (output)"})
		}
	}
	if cfg.Short != nil {
		edges = append(edges, edge{cfg.Short[0], cfg.Short[1], "the port short"})
	}
	for i, e := range edges {
		if vf.find(e.a) == vf.find(e.b) {
			path := pathBetween(e.a, e.b, len(c.Nodes), func(yield func(a, b int, name string)) {
				for _, f := range edges[:i] {
					yield(f.a, f.b, f.name)
				}
			})
			parts := append(path, e.name)
			sort.Strings(parts)
			what := "a loop of voltage sources"
			if dc {
				what = "at DC, a loop of voltage sources and inductors"
			}
			return &SingularError{F: cfg.F, Parts: parts, Msg: fmt.Sprintf("%s form %s%s: their voltages cannot all hold (remove one or add series resistance)", list(parts), what, ctx)}
		}
		vf.union(e.a, e.b)
	}
	return nil
}

// transistorTies joins what a transistor's passive parts join: for a bjt,
// B to E through rb and rπ (always present), C to E through ro, and B to C
// through Cμ when f > 0; for a mos, D to S through ro, G to S and G to D
// through Cgs and Cgd when f > 0, and D to S through a diode connection
// (gate on drain) of its working transconductance. The gate itself draws
// no current, so a gate that nothing else reaches floats.
func transistorTies(uf uf, p circuit.Part, dc, gainOff bool) {
	d := p.Dev
	n0, n1, n2 := p.Nodes[0], p.Nodes[1], p.Nodes[2]
	if d.Ro > 0 {
		uf.union(n0, n2)
	}
	switch p.Kind {
	case circuit.BJT:
		uf.union(n1, n2)
		if d.Cmu > 0 && !dc {
			uf.union(n1, n0)
		}
	case circuit.MOS:
		if d.Cgs > 0 && !dc {
			uf.union(n1, n2)
		}
		if d.Cgd > 0 && !dc {
			uf.union(n1, n0)
		}
		if n0 == n1 && !gainOff {
			uf.union(n0, n2)
		}
	}
}

// sourceTies adds the ties of the mos transconductances: gm·v(G, S) fixes
// the source's voltage once the gate's is fixed (a source follower), and
// gmb·v(B, S) likewise through the bulk — but never the other way, since
// the gate and the bulk draw no current. Repeated until nothing changes,
// for chains of followers.
func sourceTies(u uf, c *circuit.Circuit, refIdx int, refGain bool) {
	for changed := true; changed; {
		changed = false
		for i, p := range c.Parts {
			if p.Kind != circuit.MOS {
				continue
			}
			s := p.Nodes[2]
			for _, ctl := range []int{p.Nodes[1], p.Dev.Bulk} {
				on := ctl == p.Nodes[1] && !(i == refIdx && !refGain) || ctl == p.Dev.Bulk && p.Dev.Gmb > 0
				if on && u.find(ctl) == u.find(circuit.Gnd) && u.find(s) != u.find(circuit.Gnd) {
					u.union(s, ctl)
					changed = true
				}
			}
		}
	}
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

func list(names []string) string {
	const max = 8
	if len(names) > max {
		return strings.Join(names[:max], ", ") + fmt.Sprintf(" and %d more", len(names)-max)
	}
	return strings.Join(names, ", ")
}

type uf []int

func newUF(n int) uf {
	u := make(uf, n)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u uf) find(i int) int {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

func (u uf) union(a, b int) { u[u.find(a)] = u.find(b) }

// pathBetween finds the edge names on a path from a to b in a forest.
func pathBetween(a, b, n int, edges func(yield func(a, b int, name string))) []string {
	type adj struct {
		to   int
		name string
	}
	g := make([][]adj, n)
	edges(func(x, y int, name string) {
		g[x] = append(g[x], adj{y, name})
		g[y] = append(g[y], adj{x, name})
	})
	prev := make([]int, n)
	via := make([]string, n)
	for i := range prev {
		prev[i] = -2
	}
	prev[a] = -1
	queue := []int{a}
	for len(queue) > 0 {
		v := queue[0]
		queue = queue[1:]
		if v == b {
			break
		}
		for _, e := range g[v] {
			if prev[e.to] == -2 {
				prev[e.to] = v
				via[e.to] = e.name
				queue = append(queue, e.to)
			}
		}
	}
	if prev[b] == -2 {
		return nil
	}
	var names []string
	for v := b; v != a && v >= 0 && prev[v] != -2; v = prev[v] {
		names = append(names, via[v])
	}
	return names
}
