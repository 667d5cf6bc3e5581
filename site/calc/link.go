package calc

import (
	"cmp"
	"errors"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/value"
	"zport/site/fragment"
)

// A share link is read by one rule on every page: each setting the page
// knows and can use is used; each one it cannot — unreadable, unknown,
// given twice, or a value the form, the engine or an analysis refuses — is
// left out and named in a Refusal, and the page shows the rest of the link
// with its default in that setting's place. The notice says exactly that
// (LinkNotice), and the inputs show the values in use (Output.Form).

// Refusal is one setting of a share link that the page did not use.
type Refusal struct {
	// Key is the setting as the link names it ("f", "R2", "port",
	// "aid.n"); empty when the setting could not be read at all.
	Key string `json:"key,omitempty"`
	// Value is the value the link gave, when it could be read.
	Value string `json:"value,omitempty"`
	// Message says why it was not used.
	Message string `json:"message"`
	// Default is the value in use instead, as the link would write it;
	// empty when nothing stands in its place (an unknown key) or the
	// default is an empty setting.
	Default string `json:"default,omitempty"`
	// All says that the link's settings could not be read at all (the
	// fragment is too long to be a link): none of them was used.
	All bool `json:"all,omitempty"`
}

// circuitDefaults are a circuit link's spot frequency and sweep when the
// link leaves them out or they are refused; a stage's come from the
// catalog.
var circuitDefaults = Form{Frequency: "1k", Sweep: SweepForm{From: "10", To: "100M", Points: "400"}}

// parseLink splits a fragment into its settings and the refusals of those
// that cannot be read.
func parseLink(frag string, opts ...fragment.Option) (fragment.Pairs, []Refusal) {
	pairs, err := fragment.Parse(frag, opts...)
	var whole *fragment.Error
	var list fragment.Errors
	var refused []Refusal
	switch {
	case errors.As(err, &whole):
		return nil, []Refusal{{Message: whole.Msg, All: true}}
	case errors.As(err, &list):
		for _, e := range list {
			refused = append(refused, Refusal{Key: e.Key, Value: e.Value, Message: e.Msg})
		}
	}
	return pairs, refused
}

// unknown is the refusal of a key that no setting of the page has.
func unknown(p fragment.Pair) Refusal {
	return Refusal{Key: p.Key, Value: p.Value, Message: "this page has no such setting"}
}

// setAnalysisKey sets the spot frequency or a sweep field of a link's key
// into f: false when k is none of them.
func (f *Form) setAnalysisKey(k, v string) bool {
	switch k {
	case keyFrequency:
		f.Frequency = v
	case keyFrom:
		f.Sweep.From = v
	case keyTo:
		f.Sweep.To = v
	case keyPoints:
		f.Sweep.Points = v
	default:
		return false
	}
	return true
}

// applyStage sets the settings of pairs into base, a form of stage e; a
// key the stage does not know is refused.
func applyStage(pairs fragment.Pairs, base Form, e api.CatalogEntry) (Form, []Refusal) {
	f := base
	f.Params = make(map[string]string, len(base.Params))
	for k, v := range base.Params {
		f.Params[k] = v
	}
	known := make(map[string]bool, len(e.Params))
	for _, p := range e.Params {
		known[p.Name] = true
	}
	settings := settingsRead{}
	pins := pinsRead{}
	var refused []Refusal
	for _, pr := range pairs {
		k, v := pr.Key, pr.Value
		switch {
		case f.setAnalysisKey(k, v):
		case known[k]:
			f.Params[k] = v
		case settings.read(k, v), pins.read(k, v):
		default:
			refused = append(refused, unknown(pr))
		}
	}
	f.Settings = settings.over(base.Settings)
	var err error
	if f.Pins, err = pins.stagePins(f, e); err != nil {
		refused = append(refused, pinRefusal(err))
	}
	return f, refused
}

