package api

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"

	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/numeric"
	"zport/engine/topology"
	"zport/engine/value"
)

// MaxPoints bounds a sweep.
const MaxPoints = 5000

// MaxCircuitBytes bounds circuit text.
const MaxCircuitBytes = 256 << 10

// Problem is an error with a place: a circuit line and column, or a named
// parameter or request field. Err, when set, is its cause (a
// *feedback.SingularError naming nodes and parts), kept for errors.As; More
// lists the further problems of circuit text that has several.
type Problem struct {
	Line, Column int
	Param        string
	Msg          string
	Err          error
	More         []*Problem
}

// stopProblem turns the error of a loop stopped by the analysis's context
// into a Problem saying in which part of the analysis, and how far it got:
// "the time budget ran out in the sweep, after 120 of 400 frequencies". It
// is nil for any other error.
func stopProblem(err error, what string) *Problem {
	var st *feedback.Stopped
	if !errors.As(err, &st) {
		return nil
	}
	why := "the analysis was cancelled"
	if errors.Is(err, context.DeadlineExceeded) {
		why = "the time budget ran out"
	}
	return &Problem{Msg: fmt.Sprintf("%s in %s, after %d of %d %s", why, what, st.Done, st.Total, st.Units), Err: st.Err}
}

// Unwrap returns the cause.
func (p *Problem) Unwrap() error { return p.Err }

func (p *Problem) Error() string {
	if p.Line > 0 {
		return fmt.Sprintf("%d:%d: %s", p.Line, p.Column, p.Msg)
	}
	if p.Param != "" {
		return p.Param + ": " + p.Msg
	}
	return p.Msg
}

func fieldErr(field, format string, args ...any) *Problem {
	return &Problem{Param: field, Msg: fmt.Sprintf(format, args...)}
}

// Body converts any error from Analyze into the wire error body: its place,
// the nodes and parts a singular circuit is traced to, and every problem
// of circuit text that has several.
func Body(err error) ErrorBody {
	var b ErrorBody
	var p *Problem
	if errors.As(err, &p) {
		b = ErrorBody{Line: p.Line, Column: p.Column, Param: p.Param, Message: p.Msg}
		if len(p.More) > 0 {
			b.Errors = append(b.Errors, ErrorBody{Line: p.Line, Column: p.Column, Message: p.Msg})
			for _, m := range p.More {
				b.Errors = append(b.Errors, ErrorBody{Line: m.Line, Column: m.Column, Message: m.Msg})
			}
		}
	} else {
		b = ErrorBody{Message: err.Error()}
	}
	var se *feedback.SingularError
	if errors.As(err, &se) {
		b.Nodes, b.Parts = se.Nodes, se.Parts
	}
	return b
}

// sizeProblem refuses circuit text longer than MaxCircuitBytes.
func sizeProblem(text string) *Problem {
	if len(text) > MaxCircuitBytes {
		return &Problem{Line: 1, Column: 1, Msg: fmt.Sprintf("the circuit text is %d KB; the limit is %d KB", len(text)>>10, MaxCircuitBytes>>10)}
	}
	return nil
}

// Prepared is a request resolved against its circuit, ready to analyze.
type Prepared struct {
	Req      Request
	Circuit  *circuit.Circuit
	Analyzer *feedback.Analyzer
	Stage    *topology.Topology
	Values   topology.Values
	Text     string
	PortDefs []string

	ctx context.Context // of RunContext; nil means never stopped

	// Spot and Points are the analyzer's answers at the spot frequency
	// and at each frequency of the sweep (nil without one), set by Run
	// before the analyses run: an analysis that asked the analyzer for
	// more in its Before (an adjoint solution) reads it here.
	Spot   feedback.Point
	Points []feedback.Point
}

// Context is the context the request runs under (see RunContext): an
// analysis with a long loop checks it between units of work and, once it
// is done, stops with an error wrapping its Err. It is never nil.
func (p *Prepared) Context() context.Context {
	if p.ctx == nil {
		return context.Background()
	}
	return p.ctx
}

// Prepare parses and resolves a request without analyzing it.
func Prepare(req Request) (*Prepared, error) { return prepare(req, nil) }

