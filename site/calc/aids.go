package calc

import (
	"encoding/json"
	"fmt"
	"strconv"
	"strings"

	"zport/engine/aids"
	"zport/engine/api"
	"zport/engine/circuit"
	"zport/site/view"
)

// designAids is the "Design aids" section under each calculator: a
// tolerance study, standard values and sensitivities. They run on request,
// not on every recompute (a study takes up to seconds), so the analysis has
// no Ask or Section: its script (site/assets/aids.js) renders the settings
// form (AidsForm), the fast panels (AidsPanels) and the study run in slices
// (StartTolerance, ToleranceOutput) through the bridge, and reports its
// settings to the calculator, which keeps them in the form and the share
// link under "aid." (see Study).
var designAids = Analysis{
	Key:    aidsKey,
	Title:  "Design aids",
	Accept: studyKey,
	Check:  checkStudy,
}

// checkStudy checks the design aids' settings of a link as far as they
// can be checked without running the study: every setting readable, the
// seed, trials, distribution and targets, each tolerance and the part it
// names, each opamp's spread, and the series. An error names the setting
// as the link does ("aid.n", "aid.tol.R1", "aid.t2").
func checkStudy(c *Context) *api.ErrorBody {
	st, bad := studyOf(c.Values)
	if bad != nil {
		return bad
	}
	tr, bad := st.ToleranceKey()
	if bad != nil {
		return settingOf(bad, c.Values)
	}
	req, _, _, bad := AidsInput{Form: *c.Form}.base()
	if bad != nil {
		return nil // the form's own trouble, not the study's
	}
	api.Tolerance.Ask(&req, tr)
	api.StandardValues.Ask(&req, st.StandardKey())
	for _, check := range []func(api.Request) error{api.CheckTolerance, api.CheckStandardValues} {
		if err := check(req); err != nil {
			body := api.Body(err)
			return settingOf(&body, c.Values)
		}
	}
	return nil
}

// settingOf renames an error that names a field of the engine's request
// ("tolerance.seed", "tolerance.parts.R1", "tolerance.targets[0].value",
// "standardValues.series") after the design-aid setting that holds it
// ("aid.seed", "aid.tol.R1", "aid.t1", "aid.e"), as a share link names
// it; v are the settings. An error it cannot place is returned as it is.
func settingOf(bad *api.ErrorBody, v Values) *api.ErrorBody {
	p, name := bad.Param, ""
	switch {
	case p == "tolerance.default":
		name = keyTol
	case p == FieldDistribution:
		name = keyDist
	case p == FieldSeed:
		name = keySeed
	case p == FieldTrials:
		name = keyTrials
	case p == "standardValues.series":
		name = keySeries
	case p == "standardValues.capacitorSeries":
		name = keyCapSeries
	case strings.HasPrefix(p, "tolerance.parts."):
		name = keyPartTol + strings.TrimPrefix(p, "tolerance.parts.")
	case strings.HasPrefix(p, "tolerance.amps."):
		amp, field, _ := strings.Cut(strings.TrimPrefix(p, "tolerance.amps."), ".")
		name = keyA0Min + amp
		if field == "gbwMin" || field == "" && v[keyA0Min+amp] == "" {
			name = keyGBWMin + amp
		}
	case strings.HasPrefix(p, "tolerance.targets["):
		// The study numbers its targets without the gaps of the link's
		// t1 … t8: the i-th is the i-th of those given.
		i, err := strconv.Atoi(strings.TrimPrefix(p[:strings.IndexByte(p, ']')], "tolerance.targets["))
		for n := 1; err == nil && n <= MaxTargets; n++ {
			k := keyTarget + strconv.Itoa(n)
			if v[k] == "" {
				continue
			}
			if i == 0 {
				name = k
				break
			}
			i--
		}
	}
	if name == "" {
		return bad
	}
	return &api.ErrorBody{Param: aidsKey + "." + name, Message: bad.Message}
}

// aidsKey is the design aids' key: their settings are "aid.…".
const aidsKey = "aid"

// AidsInput is what a page sends for the design aids: the calculator's form,
// whose Settings["aid"] are the study's settings and whose ID prefixes the
// element ids.
type AidsInput struct {
	Form Form `json:"form"`
	// Only limits AidsPanels to one panel, "standard" or "sensitivity",
	// so that a page can compute them in separate short tasks.
	Only string `json:"only,omitempty"`
}

