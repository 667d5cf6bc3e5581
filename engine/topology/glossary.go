package topology

import (
	"cmp"
	"slices"
)

// Term is one entry of the glossary: how a parameter is written on every
// page — its symbol, what it is, and its unit — so that the same thing has
// the same name on every stage, in every form, table, link and file.
type Term struct {
	// ID is the term's key: the parameter's name, or a name of its own
	// where two stages use one parameter name for different things (the
	// degenerated stage's ro is the transistor's rO, not an op amp's).
	ID string
	// Symbol is the display symbol; "_" starts a subscript ("R_L").
	Symbol string
	// Label says what it is ("op-amp DC open-loop gain"); a stage's
	// parameter adds only where the part sits and what leaving it empty
	// means (Param.Note). It is "" for a name whose role differs between
	// stages — R1 is an input resistor in one, a gain resistor in
	// another — whose stages each say the role.
	Label string
	// Unit is the SI unit symbol, "" for a pure number.
	Unit string
	// Not lists spellings that no page may use for this term (the site's
	// tests look for them in every built page).
	Not []string
}

// glossary is the one table of parameter names; every stage's
// parameters take their symbol, unit and label from it (register).
var glossary = []Term{
	// The op-amp model (circuit text's opamp options, every op-amp stage).
	{ID: "a0", Symbol: "a₀", Label: "op-amp DC open-loop gain", Not: []string{"open-loop DC gain"}},
	{ID: "gbw", Symbol: "GBW", Label: "gain-bandwidth product", Unit: "Hz"},
	{ID: "p2", Symbol: "f_p2", Label: "second open-loop pole", Unit: "Hz", Not: []string{"p₂"}},
	{ID: "rid", Symbol: "r_id", Label: "differential input resistance", Unit: "Ω"},
	{ID: "rcm", Symbol: "r_cm", Label: "common-mode input resistance, each input to gnd", Unit: "Ω", Not: []string{"each input to ground"}},
	{ID: "ro", Symbol: "r_o", Label: "open-loop output resistance", Unit: "Ω"},
	{ID: "cid", Symbol: "c_id", Label: "differential input capacitance, between the inputs", Unit: "F"},
	{ID: "ccm", Symbol: "c_cm", Label: "common-mode input capacitance, each input to gnd", Unit: "F"},
	{ID: "Cin", Symbol: "C_in", Label: "op-amp input capacitance", Unit: "F"},

	// Noise: the opamp options en=, fce=, in=, fci=, and the stages' own.
	{ID: "en", Symbol: "e_n", Label: "op-amp input voltage noise density", Unit: "V/√Hz"},
	{ID: "fce", Symbol: "f_ce", Label: "1/f corner of eₙ", Unit: "Hz"},
	{ID: "in", Symbol: "i_n", Label: "op-amp input current noise density, at each input", Unit: "A/√Hz"},
	{ID: "fci", Symbol: "f_ci", Label: "1/f corner of iₙ", Unit: "Hz"},
	{ID: "Ipd", Symbol: "I_pd", Label: "sensor DC current, signal and dark, whose shot noise √(2q·I) enters the summing node", Unit: "A"},
	{ID: "gamma", Symbol: "γ", Label: "channel noise coefficient"},

	// Sources, sensors and loads.
	{ID: "Rs", Symbol: "R_s", Label: "source resistance", Unit: "Ω"},
	{ID: "Rs1", Symbol: "R_s1", Label: "source resistance of V1", Unit: "Ω"},
	{ID: "Rs2", Symbol: "R_s2", Label: "source resistance of V2", Unit: "Ω"},
	{ID: "Rsh", Symbol: "R_sh", Label: "sensor shunt resistance", Unit: "Ω"},
	{ID: "Cd", Symbol: "C_d", Label: "sensor capacitance", Unit: "F"},
	{ID: "RL", Symbol: "R_L", Label: "load resistance", Unit: "Ω"},
	{ID: "CL", Symbol: "C_L", Label: "load capacitance", Unit: "F"},

	// Networks: resistors and capacitors whose role is the stage's.
	{ID: "R1", Symbol: "R₁", Unit: "Ω"},
	{ID: "R2", Symbol: "R₂", Unit: "Ω"},
	{ID: "R3", Symbol: "R₃", Unit: "Ω"},
	{ID: "R4", Symbol: "R₄", Unit: "Ω"},
	{ID: "Rf", Symbol: "R_f", Unit: "Ω"},
	{ID: "Cf", Symbol: "C_f", Unit: "F"},
	{ID: "C1", Symbol: "C₁", Unit: "F"},
	{ID: "Rp", Symbol: "R_p", Label: "bias-compensation resistor", Unit: "Ω"},
	{ID: "Riso", Symbol: "R_iso", Label: "isolation resistor", Unit: "Ω"},

	// Transistor stages.
	{ID: "gm", Symbol: "g_m", Label: "transconductance", Unit: "S"},
	{ID: "rO", Symbol: "r_O", Label: "drain-source output resistance", Unit: "Ω"},
	{ID: "RS", Symbol: "R_S", Label: "source degeneration resistor", Unit: "Ω"},
	{ID: "Cgs", Symbol: "C_gs", Label: "gate-source capacitance", Unit: "F"},
	{ID: "Cgd", Symbol: "C_gd", Label: "gate-drain capacitance", Unit: "F"},
	{ID: "Rg", Symbol: "R_g", Label: "gate drive resistance", Unit: "Ω"},
	{ID: "IC", Symbol: "I_C", Label: "collector bias current", Unit: "A"},
	{ID: "beta", Symbol: "β", Label: "small-signal current gain"},
	{ID: "VA", Symbol: "V_A", Label: "Early voltage", Unit: "V"},
	{ID: "T", Symbol: "T", Label: "junction temperature", Unit: "K"},
	{ID: "Cpi", Symbol: "C_π", Label: "base-emitter capacitance", Unit: "F"},
	{ID: "Cmu", Symbol: "C_μ", Label: "base-collector capacitance", Unit: "F"},
	{ID: "RC", Symbol: "R_C", Label: "collector load resistor", Unit: "Ω"},
	{ID: "RF", Symbol: "R_F", Label: "feedback resistor", Unit: "Ω"},
	{ID: "RE", Symbol: "R_E", Label: "emitter bias resistor", Unit: "Ω"},
	{ID: "fT", Symbol: "f_T", Label: "transition frequency", Unit: "Hz"},
	{ID: "rb", Symbol: "r_b", Label: "base spreading resistance", Unit: "Ω"},
	{ID: "lambda", Symbol: "λ", Label: "channel-length modulation"},
	{ID: "ID", Symbol: "I_D", Label: "bias current", Unit: "A"},
	{ID: "ID1", Symbol: "I_D1", Label: "bias current", Unit: "A"},
	{ID: "ID6", Symbol: "I_D6", Label: "bias current", Unit: "A"},
	{ID: "Vov1", Symbol: "V_ov1", Label: "overdrive", Unit: "V"},
	{ID: "Vov2", Symbol: "V_ov2", Label: "overdrive", Unit: "V"},
	{ID: "Vov3", Symbol: "V_ov3", Label: "overdrive", Unit: "V"},
	{ID: "Vov6", Symbol: "V_ov6", Label: "overdrive", Unit: "V"},
	{ID: "Vovcs", Symbol: "V_ov,cs", Label: "overdrive", Unit: "V"},
	{ID: "gmb2", Symbol: "g_mb2", Label: "body transconductance", Unit: "S"},
	{ID: "Cgs2", Symbol: "C_gs2", Label: "gate-source capacitance", Unit: "F"},
	{ID: "Cgd2", Symbol: "C_gd2", Label: "gate-drain capacitance", Unit: "F"},
	{ID: "Cgs3", Symbol: "C_gs3", Label: "gate capacitance", Unit: "F"},
	{ID: "Cgs6", Symbol: "C_gs6", Label: "gate-source capacitance", Unit: "F"},
	{ID: "Cx", Symbol: "C_x", Label: "capacitance", Unit: "F"},
	{ID: "Ab", Symbol: "A_b", Label: "booster DC gain"},
	{ID: "gbwb", Symbol: "GBW_b", Label: "booster gain-bandwidth product", Unit: "Hz"},
	{ID: "Cc", Symbol: "C_c", Label: "Miller compensation capacitor", Unit: "F"},
	{ID: "Rz", Symbol: "R_z", Label: "nulling resistor", Unit: "Ω"},
}

// Glossary returns the glossary's terms, in the order it lists them.
func Glossary() []Term { return slices.Clone(glossary) }

// LookupTerm returns the term with the given ID.
func LookupTerm(id string) (Term, bool) {
	i := slices.IndexFunc(glossary, func(t Term) bool { return t.ID == id })
	if i < 0 {
		return Term{}, false
	}
	return glossary[i], true
}

// TermOf returns the glossary term of parameter p.
func TermOf(p Param) (Term, bool) { return LookupTerm(cmp.Or(p.Term, p.Name)) }

// glossed fills p from the glossary: its symbol and unit, and, for a term
// with a label, its meaning as the label followed by the stage's Note. A
// parameter that spells out its own symbol or meaning keeps them; the
// glossary's tests hold every stage to the table.
func glossed(p Param) Param {
	t, ok := TermOf(p)
	if !ok {
		return p
	}
	if p.Symbol == "" {
		p.Symbol, p.Unit = t.Symbol, t.Unit
	}
	if p.Meaning == "" && t.Label != "" {
		p.Meaning = t.Label + p.Note
	}
	return p
}
