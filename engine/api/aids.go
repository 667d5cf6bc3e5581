package api

import (
	"zport/engine/aids"
	"zport/engine/feedback"
)

// The design aids (tolerance.go, standard.go, sensitivity.go) are
// analyses registered with this package, answered by package
// zport/engine/aids.

// aidsModel is the design aids' view of the prepared request: the
// circuit's variable numbers (or the stage's parameters), the ports and
// gain of the request, at its spot frequency.
func (p *Prepared) aidsModel() *aids.Model {
	m := &aids.Model{Circuit: p.Circuit, Reference: p.Req.Reference, Gain: p.Analyzer.Gain, Frequency: p.Req.Frequency, Context: p.ctx}
	for _, pt := range p.Analyzer.Ports {
		m.Ports = append(m.Ports, feedback.Port{Name: pt.Name, A: pt.A, B: pt.B})
	}
	if p.Stage != nil {
		m.Params, m.Rebuild = aids.StageParams(p.Stage, p.Values, p.Circuit)
	} else {
		m.Params = aids.CircuitParams(p.Circuit)
	}
	return m
}
