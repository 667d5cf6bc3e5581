package api

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
