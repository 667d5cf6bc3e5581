package eseries_test

import (
	"fmt"

	"zport/engine/eseries"
)

func ExampleByName() {
	s, ok := eseries.ByName("e96")
	fmt.Println(s.Name, ok, s.Tolerance, len(s.Values()))
	// Output: E96 true 0.01 96
}

func ExampleSeries_Nearest() {
	// An invented design: a computed 5.23 kΩ and a computed 6.1 nF.
	fmt.Println(eseries.E96.Nearest(5230), eseries.E24.Nearest(6.1e-9))
	lo, hi := eseries.E12.Bracket(5230)
	fmt.Println(lo, hi)
	// Output:
	// 5230 6.2e-09
	// 4700 5600
}

func ExampleSeries_BestRatio() {
	// An invented design: a non-inverting stage needs gain 1 + R2/R1 = 14.2,
	// with resistors between 1 kΩ and 100 kΩ. The ratio asked for is 13.2.
	r2, r1, relErr, err := eseries.E24.BestRatio(14.2-1, 1e3, 100e3)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("R2 = %g Ω, R1 = %g Ω, gain %.4f, ratio off by %.2f %%\n", r2, r1, 1+r2/r1, 100*relErr)
	// Output: R2 = 62000 Ω, R1 = 4700 Ω, gain 14.1915, ratio off by 0.06 %
}

func ExampleParseTolerance() {
	for _, in := range []string{"F", "0.5 %", "±2%", "2", "Q"} {
		f, err := eseries.ParseTolerance(in)
		fmt.Println(f, err)
	}
	// Output:
	// 0.01 <nil>
	// 0.005 <nil>
	// 0.02 <nil>
	// 0.02 <nil>
	// 0 eseries: tolerance "Q": "Q" is not an IEC 60062 tolerance letter known here (B C D F G J K M)
}
