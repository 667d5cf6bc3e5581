package topology_test

// The shared suite every stage of the catalog runs through. Each stage's own
// file holds its published checks; this file holds the properties that must
// hold for all of them.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/topology"
	"zport/engine/value"
)

// randomParams draws each parameter log-uniformly within a factor of 3 of its
// default, clipped to its range; optional parameters are present or absent
// at random. Seeded, so a failure names a reproducible case.
func randomParams(rng *rand.Rand, t *topology.Topology) map[string]string {
	p := map[string]string{}
	for _, par := range t.Params {
		if par.Optional && rng.IntN(3) == 0 {
			p[par.Name] = ""
			continue
		}
		def := par.Default
		if def == "" {
			continue // absent optional with no default: keep absent
		}
		v, err := value.Parse(def, par.Unit)
		if err != nil || v == 0 || par.Min == par.Max {
			continue
		}
		x := v * math.Exp((rng.Float64()*2-1)*math.Log(3))
		if v < 0 {
			x = v
		}
		x = math.Min(math.Max(x, par.Min), par.Max)
		p[par.Name] = strconv.FormatFloat(x, 'g', 17, 64)
	}
	return p
}

func rel(a, b complex128) float64 {
	d := cmplx.Abs(a - b)
	if m := cmplx.Abs(b); m > 0 {
		return d / m
	}
	return d
}

// TestCatalogAgainstEngine checks, for every stage, over seeded random
// parameters and frequencies: Blackman's Z equals Z direct; every closed form
// equals the engine's value (to its stated Tol, else 1e-9 relative); the
// gain's asymptotic form equals its direct solution.
func TestCatalogAgainstEngine(t *testing.T) {
	if len(topology.Catalog()) == 0 {
		t.Fatal("the catalog is empty")
	}
	for _, st := range topology.Catalog() {
		t.Run(st.ID, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(7, uint64(len(st.ID))))
			for trial := 0; trial < 40; trial++ {
				params := randomParams(rng, st)
				if trial == 0 {
					params = nil // the defaults first
				}
				f := math.Pow(10, rng.Float64()*7) // 1 Hz … 10 MHz
				if trial == 1 {
					f = 0
				}
				resp, err := api.Analyze(api.Request{Topology: st.ID, Params: params, Frequency: f})
				if err != nil {
					t.Fatalf("trial %d params %v f=%g: %v", trial, params, f, err)
				}
				tol := 1e-9
				if resp.Condition != nil {
					tol = math.Max(tol, 50*0x1p-53**resp.Condition)
				}
				for _, p := range resp.Ports {
					if p.Z == nil || p.ZDirect == nil {
						continue
					}
					if d := rel(p.Z.Value(), p.ZDirect.Value()); d > tol {
						t.Errorf("trial %d f=%g port %s: Blackman Z %v vs direct %v (rel %.2g)\nparams %v", trial, f, p.Name, p.Z.Value(), p.ZDirect.Value(), d, params)
					}
				}
				if g := resp.Gain; g != nil && g.G != nil && g.GDirect != nil {
					if d := rel(g.G.Value(), g.GDirect.Value()); d > 1e-9 {
						t.Errorf("trial %d f=%g: asymptotic gain %v vs direct %v (rel %.2g)", trial, f, g.G.Value(), g.GDirect.Value(), d)
					}
				}
				checkForms(t, st, resp, fmt.Sprintf("trial %d f=%g params %v", trial, f, params))
			}
		})
	}
}

