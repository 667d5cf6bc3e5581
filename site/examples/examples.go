package examples

import (
	"strconv"

	"zport/engine/api"
	"zport/engine/value"
)

// Example is one example circuit with the analysis it is read with.
type Example struct {
	// ID is short, lower-case and stable: the page's example list and the
	// tests refer to it.
	ID string
	// Title names the example in the page's list.
	Title string
	// Scenario is the invented design situation, one or two sentences; the
	// page prints it marked as invented.
	Scenario string
	// Look says what the example shows and what to try with it.
	Look string
	// Text is the circuit text.
	Text string
	// Reference is the element whose return ratio Blackman's formula uses.
	Reference string
	// Ports are the ports analyzed: names of port lines, or "NODE" (node to
	// gnd).
	Ports []string
	// Gain is the closed-loop gain shown, or nil.
	Gain *api.GainSpec
	// Frequency, From, To and Points are the spot frequency and the sweep,
	// in the engine's value syntax as a user would type them.
	Frequency, From, To, Points string
}

// All returns the examples in the order the page lists them. The first is
// the one the page opens with.
func All() []Example {
	return []Example{twoPole, cable, degenerated, twoStage, currentFeedback, commonEmitter, photodiodeNoise}
}

// Lookup returns the example called id.
func Lookup(id string) (Example, bool) {
	for _, e := range All() {
		if e.ID == id {
			return e, true
		}
	}
	return Example{}, false
}

// Request is the example as an analysis request: its text, reference,
// ports, gain, spot frequency and sweep. It panics if the example's own
// frequencies do not parse, which the package's tests rule out.
func (e Example) Request() api.Request {
	hz := func(s string) float64 {
		v, err := value.Parse(s, "Hz")
		if err != nil {
			panic("examples: " + e.ID + ": " + err.Error())
		}
		return v
	}
	pts, err := strconv.Atoi(e.Points)
	if err != nil {
		panic("examples: " + e.ID + ": points: " + err.Error())
	}
	req := api.Request{
		Circuit:   e.Text,
		Reference: e.Reference,
		Ports:     append([]string(nil), e.Ports...),
		Frequency: hz(e.Frequency),
		Sweep:     &api.SweepSpec{From: hz(e.From), To: hz(e.To), Points: pts},
	}
	if e.Gain != nil {
		g := *e.Gain
		req.Gain = &g
	}
	return req
}

var twoPole = Example{
	ID:    "twopole",
	Title: "Two-pole feedback network",
	Scenario: "A gain-of-10 sensor amplifier on a crowded board: its 9 kΩ feedback resistor is built from two " +
		"4.5 kΩ parts with a guard trace between them, which adds 10 pF to ground at the midpoint, and the " +
		"inverting input carries 8 pF of pin and trace capacitance.",
	Look: "The feedback network now has two poles of its own, and each takes phase from the return ratio " +
		"near the crossover. Compare the phase margin with Cm and Cin deleted, then try a small capacitor " +
		"across R2a and R2b in series (from out to fb) to cancel them.",
	Text: `# Two-pole feedback network (invented scenario): a gain-of-10
# sensor amplifier whose 9 kΩ feedback resistor is split in two
# by a guard trace, with capacitance at the inverting input.
vsource   Vin  in   gnd  1          # the sensor
opamp     U1   in   fb   out  a0=200k gbw=20M rid=1M ro=40
resistor  R2a  out  mid  4.5k       # feedback resistor, first half
capacitor Cm   mid  gnd  10p        # guard trace: pole 1
resistor  R2b  mid  fb   4.5k       # second half
resistor  R1   fb   gnd  1k         # gain 1 + 9k/1k = 10
capacitor Cin  fb   gnd  8p         # input capacitance: pole 2
port      out  out  gnd             # drives the next stage
port      in   in   gnd             # what the sensor sees
`,
	Reference: "U1",
	Ports:     []string{"out", "in"},
	Gain:      &api.GainSpec{Source: "Vin", Output: "out"},
	Frequency: "100k", From: "10", To: "100M", Points: "400",
}

