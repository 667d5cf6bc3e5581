package api

import "zport/engine/circuit"

// This file holds the transistors' side of the contract: the request's
// analysis temperature and the response's list of devices with the
// small-signal values the engine derived for them.

// MaxTemperature bounds the request's temperature, in kelvin.
const MaxTemperature = 1000.0

// temperature returns the request's analysis temperature, checked: absent
// is circuit.DefaultTemperature.
// A noise request's temperature is the same setting, written there.
func (r Request) temperature() (float64, error) {
	field, given := "temperature", r.Temperature
	if q := Noise.Asked(r); q != nil && q.Temperature != nil {
		if given != nil && *given != *q.Temperature {
			return 0, fieldErr("noise.temperature", "%g K differs from the request's temperature, %g K: they are one setting (the transistors' VT and the noise are taken at it); give one", *q.Temperature, *given)
		}
		field, given = "noise.temperature", q.Temperature
	}
	if given == nil {
		return circuit.DefaultTemperature, nil
	}
	t := *given
	if !(t > 0) || !(t <= MaxTemperature) {
		return 0, fieldErr(field, "the analysis temperature is in kelvin, above 0 and at most %g K (300 K is about 27 °C); got %g", MaxTemperature, t)
	}
	return t, nil
}

// Device is one transistor of the circuit with the small-signal values the
// engine uses for it, in SI units, and the bias quantities a later noise
// analysis reads (collector and base shot noise from Ic and Ib, rb's thermal
// noise, a mos's channel noise 4kTγ·gm). A value that does not apply to the
// kind is left out; a bias quantity the line did not give (ic= when gm= was
// given) is left out; ro is null when infinite.
type Device struct {
	Name string `json:"name"`
	Kind string `json:"kind"` // "bjt" or "mos"
	Line int    `json:"line"`
	// Nodes are C, B, E for a bjt and D, G, S for a mos.
	Nodes []string `json:"nodes"`
	Gm    float64  `json:"gm"`
	Ro    *float64 `json:"ro"`

	// bjt
	Beta *float64 `json:"beta,omitempty"`
	Rpi  *float64 `json:"rpi,omitempty"`
	Cpi  *float64 `json:"cpi,omitempty"` // 0 without ft
	Cmu  *float64 `json:"cmu,omitempty"`
	Rb   *float64 `json:"rb,omitempty"`
	Ic   *float64 `json:"ic,omitempty"`
	Ib   *float64 `json:"ib,omitempty"` // Ic/β
	VA   *float64 `json:"va,omitempty"`
	FT   *float64 `json:"ft,omitempty"`
	VT   *float64 `json:"vt,omitempty"` // kT/q, when gm came from ic

	// mos
	Id     *float64 `json:"id,omitempty"`
	Vov    *float64 `json:"vov,omitempty"`
	Lambda *float64 `json:"lambda,omitempty"`
	Cgs    *float64 `json:"cgs,omitempty"`
	Cgd    *float64 `json:"cgd,omitempty"`
	Gmb    *float64 `json:"gmb,omitempty"`
	Bulk   string   `json:"bulk,omitempty"`
	Gamma  *float64 `json:"gamma,omitempty"`
}

// devices lists the circuit's transistors in text order (nil when none).
func devices(c *circuit.Circuit) []Device {
	var out []Device
	val := func(x float64) *float64 { return &x }
	opt := func(x float64) *float64 { // a bias quantity the line may not give
		if x == 0 {
			return nil
		}
		return &x
	}
	for _, p := range c.Parts {
		if !p.Kind.Transistor() {
			continue
		}
		d := p.Dev
		dv := Device{Name: p.Name, Kind: p.Kind.String(), Line: p.Line, Gm: d.Gm, Ro: opt(d.Ro)}
		for _, n := range p.Nodes {
			dv.Nodes = append(dv.Nodes, c.Nodes[n])
		}
		switch p.Kind {
		case circuit.BJT:
			dv.Beta, dv.Rpi, dv.Cpi, dv.Cmu, dv.Rb = val(d.Beta), val(d.Rpi), val(d.Cpi), val(d.Cmu), val(d.Rb)
			dv.Ic, dv.Ib, dv.VA, dv.FT, dv.VT = opt(d.Ic), opt(d.Ib()), opt(d.VA), opt(d.FT), opt(d.VT)
		case circuit.MOS:
			dv.Id, dv.Vov, dv.Lambda = opt(d.Id), opt(d.Vov), opt(d.Lambda)
			dv.Cgs, dv.Cgd, dv.Gmb, dv.Gamma = val(d.Cgs), val(d.Cgd), val(d.Gmb), val(d.Gamma)
			dv.Bulk = c.Nodes[d.Bulk]
		}
		out = append(out, dv)
	}
	return out
}