// AidsOutput is a rendered piece of the design-aid section, or the error
// that stopped it. Which fields are set depends on the call.
type AidsOutput struct {
	// HTML is the settings form (AidsForm) or the tolerance panel.
	HTML string `json:"html,omitempty"`
	// Standard and Sensitivity are the fast panels (AidsPanels); each may
	// instead carry its own error in StandardError or SensitivityError.
	Standard         string         `json:"standard,omitempty"`
	StandardError    *api.ErrorBody `json:"standardError,omitempty"`
	Sensitivity      string         `json:"sensitivity,omitempty"`
	SensitivityError *api.ErrorBody `json:"sensitivityError,omitempty"`
	// Parts identifies what the settings form lists (parts, nominal
	// values, opamps, ports); a page re-renders the form when it changes.
	Parts string `json:"parts,omitempty"`
	// Done and Total count a tolerance run's units of work.
	Done  int            `json:"done,omitempty"`
	Total int            `json:"total,omitempty"`
	Error *api.ErrorBody `json:"error,omitempty"`
}

func errOut(param, format string, args ...any) AidsOutput {
	return AidsOutput{Error: &api.ErrorBody{Param: param, Message: fmt.Sprintf(format, args...)}}
}

// base returns the engine request of in's circuit without a sweep (the
// aids work at the spot frequency), the catalog entry when it is a catalog
// stage, and the study of in's settings.
func (in AidsInput) base() (api.Request, *api.CatalogEntry, Study, *api.ErrorBody) {
	f := in.Form
	var entry *api.CatalogEntry
	if f.Topology != "" {
		e, ok := api.LookupEntry(f.Topology)
		if !ok {
			return api.Request{}, nil, Study{}, &api.ErrorBody{Param: "topology", Message: fmt.Sprintf("no stage %q in the catalog", f.Topology)}
		}
		f, entry = f.withDefaults(e), &e
	}
	st, bad := studyOf(f.Settings[aidsKey])
	if bad != nil {
		return api.Request{}, nil, Study{}, bad
	}
	f.Fragment, f.Sweep = nil, SweepForm{}
	req, bad := f.request()
	return req, entry, st, bad
}

func (in AidsInput) id() string {
	if in.Form.ID == "" {
		return "calc"
	}
	return in.Form.ID
}

// Layout is how a design-aid panel is drawn: ID prefixes its element ids,
// ChartWidth is the page's narrow chart width (Form.ChartWidth; 0 for the
// charts' own).
type Layout struct {
	ID         string
	ChartWidth int
}

func (in AidsInput) layout() Layout { return Layout{ID: in.id(), ChartWidth: in.Form.ChartWidth} }

// ---- what the form lists ----

// aidPart is a passive part that can take a tolerance.
type aidPart struct {
	Name, Unit, Meaning string
	Nominal             float64
	// Default parts take the default tolerance; the others (a stage's
	// source and load) are held at nominal unless given one.
	Default bool
}

// aidAmp is an opamp whose a0 and gbw can get a min–typ spread; a zero
// typical value means the opamp has no such number.
type aidAmp struct {
	Name    string
	A0, GBW float64
}

type aidInfo struct {
	Parts []aidPart
	Amps  []aidAmp
	Ports []api.PortInfo
	// Gain is the gain's unit ("V/V", "V/A"), "" without a gain.
	Gain string
}

// key identifies what the form shows, for AidsOutput.Parts.
func (ai aidInfo) key() string {
	var b strings.Builder
	for _, p := range ai.Parts {
		fmt.Fprintf(&b, "%s %s %t %s;", p.Name, p.Unit, p.Default, view.Num(p.Nominal))
	}
	b.WriteByte('|')
	for _, a := range ai.Amps {
		fmt.Fprintf(&b, "%s %s %s;", a.Name, view.Num(a.A0), view.Num(a.GBW))
	}
	b.WriteByte('|')
	for _, p := range ai.Ports {
		b.WriteString(p.Name + ";")
	}
	b.WriteString("|" + ai.Gain)
	return b.String()
}

