package calc

import (
	"strings"
	"testing"

	"zport/engine/api"
)

// refusedKeys lists the keys of refusals, in order.
func refusedKeys(r []Refusal) string {
	var keys []string
	for _, x := range r {
		keys = append(keys, x.Key)
	}
	return strings.Join(keys, " ")
}

// A stage link with bad values: each is refused by name, its default takes
// its place (in the form the page fills its inputs from, and in the link
// the page writes back), the rest of the link is used, and the notice
// says exactly that.
func TestStageLinkRefusesBadValues(t *testing.T) {
	e, _ := api.LookupEntry("inverting")
	def := DefaultForm(e)
	for _, c := range []struct {
		name, frag, refused string
	}{
		{"not a number", "R1=22k&f=abc", "f"},
		{"NaN", "R1=22k&f=NaN", "f"},
		{"too many points", "R1=22k&points=9999", "points"},
		{"a parameter the engine refuses", "R1=22k&R2=abc", "R2"},
		{"a negative part", "R1=22k&R2=-5k", "R2"},
		{"given twice", "R1=22k&f=1k&f=2k", "f"},
		{"unknown", "R1=22k&zz=1", "zz"},
		{"a start above the default end", "R1=22k&from=1G", "from"},
		{"an end below the start", "R1=22k&from=1k&to=10", "to"},
		{"design aids", "R1=22k&aid.n=abc&aid.seed=-5", "aid.n aid.seed"},
		{"an aid tolerance of no part", "R1=22k&aid.tol.R7=J", "aid.tol.R7"},
		{"an aid tolerance that is no tolerance", "R1=22k&aid.tol=Q", "aid.tol"},
		{"an aid series", "R1=22k&aid.e=E7&aid.ec=E12", "aid.e"},
		{"an aid spread above typical", "R1=22k&aid.a0.U1=1G", "aid.a0.U1"},
		{"an aid target at no port", "R1=22k&aid.t1=pm%3C45&aid.t2=z%3Anowhere%3E1", "aid.t2"},
		{"an aid target that is no value", "R1=22k&aid.t3=pm%3C4k5k", "aid.t3"},
	} {
		t.Run(c.name, func(t *testing.T) {
			frag := c.frag
			// The page's inputs before the link must not matter.
			out := Compute(Form{Topology: "inverting", Params: map[string]string{"R2": "1k"}, Frequency: "7", Fragment: &frag})
			if out.Error != nil {
				t.Fatalf("error %+v", out.Error)
			}
			if got := refusedKeys(out.Refused); got != c.refused {
				t.Fatalf("refused %q, want %q: %+v", got, c.refused, out.Refused)
			}
			f := out.Form
			if f.Params["R1"] != "22k" {
				t.Errorf("the rest of the link was not used: R1 = %q", f.Params["R1"])
			}
			for _, r := range out.Refused {
				switch r.Key {
				case "f":
					if f.Frequency != def.Frequency || r.Default != def.Frequency {
						t.Errorf("frequency %q, default %q; want %q", f.Frequency, r.Default, def.Frequency)
					}
				case "R2":
					if f.Params["R2"] != def.Params["R2"] || r.Default != def.Params["R2"] {
						t.Errorf("R2 %q, default %q; want %q", f.Params["R2"], r.Default, def.Params["R2"])
					}
				case "points", "from":
					if f.Sweep != def.Sweep {
						t.Errorf("sweep %+v, want %+v", f.Sweep, def.Sweep)
					}
				case "to":
					if f.Sweep.To != def.Sweep.To || f.Sweep.From != "1k" {
						t.Errorf("sweep %+v, want the link's start and the default end", f.Sweep)
					}
				}
				if strings.HasPrefix(r.Key, "aid.") {
					if _, ok := f.Settings[aidsKey][strings.TrimPrefix(r.Key, "aid.")]; ok {
						t.Errorf("refused %s still in the settings %v", r.Key, f.Settings[aidsKey])
					}
				}
				if !strings.Contains(out.State, "R1=22k") || strings.Contains(out.State, r.Key+"="+r.Value+"&") {
					t.Errorf("state %q", out.State)
				}
				if !strings.Contains(out.Notice, r.Message) {
					t.Errorf("notice %q lacks %q", out.Notice, r.Message)
				}
			}
			if !strings.HasPrefix(out.Notice, "Not used from this link: ") || !strings.Contains(out.Notice, "The page shows the rest of the link, with the defaults in their place") {
				t.Errorf("notice %q", out.Notice)
			}
		})
	}

	frag := "R1=22k&f=abc&points=9999"
	out := Compute(Form{Topology: "inverting", Fragment: &frag})
	want := "Not used from this link: f = \"abc\" (" + out.Refused[0].Message +
		"); points = \"9999\" (sweep points: must be from 2 to 5000). The page shows the rest of the link, with the defaults in their place: f = 1k, points = 400."
	if out.Notice != want {
		t.Errorf("notice\n %q\nwant\n %q", out.Notice, want)
	}

	// A good link has no notice.
	good := "R1=22k&aid.n=500&aid.t1=pm%3C45"
	if out := Compute(Form{Topology: "inverting", Fragment: &good}); out.Error != nil || out.Notice != "" || len(out.Refused) > 0 {
		t.Errorf("good link: %+v, %q", out.Error, out.Notice)
	}
}

