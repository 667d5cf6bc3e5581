package render

import (
	"testing"

	"zport/engine/api"
)

// BenchmarkCompute400 is one calculator update of the inverting stage at
// its default 400-point sweep: the engine's analysis, the panel with its
// charts, the Markdown and the CSV.
func BenchmarkCompute400(b *testing.B) {
	f := Form{Topology: "inverting", ID: "c"}
	b.ReportAllocs()
	for b.Loop() {
		if out := Compute(f); out.Error != nil {
			b.Fatal(out.Error)
		}
	}
}

// BenchmarkAnalyze400 is the engine's part of BenchmarkCompute400 alone.
func BenchmarkAnalyze400(b *testing.B) {
	e, _ := api.LookupEntry("inverting")
	req := api.Request{Topology: "inverting", Frequency: e.Frequency, Sweep: &e.Sweep}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := api.Analyze(req); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPanel400 is the rendering part alone, for a response computed
// once: the HTML with its four charts, the Markdown, and the CSV a page
// asks for only on download.
func BenchmarkPanel400(b *testing.B) {
	e, _ := api.LookupEntry("inverting")
	resp, err := api.Analyze(api.Request{Topology: "inverting", Frequency: e.Frequency, Sweep: &e.Sweep})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		_ = Panel(resp, &e, "c")
		_ = Markdown(resp, &e)
		_ = CSV(resp)
	}
}

// BenchmarkParts400 splits BenchmarkPanel400 into its parts.
func BenchmarkParts400(b *testing.B) {
	e, _ := api.LookupEntry("inverting")
	resp, _ := api.Analyze(api.Request{Topology: "inverting", Frequency: e.Frequency, Sweep: &e.Sweep})
	b.Run("csv", func(b *testing.B) {
		for b.Loop() {
			_ = CSV(resp)
		}
	})
	b.Run("charts", func(b *testing.B) {
		p := &panel{resp: resp, entry: &e, id: "c"}
		for b.Loop() {
			for _, c := range p.charts() {
				_ = c.SVG()
			}
		}
	})
	b.Run("markdown", func(b *testing.B) {
		for b.Loop() {
			_ = Markdown(resp, &e)
		}
	})
}
