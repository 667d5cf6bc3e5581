package aids

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/numeric"
	"zport/engine/topology"
)

// Field says which number of a part a Param is.
type Field int

// The numbers of a part a Param can be: its Value (resistance,
// capacitance, inductance, controlled-source gain or a transistor's gm) or
// one of an opamp's model numbers.
const (
	FieldValue Field = iota
	FieldA0
	FieldGBW
	FieldP2
	FieldRid
	FieldRcm
	FieldRo
	FieldCid
	FieldCcm
)

var fieldNames = [...]string{"value", "a0", "gbw", "p2", "rid", "rcm", "ro", "cid", "ccm"}

func (f Field) String() string {
	if f < 0 || int(f) >= len(fieldNames) {
		return "unknown"
	}
	return fieldNames[f]
}

// Class sorts parameters by what the design aids do with them.
type Class int

const (
	// Passive is a resistor, capacitor or inductor: it gets a tolerance
	// and, for R and C, a standard value.
	Passive Class = iota
	// AmpSpread is an opamp's a0 or gbw: it gets a min–typ spread.
	AmpSpread
	// Other is any other number (a controlled-source gain, an opamp's
	// rid, rcm, ro or p2, a transistor's gm): sensitivities only.
	Other
)

// Param is one number of a circuit that the design aids may vary.
type Param struct {
	// Name is the part name ("R1") for a part's value, "U1.a0" for an
	// opamp's model number, "Q1.gm" for a transistor's transconductance, or
	// the topology parameter's name.
	Name    string
	Unit    string // "Ω", "F", "H", "Hz", "S", "" …
	Nominal float64
	Class   Class
	// Kind is the part's kind: for a topology parameter, the kind its unit
	// implies (Ω resistor, F capacitor, H inductor) when it is Passive.
	Kind circuit.Kind
	// Part and Field locate the number in Model.Circuit; Part is −1 when
	// the number is not one part's (only Model.Rebuild can apply it).
	Part  int
	Field Field
	// Default is true for the parameters that tolerances and standard
	// values apply to when a request does not list them: every R, C and L
	// of circuit text; a stage's R, C and L in its "network" group.
	Default bool
}

// Model is a circuit under study with the numbers the design aids vary.
// Every evaluation writes the values into the runner's own scratch copy of
// the circuit and builds a fresh feedback.Analyzer for it, so the aids only
// read a Model: several runners may share one, each used by one goroutine.
type Model struct {
	Circuit   *circuit.Circuit
	Reference string
	// Ports are the ports studied (only Name, A and B are read).
	Ports []feedback.Port
	Gain  *feedback.Gain
	// Frequency is the spot frequency in hertz.
	Frequency float64
	// Grid, ascending and above 0, is where the loop's unity crossings are
	// looked for; nil means DefaultGrid.
	Grid   []float64
	Params []Param
	// Rebuild, when set, builds the circuit for parameter values x (indexed
	// as Params) instead of writing them into a copy of Circuit. A topology
	// stage whose parameters are not each one number of its circuit needs
	// it. The circuit it returns must have Circuit's nodes and parts in the
	// same order.
	Rebuild func(x []float64) (*circuit.Circuit, error)
	// Context, when set, stops a long computation once it is done (a time
	// budget, a cancel): the nominal loop's sweep, the choice of corners and
	// the sensitivities check it between units of work and return a
	// *feedback.Stopped error. A MonteCarlo runs in Steps, which its caller
	// stops. It is a field because a Model is the description of one study,
	// made for one request.
	Context context.Context
}

// stopped reports the error of m's Context once it is done, nil before
// (or without one): done of total units of work have run.
func (m *Model) stopped(done, total int, units string) error {
	if m.Context == nil {
		return nil
	}
	if err := m.Context.Err(); err != nil {
		return &feedback.Stopped{Done: done, Total: total, Units: units, Err: err}
	}
	return nil
}

// DefaultGrid is the crossover search grid used when a Model has none:
// 1 mHz to 1 THz, twenty points a decade, crossings refined between them.
// It is swept once per study, for the nominal circuit.
func DefaultGrid() []float64 {
	g := make([]float64, 301)
	for i := range g {
		g[i] = math.Pow(10, -3+float64(i)/20)
	}
	return g
}

// Nominal returns the parameters' nominal values, indexed as Params.
func (m *Model) Nominal() []float64 {
	x := make([]float64, len(m.Params))
	for i, p := range m.Params {
		x[i] = p.Nominal
	}
	return x
}

