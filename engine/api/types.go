package api

import (
	"math"
	"math/cmplx"
)

// Request is one analysis request. Exactly one of Circuit and Topology is set.
type Request struct {
	// Circuit is circuit text (see package zport/engine/circuit).
	Circuit string `json:"circuit,omitempty"`
	// Topology is a catalog stage ID; Params overrides its defaults, each
	// value in the engine's value syntax ("4k7", "10 pF" is not allowed: "10p").
	Topology string            `json:"topology,omitempty"`
	Params   map[string]string `json:"params,omitempty"`

	// Reference names the element whose return ratio is used: a controlled
	// source or an opamp. For a topology, empty means the stage's own.
	Reference string `json:"reference,omitempty"`
	// Ports lists port names (from `port` lines), or "NODE" (node to gnd), or
	// "NODE,NODE". For a topology, empty means all of the stage's ports.
	Ports []string `json:"ports,omitempty"`
	// Frequency is the spot frequency in hertz, ≥ 0.
	Frequency float64 `json:"frequency"`
	// Gain asks for the closed-loop gain from an independent source to an
	// output node ("NODE") or node pair ("NODE,NODE").
	Gain *GainSpec `json:"gain,omitempty"`
	// Sweep asks for the same quantities on a log-spaced grid.
	Sweep *SweepSpec `json:"sweep,omitempty"`
	// Temperature is the analysis temperature in kelvin (absent: 300 K,
	// above 0 and at most 1000 K): transistors given by their bias derive
	// VT = kT/q from it, and a noise analysis uses the same setting.
	Temperature *float64 `json:"temperature,omitempty"`

	// analyses holds the options of every registered analysis asked for
	// (the design aids, …), by key; see Analysis.
	analyses map[string]any
}

// GainSpec names the input source and the output of a gain.
type GainSpec struct {
	Source string `json:"source"`
	Output string `json:"output"`
}

// SweepSpec is a log-spaced frequency grid: Points frequencies from From to
// To hertz inclusive (From > 0, To > From, 2 ≤ Points ≤ MaxPoints).
type SweepSpec struct {
	From   float64 `json:"from"`
	To     float64 `json:"to"`
	Points int     `json:"points"`
}

// Complex is a complex number on the wire: {"re": x, "im": y}. A nil
// *Complex is written as null and means "not finite here" (see Notes).
type Complex struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

// C converts z to a wire value, nil when z is not finite.
func C(z complex128) *Complex {
	if cmplx.IsNaN(z) || cmplx.IsInf(z) {
		return nil
	}
	return &Complex{real(z), imag(z)}
}

// Value returns the number; a nil receiver gives NaN.
func (c *Complex) Value() complex128 {
	if c == nil {
		return cmplx.NaN()
	}
	return complex(c.Re, c.Im)
}

