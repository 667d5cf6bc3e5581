package api

import "zport/engine/topology"

// CatalogEntry describes one topology of the catalog: what `topologies`
// prints and what a page needs to build its form.
type CatalogEntry struct {
	ID          string `json:"id"`
	Title       string `json:"title"`
	Description string `json:"description"`
	// Scenario is the invented design story the defaults come from.
	Scenario  string      `json:"scenario"`
	Params    []ParamInfo `json:"params"`
	Reference string      `json:"reference"`
	Ports     []PortInfo  `json:"ports"`
	Gain      *GainInfo   `json:"gain,omitempty"`
	Frequency float64     `json:"frequency"` // suggested spot frequency, Hz
	Sweep     SweepSpec   `json:"sweep"`     // suggested sweep
	// Cautions are stage-specific reminders shown beside the calculator.
	Cautions []string `json:"cautions,omitempty"`
}

// ParamInfo describes one topology parameter.
type ParamInfo struct {
	Name    string  `json:"name"`    // key in Request.Params, e.g. "R1"
	Symbol  string  `json:"symbol"`  // display symbol, e.g. "R₁"
	Meaning string  `json:"meaning"` // e.g. "input resistor"
	Unit    string  `json:"unit"`    // "Ω", "F", "Hz", "S", "" …
	Default string  `json:"default"` // in value syntax, e.g. "10k"
	Min     float64 `json:"min"`     // allowed range, inclusive
	Max     float64 `json:"max"`
	// Optional parameters may be left empty ("" or "none"), meaning absent
	// (e.g. rid absent = infinite).
	Optional bool   `json:"optional,omitempty"`
	Group    string `json:"group,omitempty"` // "amplifier", "network", "source", "load"
	// Decibels: a dimensionless gain that may also be typed in dB.
	Decibels bool `json:"decibels,omitempty"`
}

// PortInfo names a port of a topology.
type PortInfo struct {
	Name  string `json:"name"`
	Title string `json:"title"` // e.g. "input (seen by the source)"
	A     string `json:"a"`
	B     string `json:"b"`
}

// GainInfo names the gain a topology reports.
type GainInfo struct {
	Source string `json:"source"`
	Output string `json:"output"`
	Unit   string `json:"unit"`
	Title  string `json:"title"`
}

// Catalog lists the topology catalog on the wire.
func Catalog() []CatalogEntry {
	var out []CatalogEntry
	for _, t := range topology.Catalog() {
		out = append(out, Entry(t))
	}
	return out
}

// Entry converts one stage to its catalog entry.
func Entry(t *topology.Topology) CatalogEntry {
	e := CatalogEntry{ID: t.ID, Title: t.Title, Description: t.Description, Scenario: t.Scenario,
		Reference: t.Reference, Frequency: t.Frequency,
		Sweep:    SweepSpec{From: t.Sweep.From, To: t.Sweep.To, Points: t.Sweep.Points},
		Cautions: t.Cautions, Params: []ParamInfo{}, Ports: []PortInfo{}}
	for _, p := range t.Params {
		e.Params = append(e.Params, ParamInfo{Name: p.Name, Symbol: p.Symbol, Meaning: p.Meaning, Unit: p.Unit,
			Default: p.Default, Min: p.Min, Max: p.Max, Optional: p.Optional, Group: p.Group, Decibels: p.Decibels})
	}
	for _, p := range t.Ports {
		e.Ports = append(e.Ports, PortInfo{Name: p.Name, Title: p.Title, A: p.A, B: p.B})
	}
	if g := t.Gain; g != nil {
		e.Gain = &GainInfo{Source: g.Source, Output: g.Output, Unit: g.Unit, Title: g.Title}
	}
	return e
}

// LookupEntry returns the catalog entry of stage id.
func LookupEntry(id string) (CatalogEntry, bool) {
	t, ok := topology.Lookup(id)
	if !ok {
		return CatalogEntry{}, false
	}
	return Entry(t), true
}