func checkForms(t *testing.T, st *topology.Topology, resp *api.Response, where string) {
	t.Helper()
	cf := resp.Topology.ClosedForm
	if cf == nil {
		t.Errorf("%s: %s has no closed forms", where, st.ID)
		return
	}
	check := func(what string, f *api.Formula, engine *api.Complex) {
		if f == nil {
			return
		}
		tol := 1e-9
		if f.Text == "" || f.Source == "" {
			t.Errorf("%s: %s: closed form without text or source", where, what)
		}
		if ft, ok := formTol[formKey{st.ID, what}]; ok {
			tol = ft
		}
		// The engine reports its own precision: double precision times the
		// condition of the systems it solved.
		if resp.Condition != nil {
			tol = math.Max(tol, 50*0x1p-53**resp.Condition)
		}
		if f.Value == nil || engine == nil {
			if (f.Value == nil) != (engine == nil) {
				t.Errorf("%s: %s: closed form %v but engine %v (one is not finite)", where, what, f.Value.Value(), engine.Value())
			}
			return
		}
		// Relative, with an absolute floor for a closed form that is
		// exactly zero, or nearly, against the engine's rounding residue:
		// 1e-12, times the largest return ratio of the response for return
		// ratios. Every return ratio is −k·cᵀM₀⁻¹r with the same reference
		// gain k, so its residue scales with the largest of them: a stage
		// whose T open is close to zero (a current sink with its drain
		// open) while its T short is large shows it.
		floor := 1e-12
		if what == "T" || strings.HasSuffix(what, ".tShort") || strings.HasSuffix(what, ".tOpen") {
			floor *= largestReturnRatio(resp)
		}
		if d := rel(f.Value.Value(), engine.Value()); d > tol && cmplx.Abs(f.Value.Value()-engine.Value()) > floor {
			t.Errorf("%s: %s: closed form %v, engine %v (rel %.2g > %.0g)", where, what, f.Value.Value(), engine.Value(), d, tol)
		}
	}
	check("T", cf.ReturnRatio, resp.ReturnRatio)
	if resp.Gain != nil {
		check("gain", cf.Gain, resp.Gain.G)
	}
	for _, pf := range cf.Ports {
		var pr *api.PortResult
		for i := range resp.Ports {
			if resp.Ports[i].Name == pf.Name {
				pr = &resp.Ports[i]
			}
		}
		if pr == nil {
			t.Errorf("%s: closed forms for port %q which the engine did not report", where, pf.Name)
			continue
		}
		check(pf.Name+".z0", pf.Z0, pr.Z0)
		check(pf.Name+".tShort", pf.TShort, pr.TShort)
		check(pf.Name+".tOpen", pf.TOpen, pr.TOpen)
		check(pf.Name+".z", pf.Z, pr.Z)
	}
}

// largestReturnRatio is max(1, |T|, every port's |T short| and |T open|).
func largestReturnRatio(resp *api.Response) float64 {
	ts := []*api.Complex{resp.ReturnRatio}
	for _, p := range resp.Ports {
		ts = append(ts, p.TShort, p.TOpen)
	}
	m := 1.0
	for _, c := range ts {
		if c != nil {
			m = math.Max(m, cmplx.Abs(c.Value()))
		}
	}
	return m
}

type formKey struct{ id, what string }

// formTol is filled from each stage's Forms at the defaults: a formula's own
// Tol, when it states one, is what the suite holds it to.
var formTol = map[formKey]float64{}

func init() {
	for _, st := range topology.Catalog() {
		if st.Forms == nil {
			continue
		}
		v, err := st.Values(nil)
		if err != nil {
			continue
		}
		fs := st.Forms(v, st.Frequency)
		put := func(what string, f *topology.Formula) {
			if f != nil && f.Tol > 0 {
				formTol[formKey{st.ID, what}] = f.Tol
			}
		}
		put("T", fs.T)
		put("gain", fs.Gain)
		for _, p := range fs.Ports {
			put(p.Name+".z0", p.Z0)
			put(p.Name+".tShort", p.TShort)
			put(p.Name+".tOpen", p.TOpen)
			put(p.Name+".z", p.Z)
		}
	}
}

