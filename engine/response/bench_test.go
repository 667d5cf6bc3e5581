package response

import (
	"testing"

	"zport/engine/circuit"
	"zport/engine/mna"
)

// BenchmarkAnalyze is the whole response analysis of one gain: the
// pencil, the realisation, the refined poles, the 500-point step and the
// figures; for a two-pole follower (2 natural frequencies, 4 unknowns)
// and an op-amp stage with a capacitive load (3 natural frequencies, 9
// unknowns).
func BenchmarkAnalyze(b *testing.B) {
	for _, c := range []struct{ name, text string }{
		{"Follower2Pole", "vsource Vin in gnd 1\nopamp U1 in out out a0=100k gbw=1M p2=1M\n"},
		{"Capload9", "vsource Vin in gnd 1\nopamp U1 in fb amp a0=200k gbw=5M p2=30M rid=1M ro=50\nresistor Rf amp fb 10k\nresistor R1 fb gnd 10k\ncapacitor CL amp gnd 10n\nresistor RL amp gnd 10k\n"},
	} {
		cir, err := circuit.Parse(c.text)
		if err != nil {
			b.Fatal(err)
		}
		sys := mna.New(cir)
		src, _ := cir.PartIndex("Vin")
		out, _ := cir.Node("amp")
		if out == 0 {
			out, _ = cir.Node("out")
		}
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Analyze(sys, src, out, circuit.Gnd, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
