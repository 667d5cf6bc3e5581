package calc

import (
	"slices"
	"testing"

	"zport/engine/api"
	"zport/site/view"
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
	f := DefaultForm(e)
	f.ID = "c"
	b.ReportAllocs()
	for b.Loop() {
		_ = Panel(&f, &e, resp)
		_ = CopyText(&f, &e, resp)
		_ = CSV(&f, &e, resp)
	}
}

// BenchmarkParts400 splits BenchmarkPanel400 into its analyses' parts.
func BenchmarkParts400(b *testing.B) {
	e, _ := api.LookupEntry("inverting")
	resp, _ := api.Analyze(api.Request{Topology: "inverting", Frequency: e.Frequency, Sweep: &e.Sweep})
	f := DefaultForm(e)
	b.Run("csv", func(b *testing.B) {
		for b.Loop() {
			_ = CSV(&f, &e, resp)
		}
	})
	for _, a := range Analyses {
		if a.Section == nil {
			continue
		}
		b.Run("section-"+a.Key, func(b *testing.B) {
			for b.Loop() {
				var w view.Writer
				a.Section(&w, a.context(&f, &e, resp))
			}
		})
	}
	b.Run("markdown", func(b *testing.B) {
		for b.Loop() {
			_ = CopyText(&f, &e, resp)
		}
	})
}

// BenchmarkResponseCost is one calculator update of every catalog stage
// at its defaults, with the closed-loop response section (the stage pages'
// default) and without it: the cost the section adds to a recompute.
// Compare the pairs' medians with benchstat.
func BenchmarkResponseCost(b *testing.B) {
	without := slices.DeleteFunc(slices.Clone(Analyses), func(a *Analysis) bool { return a == &closedLoop })
	for _, e := range api.Catalog() {
		f := Form{Topology: e.ID, ID: "c"}
		for _, run := range []struct {
			name string
			list []*Analysis
		}{{"with", Analyses}, {"without", without}} {
			b.Run(e.ID+"/"+run.name, func(b *testing.B) {
				saved := Analyses
				Analyses = run.list
				defer func() { Analyses = saved }()
				b.ReportAllocs()
				for b.Loop() {
					if out := Compute(f); out.Error != nil {
						b.Fatal(out.Error)
					}
				}
			})
		}
	}
}