// pinRefusal is the refusal of a link's pins that cannot be read: none of
// them is used.
func pinRefusal(err error) Refusal {
	r := Refusal{Message: err.Error() + "; the link's pins were left out"}
	var fe *fragment.Error
	if errors.As(err, &fe) {
		r.Key = fe.Key
	}
	return r
}

// applyCircuit sets the settings of pairs into base, a circuit form: port
// keys, when present, replace base's ports; src and out come together.
func applyCircuit(pairs fragment.Pairs, base Form) (Form, []Refusal) {
	f := base
	settings := settingsRead{}
	pins := pinsRead{}
	var refused []Refusal
	var ports []string
	var src, out *fragment.Pair
	for _, pr := range pairs {
		k, v := pr.Key, pr.Value
		if pins.read(k, v) {
			continue
		}
		switch k {
		case keyPort:
			if len(ports) == maxFragmentPorts {
				refused = append(refused, Refusal{Key: k, Value: v, Message: "the link lists more than " + strconv.Itoa(maxFragmentPorts) + " ports"})
				continue
			}
			ports = append(ports, v)
		case keyReference:
			f.Reference = v
		case keySource:
			src = &pr
		case keyOutput:
			out = &pr
		default:
			if !f.setAnalysisKey(k, v) && !settings.read(k, v) {
				refused = append(refused, unknown(pr))
			}
		}
	}
	switch {
	case src != nil && out != nil:
		f.Gain = nil
		if src.Value != "" {
			f.Gain = &api.GainSpec{Source: src.Value, Output: out.Value}
		}
	case src != nil || out != nil:
		one := src
		if one == nil {
			one = out
		}
		refused = append(refused, Refusal{Key: one.Key, Value: one.Value, Message: "the gain needs both “src” and “out”"})
	}
	if ports != nil {
		f.Ports = ports
	}
	f.Settings = settings.over(base.Settings)
	var err error
	if f.Pins, err = pins.circuitPins(f); err != nil {
		refused = append(refused, pinRefusal(err))
	}
	return f, refused
}

// ReadFragment reads a URL fragment (with or without "#") written by State
// over base, a form of topology e: settings the fragment leaves out keep
// base's values, except the analyses' settings, which the fragment
// replaces whole when it has any. A setting it cannot read or does not
// know is left out and refused. Values are not checked here: Compute does
// that when a form comes with a Fragment, refusing those it cannot use.
func ReadFragment(frag string, base Form, e api.CatalogEntry) (Form, []Refusal) {
	pairs, refused := parseLink(frag, fragment.Skip(keyPage))
	f, more := applyStage(pairs, base.withDefaults(e), e)
	return f, append(refused, more...)
}

// ReadCircuitFragment reads a URL fragment written by CircuitState (with
// or without "#") over base: settings the fragment leaves out keep base's
// values; port keys, when present, replace base's ports; src and out come
// together. Like ReadFragment it refuses what it cannot read or does not
// know, and leaves the values to Compute. The keys p (the single-file
// export's page) and c (the circuit text, read by the page's script) are
// skipped.
func ReadCircuitFragment(frag string, base Form) (Form, []Refusal) {
	pairs, refused := parseLink(frag, circuitOptions...)
	f, more := applyCircuit(pairs, base)
	return f, append(refused, more...)
}

var circuitOptions = []fragment.Option{
	fragment.Repeatable(append(pinKeys(keyPort), keyPort)...),
	fragment.Skip(append(pinKeys(keyCircuit), keyCircuit, keyPage)...),
}

