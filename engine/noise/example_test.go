package noise_test

import (
	"fmt"
	"math"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/mna"
	"zport/engine/noise"
	"zport/engine/value"
)

// The noise of an RC low-pass (invented values) at its output: the
// resistor's density, and over a wide band √(kT/C), whatever R.
func Example() {
	c, _ := circuit.Parse("vsource Vin in gnd 0\nresistor R in out 10k\ncapacitor C out gnd 1n\n")
	out, _ := c.Node("out")
	a, _ := feedback.New(c, "", nil, nil) // a passive network: no reference
	a.Adjoint = []mna.Term{{I: mna.NodeVar(out), V: 1}}
	n := noise.New(a.Sys, 300, nil)

	pt, _ := a.At(10) // far below the pole: R alone
	parts := make([]float64, len(n.Sources))
	n.At(parts, pt.Adjoint, pt.F)
	fmt.Println(n.Sources[0].Name, value.Format(math.Sqrt(parts[0]), "V/√Hz", 5))

	band, _ := n.Band(a.AdjointAt, a.Sys.N, 1e-3, 1e12)
	fmt.Println(value.Format(band.RMS(), "V", 5), "rms over", band.Evaluations, "frequencies")
	// Output:
	// R 12.872 nV/√Hz
	// 2.0352 µV rms over 225 frequencies
}