// info lists what the design aids can vary and read for req, by the rules
// of the contract (DEVELOPERS.md, "Design aids in the JSON contract").
func info(req api.Request, entry *api.CatalogEntry) (aidInfo, *api.ErrorBody) {
	p, err := api.Prepare(req)
	if err != nil {
		body := api.Body(err)
		return aidInfo{}, &body
	}
	var params []aids.Param
	meaning := map[string]string{}
	if p.Stage != nil {
		params, _ = aids.StageParams(p.Stage, p.Values, p.Circuit)
		if entry != nil {
			for _, pi := range entry.Params {
				meaning[pi.Name] = pi.Meaning
			}
		}
	} else {
		params = aids.CircuitParams(p.Circuit)
	}
	var ai aidInfo
	amps := map[int]int{} // circuit part → index in ai.Amps
	for _, par := range params {
		switch par.Class {
		case aids.Passive:
			ai.Parts = append(ai.Parts, aidPart{Name: par.Name, Unit: par.Unit, Nominal: par.Nominal, Default: par.Default, Meaning: meaning[par.Name]})
		case aids.AmpSpread:
			if par.Part < 0 || p.Circuit.Parts[par.Part].Kind != circuit.OpAmp {
				continue
			}
			i, ok := amps[par.Part]
			if !ok {
				i = len(ai.Amps)
				amps[par.Part] = i
				ai.Amps = append(ai.Amps, aidAmp{Name: p.Circuit.Parts[par.Part].Name})
			}
			switch par.Field {
			case aids.FieldA0:
				ai.Amps[i].A0 = par.Nominal
			case aids.FieldGBW:
				ai.Amps[i].GBW = par.Nominal
			}
		}
	}
	for _, pt := range p.Analyzer.Ports {
		pi := api.PortInfo{Name: pt.Name}
		if entry != nil {
			for _, e := range entry.Ports {
				if e.Name == pt.Name {
					pi.Title = e.Title
				}
			}
		}
		ai.Ports = append(ai.Ports, pi)
	}
	if g := p.Analyzer.Gain; g != nil {
		ai.Gain = "V/V"
		if src, ok := p.Circuit.Part(g.SourceName); ok && src.Kind == circuit.ISource {
			ai.Gain = "V/A"
		}
	}
	return ai, nil
}

// ---- the fast panels ----

// AidsPanels computes and renders the standard values and the
// sensitivities of the circuit of in (or the one in.Only names). Each
// panel has its own error field, so one can fail (a circuit with no
// resistor has no standard values) while the other shows.
func AidsPanels(in AidsInput) (out AidsOutput) {
	defer recoverAids(&out)
	std, sens := in.Only == "" || in.Only == "standard", in.Only == "" || in.Only == "sensitivity"
	if !std && !sens {
		return errOut("only", "%q: ask for \"standard\" or \"sensitivity\", or leave it out for both", in.Only)
	}
	req, entry, st, bad := in.base()
	if bad != nil {
		return AidsOutput{Error: bad}
	}
	out = AidsOutput{}
	if std {
		sreq := req
		api.StandardValues.Ask(&sreq, st.StandardKey())
		if resp, err := api.Analyze(sreq); err != nil {
			body := api.Body(err)
			out.StandardError = &body
		} else if sv := api.StandardValues.Result(resp); sv != nil {
			out.Standard = view.StandardPanel(sv, in.id(), partUnits(req, entry))
		}
	}
	if sens {
		api.Sensitivity.Ask(&req, &api.SensitivityRequest{})
		if resp, err := api.Analyze(req); err != nil {
			body := api.Body(err)
			out.SensitivityError = &body
		} else if sr := api.Sensitivity.Result(resp); sr != nil {
			out.Sensitivity = view.SensitivityPanel(sr, in.id(), in.Form.ChartWidth)
		}
	}
	return out
}

// partUnits gives the unit of each part of req by name: from the catalog
// for a stage, else from the circuit's parts.
func partUnits(req api.Request, entry *api.CatalogEntry) map[string]string {
	units := map[string]string{}
	if entry != nil {
		for _, p := range entry.Params {
			units[p.Name] = p.Unit
		}
		return units
	}
	if ai, bad := info(req, nil); bad == nil {
		for _, p := range ai.Parts {
			units[p.Name] = p.Unit
		}
	}
	return units
}

