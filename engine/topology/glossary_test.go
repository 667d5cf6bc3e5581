package topology

import (
	"math"
	"math/cmplx"
	"regexp"
	"strings"
	"testing"
)

// Every parameter of every stage is written as the glossary has it: its
// symbol and unit are the term's, its meaning begins with the term's label
// (a stage adds only where the part sits and what leaving it empty means),
// and every term is used. Labels name the reference node gnd, as circuit
// text does, not "ground" (an AC ground or a virtual ground is another
// thing).
func TestParametersFollowTheGlossary(t *testing.T) {
	used := map[string]bool{}
	for _, tp := range Catalog() {
		for _, p := range tp.Params {
			term, ok := TermOf(p)
			if !ok {
				t.Errorf("%s: parameter %s has no glossary term (add it to glossary.go)", tp.ID, p.Name)
				continue
			}
			used[term.ID] = true
			if p.Symbol != term.Symbol || p.Unit != term.Unit {
				t.Errorf("%s: %s is %q in %q, the glossary says %q in %q", tp.ID, p.Name, p.Symbol, p.Unit, term.Symbol, term.Unit)
			}
			if !strings.HasPrefix(p.Meaning, term.Label) || p.Meaning == "" {
				t.Errorf("%s: %s means %q, which does not begin with the glossary's label %q", tp.ID, p.Name, p.Meaning, term.Label)
			}
			for _, not := range term.Not {
				if strings.Contains(p.Meaning, not) {
					t.Errorf("%s: %s is labelled %q, a spelling the glossary rules out (%q)", tp.ID, p.Name, p.Meaning, not)
				}
			}
			checkGnd(t, tp.ID+" "+p.Name, p.Meaning)
		}
		for _, port := range tp.Ports {
			checkGnd(t, tp.ID+" port "+port.Name, port.Title)
		}
	}
	symbols := map[string]string{}
	for _, term := range Glossary() {
		if !used[term.ID] {
			t.Errorf("glossary term %s is used by no stage", term.ID)
		}
		if other, ok := symbols[term.Symbol]; ok {
			t.Errorf("terms %s and %s share the symbol %q", other, term.ID, term.Symbol)
		}
		symbols[term.Symbol] = term.ID
	}
}

var groundWord = regexp.MustCompile(`\bground\b`)

func checkGnd(t *testing.T, what, label string) {
	t.Helper()
	l := strings.NewReplacer("AC ground", "", "virtual ground", "").Replace(label)
	if groundWord.MatchString(l) {
		t.Errorf("%s: %q says ground where the circuit's reference node is gnd", what, label)
	}
}

// The transimpedance stage's caution gives the phase margins of the two
// Cf rules computed on the ideal model, not written by hand. The closed
// form of the crossing (|T(jω)| = 1 is a quadratic in ω²) is checked
// against a bisection on |T(jω)| itself, T = (ωt/jω)(1 + jωRfCf)/
// (1 + jωRf(Ci + Cf)) [derived]; and both against the check of
// REFERENCES.md section 5 (Rf = 1 MΩ, Ci = 20 pF, gbw = 10 MHz: 52.52° and
// 65.83°, computed there with a0 = 10⁹ in the engine [derived]).
func TestTIAMarginsComputed(t *testing.T) {
	bisected := func(rf, ci, cf, gbw float64) float64 {
		wt := 2 * math.Pi * gbw
		T := func(w float64) complex128 {
			s := complex(0, w)
			return complex(wt, 0) / s * (1 + s*complex(rf*cf, 0)) / (1 + s*complex(rf*(ci+cf), 0))
		}
		lo, hi := math.Log(1e-3), math.Log(1e15)
		for range 200 {
			mid := (lo + hi) / 2
			if cmplx.Abs(T(math.Exp(mid))) > 1 {
				lo = mid
			} else {
				hi = mid
			}
		}
		return 180 + cmplx.Phase(T(math.Exp(lo)))*180/math.Pi
	}
	rf, ci, gbw := 1e6, 20e-12, 10e6
	wt := 2 * math.Pi * gbw
	c45 := math.Sqrt(ci / (wt * rf))
	cbw := math.Sqrt(2*rf*ci*wt-1) / (rf * wt)
	for _, c := range []struct {
		cf, want float64
	}{{c45, 52.52}, {cbw, 65.83}} {
		got := tiaIdealPM(rf, ci, c.cf, gbw)
		if d := got - bisected(rf, ci, c.cf, gbw); d > 1e-9 || d < -1e-9 {
			t.Errorf("Cf = %g: closed form %.12f°, bisection differs by %g°", c.cf, got, d)
		}
		if d := got - c.want; d > 0.005 || d < -0.005 {
			t.Errorf("Cf = %g: %.4f°, REFERENCES.md says %.2f°", c.cf, got, c.want)
		}
	}
	tia, _ := Lookup("transimpedance")
	want := tiaCfCaution(tia)
	found := false
	for _, c := range tia.Cautions {
		found = found || c == want
	}
	if !found || !strings.Contains(want, "about 52°") || !strings.Contains(want, "about 66°") {
		t.Errorf("the caution %q is not the computed one among %q", want, tia.Cautions)
	}
}
