package response

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"zport/engine/value"
)

// Second-order figures of a pair of quality factor q, alone: step
// overshoot exp(−π/√(4Q² − 1)) for Q > ½ and resonant peak
// Q²/√(Q² − ¼) for Q > 1/√2 (K. Ogata, "Modern Control Engineering",
// written with Q = 1/(2ζ) [memory]).
func pairOvershoot(q float64) float64 {
	if !(q > 0.5) {
		return 0
	}
	return 100 * math.Exp(-math.Pi/math.Sqrt(4*q*q-1))
}

func pairPeakingDB(q float64) float64 {
	if !(q > 1/math.Sqrt2) {
		return 0
	}
	return 20 * math.Log10(q*q/math.Sqrt(q*q-0.25))
}

// describe names a pole the way a designer says it: "pair at 1.24 MHz,
// Q = 1.30" or "real pole at 12.3 kHz".
func describe(p Pole) string {
	if imag(p.P) == 0 {
		if p.P == 0 {
			return "pole at s = 0"
		}
		return "real pole at " + value.Format(p.Frequency(), "Hz", 3)
	}
	return "pair at " + value.Format(p.Frequency(), "Hz", 3) + ", Q = " + fmt.Sprintf("%.3g", p.Q())
}

func percent(x float64) string { return fmt.Sprintf("%.3g %%", x) }

func joinList(s []string) string { return strings.Join(s, "; ") }

// explain says which poles govern the response and how far they alone
// account for its figures.
func explain(r *Result, note func(string, ...any)) {
	var dom []Pole
	for _, p := range r.Poles {
		if p.Dominant && imag(p.P) >= 0 {
			dom = append(dom, p)
		}
	}
	if len(dom) == 0 {
		return
	}
	lead := dom[0]
	for _, p := range dom {
		if p.Weight > lead.Weight {
			lead = p
		}
	}
	var b strings.Builder
	b.WriteString("Dominant: the " + describe(lead))
	switch {
	case imag(lead.P) != 0:
		q := lead.Q()
		fmt.Fprintf(&b, " (ζ = %.3g). On its own a pair like this overshoots %s", lead.Zeta(), percent(pairOvershoot(q)))
		if q > 1/math.Sqrt2 {
			fmt.Fprintf(&b, " and peaks %.3g dB at %s", pairPeakingDB(q), value.Format(cmplx.Abs(lead.P)*math.Sqrt(1-2*lead.Zeta()*lead.Zeta())/(2*math.Pi), "Hz", 3))
		} else {
			b.WriteString(" without peaking")
		}
		b.WriteString(" (second-order formulas, Ogata)")
		if !math.IsNaN(r.Overshoot) {
			fmt.Fprintf(&b, "; the whole circuit overshoots %s", percent(r.Overshoot))
			if !math.IsNaN(r.PeakingDB) {
				fmt.Fprintf(&b, " and peaks %.3g dB", r.PeakingDB)
			}
		}
		b.WriteString(".")
	default:
		tau := 1 / -real(lead.P)
		fmt.Fprintf(&b, " (τ = %s). On its own it gives a 10–90 %% rise of τ·ln 9 = %s and a bandwidth of %s",
			value.Format(tau, "s", 3), value.Format(tau*math.Log(9), "s", 3), value.Format(lead.Frequency(), "Hz", 3))
		if !math.IsNaN(r.RiseTime) {
			fmt.Fprintf(&b, "; the whole circuit rises in %s", value.Format(r.RiseTime, "s", 3))
			if !math.IsNaN(r.Bandwidth) {
				fmt.Fprintf(&b, " with a bandwidth of %s", value.Format(r.Bandwidth, "Hz", 3))
			}
		}
		b.WriteString(".")
	}
	var others []string
	for _, p := range dom {
		if p != lead {
			others = append(others, describe(p))
		}
	}
	if len(others) > 0 {
		b.WriteString(" Also significant: " + joinList(others) + ".")
	}
	note("%s", b.String())
}
