// Package topology is zport's catalog of standard feedback stages. Each
// stage is a parameter set with defaults from an invented design scenario, a
// generator of circuit text for package circuit (parts named as a schematic
// would label them: R1, Rf, Cf, U1 …), the reference element, the ports a
// designer asks about, the gain, a suggested sweep, and closed-form
// expressions for the Blackman terms, the return ratio and the gain, each
// with the published source named beside it.
//
// The closed forms are the second, independent answer beside the engine's
// nodal one: the tests hold each stage's engine result against its closed
// forms over seeded random parameters and frequencies, and the closed forms
// against the published check values.
//
//	t, _ := topology.Lookup("noninverting")
//	v, err := t.Values(map[string]string{"R2": "47k"})
//	text := t.Circuit(v)          // circuit text, parses with circuit.Parse
//	forms := t.Forms(v, 1e3)      // hand formulas at 1 kHz
package topology
