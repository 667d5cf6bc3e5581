package api_test

import (
	"encoding/json"
	"math/cmplx"
	"strings"
	"testing"

	"zport/engine/api"
)

// magnitudes is a small analysis of the tests' own: |Z| of every port at
// the spot frequency, scaled by a factor given in the request.
type magRequest struct {
	Scale float64 `json:"scale"`
}

type magResult struct {
	Ports []float64 `json:"ports"`
}

var magnitudes = api.Register("testMagnitudes", func(p *api.Prepared, q *magRequest, base *api.Response) (*magResult, error) {
	if q.Scale <= 0 {
		return nil, &api.Problem{Param: "testMagnitudes.scale", Msg: "must be above 0"}
	}
	r := &magResult{}
	for _, pr := range base.Ports {
		r.Ports = append(r.Ports, q.Scale*cmplx.Abs(pr.Z.Value()))
	}
	return r, nil
})

// TestAnalysisRegistry: a registered analysis is asked for by its key in
// JSON or through its value in Go, answered under the same key after the
// base answer, and its errors name its fields.
func TestAnalysisRegistry(t *testing.T) {
	const circuit = "vsource V1 a gnd 1\nresistor R1 a b 1k\nresistor R2 b gnd 3k\nvcvs E1 c gnd sense=b,gnd gain=2\nresistor R3 c gnd 1k\nport p b gnd\n"
	in := `{"circuit": ` + jsonString(circuit) + `, "reference": "E1", "ports": ["p"], "frequency": 0, "testMagnitudes": {"scale": 2}}`
	out, ok := api.AnalyzeJSON([]byte(in))
	if !ok {
		t.Fatal(string(out))
	}
	var got struct {
		Ports []api.PortResult `json:"ports"`
		Mag   magResult        `json:"testMagnitudes"`
	}
	if err := json.Unmarshal(out, &got); err != nil {
		t.Fatal(err)
	}
	// R1 ∥ R2 = 750 Ω at the port; the vcvs only reads it.
	if len(got.Mag.Ports) != 1 || got.Mag.Ports[0] != 1500 {
		t.Errorf("testMagnitudes = %v, want [1500] (2 × 750 Ω)", got.Mag.Ports)
	}

	// The same through Go, typed; asking on a copy leaves the original.
	req := api.Request{Circuit: circuit, Reference: "E1", Ports: []string{"p"}}
	plain := req
	magnitudes.Ask(&req, &magRequest{Scale: 1})
	if magnitudes.Asked(plain) != nil {
		t.Error("Ask changed the request it was copied from")
	}
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	if r := magnitudes.Result(resp); r == nil || r.Ports[0] != 750 {
		t.Errorf("Result = %+v", r)
	}
	if r := api.Tolerance.Result(resp); r != nil {
		t.Error("an analysis not asked for answered")
	}
	// Read back from JSON, the answer is typed again.
	b, err := json.Marshal(resp)
	if err != nil {
		t.Fatal(err)
	}
	var back api.Response
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if r := magnitudes.Result(&back); r == nil || r.Ports[0] != 750 {
		t.Errorf("read back: %+v from %s", r, b)
	}

	for _, c := range []struct{ extra, param, frag string }{
		{`"testMagnitudes": {"scale": -1}`, "testMagnitudes.scale", "above 0"},
		{`"testMagnitudes": {"scal": 1}`, "testMagnitudes", `unknown field "scal"`},
		{`"testMagnitudes": {"scale": "big"}`, "testMagnitudes.scale", "a number"},
		{`"magnitudes": {}`, "magnitudes", "unknown key"},
	} {
		in := `{"circuit": ` + jsonString(circuit) + `, "reference": "E1", "ports": ["p"], "frequency": 0, ` + c.extra + `}`
		out, ok := api.AnalyzeJSON([]byte(in))
		var e api.ErrorResponse
		if ok || json.Unmarshal(out, &e) != nil || e.Error.Param != c.param || !strings.Contains(e.Error.Message, c.frag) {
			t.Errorf("%s: got %s, want %s: …%s…", c.extra, out, c.param, c.frag)
		}
	}
}

// TestRegisterRefusesTakenKeys: a key of the base request or of another
// analysis cannot be registered again.
func TestRegisterRefusesTakenKeys(t *testing.T) {
	for _, key := range []string{"ports", "sweep", "tolerance", "testMagnitudes", ""} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("Register(%q) did not panic", key)
				}
			}()
			api.Register(key, func(*api.Prepared, *magRequest, *api.Response) (*magResult, error) { return nil, nil })
		}()
	}
}

func jsonString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}
