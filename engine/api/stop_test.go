package api

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"sync/atomic"
	"testing"

	"zport/engine/aids"
)

// countdown is a context whose deadline passes after n checks of Err: a
// clock made of the engine's own checks, so that a test can stop an
// analysis at a chosen unit of work without waiting for time.
type countdown struct {
	context.Context
	left atomic.Int64
}

func newCountdown(n int64) *countdown {
	c := &countdown{Context: context.Background()}
	c.left.Store(n)
	return c
}

func (c *countdown) Err() error {
	if c.left.Add(-1) < 0 {
		return context.DeadlineExceeded
	}
	return nil
}

// The long loops stop between two units of work once the context is done,
// and the error says where and how far the analysis got, and wraps the
// context's error.
func TestAnalyzeStopsWhenItsContextIsDone(t *testing.T) {
	sweep := Request{Topology: "inverting", Frequency: 1e3, Sweep: &SweepSpec{From: 10, To: 1e8, Points: 400}}
	tol := Request{Topology: "inverting", Frequency: 1e3}
	Tolerance.Ask(&tol, &ToleranceRequest{Trials: 500})
	sens := Request{Topology: "inverting", Frequency: 1e3}
	Sensitivity.Ask(&sens, &SensitivityRequest{})
	grid := len(aids.DefaultGrid()) // the nominal loop's crossover search
	run, err := StartTolerance(tol)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Prepare(sens)
	if err != nil {
		t.Fatal(err)
	}
	params := len(p.aidsModel().Params)
	for _, c := range []struct {
		name   string
		req    Request
		checks int64
		want   string
	}{
		{"sweep", sweep, 10, "the time budget ran out in the sweep, after 10 of 400 frequencies"},
		{"before the analyses", tol, 0, "the time budget ran out in the analyses, after 0 of 1 analyses asked for"},
		{"crossover search", tol, 1 + 7, fmt.Sprintf("the time budget ran out in “tolerance”, after 7 of %d frequencies of the crossover search", grid)},
		{"trials", tol, 1 + int64(grid) + 40, fmt.Sprintf("the time budget ran out in “tolerance”, after 40 of %d corners and trials", run.Total())},
		{"sensitivities", sens, 1 + int64(grid) + 3, fmt.Sprintf("the time budget ran out in “sensitivity”, after 3 of %d parameters", params)},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := AnalyzeContext(newCountdown(c.checks), c.req)
			var p *Problem
			if !errors.As(err, &p) || !strings.HasPrefix(p.Msg, c.want) {
				t.Fatalf("error %v, want %q…", err, c.want)
			}
			if !errors.Is(err, context.DeadlineExceeded) {
				t.Errorf("%v does not wrap context.DeadlineExceeded", err)
			}
		})
	}

	// Cancelled rather than out of time.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = AnalyzeContext(ctx, sweep)
	if err == nil || !strings.HasPrefix(err.Error(), "the analysis was cancelled in the sweep, after 0 of 400") || !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}

	// With checks to spare, the answer is the one without a context.
	want, err := Analyze(tol)
	if err != nil {
		t.Fatal(err)
	}
	got, err := AnalyzeContext(newCountdown(1e6), tol)
	if err != nil {
		t.Fatal(err)
	}
	if a, b := Tolerance.Result(got), Tolerance.Result(want); a == nil || b == nil || a.Done != b.Done || *a.Quantities[0].Mean != *b.Quantities[0].Mean {
		t.Errorf("the study under a distant budget differs from the one without")
	}
}
