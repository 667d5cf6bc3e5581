package circuit

import (
	"fmt"
	"strings"
)

// Ladder returns the text of a circuit of n nodes besides gnd (n ≥ 4), for
// tests and benchmarks that need a circuit of a given size: an op-amp
// follower whose output drives, through Rd, an RC ladder (100 Ω in series
// and 1 pF to gnd per section), the feedback taken from the ladder's far
// end through Rf, so that one loop runs through every node. Its ports are
// in (the source) and out (the op amp's output). The values are invented;
// they keep the loop stable at any size.
func Ladder(n int) string {
	if n < 4 {
		panic(fmt.Sprintf("circuit: Ladder(%d): a ladder has at least 4 nodes", n))
	}
	var b strings.Builder
	b.WriteString("# ladder test circuit (invented)\nvsource Vin src gnd 1\nopamp U1 src l0 out a0=100k gbw=1M ro=50\nresistor Rd out l1 10\n")
	for i := 1; i < n-3; i++ {
		fmt.Fprintf(&b, "resistor R%d l%d l%d 100\ncapacitor C%d l%d gnd 1p\n", i, i, i+1, i, i+1)
	}
	fmt.Fprintf(&b, "resistor Rf l%d l0 1\nport in src gnd\nport out out gnd\n", n-3)
	return b.String()
}
