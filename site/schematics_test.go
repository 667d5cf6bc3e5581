package site

import (
	"io/fs"
	"math"
	"regexp"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/site/calc"
)

var svgTextRE = regexp.MustCompile(`<text [^>]*class="(label|node|port)"[^>]*>([^<]*)</text>`)

// TestSchematicsMatchCircuits holds each schematic against the circuit
// text its topology generates with every optional part present: every part
// of the circuit is drawn, labelled with its name, and every drawn part,
// node and port name exists in the circuit.
func TestSchematicsMatchCircuits(t *testing.T) {
	for _, e := range api.Catalog() {
		data, err := fs.ReadFile(Sources, "schematics/"+e.ID+".svg")
		if err != nil {
			continue // not drawn yet
		}
		t.Run(e.ID, func(t *testing.T) {
			params := map[string]string{}
			for _, p := range e.Params {
				if p.Optional && strings.TrimSpace(p.Default) == "" {
					params[p.Name] = calc.Syntax(math.Sqrt(math.Max(p.Min, 1e-15) * p.Max))
				}
			}
			resp, err := api.Analyze(api.Request{Topology: e.ID, Params: params, Frequency: e.Frequency})
			if err != nil {
				t.Fatalf("analyze with every optional part: %v", err)
			}
			parts, nodes, ports := map[string]bool{}, map[string]bool{"gnd": true}, map[string]bool{}
			for _, line := range strings.Split(resp.Topology.Circuit, "\n") {
				f := strings.Fields(line)
				if len(f) < 3 || strings.HasPrefix(f[0], "#") {
					continue
				}
				if f[0] == "port" {
					ports[f[1]] = true
					continue
				}
				if f[0] == "vnoise" || f[0] == "inoise" {
					// A noise generator is the noise model of a part that
					// is drawn (the sensor's shot noise, a transistor's
					// channel noise), named in the noise section, not a
					// part of the schematic.
					continue
				}
				parts[f[1]] = true
				for _, n := range f[2:] {
					if !strings.Contains(n, "=") {
						nodes[n] = true
					}
				}
			}
			drawn := map[string]bool{}
			for _, m := range svgTextRE.FindAllStringSubmatch(string(data), -1) {
				kind, name := m[1], m[2]
				switch kind {
				case "label":
					drawn[name] = true
					if !parts[name] {
						t.Errorf("the schematic labels a part %q that the circuit text does not have", name)
					}
				case "node":
					if !nodes[name] && !strings.Contains(name, " ") {
						t.Errorf("the schematic names a node %q that the circuit text does not have", name)
					}
				case "port":
					if p := strings.TrimPrefix(name, "port "); !ports[p] {
						t.Errorf("the schematic marks a port %q that the circuit text does not have", p)
					}
				}
			}
			for p := range parts {
				if !drawn[p] {
					t.Errorf("part %s of the circuit text is not drawn", p)
				}
			}
			for _, bad := range []string{"<style", " style=", "<script", "href="} {
				if strings.Contains(string(data), bad) {
					t.Errorf("the schematic contains %q", bad)
				}
			}
			if handlerRE.Match(data) {
				t.Errorf("the schematic has an event handler attribute")
			}
		})
	}
}