// PrepareParsed is Prepare for a circuit-text request whose text the
// caller has parsed already: c must be what circuit.Parse(req.Circuit)
// returned (InspectParsed gives it). It saves parsing the text twice when
// a page both inspects and analyzes it on every edit; a c parsed at another
// temperature than the request's is parsed again.
func PrepareParsed(req Request, c *circuit.Circuit) (*Prepared, error) {
	if c == nil || req.Topology != "" {
		return nil, fieldErr("circuit", "PrepareParsed needs circuit text and its parsed circuit")
	}
	return prepare(req, c)
}

func prepare(req Request, parsed *circuit.Circuit) (*Prepared, error) {
	p := &Prepared{Req: req}
	if (req.Circuit == "") == (req.Topology == "") {
		return nil, fieldErr("circuit", "give exactly one of \"circuit\" (circuit text) and \"topology\" (a catalog stage ID)")
	}
	kelvin, err := req.temperature()
	if err != nil {
		return nil, err
	}
	text := req.Circuit
	ref := req.Reference
	ports := req.Ports
	gain := req.Gain
	if req.Topology != "" {
		t, ok := topology.Lookup(req.Topology)
		if !ok {
			ids := []string{}
			for _, s := range topology.Catalog() {
				ids = append(ids, s.ID)
			}
			return nil, fieldErr("topology", "no stage %q in the catalog (one of: %s)", req.Topology, strings.Join(ids, ", "))
		}
		v, err := t.Values(req.Params)
		if err != nil {
			var pe *topology.ParamError
			if errors.As(err, &pe) {
				return nil, &Problem{Param: pe.Param, Msg: pe.Msg}
			}
			return nil, err
		}
		v[topology.TemperatureKey] = kelvin
		p.Stage, p.Values = t, v
		text = t.Circuit(v)
		if ref == "" {
			ref = t.Reference
		}
		if len(ports) == 0 {
			for _, pd := range t.Ports {
				ports = append(ports, pd.Name)
			}
		}
		if gain == nil && t.Gain != nil {
			gain = &GainSpec{Source: t.Gain.Source, Output: t.Gain.Output}
		}
	} else if len(req.Params) > 0 {
		return nil, fieldErr("params", "\"params\" goes with \"topology\"; for circuit text, edit the values in the text")
	}
	if p := sizeProblem(text); p != nil {
		return nil, p
	}
	c := parsed
	if c == nil || c.Temperature != kelvin {
		c, err = circuit.ParseWith(text, circuit.Options{Temperature: kelvin})
	}
	if err != nil {
		var list circuit.ErrorList
		if errors.As(err, &list) && len(list) > 0 {
			p := &Problem{Line: list[0].Line, Column: list[0].Column, Msg: list[0].Msg}
			for _, e := range list[1:] {
				p.More = append(p.More, &Problem{Line: e.Line, Column: e.Column, Msg: e.Msg})
			}
			return nil, p
		}
		return nil, err
	}
	p.Circuit, p.Text = c, text
	if req.Frequency < 0 || math.IsNaN(req.Frequency) || math.IsInf(req.Frequency, 0) {
		return nil, fieldErr("frequency", "the spot frequency must be ≥ 0 Hz")
	}
	if s := req.Sweep; s != nil {
		switch {
		case !(s.From > 0) || math.IsInf(s.From, 0):
			return nil, fieldErr("sweep.from", "the sweep must start above 0 Hz (it is log-spaced)")
		case !(s.To > s.From) || math.IsInf(s.To, 0):
			return nil, fieldErr("sweep.to", "the sweep must end above its start")
		case s.Points < 2 || s.Points > MaxPoints:
			return nil, fieldErr("sweep.points", "a sweep has 2 to %d points", MaxPoints)
		}
	}
	var fp []feedback.Port
	for i, name := range ports {
		port, err := resolvePort(c, name)
		if err != nil {
			return nil, fieldErr(fmt.Sprintf("ports[%d]", i), "%v", err)
		}
		fp = append(fp, port)
		p.PortDefs = append(p.PortDefs, name)
	}
	var g *feedback.Gain
	if gain != nil {
		g, err = resolveGain(c, *gain)
		if err != nil {
			return nil, err
		}
	}
	a, err := feedback.New(c, ref, fp, g)
	if err != nil {
		return nil, fieldErr("reference", "%v", err)
	}
	p.Analyzer = a
	p.Req.Reference = ref
	return p, nil
}

