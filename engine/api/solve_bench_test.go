package api_test

import (
	"bytes"
	"encoding/json"
	"testing"

	"zport/engine/api"
	"zport/engine/solve"
)

// A sliced run gives exactly the one-shot answer: the page's solve (a few
// evaluations a slice) and the analyze command's agree byte for byte.
func TestSolveRunInSlices(t *testing.T) {
	req := api.Request{Topology: "capload", Frequency: 1e4}
	api.Solve.Ask(&req, &api.SolveRequest{Part: "Riso", Target: api.SolveTarget{Quantity: "pm", Value: num(60)}})
	resp, err := api.Analyze(req)
	if err != nil {
		t.Fatal(err)
	}
	whole, _ := json.Marshal(api.Solve.Result(resp))
	run, err := api.StartSolve(req)
	if err != nil {
		t.Fatal(err)
	}
	steps := 0
	for {
		done, total, finished := run.Step(3)
		steps++
		if finished {
			if done != total || done != api.Solve.Result(resp).Evaluations {
				t.Errorf("finished at %d of %d, the one-shot run took %d", done, total, api.Solve.Result(resp).Evaluations)
			}
			break
		}
		if done != 3*steps || total <= done {
			t.Fatalf("step %d: done %d, total %d", steps, done, total)
		}
	}
	if sliced := run.ResultJSON(); !bytes.Equal(sliced, whole) {
		t.Errorf("sliced run:\n%s\none-shot:\n%s", sliced, whole)
	}
	// A run stopped part-way says so and stays stopped.
	run, _ = api.StartSolve(req)
	run.Step(5)
	run.Stop()
	if done, _, finished := run.Step(5); !finished || done != 5 {
		t.Errorf("after Stop: done %d, finished %v", done, finished)
	}
}

// benchSolve is one solve on a catalog stage as a page runs it, curve
// included: prepare, then every evaluation to the end. It reports the
// evaluations of the circuit (and the return ratios computed), which do
// not depend on the machine's load.
func benchSolve(b *testing.B, id string, q api.SolveRequest) {
	entry, _ := api.LookupEntry(id)
	req := api.Request{Topology: id, Frequency: entry.Frequency}
	api.Solve.Ask(&req, &q)
	var last *api.SolveResult
	var counts solve.Counts
	b.ReportAllocs()
	for b.Loop() {
		run, err := api.StartSolve(req)
		if err != nil {
			b.Fatal(err)
		}
		for {
			if _, _, done := run.Step(1000); done {
				break
			}
		}
		last, counts = run.Result(), run.Counts()
	}
	if len(last.Solutions) == 0 {
		b.Fatalf("no solution: %q", last.Notes)
	}
	b.ReportMetric(float64(last.Evaluations), "evals/op")
	b.ReportMetric(float64(counts.ReturnRatios), "T/op")
	b.ReportMetric(float64(counts.Responses), "responses/op")
}

// The case: one margin target on a catalog stage, over the part's
// whole allowed range (Cf from 0.1 fF to 1 mF: 49 grid points).
func BenchmarkSolveTransimpedanceCfPM45Grid49(b *testing.B) {
	benchSolve(b, "transimpedance", api.SolveRequest{Part: "Cf", Target: api.SolveTarget{Quantity: "pm", Value: num(45)}})
}

func BenchmarkSolveCaploadRisoPM60Grid49(b *testing.B) {
	benchSolve(b, "capload", api.SolveRequest{Part: "Riso", Target: api.SolveTarget{Quantity: "pm", Value: num(60)}})
}

func BenchmarkSolveInvertingR2ZOutGrid49(b *testing.B) {
	benchSolve(b, "inverting", api.SolveRequest{Part: "R2", Target: api.SolveTarget{Quantity: "z", Port: "out", Value: num(1)}})
}

func BenchmarkSolveFollowerGBWOvershootGrid49(b *testing.B) {
	benchSolve(b, "follower", api.SolveRequest{Part: "gbw", Target: api.SolveTarget{Quantity: "overshoot", Value: num(5)}})
}
