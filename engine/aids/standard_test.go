package aids_test

import (
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"zport/engine/aids"
	"zport/engine/eseries"
)

// noninv is a non-inverting stage of our own: gain 1 + R2/R1 = 7.65 by
// design, to be built from series values for a gain of 7.5.
const noninv = `
vsource Vin in gnd 1
opamp U1 in fb out a0=1e6 gbw=10M
resistor R1 fb gnd 2k
resistor R2 out fb 13.3k
capacitor Cf out fb 4.7p
resistor RL out gnd 2.49k
port out out gnd
`

// TestSnap: nearest values and the best ratio pair come from the
// IEC 60063 tables (REFERENCES.md §6: E24 … 1.3 1.5 … 2.0 2.2 2.4 2.7 …;
// E96 holds 133 and 249), and the snapped circuit's gain and impedance
// are what the engine gives for those values.
func TestSnap(t *testing.T) {
	m := circuitModel(t, noninv, "U1", []string{"out"}, "Vin", "out", 1e3)
	idx := func(name string) int { return m.Param(name) }
	for _, c := range []struct {
		series eseries.Series
		want   map[string]float64
	}{
		// 13.3k: 13k/13.3k is nearer than 15k in ratio; 2.49k: 2.4k.
		{eseries.E24, map[string]float64{"R1": 2e3, "R2": 13e3, "RL": 2.4e3, "Cf": 4.7e-12}},
		// Both are E96 values already.
		{eseries.E96, map[string]float64{"R1": 2e3, "R2": 13.3e3, "RL": 2.49e3, "Cf": 4.7e-12}},
	} {
		res, err := aids.Snap(m, aids.SnapOptions{Resistors: c.series, Capacitors: eseries.E12,
			Ratios: []aids.RatioPair{{Num: idx("R2"), Den: idx("R1"), Plus1: true, Want: 7.5 - 1}}})
		if err != nil {
			t.Fatal(err)
		}
		near := res.Variants[0]
		if near.Name != "nearest" || len(near.Values) != 4 {
			t.Fatalf("%s: first variant %q with %d values", c.series.Name, near.Name, len(near.Values))
		}
		for _, v := range near.Values {
			if math.Abs(v.Value/c.want[v.Name]-1) > 1e-12 {
				t.Errorf("%s: nearest %s = %g, want %g", c.series.Name, v.Name, v.Value, c.want[v.Name])
			}
		}
		rr := res.Ratios[0]
		// 6.5 = 13/2 exactly in E24 (and in E96: 13.0k/2.00k), within
		// [2k/√10, 13.3k·√10]; 1.3k/200 lies below the range.
		if rr.NumValue != 13e3 || rr.DenValue != 2e3 || rr.RelErr > 1e-15 || math.Abs(rr.Gain-7.5) > 1e-12 {
			t.Errorf("%s: ratio pair %g/%g (err %g, gain %g), want 13k/2k for 7.5", c.series.Name, rr.NumValue, rr.DenValue, rr.RelErr, rr.Gain)
		}
		ratio := res.Variants[1]
		// The snapped circuit, analyzed independently.
		vals := map[string]float64{}
		for _, v := range ratio.Values {
			vals[v.Name] = v.Value
		}
		text := noninv
		for _, r := range []struct{ old, name string }{{"2k\n", "R1"}, {"13.3k\n", "R2"}, {"2.49k\n", "RL"}} {
			text = strings.Replace(text, r.old, strconv.FormatFloat(vals[r.name], 'g', -1, 64)+"\n", 1)
		}
		z, g := analyzeText(t, text, "U1", "out", 1e3, "Vin", "out")
		if e := cmplx.Abs(ratio.Gain.Snapped/g - 1); e > 1e-12 {
			t.Errorf("%s: snapped gain %v, direct %v", c.series.Name, ratio.Gain.Snapped, g)
		}
		if e := cmplx.Abs(ratio.Ports[0].Snapped/z - 1); e > 1e-12 {
			t.Errorf("%s: snapped Zout %v, direct %v", c.series.Name, ratio.Ports[0].Snapped, z)
		}
		// The gain error against nominal follows the ratio: 7.5/7.65 − 1
		// with the loop's own small share (1e-3 at this loop gain).
		if e := ratio.Gain.MagErr - (7.5/7.65 - 1); math.Abs(e) > 1e-3 {
			t.Errorf("%s: gain error %g, want about %g", c.series.Name, ratio.Gain.MagErr, 7.5/7.65-1)
		}
	}
}