// F converts x to a wire value, nil when x is not finite.
func F(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

// Response is the answer at the spot frequency, plus the sweep and margins
// when a sweep was asked for.
type Response struct {
	Frequency   float64      `json:"frequency"`
	Reference   string       `json:"reference"`
	ReturnRatio *Complex     `json:"returnRatio"`
	Ports       []PortResult `json:"ports"`
	Gain        *GainResult  `json:"gain,omitempty"`
	Notes       []string     `json:"notes"`
	// ReturnRatioError bounds the error of ReturnRatio (see Errors).
	ReturnRatioError *float64 `json:"returnRatioError"`
	// Condition estimates the 1-norm condition number of the worst-
	// conditioned matrix factored at the spot frequency (after row and
	// column equilibration). It says how hard the equations are for the
	// float64 factorization, which refinement then corrects; the error of
	// each value is what its bound says, not Condition·1.1e-16.
	Condition *float64      `json:"condition"`
	Sweep     *SweepResult  `json:"sweep,omitempty"`
	Margins   *Margins      `json:"margins,omitempty"`
	Topology  *TopologyEcho `json:"topology,omitempty"`
	// Temperature is the analysis temperature used, in kelvin.
	Temperature float64 `json:"temperature"`
	// Devices lists the circuit's transistors with the small-signal values
	// derived for them (absent when there are none).
	Devices []Device `json:"devices,omitempty"`

	// analyses holds the answer of every registered analysis asked for,
	// by key; see Analysis.
	analyses map[string]any
}

// PortResult holds Blackman's terms for one port at one frequency.
type PortResult struct {
	Name string `json:"name"`
	// A and B are the port's nodes (A is the + side).
	A string `json:"a"`
	B string `json:"b"`
	// Z0 is the port impedance with the reference gain at zero.
	Z0 *Complex `json:"z0"`
	// TShort and TOpen are the reference's return ratio with the port
	// shorted and open.
	TShort *Complex `json:"tShort"`
	TOpen  *Complex `json:"tOpen"`
	// Z is Blackman's Z0·(1+TShort)/(1+TOpen); ZDirect the nodal solution.
	Z       *Complex `json:"z"`
	ZDirect *Complex `json:"zDirect"`
	// Y is the port admittance from the admittance form of Blackman's
	// formula, given only when Z is not finite.
	Y *Complex `json:"y,omitempty"`
	// Agreement is |Z − ZDirect| / max(|Z|, |ZDirect|), absolute when one
	// is exactly zero (null when either is not finite).
	Agreement *float64 `json:"agreement"`
	// Errors bounds the error of each value.
	Errors PortErrors `json:"errors"`
}

// PortErrors bounds the absolute error of each of a port's values, in the
// value's own unit: the exact value for the circuit as given lies within
// the bound of the one reported. Null goes with a null value, or — with a
// value present — means no bound can be given (a note names the value).
// A value of exactly 0 with a bound of 0 is a zero the circuit's structure
// makes exact; a bound at least as large as its value's magnitude means
// the value is zero within rounding ("0 (below ±bound)").
type PortErrors struct {
	Z0      *float64 `json:"z0"`
	TShort  *float64 `json:"tShort"`
	TOpen   *float64 `json:"tOpen"`
	Z       *float64 `json:"z"`
	ZDirect *float64 `json:"zDirect"`
	Y       *float64 `json:"y,omitempty"`
	// Agreement bounds what the two values' errors allow the agreement to
	// be when the exact values agree (as Blackman's formula says they do):
	// an agreement within it is zero within rounding.
	Agreement *float64 `json:"agreement"`
}

// GainResult holds the asymptotic gain model's terms at one frequency.
type GainResult struct {
	Source    string   `json:"source"`
	Output    string   `json:"output"`
	Unit      string   `json:"unit"` // "V/V" for a voltage source, "V/A" for a current source
	G0        *Complex `json:"g0"`
	GInf      *Complex `json:"gInf"`
	G         *Complex `json:"g"`
	GDirect   *Complex `json:"gDirect"`
	Agreement *float64 `json:"agreement"`
	// Errors bounds each value's error, as PortErrors does.
	Errors GainErrors `json:"errors"`
}

// GainErrors bounds the errors of the gain's values (see PortErrors).
type GainErrors struct {
	G0      *float64 `json:"g0"`
	GInf    *float64 `json:"gInf"`
	G       *float64 `json:"g"`
	GDirect *float64 `json:"gDirect"`
	// Agreement is as PortErrors.Agreement, for g and g direct.
	Agreement *float64 `json:"agreement"`
}

// SweepResult holds the same quantities over the grid, index for index.
type SweepResult struct {
	Frequency   []float64  `json:"frequency"`
	ReturnRatio []*Complex `json:"returnRatio"`
	// ReturnRatioError bounds each point's return ratio (see PortErrors).
	ReturnRatioError []*float64  `json:"returnRatioError"`
	Ports            []PortSweep `json:"ports"`
	Gain             *GainSweep  `json:"gain,omitempty"`
}

// PortSweep is one port's terms over the sweep.
type PortSweep struct {
	Name    string     `json:"name"`
	Z0      []*Complex `json:"z0"`
	TShort  []*Complex `json:"tShort"`
	TOpen   []*Complex `json:"tOpen"`
	Z       []*Complex `json:"z"`
	ZDirect []*Complex `json:"zDirect"`
	// Errors bounds each value at each point (see PortErrors).
	Errors PortSweepErrors `json:"errors"`
}

// PortSweepErrors are PortErrors point by point.
type PortSweepErrors struct {
	Z0      []*float64 `json:"z0"`
	TShort  []*float64 `json:"tShort"`
	TOpen   []*float64 `json:"tOpen"`
	Z       []*float64 `json:"z"`
	ZDirect []*float64 `json:"zDirect"`
}

// GainSweep is the gain's terms over the sweep.
type GainSweep struct {
	G0      []*Complex `json:"g0"`
	GInf    []*Complex `json:"gInf"`
	G       []*Complex `json:"g"`
	GDirect []*Complex `json:"gDirect"`
	// Errors bounds each value at each point (see PortErrors).
	Errors GainSweepErrors `json:"errors"`
}

// GainSweepErrors are GainErrors point by point.
type GainSweepErrors struct {
	G0      []*float64 `json:"g0"`
	GInf    []*float64 `json:"gInf"`
	G       []*float64 `json:"g"`
	GDirect []*float64 `json:"gDirect"`
}

// Margins summarizes the loop's stability from the return ratio over the
// sweep. Phase is unwrapped continuously from the lowest frequency; the phase
// margin at a crossover is 180° + ∠T there.
type Margins struct {
	// Crossovers lists every frequency where |T| crosses 1, refined.
	Crossovers []Crossover `json:"crossovers"`
	// PhaseCrossings lists every frequency where the unwrapped ∠T crosses
	// −180° (mod 360°), with the gain margin −20·log10|T| there.
	PhaseCrossings []PhaseCrossing `json:"phaseCrossings"`
	// Crossover, PhaseMargin and GainMargin are the governing values: the
	// crossover with the smallest phase margin, and the smallest gain margin.
	Crossover   *float64 `json:"crossover"`
	PhaseMargin *float64 `json:"phaseMargin"`
	GainMargin  *float64 `json:"gainMargin"`
	// Verdict is one of "no crossover", "stable", "margin below 45°",
	// "unstable"; VerdictDetail says why in a sentence.
	Verdict       string `json:"verdict"`
	VerdictDetail string `json:"verdictDetail"`

	// The loop views, beside the sweep (see loopviews.go): OpenLoop is
	// the reference element's own gain A(f) (an opamp's a(f), a
	// controlled source's constant), NoiseGain is A/T, the 1/β the loop
	// sees, and Closure their rate of closure at the governing crossover.
	OpenLoop  []*Complex `json:"openLoop"`
	NoiseGain []*Complex `json:"noiseGain"`
	Closure   *Closure   `json:"closure"`
}

// Crossover is one unity-gain crossing of |T|.
type Crossover struct {
	Frequency   float64 `json:"frequency"`
	PhaseMargin float64 `json:"phaseMargin"` // degrees
	Direction   string  `json:"direction"`   // "down" when |T| falls through 1, "up" otherwise
}

// PhaseCrossing is one −180° crossing of the unwrapped phase of T.
type PhaseCrossing struct {
	Frequency  float64 `json:"frequency"`
	GainMargin float64 `json:"gainMargin"` // dB, positive when |T| < 1 there
}

// TopologyEcho is what a topology request used, and its closed forms.
type TopologyEcho struct {
	ID        string             `json:"id"`
	Title     string             `json:"title"`
	Params    map[string]float64 `json:"params"`
	Circuit   string             `json:"circuit"`
	Reference string             `json:"reference"`
	Ports     []string           `json:"ports"`
	Gain      *GainSpec          `json:"gain,omitempty"`
	// ClosedForm holds the hand formulas' values at the spot frequency.
	ClosedForm *ClosedForm `json:"closedForm,omitempty"`
	// Extras carries stage-specific values (e.g. suggested Cf), each with
	// its name, value, unit and the source of the formula.
	Extras []Extra `json:"extras,omitempty"`
}

// ClosedForm is the hand-formula side of a topology result.
type ClosedForm struct {
	ReturnRatio *Formula       `json:"returnRatio,omitempty"`
	Ports       []PortFormulas `json:"ports"`
	Gain        *Formula       `json:"gain,omitempty"`
}

// PortFormulas are the closed forms of one port's Blackman terms; a nil
// entry means no closed form is offered for that term.
type PortFormulas struct {
	Name   string   `json:"name"`
	Z0     *Formula `json:"z0,omitempty"`
	TShort *Formula `json:"tShort,omitempty"`
	TOpen  *Formula `json:"tOpen,omitempty"`
	Z      *Formula `json:"z,omitempty"`
}

// Formula is a closed-form value with its text form and published source.
type Formula struct {
	Value  *Complex `json:"value"`
	Text   string   `json:"text"`
	Source string   `json:"source"`
}

// Extra is a stage-specific derived value.
type Extra struct {
	Name   string   `json:"name"`
	Value  *float64 `json:"value"`
	Unit   string   `json:"unit"`
	Note   string   `json:"note,omitempty"`
	Source string   `json:"source,omitempty"`
}

// ErrorResponse is the answer to bad input.
type ErrorResponse struct {
	Error ErrorBody `json:"error"`
}

// ErrorBody locates a problem: Line and Column (1-based) in the circuit
// text when it came from there, else zero; Param names the topology
// parameter or request field at fault. A circuit that cannot be solved
// names the Nodes and Parts it is traced to; circuit text with several
// problems lists every one in Errors, the first of them also in the
// body's own fields.
type ErrorBody struct {
	Line    int         `json:"line"`
	Column  int         `json:"column"`
	Param   string      `json:"param,omitempty"`
	Message string      `json:"message"`
	Nodes   []string    `json:"nodes,omitempty"`
	Parts   []string    `json:"parts,omitempty"`
	Errors  []ErrorBody `json:"errors,omitempty"`
}
