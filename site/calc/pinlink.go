package calc

import (
	"maps"
	"slices"
	"strconv"
	"strings"

	"zport/engine/api"
	"zport/site/fragment"
)

// In a share link each pin is its name under pinN (N its slot, 1 …
// MaxPins), then only what its design changes from the current one, each
// key of the current design's own under the prefix pinN.:
//
//	…&points=400&pin1=Cf+1p&pin1.Cf=1p&pin2=no+Riso&pin2.Riso=
//
// For circuit text the keys are ref, port (repeated; one empty port for
// none), src and out; the page's script adds pinN.c, the pin's text
// compressed as c is, where it differs from the current text.
const keyPin = "pin"

// pinKey is the link key of slot's name, or with name of one of its keys.
func pinKey(slot int, name string) string {
	k := keyPin + strconv.Itoa(slot)
	if name != "" {
		k += "." + name
	}
	return k
}

// pinKeys are the keys of every slot with the given name: the options of
// fragment.Parse for keys that repeat or that the page reads itself.
func pinKeys(name string) []string {
	var out []string
	for s := 1; s <= MaxPins; s++ {
		out = append(out, pinKey(s, name))
	}
	return out
}

// pinName is what a pin without a name is called.
func pinName(slot int) string { return "Pin " + strconv.Itoa(slot) }

// stagePinState adds f's pins to p, each as its name and the parameters
// in which it differs from f, in catalog order.
func (f Form) stagePinState(p *fragment.Pairs, e api.CatalogEntry) {
	for _, pin := range f.Pins {
		p.Add(pinKey(pin.Slot, ""), pin.Name)
		for _, par := range e.Params {
			if v := pin.Params[par.Name]; strings.TrimSpace(v) != strings.TrimSpace(f.Params[par.Name]) {
				p.Add(pinKey(pin.Slot, par.Name), v)
			}
		}
	}
}

// circuitPinState adds f's pins to p, each as its name and the choices in
// which it differs from f (its text is the page's to add).
func (f Form) circuitPinState(p *fragment.Pairs) {
	for _, pin := range f.Pins {
		p.Add(pinKey(pin.Slot, ""), pin.Name)
		if pin.Reference != f.Reference {
			p.Add(pinKey(pin.Slot, keyReference), pin.Reference)
		}
		if !slices.Equal(pin.Ports, f.Ports) {
			for _, port := range pin.Ports {
				p.Add(pinKey(pin.Slot, keyPort), port)
			}
			if len(pin.Ports) == 0 {
				p.Add(pinKey(pin.Slot, keyPort), "")
			}
		}
		if !sameGain(pin.Gain, f.Gain) {
			src, out := "", ""
			if pin.Gain != nil {
				src, out = pin.Gain.Source, pin.Gain.Output
			}
			p.Add(pinKey(pin.Slot, keySource), src)
			p.Add(pinKey(pin.Slot, keyOutput), out)
		}
	}
}

func sameGain(a, b *api.GainSpec) bool {
	if a == nil || b == nil {
		return a == b
	}
	return *a == *b
}

// pinsRead collects the pins of a link, by slot: each one's name and the
// keys of its design.
type pinsRead map[int]*pinRead

type pinRead struct {
	name  string
	pairs fragment.Pairs
}

// read takes one pair that may belong to a pin: false when k is not a pin
// key.
func (r pinsRead) read(k, v string) bool {
	rest, ok := strings.CutPrefix(k, keyPin)
	if !ok || rest == "" || rest[0] < '1' || rest[0] > '0'+MaxPins {
		return false
	}
	slot := int(rest[0] - '0')
	rest = rest[1:]
	if rest != "" && rest[0] != '.' {
		return false
	}
	p := r[slot]
	if p == nil {
		p = &pinRead{}
		r[slot] = p
	}
	if rest == "" {
		p.name = v
	} else {
		p.pairs.Add(rest[1:], v)
	}
	return true
}

// slots lists the slots read, in order, each with its pin's name.
func (r pinsRead) slots() []int { return slices.Sorted(maps.Keys(r)) }

func (p *pinRead) pin(slot int) (Pin, error) {
	pin := Pin{Name: p.name, Slot: slot}
	if strings.TrimSpace(pin.Name) == "" {
		pin.Name = pinName(slot)
	}
	if len(pin.Name) > MaxPinName {
		return pin, &fragment.Error{Key: pinKey(slot, ""), Msg: "the name of pin " + strconv.Itoa(slot) + " is longer than " + strconv.Itoa(MaxPinName) + " characters"}
	}
	return pin, nil
}

// each makes one pin a slot, in slot order: its name and slot from the
// link, the rest by fill from the slot's keys.
func (r pinsRead) each(fill func(pin *Pin, pairs fragment.Pairs) error) ([]Pin, error) {
	var out []Pin
	for _, slot := range r.slots() {
		p := r[slot]
		pin, err := p.pin(slot)
		if err == nil {
			err = fill(&pin, p.pairs)
		}
		if err != nil {
			return nil, err
		}
		out = append(out, pin)
	}
	return out, nil
}

// stagePins makes the pins of a stage's link: each is f's parameters
// with its own keys over them.
func (r pinsRead) stagePins(f Form, e api.CatalogEntry) ([]Pin, error) {
	return r.each(func(pin *Pin, pairs fragment.Pairs) error {
		pin.Params = maps.Clone(f.Params)
		for _, pr := range pairs {
			if _, ok := pin.Params[pr.Key]; !ok {
				k := pinKey(pin.Slot, pr.Key)
				return &fragment.Error{Key: k, Msg: "unknown setting " + strconv.Quote(k) + " for " + e.Title}
			}
			pin.Params[pr.Key] = pr.Value
		}
		return nil
	})
}

// circuitPins makes the pins of a circuit's link: each is f's choices
// with its own over them, and f's text (the page puts in a pin's own).
func (r pinsRead) circuitPins(f Form) ([]Pin, error) {
	return r.each(func(pin *Pin, pairs fragment.Pairs) error {
		what := "pin " + strconv.Itoa(pin.Slot)
		var ch choices
		for _, pr := range pairs {
			k := pinKey(pin.Slot, pr.Key)
			ok, err := ch.read(pr.Key, pr.Value, k, what)
			if err != nil {
				return err
			}
			if !ok {
				return &fragment.Error{Key: k, Msg: "unknown setting " + strconv.Quote(k) + " for a circuit"}
			}
		}
		g := f
		if err := ch.apply(&g, "the gain of "+what); err != nil {
			return err
		}
		pin.Circuit, pin.Reference, pin.Ports, pin.Gain = f.Circuit, g.Reference, g.Ports, g.Gain
		return nil
	})
}
