package calc

import (
	"slices"
	"testing"
	"time"

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

// fourPins pins four variants of the inverting stage's R2.
func fourPins() []Pin {
	var pins []Pin
	for i, r2 := range []string{"22k", "33k", "68k", "100k"} {
		pins = append(pins, Pin{Name: "R2 " + r2, Slot: i + 1, Params: map[string]string{"R2": r2}})
	}
	return pins
}

// BenchmarkCompute400Pins4Cached is BenchmarkCompute400 with four pinned
// designs whose answers the cache holds, as on every edit of the current
// design: their overlays and comparisons, no analysis.
func BenchmarkCompute400Pins4Cached(b *testing.B) {
	f := Form{Topology: "inverting", ID: "c", Pins: fourPins()}
	Compute(f)
	b.ReportAllocs()
	for b.Loop() {
		if out := Compute(f); out.Error != nil {
			b.Fatal(out.Error)
		}
	}
}

// BenchmarkCompute400Pins4Fresh is the same with every pin analyzed anew,
// as after an edit of the spot frequency or the sweep.
func BenchmarkCompute400Pins4Fresh(b *testing.B) {
	f := Form{Topology: "inverting", ID: "c", Pins: fourPins()}
	b.ReportAllocs()
	for b.Loop() {
		pinAnswers.mu.Lock()
		pinAnswers.m, pinAnswers.keys = nil, nil
		pinAnswers.mu.Unlock()
		if out := Compute(f); out.Error != nil {
			b.Fatal(out.Error)
		}
	}
}

// BenchmarkResponseCost is one calculator update of every catalog stage
// at its defaults, alternately with the closed-loop response section (the
// stage pages' default) and without it, one after the other in the same
// loop so that both see the same machine: it reports each one's time per
// update and their ratio, the cost the section adds to a recompute.
// Compare medians over several runs with benchstat.
func BenchmarkResponseCost(b *testing.B) {
	without := slices.DeleteFunc(slices.Clone(Analyses), func(a *Analysis) bool { return a == &closedLoop })
	with := Analyses
	defer func() { Analyses = with }()
	for _, e := range api.Catalog() {
		f := Form{Topology: e.ID, ID: "c"}
		b.Run(e.ID, func(b *testing.B) {
			var spent [2]time.Duration
			n := 0
			for b.Loop() {
				for k, list := range [][]*Analysis{with, without} {
					Analyses = list
					t0 := time.Now()
					if out := Compute(f); out.Error != nil {
						b.Fatal(out.Error)
					}
					spent[k] += time.Since(t0)
				}
				n++
			}
			Analyses = with
			b.ReportMetric(float64(spent[0].Nanoseconds())/float64(n), "ns-with/op")
			b.ReportMetric(float64(spent[1].Nanoseconds())/float64(n), "ns-without/op")
			b.ReportMetric(float64(spent[0])/float64(spent[1]), "with/without")
		})
	}
}