func resolvePort(c *circuit.Circuit, name string) (feedback.Port, error) {
	if pt, ok := c.Port(name); ok {
		return feedback.Port{Name: pt.Name, A: pt.A, B: pt.B}, nil
	}
	a, b, pair := strings.Cut(name, ",")
	ia, ok := c.Node(strings.TrimSpace(a))
	if !ok {
		return feedback.Port{}, fmt.Errorf("%s is neither a port nor a node of the circuit", value.Quote(name))
	}
	ib := circuit.Gnd
	if pair {
		ib, ok = c.Node(strings.TrimSpace(b))
		if !ok {
			return feedback.Port{}, fmt.Errorf("node %s is not in the circuit", value.Quote(strings.TrimSpace(b)))
		}
	}
	if ia == ib {
		return feedback.Port{}, fmt.Errorf("port %s has both ends on one node", value.Quote(name))
	}
	return feedback.Port{Name: name, A: ia, B: ib}, nil
}

func resolveGain(c *circuit.Circuit, g GainSpec) (*feedback.Gain, error) {
	p, ok := c.Part(g.Source)
	if !ok {
		return nil, fieldErr("gain.source", "no source called %s (one of: %s)", value.Quote(g.Source), strings.Join(c.Sources(), ", "))
	}
	if p.Kind != circuit.VSource && p.Kind != circuit.ISource {
		return nil, fieldErr("gain.source", "%q is a %s; a gain is taken from a vsource or an isource", g.Source, p.Kind)
	}
	src := -1
	for i := range c.Parts {
		if c.Parts[i].Name == g.Source {
			src = i
		}
	}
	ia, ib, bad := nodePair(c, g.Output)
	if bad != "" {
		return nil, fieldErr("gain.output", "%s", bad)
	}
	return &feedback.Gain{Source: src, OutA: ia, OutB: ib, SourceName: g.Source, OutputName: g.Output}, nil
}

// Analyze answers a request.
func Analyze(req Request) (*Response, error) { return AnalyzeContext(context.Background(), req) }

// AnalyzeContext answers a request under ctx, which bounds its time: see
// RunContext.
func AnalyzeContext(ctx context.Context, req Request) (*Response, error) {
	p, err := Prepare(req)
	if err != nil {
		return nil, err
	}
	return p.RunContext(ctx)
}

// Run analyzes a prepared request.
func (p *Prepared) Run() (*Response, error) { return p.RunContext(context.Background()) }

// RunContext analyzes a prepared request under ctx. The long loops — the
// sweep's frequencies, each analysis asked for (a tolerance study's corners
// and trials, the sensitivities' parameters, the crossover search grid of
// the design aids) — check ctx between units of work; once it is done the
// analysis stops cleanly with a *Problem that says where it stopped and
// wraps ctx.Err() (errors.Is(err, context.DeadlineExceeded) for a time
// budget). Nothing is killed: the work in hand finishes first.
func (p *Prepared) RunContext(ctx context.Context) (*Response, error) {
	p.ctx = ctx
	a := p.Analyzer
	if err := p.beforeAnalyses(); err != nil {
		return nil, err
	}
	a.Condition = true
	pt, err := a.At(p.Req.Frequency)
	a.Condition = false
	if err != nil {
		return nil, &Problem{Msg: err.Error(), Err: err}
	}
	resp := &Response{Frequency: pt.F, Reference: p.Req.Reference, ReturnRatio: C(pt.T), ReturnRatioError: bound(pt.T, pt.TErr), Notes: []string{}, Condition: F(pt.Cond),
		Temperature: p.Circuit.Temperature, Devices: devices(p.Circuit)}
	for i, pr := range pt.Ports {
		resp.Ports = append(resp.Ports, portResult(a, i, pr))
	}
	if pt.Gain != nil {
		resp.Gain = p.gainResult(pt.Gain)
	}
	var notes []string
	if a.Ref < 0 {
		notes = append(notes, feedback.NoReferenceNote)
	}
	notes = append(notes, pt.Notes...)
	p.Spot, p.Points = pt, nil
	if s := p.Req.Sweep; s != nil {
		grid := numeric.LogSpan(make([]float64, s.Points), s.From, s.To)
		pts, err := a.SweepContext(ctx, grid)
		if err != nil {
			if p := stopProblem(err, "the sweep"); p != nil {
				return nil, p
			}
			return nil, &Problem{Msg: err.Error(), Err: err}
		}
		p.Points = pts
		resp.Sweep = sweepResult(grid, pts)
		sweepErrors(resp.Sweep, pts)
		resp.fillSweepNames()
		if a.Ref >= 0 {
			T := make([]complex128, len(pts))
			for i := range pts {
				T[i] = pts[i].T
			}
			m := feedback.Margins(grid, T, a.ReturnRatio)
			resp.Margins = margins(m)
			p.loopViews(resp.Sweep, resp.Margins)
		}
		notes = append(notes, feedback.Notes(pts)...)
	}
	seen := map[string]bool{}
	for _, n := range notes {
		if !seen[n] {
			seen[n] = true
			resp.Notes = append(resp.Notes, n)
		}
	}
	if err := p.runAnalyses(resp); err != nil {
		return nil, err
	}
	if p.Stage != nil {
		resp.Topology = p.echo()
	}
	return resp, nil
}