// Vary returns a function that builds the circuit with parameter j at x
// and every other parameter at its nominal value, for a search along one
// parameter (package zport/engine/solve). It writes into a scratch copy
// of the circuit, which the next call changes again (or regenerates the
// stage's text, when the model has Rebuild).
func (m *Model) Vary(j int) func(x float64) (*circuit.Circuit, error) {
	c := copyCircuit(m.Circuit)
	xs := m.Nominal()
	p := m.Params[j]
	return func(x float64) (*circuit.Circuit, error) {
		if m.Rebuild != nil {
			xs[j] = x
			return m.Rebuild(xs)
		}
		setField(&c.Parts[p.Part], p.Field, x)
		return c, nil
	}
}

// Param returns the index of the parameter called name, or −1.
func (m *Model) Param(name string) int {
	for i, p := range m.Params {
		if p.Name == name {
			return i
		}
	}
	return -1
}

// CircuitParams lists every number of c that the design aids can vary:
// the value of each resistor, capacitor, inductor and controlled source,
// each opamp's a0 and, where present, gbw, p2, rid, rcm, ro, cid and ccm,
// and each transistor's gm (its other values held).
// Independent sources are left out: a linear analysis's impedances and
// gains do not depend on them.
func CircuitParams(c *circuit.Circuit) []Param {
	var ps []Param
	for i, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor, circuit.Capacitor, circuit.Inductor:
			ps = append(ps, Param{Name: p.Name, Unit: kindUnit[p.Kind], Nominal: p.Value, Class: Passive,
				Kind: p.Kind, Part: i, Field: FieldValue, Default: true})
		case circuit.VCVS, circuit.VCCS, circuit.CCVS, circuit.CCCS:
			if p.Value != 0 {
				ps = append(ps, Param{Name: p.Name, Unit: kindUnit[p.Kind], Nominal: p.Value, Class: Other,
					Kind: p.Kind, Part: i, Field: FieldValue})
			}
		case circuit.BJT, circuit.MOS:
			ps = append(ps, Param{Name: p.Name + ".gm", Unit: "S", Nominal: p.Value, Class: Other,
				Kind: p.Kind, Part: i, Field: FieldValue})
		case circuit.OpAmp:
			a := p.Amp
			for _, f := range []struct {
				field Field
				v     float64
				unit  string
				class Class
			}{{FieldA0, a.A0, "", AmpSpread}, {FieldGBW, a.GBW, "Hz", AmpSpread}, {FieldP2, a.P2, "Hz", Other},
				{FieldRid, a.Rid, "Ω", Other}, {FieldRcm, a.Rcm, "Ω", Other}, {FieldRo, a.Ro, "Ω", Other},
				{FieldCid, a.Cid, "F", Other}, {FieldCcm, a.Ccm, "F", Other}} {
				if f.v > 0 {
					ps = append(ps, Param{Name: p.Name + "." + f.field.String(), Unit: f.unit, Nominal: f.v,
						Class: f.class, Kind: circuit.OpAmp, Part: i, Field: f.field})
				}
			}
		}
	}
	return ps
}

var kindUnit = map[circuit.Kind]string{circuit.Resistor: "Ω", circuit.Capacitor: "F", circuit.Inductor: "H",
	circuit.VCVS: "", circuit.VCCS: "S", circuit.CCVS: "Ω", circuit.CCCS: ""}

var unitKind = map[string]circuit.Kind{"Ω": circuit.Resistor, "F": circuit.Capacitor, "H": circuit.Inductor}

// ampFields maps a stage's op-amp parameter names to the opamp's fields.
var ampFields = map[string]Field{"a0": FieldA0, "gbw": FieldGBW, "p2": FieldP2, "rid": FieldRid, "rcm": FieldRcm, "ro": FieldRo, "cid": FieldCid, "ccm": FieldCcm}