// The custom page: a link's circuit is shown with the link's choices, a
// bad one replaced by the circuit's default, whatever the page showed
// before the link.
func TestCircuitLinkRefusesBadValues(t *testing.T) {
	text := "vsource Vin in gnd 1\nopamp U7 in fb out a0=100k gbw=1M\nresistor R1 fb gnd 1k\nresistor R2 out fb 9k\nport zz out gnd\nport in in gnd\n"
	// What the page held before: another circuit's choices and a bad
	// frequency, which a link must not inherit.
	before := Form{Circuit: text, Reference: "U1", Ports: []string{"o"}, Frequency: "abc", Sweep: SweepForm{From: "x", To: "y", Points: "z"},
		Gain: &api.GainSpec{Source: "Vin", Output: "in"}, ID: "c"}
	for _, c := range []struct {
		name, frag, refused string
		check               func(t *testing.T, f *Form)
	}{
		{"the issue's link", "ref=U7&port=zz&f=abc", "f", func(t *testing.T, f *Form) {
			if f.Reference != "U7" || len(f.Ports) != 1 || f.Ports[0] != "zz" || f.Frequency != circuitDefaults.Frequency || f.Gain != nil {
				t.Errorf("form %+v", f)
			}
		}},
		{"no frequency in the link", "ref=U7&port=zz", "", func(t *testing.T, f *Form) {
			if f.Frequency != circuitDefaults.Frequency || f.Sweep != circuitDefaults.Sweep {
				t.Errorf("inherited %q, %+v", f.Frequency, f.Sweep)
			}
		}},
		{"points", "ref=U7&port=zz&points=9999", "points", func(t *testing.T, f *Form) {
			if f.Sweep.Points != "400" || f.Ports[0] != "zz" {
				t.Errorf("form %+v", f)
			}
		}},
		{"a reference not in the circuit", "ref=U9&port=zz", "ref", func(t *testing.T, f *Form) {
			if f.Reference != "U7" {
				t.Errorf("reference %q", f.Reference)
			}
		}},
		{"a port not in the circuit", "ref=U7&port=zz&port=nowhere", "port", func(t *testing.T, f *Form) {
			if len(f.Ports) != 1 || f.Ports[0] != "zz" {
				t.Errorf("ports %q", f.Ports)
			}
		}},
		{"a gain from no source", "ref=U7&src=Vx&out=out", "src out", func(t *testing.T, f *Form) {
			if f.Gain != nil {
				t.Errorf("gain %+v", f.Gain)
			}
		}},
		{"design aids", "ref=U7&aid.n=abc&aid.seed=-5&aid.tol.R9=J", "aid.n aid.seed aid.tol.R9", func(t *testing.T, f *Form) {
			if len(f.Settings[aidsKey]) != 0 {
				t.Errorf("aid settings %v", f.Settings[aidsKey])
			}
		}},
		{"an aid spread of a circuit's opamp", "ref=U7&aid.gbw.U7=5M", "aid.gbw.U7", nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := before
			frag := c.frag
			f.Fragment = &frag
			out := ComputeCircuit(CircuitRequest{Form: f, Offered: &Offered{References: []string{"U1"}, Ports: []string{"o"}}})
			o := out.Output
			if o == nil || o.Error != nil {
				t.Fatalf("output %+v", o)
			}
			if got := refusedKeys(o.Refused); got != c.refused {
				t.Fatalf("refused %q, want %q: %+v", got, c.refused, o.Refused)
			}
			if c.refused != "" && !strings.Contains(o.Notice, "The page shows the link’s circuit and the rest of its settings, with the defaults in their place") {
				t.Errorf("notice %q", o.Notice)
			}
			if c.refused == "" && o.Notice != "" {
				t.Errorf("notice %q for a good link", o.Notice)
			}
			if c.check != nil {
				c.check(t, out.Form)
			}
			if out.Form.Fragment != nil || o.Form.Reference != out.Form.Reference {
				t.Errorf("the form the pickers get differs from the one analyzed")
			}
		})
	}
}
