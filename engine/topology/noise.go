package topology

import "zport/engine/value"

// The catalog's noise parameters. Every default is invented for the
// stage's scenario, as its other values are: no real part's data.

// opmNoiseParams is the op-amp's input noise: en and in with their 1/f
// corners, as the circuit text's opamp options en=, fce=, in=, fci=.
func opmNoiseParams(en, fce, in, fci string) []Param {
	return []Param{
		{Name: "en", Note: " (invented default; empty: none)", Default: en, Min: 0, Max: 1e-5, Optional: true, Group: "noise"},
		{Name: "fce", Note: " (empty: white)", Default: fce, Min: 1e-3, Max: 1e9, Optional: true, Group: "noise"},
		{Name: "in", Note: " (invented default; empty: none)", Default: in, Min: 0, Max: 1e-6, Optional: true, Group: "noise"},
		{Name: "fci", Note: " (empty: white)", Default: fci, Min: 1e-3, Max: 1e9, Optional: true, Group: "noise"},
	}
}

// opmNoiseOptions are the opamp line's noise options for v's parameters.
func opmNoiseOptions(v Values) []string {
	var opts []string
	for _, k := range []string{"en", "fce", "in", "fci"} {
		if v.Has(k) {
			opts = append(opts, k+"="+value.Exact(v[k]))
		}
	}
	return opts
}

// noiseless is the value field of a resistor line marked noise=off: a
// load, which is what the stage drives and not part of its design, or a
// resistance of a transistor's small-signal model (rπ, rO), whose noise is
// the device's own sources.
func noiseless(r float64) string { return value.Exact(r) + " noise=off" }
