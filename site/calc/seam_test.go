package calc

import (
	"encoding/csv"
	"math/cmplx"
	"slices"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/internal/sitetest"
	"zport/site/view"
)

// admittance is the analysis of DEVELOPERS.md's walk-through, "Adding an
// analysis": each port's admittance Y = 1/Z at the spot frequency, in a
// unit the user picks. It is one value, written as a new analysis would
// be; TestAddingAnAnalysis registers it with one line and checks that it
// reaches the panel, the CSV, the copied results and the share link.
var admittance = Analysis{
	Key:   "admittance",
	Title: "Port admittances",
	Settings: []Setting{{Name: "unit", Symbol: "unit", Meaning: "admittance unit", Default: "S",
		Options: [][2]string{{"S", "siemens"}, {"mS", "millisiemens"}}}},
	Ask: func(req *api.Request, c *Context) *api.ErrorBody {
		if u := c.Values["unit"]; u != "S" && u != "mS" {
			return &api.ErrorBody{Param: admittanceField, Message: "choose S or mS"}
		}
		return nil // Y needs nothing the base answer lacks
	},
	Section: func(w *view.Writer, c *Context) {
		w.Section(c.ID, "admittance", "Port admittances")
		w.Open("dl", "class", "kv")
		for _, p := range c.Resp.Ports {
			w.KV("Y at "+p.Name, func() {
				w.Elem("span", admittanceText(p, c.Values["unit"]), "data-port", p.Name, "data-quantity", "admittance")
			})
		}
		w.Close("dl")
		w.Close("section")
	},
	Columns: func(c *Context) []Column {
		var cols []Column
		if s := c.Resp.Sweep; s != nil { // one value a frequency
			for _, p := range s.Ports {
				y := make([]*api.Complex, len(p.Z))
				for i, z := range p.Z {
					y[i] = api.C(1 / z.Value())
				}
				cols = append(cols, Column{Name: p.Name + ".y", Unit: "S", Complex: y})
			}
			return cols
		}
		for _, p := range c.Resp.Ports { // the spot frequency alone
			cols = append(cols, Column{Name: p.Name + ".y", Unit: "S", Complex: []*api.Complex{api.C(1 / p.Z.Value())}})
		}
		return cols
	},
	Copy: func(m *Markdown, c *Context) {
		var rows [][]string
		for _, p := range c.Resp.Ports {
			rows = append(rows, []string{MD(p.Name), admittanceText(p, c.Values["unit"])})
		}
		m.Table([]string{"Port", "Admittance"}, rows...)
	},
}

const admittanceField = "admittance.unit"

func admittanceText(p api.PortResult, unit string) string {
	y := 1 / p.Z.Value()
	if unit == "mS" {
		return view.Polar(1e3*y, "") + " mS"
	}
	return view.Polar(y, "S")
}

func TestAddingAnAnalysis(t *testing.T) {
	// The one registration line:
	Analyses = append(Analyses, &admittance)
	t.Cleanup(func() { Analyses = slices.DeleteFunc(Analyses, func(a *Analysis) bool { return a == &admittance }) })

	f := Form{Topology: "inverting", ID: "c", CSV: true}
	f.Settings = map[string]Values{"admittance": {"unit": "mS"}}
	page := Compute(f)
	if page.Error != nil {
		t.Fatal(page.Error)
	}
	resp, err := api.Analyze(api.Request{Topology: "inverting", Frequency: 1e3, Sweep: &api.SweepSpec{From: 10, To: 1e8, Points: 400}})
	if err != nil {
		t.Fatal(err)
	}

	// On the page: a section with each port's Y.
	n := 0
	for _, e := range sitetest.Parse(t, page.HTML) {
		if e.Attrs["data-quantity"] != "admittance" {
			continue
		}
		n++
		var z *api.Complex
		for _, p := range resp.Ports {
			if p.Name == e.Attrs["data-port"] {
				z = p.Z
			}
		}
		want := view.Polar(1e3/z.Value(), "") + " mS"
		if e.Text != want {
			t.Errorf("Y at %s reads %q, want %q", e.Attrs["data-port"], e.Text, want)
		}
	}
	if n != len(resp.Ports) {
		t.Errorf("%d admittances on the page for %d ports", n, len(resp.Ports))
	}

	// In the CSV: a complex column per port, 1/Z.
	r := csv.NewReader(strings.NewReader(page.CSV))
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := slices.Index(rows[0], "out.y_re_S")
	if col < 0 {
		t.Fatalf("CSV header %v has no out.y_re_S", rows[0])
	}
	out := slices.IndexFunc(resp.Sweep.Ports, func(p api.PortSweep) bool { return p.Name == "out" })
	for i, row := range rows[1:] {
		re, _ := strconv.ParseFloat(row[col], 64)
		im, _ := strconv.ParseFloat(row[col+1], 64)
		z := resp.Sweep.Ports[out].Z[i].Value()
		if d := cmplx.Abs(complex(re, im)*z - 1); d > 1e-12 {
			t.Errorf("row %d: Y·Z − 1 = %g in the CSV", i+1, d)
			break
		}
	}

	// In the copied results.
	if !strings.Contains(page.Markdown, "| Port | Admittance |") || !strings.Contains(page.Markdown, " mS |") {
		t.Errorf("copied results lack the admittance table:\n%s", page.Markdown)
	}

	// In the share link, and back.
	if !strings.Contains(page.State, "admittance.unit=mS") {
		t.Errorf("state %q lacks the setting", page.State)
	}
	e, _ := api.LookupEntry("inverting")
	g, refused := ReadFragment(page.State, Form{Topology: "inverting"}, e)
	if len(refused) > 0 || g.Settings["admittance"]["unit"] != "mS" {
		t.Errorf("read back: %v, %+v", g.Settings, refused)
	}
	// At its default it stays out of the link.
	f.Settings = map[string]Values{"admittance": {"unit": "S"}}
	if out := Compute(f); strings.Contains(out.State, "admittance") {
		t.Errorf("state %q carries a default setting", out.State)
	}

	// A bad setting is an error naming it.
	f.Settings = map[string]Values{"admittance": {"unit": "kS"}}
	if bad := Compute(f); bad.Error == nil || bad.Error.Param != admittanceField {
		t.Errorf("bad unit: %+v", bad.Error)
	}
}

func TestPortChartTitle(t *testing.T) {
	for _, c := range []struct{ name, desc, want string }{
		{"out", "", "|Z| and phase at port out"},
		{"out", "output", "|Z| and phase at port out (output)"},
		{"in", "input, as the source sees it (through Rs and the summing node, a long description)", "|Z| and phase at port in (input, as the source sees it)"},
		{"in", strings.Repeat("x", 80), "|Z| and phase at port in"},
	} {
		if got := portChartTitle(c.name, c.desc); got != c.want {
			t.Errorf("portChartTitle(%q, %q) = %q, want %q", c.name, c.desc, got, c.want)
		}
	}
}
