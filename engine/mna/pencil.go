package mna

import (
	"math"

	"zport/engine/circuit"
	"zport/engine/dd"
)

// Pencil is the circuit's equations with every gain at its value (the
// closed loop) written as a real matrix pencil,
//
//	(G + s·C)·x = b·u,
//
// the form in which its natural frequencies are the finite s where
// G + s·C is singular, and in which it can be evaluated at any complex s.
// The unknowns are the System's, followed by one internal state for each
// pole of each opamp: A(s) = a0/((1 + s/ω1)(1 + s/ω2)) is not a constant,
// so it is realised as
//
//	(1 + s/ω1)·y1 = a0·(V(PLUS) − V(MINUS)),  (1 + s/ω2)·y2 = y1,
//
// with the internal source forcing the last state (y2, or y1 with one
// pole, or a0·(V(PLUS) − V(MINUS)) with none). A current-controlled source
// sensing a capacitor, whose control is s·C·V, puts its gain into C.
// At s = j2πf, eliminating the states gives back exactly the matrix that
// System.Assemble writes with the reference gain on.
type Pencil struct {
	// N is the number of unknowns: System.N, then the opamps' states.
	N int
	// G and C are N×N, row-major.
	G, C []float64
	// States names each internal state ("U1.p1", "U1.p2"), indexed from
	// System.N.
	States []string
}

// Pencil writes the pencil of the circuit with every controlled source at
// its gain.
func (s *System) Pencil() *Pencil {
	n := s.N
	var states []string
	for _, ctl := range s.Controls {
		p := s.C.Parts[ctl.Part]
		if p.Kind == circuit.OpAmp {
			for k, w := range poles(p.Amp) {
				if w > 0 {
					states = append(states, p.Name+".p"+string(rune('1'+k)))
				}
			}
		}
	}
	N := n + len(states)
	P := &Pencil{N: N, G: make([]float64, N*N), C: make([]float64, N*N), States: states}
	for _, e := range s.g {
		P.G[e.i*N+e.j] += e.v
	}
	for _, e := range s.c {
		P.C[e.i*N+e.j] += e.v
	}
	next := n
	for _, ctl := range s.Controls {
		p := s.C.Parts[ctl.Part]
		if p.Kind != circuit.OpAmp {
			// −k·r·(c0 + s·c1)ᵀ, as Assemble writes it.
			for _, r := range ctl.R {
				for _, c := range ctl.C0 {
					P.G[r.I*N+c.I] -= p.Value * r.V * c.V
				}
				for _, c := range ctl.C1 {
					P.C[r.I*N+c.I] -= p.Value * r.V * c.V
				}
			}
			continue
		}
		// The internal source's branch row reads V(src) − (drive) = 0;
		// the drive is a0·vd, or the last pole state.
		br := ctl.R[0].I
		gain, from := p.Amp.A0, ctl.C0 // the drive of the next stage: gain·(from)
		for _, w := range poles(p.Amp) {
			if !(w > 0) {
				continue
			}
			y := next
			next++
			// (1 + s/ω)·y − gain·(from) = 0
			P.G[y*N+y] = 1
			P.C[y*N+y] = 1 / w
			for _, c := range from {
				P.G[y*N+c.I] -= gain * c.V
			}
			gain, from = 1, []Term{{I: y, V: 1}}
		}
		for _, c := range from {
			P.G[br*N+c.I] -= gain * c.V
		}
	}
	return P
}

// poles returns an opamp's pole frequencies ω1, ω2 in rad/s, 0 where the
// pole is absent (see circuit.Amp.Gain).
func poles(a *circuit.Amp) [2]float64 {
	var w [2]float64
	if a.GBW > 0 {
		w[0] = 2 * math.Pi * a.GBW / a.A0
	}
	if a.P2 > 0 {
		w[1] = 2 * math.Pi * a.P2
	}
	return w
}

// Excitation returns where a unit of the independent source part enters
// the equations: a voltage source's branch row, or a current source's
// injection into its TO node (and out of its FROM node).
func (s *System) Excitation(part int) []Term {
	p := s.C.Parts[part]
	if p.Kind == circuit.VSource {
		return []Term{{I: s.Branch[part], V: 1}}
	}
	return pair(NodeVar(p.Nodes[1]), NodeVar(p.Nodes[0]), dd.F(1))
}

// Across returns the read-out V(a) − V(b) of two circuit nodes.
func Across(a, b int) []Term { return pair(NodeVar(a), NodeVar(b), dd.F(1)) }
