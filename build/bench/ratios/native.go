package ratios

import (
	"fmt"
	"math/cmplx"
	"runtime"
	"syscall"
	"time"
	"unsafe"

	"gonum.org/v1/gonum/floats"

	"zport/engine/api"
	"zport/engine/circuit"
	"zport/engine/feedback"
	"zport/engine/mna"
)

// sink keeps MulAddFloor's result alive.
var sink complex128

// threadCPU is the calling thread's CPU time (the goroutine is locked to
// its thread while measuring), from CLOCK_THREAD_CPUTIME_ID.
func threadCPU() time.Duration {
	var ts syscall.Timespec
	const clockThreadCPUTime = 3
	syscall.Syscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTime, uintptr(unsafe.Pointer(&ts)), 0)
	return time.Duration(ts.Nano())
}

// timed runs fn and returns its wall-clock and thread CPU times.
func timed(fn func()) (wall, cpu float64) {
	c0, t0 := threadCPU(), time.Now()
	fn()
	return float64(time.Since(t0)), float64(threadCPU() - c0)
}

// sweepJob is a prepared analyzer and its grid.
type sweepJob struct {
	name string
	a    *feedback.Analyzer
	grid []float64
}

func (j *sweepJob) sweep() {
	if _, err := j.a.Sweep(j.grid); err != nil {
		panic(err)
	}
}

// inverting is the inverting stage at its defaults, as its page asks for it.
func inverting() (*api.Prepared, api.Request, error) {
	e, _ := api.LookupEntry("inverting")
	req := api.Request{Topology: "inverting", Frequency: e.Frequency, Sweep: &e.Sweep}
	p, err := api.Prepare(req)
	return p, req, err
}

// ladder prepares an n-node ladder with an input and an output port and
// the gain, over points frequencies from 10 Hz to 100 MHz.
func ladder(n, points int) (*sweepJob, error) {
	c, err := circuit.Parse(circuit.Ladder(n))
	if err != nil {
		return nil, err
	}
	if got := len(c.Nodes) - 1; got != n {
		return nil, fmt.Errorf("ladder of %d nodes has %d", n, got)
	}
	src, _ := c.Node("src")
	out, _ := c.Node("out")
	vin, _ := c.PartIndex("Vin")
	a, err := feedback.New(c, "U1", []feedback.Port{{Name: "in", A: src}, {Name: "out", A: out}}, &feedback.Gain{Source: vin, OutA: out})
	if err != nil {
		return nil, err
	}
	return &sweepJob{fmt.Sprintf("%d-node ladder", n), a, floats.LogSpan(make([]float64, points), 10, 100e6)}, nil
}

// floorRatio times one sweep of j and the multiply-adds it counted: the
// ratio in wall-clock and in CPU time, the time of a point, the
// multiply-adds of a point.
func floorRatio(j *sweepJob) (wallRatio, cpuRatio, perPoint, muladds float64) {
	m0 := j.a.MulAdds()
	wall, cpu := timed(j.sweep)
	n := j.a.MulAdds() - m0
	fw, fc := timed(func() { sink += mna.MulAddFloor(n) })
	pts := float64(len(j.grid))
	return wall / fw, cpu / fc, wall / pts, float64(n) / pts
}

// runNative prints the engine's ratios.
func runNative(rounds int) error {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	p, req, err := inverting()
	if err != nil {
		return err
	}
	inv := &sweepJob{"inverting stage", p.Analyzer, floats.LogSpan(make([]float64, req.Sweep.Points), req.Sweep.From, req.Sweep.To)}
	l50, err := ladder(50, 100)
	if err != nil {
		return err
	}
	l200, err := ladder(200, 100)
	if err != nil {
		return err
	}
	// Warm up: structures recorded, caches and the branch predictor filled.
	for _, j := range []*sweepJob{inv, l50, l200} {
		j.sweep()
	}
	var invR, invC, invP, invM, l50R, l50C, l50P, l50M, l200P, grow, growC []float64
	var sweepW, sweepC, pageW, pageC []float64
	for r := 0; r < rounds; r++ {
		x, xc, pp, m := floorRatio(inv)
		invR, invC, invP, invM = append(invR, x), append(invC, xc), append(invP, pp), append(invM, m)
		x, xc, pp, m = floorRatio(l50)
		l50R, l50C, l50P, l50M = append(l50R, x), append(l50C, xc), append(l50P, pp), append(l50M, m)
		_, c50 := timed(l50.sweep)
		w, c200 := timed(l200.sweep)
		l200P = append(l200P, w/float64(len(l200.grid)))
		grow, growC = append(grow, l200P[r]/l50P[r]), append(growC, c200/c50)
		w, c := timed(inv.sweep)
		sweepW, sweepC = append(sweepW, w), append(sweepC, c)
		w, c = timed(func() {
			if _, err := api.Analyze(req); err != nil {
				panic(err)
			}
		})
		pageW, pageC = append(pageW, w), append(pageC, c)
	}
	if cmplx.IsNaN(sink) { // read, so the floor's work is kept
		return fmt.Errorf("the multiply-add floor summed to NaN")
	}
	fmt.Printf("native engine, %d interleaved rounds, medians (%s)\n", rounds, machine())
	line("inverting stage point vs multiply-add floor", fmt.Sprintf("%.2f× (CPU %.2f×)", Median(invR), Median(invC)), verdict(Median(invR), 3),
		fmt.Sprintf("(%s a point, %.0f multiply-adds)", us(Median(invP)), Median(invM)))
	line("50-node ladder point vs multiply-add floor", fmt.Sprintf("%.2f× (CPU %.2f×)", Median(l50R), Median(l50C)), verdict(Median(l50R), 3),
		fmt.Sprintf("(%s a point, %.0f multiply-adds)", us(Median(l50P)), Median(l50M)))
	line("200-node point vs 50-node point", fmt.Sprintf("%.2f× (CPU %.2f×)", Median(grow), Median(growC)), verdict(Median(grow), 1.3*4),
		fmt.Sprintf("(%s vs %s a point; linear: 4×)", us(Median(l200P)), us(Median(l50P))))
	line("inverting 400-point sweep", ms(Median(sweepW))+" wall", ms(Median(sweepC))+" thread CPU", "(target < 2 ms)")
	line("inverting page recompute (api.Analyze)", ms(Median(pageW))+" wall", ms(Median(pageC))+" thread CPU")
	return nil
}

// machine describes the load the measurement ran under.
func machine() string {
	var si syscall.Sysinfo_t
	if syscall.Sysinfo(&si) != nil {
		return fmt.Sprintf("%d CPUs", runtime.NumCPU())
	}
	return fmt.Sprintf("%d CPUs, load average %.1f", runtime.NumCPU(), float64(si.Loads[0])/65536)
}