var cable = Example{
	ID:    "cable",
	Title: "Op-amp driving a cable through an isolation resistor",
	Scenario: "A unity-gain buffer sends a sensor signal down about 2 m of coaxial cable to a data-acquisition " +
		"input. The cable is modelled by its capacitance, 200 pF, the acquisition input by 1 MΩ; a 47 Ω " +
		"isolation resistor sits between the op-amp pin and the cable, and the feedback is taken at the pin.",
	Look: "The op-amp's output resistance and the cable form a pole inside the loop; Riso adds a zero that " +
		"gives the phase back. Delete the Riso line and connect Ccab and Rdaq to pin to see the bare " +
		"capacitive load, then compare the impedance the cable end sees at port load.",
	Text: `# Op-amp driving a cable through an isolation resistor (invented
# scenario): a unity-gain buffer into 2 m of coax, modelled as its
# 200 pF; the feedback is taken at the op-amp pin, before Riso.
vsource   Vin   in    gnd   1
opamp     U1    in    pin   pin  a0=100k gbw=10M ro=50
resistor  Riso  pin   load  47       # isolation resistor
capacitor Ccab  load  gnd   200p     # the cable
resistor  Rdaq  load  gnd   1M       # the acquisition input
port      load  load  gnd            # the cable end
port      pin   pin   gnd            # the op-amp pin
`,
	Reference: "U1",
	Ports:     []string{"load", "pin"},
	Gain:      &api.GainSpec{Source: "Vin", Output: "load"},
	Frequency: "1M", From: "100", To: "1G", Points: "400",
}

var degenerated = Example{
	ID:    "degenerated",
	Title: "MOS common-source stage with source degeneration",
	Scenario: "The gain stage of a sensor front-end: an n-channel MOS transistor at its bias point, " +
		"gm = 2 mS and rO = 50 kΩ, with 500 Ω of source degeneration, loaded by the 200 kΩ output " +
		"resistance of its current-source load and by 1 pF of wiring and next-stage input.",
	Look: "The transistor's own output resistance rises from rO + RS to rO + RS + gm·rO·RS because of the " +
		"local feedback through RS: Blackman's terms show it as T short = gm·(RS ∥ rO) with T open small. " +
		"Delete RL to see the transistor alone.",
	Text: `# MOS common-source stage with source degeneration (invented
# scenario): the small-signal model at the bias point.
vsource   Vg   g    gnd  1                # gate drive
vccs      Gm1  d    s    sense=g,s gm=2m  # gm·vgs, drain to source
resistor  rO1  d    s    50k              # output resistance rO
resistor  RS   s    gnd  500              # source degeneration
resistor  RL   d    gnd  200k             # current-source load
capacitor CL   d    gnd  1p               # wiring, next stage
port      out  d    gnd
`,
	Reference: "Gm1",
	Ports:     []string{"out"},
	Gain:      &api.GainSpec{Source: "Vg", Output: "d"},
	Frequency: "1k", From: "1k", To: "10G", Points: "400",
}

var twoStage = Example{
	ID:    "twostage",
	Title: "Two-stage loop with a local and a global feedback path",
	Scenario: "A two-stage inverting amplifier: a preamplifier U1 with its own feedback resistor R2, followed " +
		"by a gain-of-5 stage U2 with its own feedback R4 and R3, and a global feedback resistor Rg from the " +
		"output back to U1's summing node, which sets the overall gain near −Rg/R1 = −2.",
	Look: "Switch the reference between U1 and U2. Z₀, T short and T open change completely, because each " +
		"choice breaks the circuit at a different element; Z, the answer, stays the same and agrees with " +
		"the direct solution. The crossover moves too: each return ratio describes the loop as broken at " +
		"its own element.",
	Text: `# Two-stage loop with a local and a global feedback path (invented
# scenario): an inverting preamplifier and a gain-of-5 stage.
vsource  Vin  src  gnd  1
resistor R1   src  sum  10k               # input resistor
opamp    U1   gnd  sum  m    a0=100k gbw=1M
resistor R2   m    sum  100k              # local feedback, U1
opamp    U2   m    f2   out  a0=100k gbw=10M
resistor R3   f2   gnd  1k                # local feedback, U2:
resistor R4   out  f2   4k                #   gain 1 + 4k/1k = 5
resistor Rg   out  sum  20k               # global feedback
port     in   src  gnd                    # what the source sees
port     sum  sum  gnd                    # the summing node
`,
	Reference: "U1",
	Ports:     []string{"in", "sum"},
	Gain:      &api.GainSpec{Source: "Vin", Output: "out"},
	Frequency: "10k", From: "10", To: "100M", Points: "400",
}