// StageParams lists the parameters of stage t at values v as Params of c,
// the circuit that t.Circuit(v) parses to. Each parameter is located as one
// number of c where that is so — a part of the same name and value, or an
// op-amp parameter (a0, gbw …) of the stage's reference opamp — and the
// location is checked by regenerating the stage's text with the parameter
// changed. When every parameter checks out, the returned rebuild is nil and
// the aids write values straight into a copy of c (fast); otherwise rebuild
// regenerates and parses the text for each evaluation.
func StageParams(t *topology.Topology, v topology.Values, c *circuit.Circuit) (params []Param, rebuild func(x []float64) (*circuit.Circuit, error)) {
	ref, refOK := c.PartIndex(t.Reference)
	refAmp := refOK && c.Parts[ref].Kind == circuit.OpAmp
	direct := true
	for _, tp := range t.Params {
		x, ok := v[tp.Name]
		if !ok || x == 0 || tp.Group == "noise" {
			// Noise densities change no impedance, gain or margin.
			continue
		}
		p := Param{Name: tp.Name, Unit: tp.Unit, Nominal: x, Class: Other, Part: -1}
		if k, ok := unitKind[tp.Unit]; ok && tp.Group != "amplifier" {
			p.Class, p.Kind, p.Default = Passive, k, tp.Group == "network"
		}
		if i, ok := c.PartIndex(tp.Name); ok && c.Parts[i].Kind != circuit.OpAmp && c.Parts[i].Value == x {
			p.Part, p.Field, p.Kind = i, FieldValue, c.Parts[i].Kind
		} else if f, ok := ampFields[tp.Name]; ok && refAmp && getField(&c.Parts[ref], f) == x {
			p.Part, p.Field, p.Kind = ref, f, circuit.OpAmp
			if f == FieldA0 || f == FieldGBW {
				p.Class = AmpSpread
			}
		}
		if p.Part < 0 || !locatedRight(t, v, c, p) {
			p.Part = -1
			direct = false
		}
		params = append(params, p)
	}
	if direct {
		return params, nil
	}
	nodes := len(c.Nodes)
	parts := len(c.Parts)
	return params, func(x []float64) (*circuit.Circuit, error) {
		w := topology.Values{}
		for k, val := range v {
			w[k] = val
		}
		for i, p := range params {
			w[p.Name] = x[i]
		}
		c2, err := circuit.ParseWith(t.Circuit(w), circuit.Options{Temperature: c.Temperature})
		if err != nil {
			return nil, err
		}
		if len(c2.Nodes) != nodes || len(c2.Parts) != parts {
			return nil, fmt.Errorf("the stage's circuit changed shape with its parameter values")
		}
		return c2, nil
	}
}

// locatedRight regenerates t's text with p changed and checks that the
// result is c with exactly p's number changed.
func locatedRight(t *topology.Topology, v topology.Values, c *circuit.Circuit, p Param) bool {
	w := topology.Values{}
	for k, val := range v {
		w[k] = val
	}
	moved := p.Nominal * 1.0625
	w[p.Name] = moved
	c2, err := circuit.ParseWith(t.Circuit(w), circuit.Options{Temperature: c.Temperature})
	if err != nil || len(c2.Parts) != len(c.Parts) || len(c2.Nodes) != len(c.Nodes) {
		return false
	}
	want := copyCircuit(c)
	setField(&want.Parts[p.Part], p.Field, moved)
	for i := range c2.Parts {
		a, b := &want.Parts[i], &c2.Parts[i]
		if a.Name != b.Name || a.Kind != b.Kind || a.Value != b.Value || (a.Amp == nil) != (b.Amp == nil) {
			return false
		}
		if a.Amp != nil && *a.Amp != *b.Amp {
			return false
		}
		if (a.Dev == nil) != (b.Dev == nil) || a.Dev != nil && *a.Dev != *b.Dev {
			return false
		}
		if len(a.Nodes) != len(b.Nodes) {
			return false
		}
		for j := range a.Nodes {
			if a.Nodes[j] != b.Nodes[j] {
				return false
			}
		}
	}
	return true
}

// copyCircuit returns a copy of c whose parts (and opamp models) can be
// changed without touching c. The name maps are shared, read-only.
func copyCircuit(c *circuit.Circuit) *circuit.Circuit {
	cp := *c
	cp.Parts = append([]circuit.Part(nil), c.Parts...)
	for i := range cp.Parts {
		if a := cp.Parts[i].Amp; a != nil {
			b := *a
			cp.Parts[i].Amp = &b
		}
	}
	return &cp
}

func getField(p *circuit.Part, f Field) float64 {
	switch f {
	case FieldValue:
		return p.Value
	case FieldA0:
		return p.Amp.A0
	case FieldGBW:
		return p.Amp.GBW
	case FieldP2:
		return p.Amp.P2
	case FieldRid:
		return p.Amp.Rid
	case FieldRcm:
		return p.Amp.Rcm
	case FieldRo:
		return p.Amp.Ro
	case FieldCid:
		return p.Amp.Cid
	case FieldCcm:
		return p.Amp.Ccm
	}
	panic("aids: unknown field")
}