// readLink reads a share link over base — a stage's defaults (entry set),
// or circuit text (parsed, when not nil, is its parse) with default
// choices — and settles it: a setting that the form, the engine's
// preparation (parameter values, reference, ports, gain), an analysis's
// Ask or Check refuses is left out, base's value kept in its place, and
// the form checked again, until it passes or what fails is not the link's
// doing (then Compute reports it as usual). It returns the form and every
// refusal, with the value in use in its place.
func readLink(frag string, base Form, entry *api.CatalogEntry, parsed *circuit.Circuit) (Form, []Refusal) {
	var pairs fragment.Pairs
	var refused []Refusal
	apply := func(ps fragment.Pairs) (Form, []Refusal) { return applyCircuit(ps, base) }
	if entry != nil {
		pairs, refused = parseLink(frag, fragment.Skip(keyPage))
		apply = func(ps fragment.Pairs) (Form, []Refusal) { return applyStage(ps, base, *entry) }
	} else {
		pairs, refused = parseLink(frag, circuitOptions...)
	}
	dropped := make([]bool, len(pairs))
	var f Form
	var unread []Refusal
	for range len(pairs) + 1 {
		var use fragment.Pairs
		for i, p := range pairs {
			if !dropped[i] {
				use = append(use, p)
			}
		}
		f, unread = apply(use)
		bad := f.check(entry, parsed)
		if bad == nil {
			break
		}
		blamed := blame(bad.Param, pairs, dropped, &f)
		if len(blamed) == 0 {
			break
		}
		for _, i := range blamed {
			dropped[i] = true
			refused = append(refused, Refusal{Key: pairs[i].Key, Value: pairs[i].Value, Message: bad.Message})
		}
	}
	refused = append(refused, unread...)
	// In the order of the link; what could not be read at all first.
	at := func(r Refusal) int {
		for i, p := range pairs {
			if p.Key == r.Key && p.Value == r.Value {
				return i
			}
		}
		return -1
	}
	slices.SortStableFunc(refused, func(a, b Refusal) int { return cmp.Compare(at(a), at(b)) })
	inUse := f.inUse(entry)
	for i := range refused {
		refused[i].Default = inUse[refused[i].Key]
	}
	return f, refused
}

// check is what a link's settings must pass before the page uses them:
// the form's own fields, each analysis's Ask, the engine's preparation of
// the request, and the Check of each analysis that has settings in f.
func (f Form) check(entry *api.CatalogEntry, parsed *circuit.Circuit) *api.ErrorBody {
	req, bad := f.ask(entry)
	if bad != nil {
		return bad
	}
	var err error
	if parsed != nil && req.Topology == "" {
		_, err = api.PrepareParsed(req, parsed)
	} else {
		_, err = api.Prepare(req)
	}
	if err != nil {
		body := api.Body(err)
		return &body
	}
	for _, a := range Analyses {
		if a.Check != nil && len(f.Settings[a.Key]) > 0 {
			if bad := a.Check(a.context(&f, entry, nil)); bad != nil {
				return bad
			}
		}
	}
	return nil
}

// blame returns the indices of the settings of the link (among those not
// dropped) that an error naming param is about: the link's key for a form
// field, the port pair of "ports[i]", both gain keys for the gain, the
// parameter or analysis setting itself. None when the link did not set
// what the error is about.
func blame(param string, pairs fragment.Pairs, dropped []bool, f *Form) []int {
	keys := []string{param}
	value := ""
	switch {
	case param == FieldFrequency:
		keys = []string{keyFrequency}
	case param == FieldFrom:
		keys = []string{keyFrom}
	case param == FieldTo:
		// The end must lie above the start: the start may be the link's
		// doing when the end is not.
		keys = []string{keyTo, keyFrom}
	case param == FieldPoints:
		keys = []string{keyPoints}
	case param == "reference":
		keys = []string{keyReference}
	case param == "gain" || strings.HasPrefix(param, "gain."):
		return find(pairs, dropped, keySource, keyOutput)
	case strings.HasPrefix(param, "ports["):
		i, err := strconv.Atoi(strings.TrimSuffix(strings.TrimPrefix(param, "ports["), "]"))
		if err != nil || i < 0 || i >= len(f.Ports) {
			return nil
		}
		keys, value = []string{keyPort}, f.Ports[i]
	}
	analysis := ""
	if i, j := strings.IndexByte(param, '.'), strings.LastIndexByte(param, '.'); i > 0 && !strings.HasPrefix(param, "gain.") {
		// An analysis's setting: its link key is the analysis's key and
		// the field's last name ("solve.target.value" is "solve.value").
		analysis = param[:i]
		if j > i {
			keys = append(keys, analysis+param[j:])
		}
	}
	for _, k := range keys {
		for i, p := range pairs {
			if !dropped[i] && p.Key == k && (value == "" || p.Value == value) {
				return []int{i}
			}
		}
	}
	if analysis != "" {
		// What is wrong is a setting the link leaves out (a port its
		// quantity needs): the analysis's settings go together.
		var out []int
		for i, p := range pairs {
			if !dropped[i] && strings.HasPrefix(p.Key, analysis+".") {
				out = append(out, i)
			}
		}
		return out
	}
	return nil
}