var currentFeedback = Example{
	ID:    "cfa",
	Title: "Current-feedback-style stage from a ccvs",
	Scenario: "A gain-of-2 line driver into a 150 Ω load, drawn the way a current-feedback amplifier works: a " +
		"unity-gain input buffer holds the inverting input at the input voltage, and the current it has to " +
		"deliver into the inverting input is turned into the output voltage by a 1 MΩ transimpedance.",
	Look: "The reference is the ccvs Ht that senses the inverting-input current I(Rn). Its return ratio is " +
		"about Z/(Rf + Rn·(1 + Rf/Rg)), so the loop, and with it the bandwidth, is set by Rf rather than by " +
		"the gain: change Rg to change the gain and watch the crossover stay put, then change Rf.",
	Text: `# Current-feedback-style stage (invented scenario): gain 2 into
# 150 Ω; the ccvs Ht senses the inverting-input current I(Rn).
vsource   Vin  in   gnd  1
vcvs      Eb   b    gnd  sense=in,gnd gain=1   # input buffer
resistor  Rn   b    inv  50                    # its output resistance
resistor  Rf   out  inv  1k                    # feedback resistor
resistor  Rg   inv  gnd  1k                    # gain 1 + Rf/Rg = 2
ccvs      Ht   x    gnd  sense=Rn r=1M         # transimpedance
resistor  Rt   x    z    1k                    # dominant pole,
capacitor Ct   z    gnd  2n                    #   with Ct
resistor  Rt2  z    z2   100                   # a faster pole,
capacitor Ct2  z2   gnd  5p                    #   with Ct2
vcvs      Eo   o    gnd  sense=z2,gnd gain=1   # output buffer
resistor  Ro   o    out  10                    # its output resistance
resistor  RL   out  gnd  150                   # the load
port      out  out  gnd
port      inv  inv  gnd                        # the inverting input
`,
	Reference: "Ht",
	Ports:     []string{"out", "inv"},
	Gain:      &api.GainSpec{Source: "Vin", Output: "out"},
	Frequency: "1M", From: "1k", To: "1G", Points: "400",
}

var commonEmitter = Example{
	ID:    "ce",
	Title: "Common-emitter stage written with a bjt line",
	Scenario: "The first gain stage of a hobby audio-band preamplifier: a bipolar transistor at 1 mA with an unbypassed " +
		"220 Ω emitter resistor for linearity and a 4.7 kΩ collector load, driven from a 1 kΩ source, with 10 pF of wiring " +
		"and next-stage input at the collector.",
	Look: "The bjt line derives the hybrid-π model from the bias (the Transistors section lists gm, rπ, ro and Cπ); its " +
		"transconductance is the reference. The emitter resistor is series feedback: at the collector it multiplies ro, at the base " +
		"it adds (1 + β0)·RE. Change ic= and watch every value move with gm = IC/VT; delete va= to see ro become infinite.",
	Text: `# Common-emitter stage written with a bjt line (invented
# scenario): 1 mA, an unbypassed 220 Ω emitter resistor.
vsource   Vs   src  gnd  1
resistor  Rs   src  b    1k                     # the source
bjt       Q1   c    b    e    ic=1m beta=150 va=80 ft=400M cmu=0.6p rb=100
resistor  RE   e    gnd  220                    # emitter degeneration
resistor  RC   c    gnd  4.7k                   # collector load
capacitor CL   c    gnd  10p                    # wiring, next stage
port      out  c    gnd
port      in   src  gnd                         # what the source sees
`,
	Reference: "Q1",
	Ports:     []string{"out", "in"},
	Gain:      &api.GainSpec{Source: "Vs", Output: "c"},
	Frequency: "10k", From: "10", To: "1G", Points: "400",
}

var photodiodeNoise = Example{
	ID:    "pdnoise",
	Title: "Photodiode front end: where its noise comes from",
	Scenario: "The receiver of a short-range infrared data link: a 50 pF photodiode under about 2 µA of background light " +
		"into a 100 kΩ transimpedance with 2 pF across it, on a FET-input op amp of 6 nV/√Hz (1/f below " +
		"200 Hz) and 2 fA/√Hz, driving an ADC buffer that is not part of the design.",
	Look: "Read the noise table and the density chart: at low frequency Rf's thermal noise and the shot noise " +
		"of the background light share the output; above the noise gain's zero at 1/(2π·Rf·(Cd + Cf)) the op " +
		"amp's eₙ, multiplied by 1 + Cd/Cf, takes over. Double Cf and watch eₙ's share fall and the bandwidth " +
		"with it; raise shot= to see how much light the stage takes before shot noise rules.",
	Text: `# Photodiode front end, noise budget (invented scenario): 2 µA of
# background light on a 50 pF diode, 100 kΩ transimpedance.
isource   Iph  gnd  sum  1                  # the signal photocurrent
inoise    Ish  gnd  sum  shot=2u            # shot noise of 2 µA of light
capacitor Cd   sum  gnd  50p                # diode capacitance
resistor  Rf   out  sum  100k               # transimpedance
capacitor Cf   out  sum  2p                 # feedback capacitor
opamp     U1   gnd  sum  out  a0=1M gbw=20M ro=30 en=6n fce=200 in=2f
resistor  RL   out  gnd  2k noise=off       # ADC buffer input, not ours
port      in   sum  gnd                     # what the diode sees
port      out  out  gnd
`,
	Reference: "U1",
	Ports:     []string{"in", "out"},
	Gain:      &api.GainSpec{Source: "Iph", Output: "out"},
	Frequency: "1k", From: "10", To: "100M", Points: "400",
}
