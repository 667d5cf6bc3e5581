package api

import (
	"bytes"
	"fmt"
	"strings"

	"zport/engine/aids"
)

// This file holds the "sensitivity" analysis: normalized sensitivities of
// every port impedance, the gain and the phase margin.

// SensitivityRequest is the "sensitivity" key: true, or an object.
type SensitivityRequest struct {
	// Parameters lists the parameters to vary; empty means all.
	Parameters []string `json:"parameters,omitempty"`
	// Step is h, the step in ln p (default 1e-3, at most 0.05).
	Step float64 `json:"step,omitempty"`
	// off is set by a request of false: no sensitivities.
	off bool
}

// SensitivityResult is the "sensitivity" key of a response.
type SensitivityResult struct {
	Frequency  float64               `json:"frequency"`
	Step       float64               `json:"step"`
	Method     string                `json:"method"`
	Quantities []SensitivityQuantity `json:"quantities"`
	Notes      []string              `json:"notes"`
}

// SensitivityQuantity lists one quantity's sensitivities, largest first.
type SensitivityQuantity struct {
	ID       string `json:"id"`       // "z:PORT", "g" or "pm"
	Quantity string `json:"quantity"` // "z", "g" or "pm"
	Port     string `json:"port,omitempty"`
	Title    string `json:"title"`
	// Value is the nominal impedance or gain; PhaseMargin the nominal
	// margin in degrees.
	Value       *Complex           `json:"value,omitempty"`
	PhaseMargin *float64           `json:"phaseMargin,omitempty"`
	Entries     []SensitivityEntry `json:"entries"`
}

// SensitivityEntry is one parameter's sensitivity. For "z" and "g", Value
// is ∂ln|Q|/∂ln p and Phase ∂∠Q/∂ln p in degrees; for "pm", Value is
// ∂PM/∂ln p in degrees and Phase is absent. The errors are estimates.
type SensitivityEntry struct {
	Parameter  string   `json:"parameter"`
	Unit       string   `json:"unit"`
	Nominal    float64  `json:"nominal"`
	Value      *float64 `json:"value"`
	Error      *float64 `json:"error"`
	Phase      *float64 `json:"phase,omitempty"`
	PhaseError *float64 `json:"phaseError,omitempty"`
}

// Sensitivity is the "sensitivity" analysis: the normalized sensitivity
// of every port's |Z| and phase, the gain and the phase margin to every
// parameter.
var Sensitivity = Register("sensitivity", func(p *Prepared, q *SensitivityRequest, _ *Response) (*SensitivityResult, error) {
	if q.off {
		return nil, nil
	}
	return p.sensitivity(p.aidsModel(), q)
})

// UnmarshalJSON reads the "sensitivity" key: true (every parameter, the
// default step), false (none), or an object with unknown fields refused.
func (sr *SensitivityRequest) UnmarshalJSON(b []byte) error {
	switch t := bytes.TrimSpace(b); {
	case bytes.Equal(t, []byte("true")):
		*sr = SensitivityRequest{}
		return nil
	case bytes.Equal(t, []byte("false")):
		*sr = SensitivityRequest{off: true}
		return nil
	}
	type plain SensitivityRequest
	var p plain
	if err := decodeStrict("sensitivity", b, &p); err != nil {
		return err
	}
	*sr = SensitivityRequest(p)
	return nil
}

func (p *Prepared) sensitivity(m *aids.Model, sr *SensitivityRequest) (*SensitivityResult, error) {
	if sr.Step != 0 && !(sr.Step > 0 && sr.Step <= 0.05) {
		return nil, fieldErr("sensitivity.step", "the step in ln p must be above 0 and at most 0.05 (default %g)", aids.DefaultStep)
	}
	var params []int
	for i, name := range sr.Parameters {
		j := m.Param(name)
		if j < 0 {
			var names []string
			for _, par := range m.Params {
				names = append(names, par.Name)
			}
			return nil, fieldErr(fmt.Sprintf("sensitivity.parameters[%d]", i), "no parameter called %q (one of: %s)", name, strings.Join(names, ", "))
		}
		params = append(params, j)
	}
	res, err := aids.Sensitivities(m, params, sr.Step)
	if err != nil {
		return nil, &Problem{Msg: err.Error(), Err: err}
	}
	out := &SensitivityResult{Frequency: m.Frequency, Step: res.Step, Quantities: []SensitivityQuantity{}, Notes: append([]string{}, res.Notes...),
		Method: "central differences of ln Q in ln p at steps 2h, h and h/2, Richardson-extrapolated; error = |R(h) − R(2h)| + what the values' error bounds allow"}
	for _, q := range res.Quantities {
		sq := SensitivityQuantity{ID: q.ID, Quantity: q.Kind.String(), Title: q.Title, Entries: []SensitivityEntry{}}
		if q.Port >= 0 {
			sq.Port = m.Ports[q.Port].Name
		}
		if q.Kind == aids.PhaseMargin {
			sq.PhaseMargin = F(q.PM)
		} else {
			sq.Value = C(q.Value)
		}
		for _, e := range q.Entries {
			par := m.Params[e.Param]
			se := SensitivityEntry{Parameter: e.Name, Unit: par.Unit, Nominal: par.Nominal, Value: F(e.Mag), Error: F(e.MagErr)}
			if q.Kind != aids.PhaseMargin {
				se.Phase, se.PhaseError = F(e.Phase), F(e.PhaseErr)
			}
			sq.Entries = append(sq.Entries, se)
		}
		out.Quantities = append(out.Quantities, sq)
	}
	if len(out.Notes) == 0 {
		out.Notes = []string{}
	}
	return out, nil
}
