package api_test

import (
	"testing"

	"zport/engine/api"
)

// One calculator recompute as a page asks for it: a catalog stage at its
// defaults, spot frequency and its 400-point sweep, every port and the gain.
func benchStage(b *testing.B, id string) { benchStageNoise(b, id, false) }

// benchStageNoise is benchStage, with the noise analysis over the sweep's
// range when noise is set: the densities at the 400 points reuse the
// sweep's factorizations (one transposed solve each), the band integral
// solves at its own frequencies.
func benchStageNoise(b *testing.B, id string, noise bool) {
	entry, _ := api.LookupEntry(id)
	req := api.Request{Topology: id, Frequency: entry.Frequency, Sweep: &entry.Sweep}
	if noise {
		api.Noise.Ask(&req, &api.NoiseRequest{})
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := api.Analyze(req); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkInverting3Port400(b *testing.B)       { benchStage(b, "inverting") }
func BenchmarkTransimpedance2Port400(b *testing.B)  { benchStage(b, "transimpedance") }
func BenchmarkDifference3Port400(b *testing.B)      { benchStage(b, "difference") }
func BenchmarkBoostedCascode2Port400(b *testing.B)  { benchStage(b, "boostedcascode") }
func BenchmarkEmitterFollower2Port400(b *testing.B) { benchStage(b, "emitterfollower") }
func BenchmarkMiller2Port400(b *testing.B)          { benchStage(b, "miller") }
func BenchmarkCapload2Port400(b *testing.B)         { benchStage(b, "capload") }

func BenchmarkInverting3Port400Noise(b *testing.B)      { benchStageNoise(b, "inverting", true) }
func BenchmarkTransimpedance2Port400Noise(b *testing.B) { benchStageNoise(b, "transimpedance", true) }
