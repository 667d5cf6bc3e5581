package api_test

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"zport/engine/api"
	"zport/engine/feedback"
	"zport/engine/noise"
	"zport/engine/topology"
)

// Bad "noise" input is an error naming its field.
func TestNoiseErrors(t *testing.T) {
	rc := jsonString("vsource Vin in gnd 0\nresistor R in out 10k\ncapacitor C out gnd 1n\n")
	for _, c := range []struct{ rest, param, frag string }{
		{`"gain": {"source": "Vin", "output": "out"}, "temperature": 0, "noise": {}`, "temperature", "above 0"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"temperature": 0}`, "noise.temperature", "above 0"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"temperature": 1001}`, "noise.temperature", "at most 1000 K"},
		{`"gain": {"source": "Vin", "output": "out"}, "temperature": 300, "noise": {"temperature": 77}`, "noise.temperature", "one setting"},
		{`"gain": {"source": "Vin", "output": "out"}, "temperature": -3, "noise": {}`, "temperature", "above 0"},
		{`"gain": {"source": "Vin", "output": "out"}, "temperature": 1001, "noise": {}`, "temperature", "at most 1000 K"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"band": {"from": 1e3, "to": 1e3}}`, "noise.band.to", "end above its start"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"band": {"from": 1e3, "to": 10}}`, "noise.band.to", "end above its start"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"band": {"from": 0, "to": 10}}`, "noise.band.from", "above 0 Hz"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"band": {"from": -1, "to": 10}}`, "noise.band.from", "above 0 Hz"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {}`, "noise.band", "no sweep"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"output": "nowhere", "band": {"from": 1, "to": 10}}`, "noise.output", `no node called "nowhere"`},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"output": "out,out", "band": {"from": 1, "to": 10}}`, "noise.output", "both ends"},
		{`"noise": {"band": {"from": 1, "to": 10}}`, "noise.output", "no gain"},
		{`"gain": {"source": "Vin", "output": "out"}, "noise": {"temp": 300}`, "noise", `unknown field "temp"`},
		{`"gain": {"source": "Vin", "output": "out"}, "temperature": "warm", "noise": {}`, "temperature", "a number"},
	} {
		in := `{"circuit": ` + rc + `, "frequency": 1000, ` + c.rest + `}`
		out, ok := api.AnalyzeJSON([]byte(in))
		var e api.ErrorResponse
		if ok || json.Unmarshal(out, &e) != nil || e.Error.Param != c.param || !strings.Contains(e.Error.Message, c.frag) {
			t.Errorf("%s:\n got %s\nwant %s: …%s…", c.rest, out, c.param, c.frag)
		}
	}
	// A negative density in circuit text is the parser's, with its place;
	// in a stage's parameters, the parameter's.
	if _, err := api.Analyze(api.Request{Circuit: "resistor R out gnd 1k\ninoise I1 gnd out shot=-1u\n", Frequency: 1}); err == nil || api.Body(err).Line != 2 || api.Body(err).Column != 24 {
		t.Errorf("negative shot current: %+v", api.Body(err))
	}
	if _, err := api.Analyze(api.Request{Topology: "inverting", Params: map[string]string{"en": "-1n"}, Frequency: 1}); err == nil || api.Body(err).Param != "en" {
		t.Errorf("negative en: %v", err)
	}
}

// A passive network needs no reference element: the direct answer, no
// loop, one note saying so.
func TestNoReferenceRequest(t *testing.T) {
	out, ok := api.AnalyzeJSON([]byte(`{"circuit": "vsource Vin in gnd 1\nresistor R in out 1k\ncapacitor C out gnd 1u\n", "ports": ["out"],
		"frequency": 1000, "gain": {"source": "Vin", "output": "out"}, "sweep": {"from": 1, "to": 1e6, "points": 20}}`))
	if !ok {
		t.Fatal(string(out))
	}
	var resp api.Response
	if err := json.Unmarshal(out, &resp); err != nil {
		t.Fatal(err)
	}
	if resp.Reference != "" || resp.ReturnRatio != nil || resp.Margins != nil || resp.Ports[0].Z != nil || resp.Ports[0].ZDirect == nil ||
		resp.Gain.G != nil || resp.Gain.GDirect == nil || len(resp.Notes) != 1 || resp.Notes[0] != feedback.NoReferenceNote {
		t.Errorf("response %s", out)
	}
	// A reference that is not there is still an error.
	if _, ok := api.AnalyzeJSON([]byte(`{"circuit": "resistor R out gnd 1k\n", "reference": "U9", "frequency": 1}`)); ok {
		t.Error("a missing reference was accepted")
	}
}

// Every stage of the catalog shows its noise, with the TIA's photodiode
// shot noise among its sources; the rms over the band does not depend on
// the sweep's point count (the band has nodes of its own), and the
// densities on the sweep are those of an adjoint solve at that frequency.
func TestCatalogNoise(t *testing.T) {
	for _, st := range topology.Catalog() {
		req := api.Request{Topology: st.ID, Frequency: st.Frequency, Sweep: &api.SweepSpec{From: st.Sweep.From, To: st.Sweep.To, Points: 60}}
		q := &api.NoiseRequest{}
		if st.Gain == nil {
			// No gain to take the output from: the first port's node.
			q.Output = st.Ports[0].A
		}
		api.Noise.Ask(&req, q)
		resp, err := api.Analyze(req)
		if err != nil {
			t.Fatalf("%s: %v", st.ID, err)
		}
		n := api.Noise.Result(resp)
		if n == nil || n.RMS.Output == nil || !(*n.RMS.Output > 0) || len(n.Contributors) < 2 || !n.Integration.Converged {
			t.Fatalf("%s: noise %+v", st.ID, n)
		}
		share := 0.0
		for i, c := range n.Contributors {
			share += *c.Share
			if i > 0 && *c.RMS > *n.Contributors[i-1].RMS {
				t.Errorf("%s: contributors not ranked: %s after %s", st.ID, c.Name, n.Contributors[i-1].Name)
			}
			if c.Name == "RL" {
				t.Errorf("%s: the load RL is a noise source", st.ID)
			}
		}
		if math.Abs(share-1) > 1e-12 {
			t.Errorf("%s: shares add up to %.15g", st.ID, share)
		}
		if st.Gain != nil && (n.RMS.Input == nil || n.Bandwidth == nil || len(n.Input) != 60) {
			t.Errorf("%s: no input referral", st.ID)
		}
		if st.Reference == "U1" && len(n.NoiseGain) != 60 {
			t.Errorf("%s: no noise gain", st.ID)
		}
		req.Sweep.Points = 400
		again, err := api.Analyze(req)
		if err != nil {
			t.Fatal(err)
		}
		if m := api.Noise.Result(again); *m.RMS.Output != *n.RMS.Output || *m.Integration.Error != *n.Integration.Error {
			t.Errorf("%s: rms %.17g with 60 points, %.17g with 400", st.ID, *n.RMS.Output, *m.RMS.Output)
		}
	}

	req := api.Request{Topology: "transimpedance", Frequency: 1e3, Sweep: &api.SweepSpec{From: 10, To: 1e8, Points: 50}}
	api.Noise.Ask(&req, &api.NoiseRequest{})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	n := api.Noise.Result(resp)
	found := false
	for _, c := range n.Contributors {
		if c.Name == "Ipd" {
			found = true
			if c.Kind != noise.Shot || c.Unit != "A/√Hz" || math.Abs(c.Level-math.Sqrt(2*1.602176634e-19*100e-9)) > 1e-28 {
				t.Errorf("Ipd: %+v", c)
			}
		}
	}
	if !found || n.InputUnit != "A/√Hz" || n.Source != "Iin" || n.Node != "out" {
		t.Errorf("TIA noise: %+v", n)
	}
	// The sweep's densities, from the sweep's own factorizations, against
	// the spot density of a request at that frequency.
	for _, i := range []int{0, 17, 49} {
		spot := req
		spot.Frequency = n.Frequency[i]
		r, err := api.Analyze(spot)
		if err != nil {
			t.Fatal(err)
		}
		s := api.Noise.Result(r).Spot
		if d := math.Abs(*s.Output / *n.Output[i] - 1); d > 1e-13 {
			t.Errorf("at %g Hz: sweep density %g, spot density %g", n.Frequency[i], *n.Output[i], *s.Output)
		}
		if d := math.Abs(*s.Input / *n.Input[i] - 1); d > 1e-13 {
			t.Errorf("at %g Hz: sweep input density %g, spot %g", n.Frequency[i], *n.Input[i], *s.Input)
		}
	}
}

// noise.temperature and the request's temperature are one setting: given
// in the noise request alone it sets the transistors' VT = kT/q (k, q the
// exact SI constants) as well as the noise, which the response echoes.
func TestNoiseTemperatureIsTheRequests(t *testing.T) {
	out, ok := api.AnalyzeJSON([]byte(`{"circuit": "vsource Vin b gnd 1\nbjt Q1 c b gnd ic=1m\nresistor RC c gnd 1k noise=off\n",
		"reference": "Q1", "frequency": 1000, "gain": {"source": "Vin", "output": "c"}, "noise": {"temperature": 400, "band": {"from": 10, "to": 1e4}}}`))
	if !ok {
		t.Fatalf("%s", out)
	}
	var resp struct {
		Temperature float64 `json:"temperature"`
		Devices     []struct {
			VT float64 `json:"vt"`
		} `json:"devices"`
		Noise struct {
			Temperature float64 `json:"temperature"`
		} `json:"noise"`
	}
	if err := json.Unmarshal(out, &resp); err != nil {
		t.Fatal(err)
	}
	vt := 1.380649e-23 * 400 / 1.602176634e-19
	if resp.Temperature != 400 || resp.Noise.Temperature != 400 || len(resp.Devices) != 1 || math.Abs(resp.Devices[0].VT-vt) > 1e-15*vt {
		t.Errorf("temperature %g, noise at %g, devices %+v; want 400 K and VT = %g", resp.Temperature, resp.Noise.Temperature, resp.Devices, vt)
	}
}
