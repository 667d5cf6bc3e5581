package aids_test

import (
	"fmt"

	"zport/engine/aids"
	"zport/engine/circuit"
	"zport/engine/feedback"
)

// A Howland current pump of our own with 1 % resistors: its output
// resistance at the corners swings through infinity, from large positive
// to negative values.
func ExampleMonteCarlo() {
	c, _ := circuit.Parse(`
vsource Vin in gnd 1
resistor R1 in p 15k
resistor R2 p vo 4.5k
resistor R3 n gnd 15k
resistor R4 n vo 4.5k
opamp U1 p n vo a0=100k
port out p gnd
`)
	p, _ := c.Port("out")
	m := &aids.Model{Circuit: c, Reference: "U1", Params: aids.CircuitParams(c),
		Ports: []feedback.Port{{Name: "out", A: p.A, B: p.B}}}
	var spreads []aids.Spread
	for j, par := range m.Params {
		if par.Class == aids.Passive {
			spreads = append(spreads, aids.Tolerance(j, par.Nominal, 0.01))
		}
	}
	mc, err := aids.NewMonteCarlo(m, spreads, aids.Options{Seed: 1, Trials: 500, Corners: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	for mc.Step(100) < mc.Total() {
		// a page would update its progress bar here
	}
	r, _ := mc.Result(0, nil)
	for _, q := range r.Quantities {
		if q.ID == "r:out" {
			fmt.Printf("nominal %.4g Ω; corners from %.4g Ω to %.4g Ω (%d corners)\n", q.Nominal, q.Corners.Min, q.Corners.Max, r.Corners)
		}
		if q.ID == "z:out" {
			fmt.Printf("smallest |Z| %.4g Ω at corner %v (R1…R4: +1 high, −1 low)\n", q.Corners.Min, q.Corners.MinAt)
		}
	}
	// Output:
	// smallest |Z| 3.717e+05 Ω at corner [1 -1 -1 1] (R1…R4: +1 high, −1 low)
	// nominal 2.663e+08 Ω; corners from -7.521e+05 Ω to 2.689e+08 Ω (16 corners)
}
