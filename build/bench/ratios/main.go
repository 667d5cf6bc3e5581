// Package ratios is the benchmark's "ratios" part: it measures how fast
// zport answers, as ratios taken in one run with their two sides
// interleaved round by round, so that a shared, busy machine slows both
// alike; it prints the median of each ratio over the rounds, and the
// medians of the times beside it.
//
//	go run ./build/bench ratios            # native and browser
//	go run ./build/bench ratios -native    # the engine alone (no Chromium)
//	go run ./build/bench ratios -rounds 15
//
// Native (the engine in Go, package engine):
//   - a sweep point against its arithmetic floor: the time of the complex
//     multiply-adds its factorizations, solves and residual bounds need
//     (counted by the engine, feedback.Analyzer.MulAdds), run as the LU's
//     solves run them (mna.MulAddFloor) — for the inverting stage at its
//     defaults and for a 50-node ladder;
//   - a point at 200 nodes against a point at 50 (linear growth is 4×);
//   - the inverting stage's 400-point sweep, and a whole page recompute
//     (api.Analyze: spot analysis with condition estimate, sweep, margins),
//     in wall-clock time and in the thread's CPU time, which load inflates
//     less.
//
// Browser (the built site in Chromium from file://, browser.go): a
// recompute against its engine call, the first edit against a steady one,
// and the longest main-thread task during a 10,000-line paste.
package ratios

import (
	"errors"
	"flag"
	"fmt"
	"slices"
	"strings"
	"time"
)

// Run measures the ratios the flags in args ask for.
func Run(args []string) error {
	fs := flag.NewFlagSet("ratios", flag.ContinueOnError)
	native := fs.Bool("native", false, "measure the engine only")
	browserOnly := fs.Bool("browser", false, "measure the browser only")
	rounds := fs.Int("rounds", 9, "interleaved rounds (medians are printed; at least 7)")
	only := fs.String("only", "", `measure one part of the browser's: "recompute", "paste" or "first"`)
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *rounds < 7 {
		return errors.New("-rounds must be at least 7")
	}
	if !*browserOnly {
		if err := runNative(*rounds); err != nil {
			return err
		}
	}
	if !*native {
		return runBrowser(*rounds, *only)
	}
	return nil
}

// Median returns the median of xs (the mean of the middle two when their
// number is even), 0 for none. The benchmark's other parts use it too.
func Median[T ~int64 | ~float64](xs []T) T {
	s := slices.Clone(xs)
	slices.Sort(s)
	n := len(s)
	if n == 0 {
		return 0
	}
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

func ms(d float64) string { return fmt.Sprintf("%.2f ms", d/float64(time.Millisecond)) }
func us(d float64) string { return fmt.Sprintf("%.2f µs", d/float64(time.Microsecond)) }

// verdict says whether ratio r meets target t (r ≤ t).
func verdict(r, t float64) string {
	if r <= t {
		return fmt.Sprintf("target ≤ %.3g: met", t)
	}
	return fmt.Sprintf("target ≤ %.3g: missed", t)
}

// line prints one measurement.
func line(what string, parts ...string) {
	fmt.Printf("  %-44s %s\n", what, strings.Join(parts, "  "))
}