// ---- the tolerance study ----

// ToleranceRequest is the engine request for the tolerance study of in:
// the circuit at its spot frequency with the study's "tolerance" key. A
// page passes it to api.StartTolerance; `analyze` gives the same numbers.
func ToleranceRequest(in AidsInput) (api.Request, *api.ErrorBody) {
	req, _, st, bad := in.base()
	if bad != nil {
		return req, bad
	}
	key, bad := st.ToleranceKey()
	if bad != nil {
		return req, bad
	}
	api.Tolerance.Ask(&req, key)
	return req, nil
}

// StartTolerance prepares the tolerance study of in, to be run in slices
// with Step and rendered with TolerancePanel.
func StartTolerance(in AidsInput) (run *api.ToleranceRun, bad *api.ErrorBody) {
	defer func() {
		if r := recover(); r != nil {
			run, bad = nil, internalError(r)
		}
	}()
	req, bad := ToleranceRequest(in)
	if bad != nil {
		return nil, bad
	}
	run, err := api.StartTolerance(req)
	if err != nil {
		body := api.Body(err)
		return nil, &body
	}
	return run, nil
}

// ToleranceOutput renders what run has computed so far as the tolerance
// panel laid out as l says, with its progress.
func ToleranceOutput(run *api.ToleranceRun, l Layout) (out AidsOutput) {
	defer recoverAids(&out)
	if l.ID == "" {
		l.ID = "calc"
	}
	res := run.Result()
	done, total := run.Step(0)
	return AidsOutput{HTML: view.TolerancePanel(res, l.ID, l.ChartWidth), Done: done, Total: total}
}

func internalError(r any) *api.ErrorBody {
	return &api.ErrorBody{Message: fmt.Sprintf("internal error: %v (please report the settings that caused it)", r)}
}

func recoverAids(out *AidsOutput) {
	if r := recover(); r != nil {
		*out = AidsOutput{Error: internalError(r)}
	}
}

// ---- JSON ----

// decodeStrict reads a page's JSON request (what names it in the message)
// into dst, refusing unknown fields.
func decodeStrict(in []byte, dst any, what string) *api.ErrorBody {
	dec := json.NewDecoder(strings.NewReader(string(in)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(dst); err != nil {
		return &api.ErrorBody{Message: "the " + what + " request is not valid: " + err.Error()}
	}
	return nil
}

// encode writes an answer to a page as JSON, markup unescaped (the page
// reads it with JSON.parse). It never fails: an answer that cannot be
// written becomes an error object.
func encode(v any) []byte {
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		b.Reset()
		_ = enc.Encode(AidsOutput{Error: &api.ErrorBody{Message: "internal error: " + err.Error()}})
	}
	return []byte(strings.TrimSuffix(b.String(), "\n"))
}

// decodeAids reads an AidsInput strictly.
func decodeAids(in []byte) (AidsInput, *api.ErrorBody) {
	var a AidsInput
	return a, decodeStrict(in, &a, "design-aid")
}

// EncodeAids writes an AidsOutput as JSON, markup unescaped (the page
// reads it with JSON.parse). It never fails.
func EncodeAids(out AidsOutput) []byte { return encode(out) }

// AidsFormJSON is AidsForm on JSON: an AidsInput in, an AidsOutput out.
func AidsFormJSON(in []byte) []byte {
	a, bad := decodeAids(in)
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	return EncodeAids(AidsForm(a))
}

// AidsPanelsJSON is AidsPanels on JSON.
func AidsPanelsJSON(in []byte) []byte {
	a, bad := decodeAids(in)
	if bad != nil {
		return EncodeAids(AidsOutput{Error: bad})
	}
	return EncodeAids(AidsPanels(a))
}

// StartToleranceJSON is StartTolerance on JSON; on bad input the run is
// nil and errJSON is an AidsOutput with its Error.
func StartToleranceJSON(in []byte) (run *api.ToleranceRun, l Layout, errJSON []byte) {
	a, bad := decodeAids(in)
	if bad == nil {
		run, bad = StartTolerance(a)
	}
	if bad != nil {
		return nil, Layout{}, EncodeAids(AidsOutput{Error: bad})
	}
	return run, a.layout(), nil
}