func portResult(a *feedback.Analyzer, i int, pr feedback.PortResult) PortResult {
	port := a.Ports[i]
	out := PortResult{
		Name: port.Name, A: a.C.Nodes[port.A], B: a.C.Nodes[port.B],
		Z0: C(pr.Z0), TShort: C(pr.TShort), TOpen: C(pr.TOpen), Z: C(pr.Z), ZDirect: C(pr.ZDirect),
		Agreement: F(pr.Agreement), Errors: portErrors(pr),
	}
	if out.Z == nil {
		out.Y = C(pr.Y)
	}
	return out
}

func (p *Prepared) gainResult(g *feedback.GainResult) *GainResult {
	spec := p.Analyzer.Gain
	return &GainResult{Source: spec.SourceName, Output: spec.OutputName, Unit: spec.Unit(p.Circuit),
		G0: C(g.G0), GInf: C(g.GInf), G: C(g.G), GDirect: C(g.GDirect), Agreement: F(g.Agreement), Errors: gainErrors(g)}
}

func sweepResult(grid []float64, pts []feedback.Point) *SweepResult {
	n := len(pts)
	s := &SweepResult{Frequency: grid}
	if n == 0 {
		return s
	}
	// One backing array for every value of the sweep, rather than an
	// allocation per number: a page recomputes this on every keystroke.
	per := 1 + 5*len(pts[0].Ports)
	if pts[0].Gain != nil {
		per += 4
	}
	arena := make([]Complex, 0, n*per)
	c := func(z complex128) *Complex {
		if !numeric.Finite(z) {
			return nil
		}
		arena = append(arena, Complex{real(z), imag(z)})
		return &arena[len(arena)-1]
	}
	col := func() []*Complex { return make([]*Complex, n) }
	s.ReturnRatio = col()
	s.Ports = make([]PortSweep, len(pts[0].Ports))
	for j := range s.Ports {
		s.Ports[j] = PortSweep{Z0: col(), TShort: col(), TOpen: col(), Z: col(), ZDirect: col()}
	}
	if pts[0].Gain != nil {
		s.Gain = &GainSweep{G0: col(), GInf: col(), G: col(), GDirect: col()}
	}
	for i, pt := range pts {
		s.ReturnRatio[i] = c(pt.T)
		for j, pr := range pt.Ports {
			ps := &s.Ports[j]
			ps.Z0[i], ps.TShort[i], ps.TOpen[i], ps.Z[i], ps.ZDirect[i] = c(pr.Z0), c(pr.TShort), c(pr.TOpen), c(pr.Z), c(pr.ZDirect)
		}
		if g := pt.Gain; g != nil {
			s.Gain.G0[i], s.Gain.GInf[i], s.Gain.G[i], s.Gain.GDirect[i] = c(g.G0), c(g.GInf), c(g.G), c(g.GDirect)
		}
	}
	return s
}

// fillSweepNames copies the port names of the spot result into the sweep.
func (r *Response) fillSweepNames() {
	if r.Sweep == nil {
		return
	}
	for j := range r.Sweep.Ports {
		if j < len(r.Ports) {
			r.Sweep.Ports[j].Name = r.Ports[j].Name
		}
	}
}

