package feedback_test

import (
	"math"
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

func benchAnalyzer(b testing.TB, text string, ports [][3]string, gain *[3]string) *feedback.Analyzer {
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
	benchSweepTol(b, text, ports, gain, n, 0)
}

// benchSweepTol is benchSweep with Analyzer.Tol = tol: +Inf computes every
// bound but refines nothing, the cost of the checks alone.
func benchSweepTol(b *testing.B, text string, ports [][3]string, gain *[3]string, n int, tol float64) {
	a := benchAnalyzer(b, text, ports, gain)
	a.Tol = tol
	grid := floats.LogSpan(make([]float64, n), 10, 100e6)
	b.ReportAllocs()
	m0, sweeps := a.MulAdds(), 0
	for b.Loop() {
		if _, err := a.Sweep(grid); err != nil {
			b.Fatal(err)
		}
		sweeps++
	}
	// The complex multiply-adds a point needs (factorizations, solves,
	// residual bounds), against which the benchmark's ratios (build/bench/ratios) time it.
	b.ReportMetric(float64(a.MulAdds()-m0)/float64(sweeps*n), "muladds/point")
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

// Time per point grows about linearly with the nodes: 200 against 50.
func BenchmarkSweep200NodeLadder100(b *testing.B) {
	benchSweep(b, circuit.Ladder(200), [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out"}, 100)
}

func BenchmarkSweep50NodeLadder100(b *testing.B) {
	benchSweep(b, circuit.Ladder(50), [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}}, &[3]string{"Vin", "out"}, 100)
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

// wellConditioned is an inverting stage with everyday values (invented):
// source resistance, gain-setting pair with a feedback capacitor, an opamp
// with two poles, rid and ro, and an RC load. No value it reports needs
// refinement, so its sweep measures what the error bounds cost.
const wellConditioned = `
vsource Vin src gnd 1
resistor Rs src in 600
resistor R1 in sum 10k
resistor R2 out sum 47k
capacitor Cf out sum 10p
opamp U1 gnd sum oi a0=200k gbw=10M p2=50M rid=1M ro=50
resistor Riso oi out 10
capacitor CL out gnd 100p
resistor RL out gnd 10k
`

var portsWell = [][3]string{{"in", "src", "gnd"}, {"out", "out", "gnd"}}

func BenchmarkSweepWellConditioned400(b *testing.B) {
	benchSweep(b, wellConditioned, portsWell, &[3]string{"Vin", "out"}, 400)
}

// electrometer is the electrometer-input buffer of
// TestElectrometerInputSweep: every point's input impedance needs
// refinement, many of them the double-double factorization.
const electrometer = "vsource Vin src gnd 1\nresistor Rs src in 50\nopamp U1 in out out a0=1e6 gbw=10M rid=1T\nresistor RL out gnd 10k\n"

func BenchmarkSweepElectrometer400(b *testing.B) {
	benchSweep(b, electrometer, [][3]string{{"in", "src", "gnd"}}, &[3]string{"Vin", "out"}, 400)
}

func BenchmarkSweepWellConditioned400Unrefined(b *testing.B) {
	benchSweepTol(b, wellConditioned, portsWell, &[3]string{"Vin", "out"}, 400, math.Inf(1))
}

func BenchmarkSweep10Node2Port400Unrefined(b *testing.B) {
	benchSweepTol(b, bench10, ports10, &[3]string{"Vin", "o2"}, 400, math.Inf(1))
}

func BenchmarkSweepElectrometer400Unrefined(b *testing.B) {
	benchSweepTol(b, electrometer, [][3]string{{"in", "src", "gnd"}}, &[3]string{"Vin", "out"}, 400, math.Inf(1))
}
