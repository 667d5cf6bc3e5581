package topology_test

import (
	"encoding/json"
	"os"
	"testing"

	"zport/engine/api"
	"zport/engine/topology"
)

func TestCfScratch(t *testing.T) {
	id := os.Getenv("CFID")
	if id == "" {
		t.Skip()
	}
	st, _ := topology.Lookup(id)
	v, _ := st.Values(nil)
	t.Log("\n" + st.Circuit(v))
	r, err := api.Analyze(api.Request{Topology: id, Frequency: st.Frequency})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := json.MarshalIndent(r.Topology.Extras, "", " ")
	t.Log(string(b))
	for _, p := range r.Ports {
		t.Log(p.Name, p.Z0.Value(), p.TShort.Value(), p.TOpen.Value(), p.Z.Value(), p.ZDirect.Value())
	}
	if r.Gain != nil {
		t.Log("gain", r.Gain.G.Value(), r.Gain.GDirect.Value())
	}
	t.Log(r.Notes)
}

func TestCfProbe(t *testing.T) {
	if os.Getenv("CFPROBE") == "" {
		t.Skip()
	}
	r, err := api.Analyze(api.Request{Topology: "integrator", Params: map[string]string{"R2": ""}, Frequency: 0})
	if err != nil {
		t.Fatal(err)
	}
	t.Log("T", r.ReturnRatio.Value(), "G", r.Gain.G, "G0", r.Gain.G0, "GInf", r.Gain.GInf, "GDirect", r.Gain.GDirect.Value(), r.Notes)
}