func margins(m feedback.MarginResult) *Margins {
	out := &Margins{Crossovers: []Crossover{}, PhaseCrossings: []PhaseCrossing{},
		Crossover: F(m.Crossover), PhaseMargin: F(m.PhaseMargin), GainMargin: F(m.GainMargin),
		Verdict: m.Verdict, VerdictDetail: m.Detail}
	for _, c := range m.Crossovers {
		dir := "up"
		if c.Falling {
			dir = "down"
		}
		out.Crossovers = append(out.Crossovers, Crossover{Frequency: c.F, PhaseMargin: c.PhaseMargin, Direction: dir})
	}
	for _, p := range m.PhaseCrossings {
		out.PhaseCrossings = append(out.PhaseCrossings, PhaseCrossing{Frequency: p.F, GainMargin: p.GainMargin})
	}
	return out
}

func (p *Prepared) echo() *TopologyEcho {
	t := p.Stage
	params := map[string]float64{}
	for k, x := range p.Values {
		if k != topology.TemperatureKey { // the request's setting, echoed as the response's temperature
			params[k] = x
		}
	}
	e := &TopologyEcho{ID: t.ID, Title: t.Title, Params: params, Circuit: p.Text,
		Reference: p.Req.Reference, Ports: p.PortDefs}
	if g := p.Analyzer.Gain; g != nil {
		e.Gain = &GainSpec{Source: g.SourceName, Output: g.OutputName}
	}
	if t.Forms == nil {
		return e
	}
	forms := t.Forms(p.Values, p.Req.Frequency)
	cf := &ClosedForm{ReturnRatio: formula(forms.T), Gain: formula(forms.Gain), Ports: []PortFormulas{}}
	for _, pf := range forms.Ports {
		cf.Ports = append(cf.Ports, PortFormulas{Name: pf.Name, Z0: formula(pf.Z0), TShort: formula(pf.TShort), TOpen: formula(pf.TOpen), Z: formula(pf.Z)})
	}
	e.ClosedForm = cf
	for _, x := range forms.Extras {
		e.Extras = append(e.Extras, Extra{Name: x.Name, Value: F(x.Value), Unit: x.Unit, Note: x.Note, Source: x.Source})
	}
	return e
}

func formula(f *topology.Formula) *Formula {
	if f == nil {
		return nil
	}
	return &Formula{Value: C(f.Value), Text: f.Text, Source: f.Source}
}

// AnalyzeJSON answers a JSON request with JSON; ok is false when the answer
// is an ErrorResponse. The input is one JSON object, with nothing but white
// space after it. It never panics: a panic inside the engine becomes an
// error response naming it as an internal error.
func AnalyzeJSON(in []byte) (out []byte, ok bool) {
	return AnalyzeJSONContext(context.Background(), in)
}

// AnalyzeJSONContext is AnalyzeJSON under ctx, which bounds its time (see
// RunContext).
func AnalyzeJSONContext(ctx context.Context, in []byte) (out []byte, ok bool) {
	defer func() {
		if r := recover(); r != nil {
			out, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: fmt.Sprintf("internal error: %v (please report this circuit)", r)}})
			ok = false
		}
	}()
	req, err := decodeRequest(in)
	if err != nil {
		out, _ = json.Marshal(ErrorResponse{Error: Body(err)})
		return out, false
	}
	resp, err := AnalyzeContext(ctx, req)
	if err != nil {
		out, _ = json.Marshal(ErrorResponse{Error: Body(err)})
		return out, false
	}
	out, err = json.Marshal(resp)
	if err != nil {
		out, _ = json.Marshal(ErrorResponse{Error: ErrorBody{Message: "internal error: " + err.Error()}})
		return out, false
	}
	return out, true
}

// decodeRequest reads one request: a JSON object, strictly, followed by
// nothing but white space (a second object, or anything else, is an error
// rather than being ignored).
func decodeRequest(in []byte) (Request, error) {
	var req Request
	dec := json.NewDecoder(bytes.NewReader(in))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&req); err != nil {
		var p *Problem
		if errors.As(err, &p) {
			return req, err
		}
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) && te.Field != "" {
			return req, fieldErr(te.Field, "want %s, not a JSON %s", jsonType(te.Type.String()), te.Value)
		}
		return req, &Problem{Msg: "request is not valid JSON for this contract: " + err.Error()}
	}
	if off := dec.InputOffset(); len(bytes.TrimSpace(in[off:])) > 0 {
		rest := bytes.TrimSpace(in[off:])
		return req, &Problem{Msg: fmt.Sprintf("request is not valid JSON for this contract: unexpected %s after the request object (at byte %d); send one request at a time", value.Quote(string(rest)), len(in)-len(rest)+1)}
	}
	return req, nil
}
