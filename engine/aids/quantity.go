package aids

import (
	"math"
	"math/cmplx"

	"zport/engine/numeric"
)

// QuantityKind is what a Quantity measures.
type QuantityKind int

// The quantities the aids report at the spot frequency.
const (
	ZMag        QuantityKind = iota // |Z| of a port, Ω
	ZPhase                          // ∠Z of a port, degrees in (−180°, 180°]
	ZRe                             // Re Z of a port, Ω: the signed resistance
	GainMag                         // |g|, V/V or V/A
	PhaseMargin                     // governing phase margin, degrees
)

var kindIDs = [...]string{"z", "phase", "r", "g", "pm"}

// String returns the quantity's wire name: "z", "phase", "r", "g" or "pm".
func (k QuantityKind) String() string {
	if k < 0 || int(k) >= len(kindIDs) {
		return "unknown"
	}
	return kindIDs[k]
}

// Quantity is one number read from each evaluation.
type Quantity struct {
	Kind QuantityKind
	// Port is the index in Model.Ports for a port quantity, else −1.
	Port int
	// ID is "z:PORT", "phase:PORT", "r:PORT", "g" or "pm".
	ID    string
	Title string // e.g. "|Z| at out"
	Unit  string // "Ω", "°", "V/V" …
}

// Of reads the quantity from s; NaN when it is not finite there.
func (q Quantity) Of(s *Sample) float64 {
	var v float64
	switch q.Kind {
	case ZMag:
		v = cmplx.Abs(s.Z[q.Port])
	case ZPhase:
		v = degrees(s.Z[q.Port])
	case ZRe:
		v = real(s.Z[q.Port])
	case GainMag:
		v = cmplx.Abs(s.G)
	case PhaseMargin:
		v = s.PM
	}
	if math.IsInf(v, 0) {
		return math.NaN()
	}
	return v
}

// angular reports whether differences of q wrap at 360°.
func (q Quantity) angular() bool { return q.Kind == ZPhase || q.Kind == PhaseMargin }

// QuantityID returns the ID of the quantity of kind k at the port called
// port ("" for g and pm).
func QuantityID(k QuantityKind, port string) string {
	if k == GainMag || k == PhaseMargin {
		return k.String()
	}
	return k.String() + ":" + port
}

// quantities lists what the model yields: |Z|, ∠Z and Re Z of each port,
// |g| with a gain, and the phase margin when the loop is tracked.
func quantities(m *Model, loop bool) []Quantity {
	var qs []Quantity
	for i, p := range m.Ports {
		qs = append(qs,
			Quantity{Kind: ZMag, Port: i, ID: QuantityID(ZMag, p.Name), Title: "|Z| at " + p.Name, Unit: "Ω"},
			Quantity{Kind: ZPhase, Port: i, ID: QuantityID(ZPhase, p.Name), Title: "∠Z at " + p.Name, Unit: "°"},
			Quantity{Kind: ZRe, Port: i, ID: QuantityID(ZRe, p.Name), Title: "Re Z at " + p.Name, Unit: "Ω"})
	}
	if m.Gain != nil {
		qs = append(qs, Quantity{Kind: GainMag, Port: -1, ID: "g", Title: "|g|", Unit: m.Gain.Unit(m.Circuit)})
	}
	if loop {
		qs = append(qs, Quantity{Kind: PhaseMargin, Port: -1, ID: "pm", Title: "phase margin", Unit: "°"})
	}
	return qs
}

func degrees(z complex128) float64 {
	if !numeric.Finite(z) || z == 0 {
		return math.NaN()
	}
	return cmplx.Phase(z) * 180 / math.Pi
}