// find returns the indices of the settings with any of keys, not dropped.
func find(pairs fragment.Pairs, dropped []bool, keys ...string) []int {
	var out []int
	for i, p := range pairs {
		for _, k := range keys {
			if !dropped[i] && p.Key == k {
				out = append(out, i)
			}
		}
	}
	return out
}

// inUse maps each key of f's link to its value as the link writes it, the
// values of a repeated key (port) joined by ", ".
func (f Form) inUse(entry *api.CatalogEntry) map[string]string {
	state := f.CircuitState()
	if entry != nil {
		state = f.State(*entry)
	}
	pairs, _ := fragment.Parse(state, fragment.Repeatable(keyPort))
	m := map[string]string{}
	for _, p := range pairs {
		if m[p.Key] != "" {
			m[p.Key] += ", " + p.Value
		} else {
			m[p.Key] = p.Value
		}
	}
	return m
}

// noticeRefusals is how many refusals a notice lists; the others are
// counted.
const noticeRefusals = 6

// LinkNotice is the sentence a page shows when a link's settings were
// refused: which, why, and what stands in their place; "" when none
// were. circuit says the page is the custom-circuit page, whose link
// carries its circuit text apart from these settings. Values are quoted
// and cut (value.Quote), so a hostile link cannot fill the page.
func LinkNotice(refused []Refusal, circuit bool) string {
	if len(refused) == 0 {
		return ""
	}
	if refused[0].All {
		if circuit {
			return "The settings in this link could not be read (" + refused[0].Message + "). The page shows the link’s circuit with the default settings."
		}
		return "The settings in this link could not be read (" + refused[0].Message + "). The page shows the defaults."
	}
	var b strings.Builder
	b.WriteString("Not used from this link: ")
	var defaults []string
	named := map[string]bool{}
	for i, r := range refused {
		if i == noticeRefusals {
			b.WriteString("; and " + strconv.Itoa(len(refused)-i) + " more")
			break
		}
		if i > 0 {
			b.WriteString("; ")
		}
		switch {
		case r.Key == "":
			b.WriteString("a setting")
		case r.Value != "":
			b.WriteString(keyName(r.Key) + " = " + value.Quote(r.Value))
		default:
			b.WriteString(keyName(r.Key))
		}
		b.WriteString(" (" + r.Message + ")")
		if r.Key != "" && r.Default != "" && !named[r.Key] {
			named[r.Key] = true
			defaults = append(defaults, keyName(r.Key)+" = "+r.Default)
		}
	}
	if circuit {
		b.WriteString(". The page shows the link’s circuit and the rest of its settings, with the defaults in their place")
	} else {
		b.WriteString(". The page shows the rest of the link, with the defaults in their place")
	}
	if len(defaults) > 0 {
		b.WriteString(": " + strings.Join(defaults, ", "))
	}
	b.WriteString(".")
	return b.String()
}

// keyName writes a setting's key for a notice: as it is, or quoted and cut
// when it is long.
func keyName(k string) string {
	if len(k) > 24 {
		return value.Quote(k)
	}
	return k
}
