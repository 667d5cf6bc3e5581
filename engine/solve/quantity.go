package solve

import (
	"fmt"
	"math"
)

// Quantity is what a target holds to a value.
type Quantity int

// The quantities a part can be solved for. The loop's (PhaseMargin,
// GainMargin, Crossover) are read from the reference element's return
// ratio over LoopGrid; the port's (ZMag, ZRe, ZPhase) and GainMag at the
// spot frequency; the closed-loop response's (Peaking, Bandwidth,
// Overshoot) from package zport/engine/response.
const (
	PhaseMargin Quantity = iota // governing phase margin, degrees
	GainMargin                  // smallest gain margin, dB
	Crossover                   // governing crossover frequency, Hz
	ZMag                        // |Z| at a port, Ω
	ZRe                         // Re Z at a port, Ω
	ZPhase                      // ∠Z at a port, degrees in (−180°, 180°]
	GainMag                     // |g|, V/V or V/A
	Peaking                     // closed-loop peaking above the low-frequency gain, dB (0 without)
	Bandwidth                   // closed-loop −3 dB frequency, Hz
	Overshoot                   // step overshoot, percent (0 without)
)

var quantityNames = [...]string{"pm", "gm", "crossover", "z", "r", "phase", "g", "peaking", "bandwidth", "overshoot"}

// Quantities lists every quantity's wire name, in order.
func Quantities() []string { return append([]string(nil), quantityNames[:]...) }

// ParseQuantity reads a wire name: "pm", "gm", "crossover", "z", "r",
// "phase", "g", "peaking", "bandwidth" or "overshoot".
func ParseQuantity(s string) (Quantity, bool) {
	for i, n := range quantityNames {
		if n == s {
			return Quantity(i), true
		}
	}
	return 0, false
}

// String returns the wire name.
func (q Quantity) String() string {
	if q < 0 || int(q) >= len(quantityNames) {
		return "unknown"
	}
	return quantityNames[q]
}

// Loop reports whether q is read from the loop's margins.
func (q Quantity) Loop() bool { return q <= Crossover }

// NeedsPort reports whether q is a port's: |Z|, Re Z or ∠Z.
func (q Quantity) NeedsPort() bool { return q == ZMag || q == ZRe || q == ZPhase }

// NeedsGain reports whether q is the gain's or its closed-loop
// response's.
func (q Quantity) NeedsGain() bool { return q >= GainMag }

// Response reports whether q comes from the closed-loop response.
func (q Quantity) Response() bool { return q >= Peaking }

// Angular reports whether q is an angle that wraps at ±180° (∠Z); the
// phase margin is unwrapped by definition and does not.
func (q Quantity) Angular() bool { return q == ZPhase }

// Unit is q's unit; gainUnit is the gain's ("V/V", or "V/A" for a
// current source's).
func (q Quantity) Unit(gainUnit string) string {
	switch q {
	case PhaseMargin, ZPhase:
		return "°"
	case GainMargin, Peaking:
		return "dB"
	case Crossover, Bandwidth:
		return "Hz"
	case ZMag, ZRe:
		return "Ω"
	case GainMag:
		return gainUnit
	case Overshoot:
		return "%"
	}
	return ""
}

// Title names q for a reader: "phase margin", "|Z| at out".
func (q Quantity) Title(port string) string {
	switch q {
	case PhaseMargin:
		return "phase margin"
	case GainMargin:
		return "gain margin"
	case Crossover:
		return "crossover frequency"
	case ZMag:
		return "|Z| at " + port
	case ZRe:
		return "Re Z at " + port
	case ZPhase:
		return "∠Z at " + port
	case GainMag:
		return "|g|"
	case Peaking:
		return "closed-loop peaking"
	case Bandwidth:
		return "closed-loop −3 dB bandwidth"
	case Overshoot:
		return "step overshoot"
	}
	return q.String()
}

// CheckTarget says whether x is a value q can take, and if not, what it
// can: a phase margin lies in [−180°, 360°] (beyond 180° only with a
// feedforward path), a frequency, |Z| and |g| above 0, ∠Z in
// [−180°, 180°], peaking and overshoot above 0 (a target of 0 is the
// edge where they start, not a value to solve for).
func (q Quantity) CheckTarget(x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return fmt.Errorf("the target must be a finite number")
	}
	var ok bool
	var what string
	switch q {
	case PhaseMargin:
		ok, what = x >= -180 && x <= 360, "a phase margin lies from −180° to 360° (180° + ∠T at the crossover, with ∠T unwrapped; above 180° only with a feedforward path)"
	case ZPhase:
		ok, what = x >= -180 && x <= 180, "∠Z lies from −180° to 180°"
	case Crossover, Bandwidth:
		ok, what = x > 0, "a frequency is above 0 Hz"
	case ZMag, GainMag:
		ok, what = x > 0, "a magnitude is above 0"
	case Peaking:
		ok, what = x > 0, "peaking is above 0 dB (0 dB is where it begins: a response without peaking has none)"
	case Overshoot:
		ok, what = x > 0, "overshoot is above 0 % (0 % is where it begins: a step without overshoot has none)"
	default: // gain margin in dB and Re Z take any sign
		ok = true
	}
	if !ok {
		return fmt.Errorf("%s", what)
	}
	return nil
}
