package feedback_test

import (
	"testing"

	"gonum.org/v1/gonum/floats"

	"zport/engine/circuit"
	"zport/engine/feedback"
)

// bench10 is a 10-node op-amp stage (invented values): a non-inverting
// amplifier with source network, a two-pole feedback network and an RC load.
const bench10 = `
vsource Vin src gnd 1
resistor Rs src n1 50
capacitor Cs n1 gnd 10p
resistor Rin n1 in 1k
opamp U1 in fb out a0=100k gbw=10M p2=50M rid=1M rcm=1G ro=50
resistor R1 fb gnd 1k
resistor R2 out f1 4.7k
capacitor C2 f1 gnd 100p
resistor R3 f1 fb 4.7k
capacitor Cf out fb 10p
resistor Riso out o2 20
capacitor CL o2 gnd 1n
resistor RL o2 gnd 10k
resistor Rx o2 o3 100
capacitor Cx o3 gnd 47p
`

func benchAnalyzer(b *testing.B, text string, ports [][3]string, gain *[3]string) *feedback.Analyzer {
	c, err := circuit.Parse(text)
	if err != nil {
		b.Fatal(err)
	}
	var ps []feedback.Port
	for _, p := range ports {
		a, _ := c.Node(p[1])
		bb, _ := c.Node(p[2])
		ps = append(ps, feedback.Port{Name: p[0], A: a, B: bb})
	}
	var g *feedback.Gain
	if gain != nil {
		oa, _ := c.Node(gain[1])
		for i, p := range c.Parts {
			if p.Name == gain[0] {
				g = &feedback.Gain{Source: i, OutA: oa}
			}
		}
	}
	a, err := feedback.New(c, "U1", ps, g)
	if err != nil {
		b.Fatal(err)
	}
	return a
}

var ports10 = [][3]string{{"in", "src", "gnd"}, {"out", "o2", "gnd"}}

func BenchmarkSpot10Node2Port(b *testing.B) {
	a := benchAnalyzer(b, bench10, ports10, &[3]string{"Vin", "o2"})
	b.ReportAllocs()
	f := 1e3
	for b.Loop() {
		f *= 1.0001 // a new frequency each time, so nothing is cached
		if _, err := a.At(f); err != nil {
			b.Fatal(err)
		}
	}
}

func benchSweep(b *testing.B, text string, ports [][3]string, gain *[3]string, n int) {
	a := benchAnalyzer(b, text, ports, gain)
	grid := floats.LogSpan(make([]float64, n), 10, 100e6)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := a.Sweep(grid); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSweep10Node2Port100(b *testing.B) {
	benchSweep(b, bench10, ports10, &[3]string{"Vin", "o2"}, 100)
}

func BenchmarkSweep10Node2Port400(b *testing.B) {
	benchSweep(b, bench10, ports10, &[3]string{"Vin", "o2"}, 400)
}

func BenchmarkSweep10Node2Port1600(b *testing.B) {
	benchSweep(b, bench10, ports10, &[3]string{"Vin", "o2"}, 1600)
}

func BenchmarkSweep50NodeLadder400(b *testing.B) {
	benchSweep(b, circuit.Ladder(50), [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out"}, 400)
}

func BenchmarkSpot50NodeLadder(b *testing.B) {
	a := benchAnalyzer(b, circuit.Ladder(50), [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out"})
	f := 1e3
	for b.Loop() {
		f *= 1.0001
		if _, err := a.At(f); err != nil {
			b.Fatal(err)
		}
	}
}