// TestCatalogCircuitRoundTrip checks that each stage's generated circuit
// text parses, and that analyzing it as a circuit request gives exactly the
// topology request's results.
func TestCatalogCircuitRoundTrip(t *testing.T) {
	for _, st := range topology.Catalog() {
		t.Run(st.ID, func(t *testing.T) {
			sweep := &api.SweepSpec{From: st.Sweep.From, To: st.Sweep.To, Points: 50}
			a, err := api.Analyze(api.Request{Topology: st.ID, Frequency: st.Frequency, Sweep: sweep})
			if err != nil {
				t.Fatal(err)
			}
			echo := a.Topology
			if _, err := circuit.Parse(echo.Circuit); err != nil {
				t.Fatalf("generated text does not parse: %v\n%s", err, echo.Circuit)
			}
			b, err := api.Analyze(api.Request{Circuit: echo.Circuit, Reference: echo.Reference, Ports: echo.Ports, Gain: echo.Gain, Frequency: st.Frequency, Sweep: sweep})
			if err != nil {
				t.Fatal(err)
			}
			if len(a.Ports) != len(b.Ports) || len(a.Ports) != len(st.Ports) {
				t.Fatalf("ports: topology %d, circuit %d, declared %d", len(a.Ports), len(b.Ports), len(st.Ports))
			}
			for i := range a.Ports {
				if *a.Ports[i].Z != *b.Ports[i].Z || *a.Ports[i].ZDirect != *b.Ports[i].ZDirect {
					t.Errorf("port %s differs: %v vs %v", a.Ports[i].Name, a.Ports[i].Z, b.Ports[i].Z)
				}
			}
			if (a.Gain == nil) != (st.Gain == nil) {
				t.Errorf("gain declared %v but reported %v", st.Gain != nil, a.Gain != nil)
			}
			if a.Margins == nil || b.Margins == nil || a.Margins.Verdict != b.Margins.Verdict {
				t.Errorf("margins differ")
			}
		})
	}
}

// TestCatalogParamErrors checks that every parameter's bad input is an error
// naming that parameter.
func TestCatalogParamErrors(t *testing.T) {
	for _, st := range topology.Catalog() {
		t.Run(st.ID, func(t *testing.T) {
			for _, p := range st.Params {
				bad := []string{"abc", "1..2", "4k7k", "NaN"}
				if p.Max < math.MaxFloat64/10 {
					bad = append(bad, strconv.FormatFloat(p.Max*10+1, 'g', -1, 64))
				}
				if p.Min > 0 {
					bad = append(bad, strconv.FormatFloat(p.Min/10, 'g', -1, 64))
				} else if p.Min == 0 {
					bad = append(bad, "-1")
				}
				if !p.Optional {
					bad = append(bad, "")
				}
				for _, b := range bad {
					_, err := api.Analyze(api.Request{Topology: st.ID, Params: map[string]string{p.Name: b}, Frequency: 1e3})
					var pr *api.Problem
					if !errors.As(err, &pr) || pr.Param != p.Name {
						t.Errorf("param %s = %q: got %v, want an error naming %s", p.Name, b, err, p.Name)
					}
				}
			}
		})
	}
}

// TestCatalogMetadata checks what every page relies on.
func TestCatalogMetadata(t *testing.T) {
	for _, st := range topology.Catalog() {
		if st.Title == "" || st.Description == "" || st.Scenario == "" || st.Reference == "" || len(st.Ports) == 0 {
			t.Errorf("%s: missing title, description, scenario, reference or ports", st.ID)
		}
		if st.Sweep.From <= 0 || st.Sweep.To <= st.Sweep.From || st.Sweep.Points < 2 {
			t.Errorf("%s: bad sweep %+v", st.ID, st.Sweep)
		}
		for _, p := range st.Params {
			if p.Symbol == "" || p.Meaning == "" || p.Max < p.Min {
				t.Errorf("%s: param %s lacks symbol/meaning or has an empty range", st.ID, p.Name)
			}
		}
		if _, err := st.Values(nil); err != nil {
			t.Errorf("%s: defaults do not parse: %v", st.ID, err)
		}
	}
}