func setField(p *circuit.Part, f Field, x float64) {
	switch f {
	case FieldValue:
		p.Value = x
	case FieldA0:
		p.Amp.A0 = x
	case FieldGBW:
		p.Amp.GBW = x
	case FieldP2:
		p.Amp.P2 = x
	case FieldRid:
		p.Amp.Rid = x
	case FieldRcm:
		p.Amp.Rcm = x
	case FieldRo:
		p.Amp.Ro = x
	case FieldCid:
		p.Amp.Cid = x
	case FieldCcm:
		p.Amp.Ccm = x
	default:
		panic("aids: unknown field")
	}
}

// Sample is what one evaluation yields at the spot frequency.
type Sample struct {
	// Z holds each port's impedance (Blackman's, or the direct solution
	// where Blackman's is not finite); NaN when neither is finite.
	Z []complex128
	// G is the gain, NaN without one.
	G complex128
	// PM and FC are the governing phase margin (degrees) and its
	// crossover (Hz), NaN when the loop was not tracked or has none.
	PM, FC float64
	// ZErr and GErr bound the errors of Z and G (see feedback.PortErrors).
	ZErr []float64
	GErr float64
}

// evaluator turns parameter values into Samples. It owns a scratch copy of
// the model's circuit and its ports, reused by every evaluation, so it is
// not safe for concurrent use.
type evaluator struct {
	m     *Model
	tol   float64 // feedback.Analyzer.Tol for every evaluation
	c     *circuit.Circuit
	ports []feedback.Port
	loop  *loop // nil: phase margin not tracked
}

func newEvaluator(m *Model) *evaluator {
	e := &evaluator{m: m, c: copyCircuit(m.Circuit)}
	e.ports = make([]feedback.Port, len(m.Ports))
	for i, p := range m.Ports {
		e.ports[i] = feedback.Port{Name: p.Name, A: p.A, B: p.B}
	}
	return e
}

// analyzer builds the analyzer for values x. The analyzer it returns is
// valid until the next call.
func (e *evaluator) analyzer(x []float64) (*feedback.Analyzer, error) {
	c := e.c
	if e.m.Rebuild != nil {
		var err error
		if c, err = e.m.Rebuild(x); err != nil {
			return nil, err
		}
	} else {
		for i, p := range e.m.Params {
			setField(&c.Parts[p.Part], p.Field, x[i])
		}
	}
	for i := range e.ports {
		e.ports[i].Drivers, e.ports[i].HeldBy = nil, nil
	}
	a, err := feedback.New(c, e.m.Reference, e.ports, e.m.Gain)
	if err == nil {
		a.Tol = e.tol
	}
	return a, err
}

// eval analyzes the circuit at values x into dst (whose Z must have one
// entry per port).
func (e *evaluator) eval(x []float64, dst *Sample) error {
	for i := range dst.Z {
		dst.Z[i], dst.ZErr[i] = cmplx.NaN(), math.NaN()
	}
	dst.G, dst.GErr, dst.PM, dst.FC = cmplx.NaN(), math.NaN(), math.NaN(), math.NaN()
	a, err := e.analyzer(x)
	if err != nil {
		return err
	}
	pt, err := a.At(e.m.Frequency)
	if err != nil {
		return err
	}
	for i, pr := range pt.Ports {
		dst.Z[i], dst.ZErr[i] = finiteOr(pr.Z, pr.Err.Z, pr.ZDirect, pr.Err.ZDirect)
	}
	if g := pt.Gain; g != nil {
		dst.G, dst.GErr = finiteOr(g.G, g.Err.G, g.GDirect, g.Err.GDirect)
	}
	if e.loop != nil {
		dst.PM, dst.FC = e.loop.margin(a)
	}
	return nil
}

func newSample(ports int) Sample {
	return Sample{Z: make([]complex128, ports), ZErr: make([]float64, ports)}
}

// finiteOr returns a with its bound ea when a is finite, else b with eb,
// else NaN.
func finiteOr(a complex128, ea float64, b complex128, eb float64) (complex128, float64) {
	if numeric.Finite(a) {
		return a, ea
	}
	if numeric.Finite(b) {
		return b, eb
	}
	return cmplx.NaN(), math.NaN()
}
