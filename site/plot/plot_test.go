package plot

import (
	"flag"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"zport/engine/value"
)

var sample = flag.String("sample", "", "write sample charts (SVG, and an HTML page showing them) to this path prefix")

// logspace returns n frequencies from lo to hi, evenly spaced in log f.
func logspace(lo, hi float64, n int) []float64 {
	f := make([]float64, n)
	for i := range f {
		f[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	return f
}

// Invented example, not a product: a non-inverting stage (R1 = 2 kΩ,
// R2 = 18 kΩ) around an amplifier with open-loop gain a = a0/(1 + jf/fa),
// a0 = 100 000, gain-bandwidth 1 MHz, open-loop output resistance
// ro = 100 Ω. In Blackman's form Z = Z0(1 + T_sc)/(1 + T_oc) with
// Z0 = ro ∥ (R1 + R2), T_sc = 0 and T_oc = a·R1/(R1 + R2 + ro); |Z| rises at
// 20 dB/decade above the loop's first corner (Franco, Design with
// Operational Amplifiers, 3rd ed., ch. 6; check values in
// /work/shared/REFERENCES.md §3).
func outputImpedance(f []float64) (z, z0 []complex128) {
	const a0, gbw, ro, r1, r2 = 1e5, 1e6, 100.0, 2e3, 18e3
	z, z0 = make([]complex128, len(f)), make([]complex128, len(f))
	for i, fi := range f {
		a := complex(a0, 0) / complex(1, fi/(gbw/a0))
		z0[i] = complex(ro*(r1+r2)/(ro+r1+r2), 0)
		z[i] = z0[i] / (1 + a*complex(r1/(r1+r2+ro), 0))
	}
	return z, z0
}

// Invented example: a loop gain with three real poles,
// T = T0/((1 + jf/p1)(1 + jf/p2)(1 + jf/p3)). Each real pole contributes
// −arctan(f/p) of phase (standard first-order response; e.g. Sedra & Smith,
// Microelectronic Circuits, frequency-response chapter [memory]).
func threePole(f []float64, t0, p1, p2, p3 float64) []complex128 {
	t := make([]complex128, len(f))
	for i, fi := range f {
		t[i] = complex(t0, 0) / (complex(1, fi/p1) * complex(1, fi/p2) * complex(1, fi/p3))
	}
	return t
}

func bode400x4() *Bode {
	f := logspace(10, 100e6, 400)
	z, z0 := outputImpedance(f)
	t := threePole(f, 1e4, 100, 2e6, 20e6)
	g := make([]complex128, len(f))
	for i := range f {
		g[i] = 10 * t[i] / (1 + t[i])
	}
	return &Bode{
		ID: "p-out", Title: "Output impedance", Freq: f, MagUnit: "Ω",
		Traces: []Trace{
			{Name: "Z (Blackman)", Class: "z", Values: z},
			{Name: "Z₀ (gain zero)", Class: "z0", Values: z0, Dashed: true},
			{Name: "T", Class: "t", Values: t},
			{Name: "G", Class: "g", Values: g},
		},
		Markers: []Marker{{Freq: 784e3, Label: "crossover 784 kHz, PM 47.4°"}},
	}
}

// pathPoints interprets the path data this package writes (M, l with
// implicit repeats, h, H, V, Z) and returns its subpaths as absolute points.
func pathPoints(t testing.TB, d string) [][][2]float64 {
	t.Helper()
	tok := regexp.MustCompile(`[MlhHVZ]|-?(\d+\.?\d*|\.\d+)`).FindAllString(d, -1)
	var subs [][][2]float64
	var cmd string
	var x, y float64
	var nums []float64
	flush := func() {
		for len(nums) > 0 {
			switch cmd {
			case "M":
				x, y = nums[0], nums[1]
				subs = append(subs, [][2]float64{{x, y}})
				nums = nums[2:]
				cmd = "L"
				continue
			case "L":
				x, y = nums[0], nums[1]
				nums = nums[2:]
			case "l":
				x, y = x+nums[0], y+nums[1]
				nums = nums[2:]
			case "h":
				x += nums[0]
				nums = nums[1:]
			case "H":
				x = nums[0]
				nums = nums[1:]
			case "V":
				y = nums[0]
				nums = nums[1:]
			default:
				t.Fatalf("path %q: numbers after %q", clip(d), cmd)
			}
			subs[len(subs)-1] = append(subs[len(subs)-1], [2]float64{x, y})
		}
	}
	for _, s := range tok {
		if len(s) == 1 && strings.Contains("MlhHVZ", s) {
			flush()
			cmd = s
			continue
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("path %q: %v", clip(d), err)
		}
		nums = append(nums, v)
		if (cmd == "M" || cmd == "L" || cmd == "l") && len(nums) < 2 {
			continue
		}
		flush()
	}
	flush()
	return subs
}

func attrFloats(t testing.TB, n *node, name string) []float64 {
	t.Helper()
	return floats(t, n.attr[name])
}

// tracePaths returns the magnitude and phase path of each trace.
func tracePaths(root *node) (mag, ph []*node) {
	for _, p := range root.all(byClass("g", "traces"))[0].all(byName("path")) {
		if _, ok := p.attr["data-values"]; ok {
			mag = append(mag, p)
		} else {
			ph = append(ph, p)
		}
	}
	return mag, ph
}

func TestFrequencyTicks(t *testing.T) {
	cases := []struct {
		name      string
		lo, hi    float64 // Hz
		px        float64
		labels    []string
		minorsMin int // ticks without a full grid line
	}{
		{"10 Hz–100 MHz", 10, 100e6, 560,
			[]string{"10 Hz", "100 Hz", "1 kHz", "10 kHz", "100 kHz", "1 MHz", "10 MHz", "100 MHz"}, 56},
		{"one decade gets 2 and 5", 1e3, 10e3, 560, []string{"1 kHz", "2 kHz", "5 kHz", "10 kHz"}, 8},
		{"1300 px per decade gets 2…9", 1e3, 10e3, 1300,
			[]string{"1 kHz", "2 kHz", "3 kHz", "4 kHz", "5 kHz", "6 kHz", "7 kHz", "8 kHz", "9 kHz", "10 kHz"}, 8},
		{"two decades", 100, 10e3, 560,
			[]string{"100 Hz", "200 Hz", "500 Hz", "1 kHz", "2 kHz", "5 kHz", "10 kHz"}, 16},
		{"inside one decade", 1.1e3, 1.9e3, 560, []string{"1.10 kHz", "1.90 kHz"}, 0},
		{"30 decades thin out", 1e-6, 1e24, 560,
			[]string{"1 µHz", "1 Hz", "1 MHz", "1 THz", "1×10^+18 Hz", "1×10^+24 Hz"}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lo, hi := math.Log10(c.lo), math.Log10(c.hi)
			ticks := logTicks(lo, hi, c.px/(hi-lo), 58, "Hz")
			var labels []string
			minors := 0
			for _, tk := range ticks {
				if tk.label != "" {
					labels = append(labels, tk.label)
				}
				if !tk.major {
					minors++
				}
				if tk.pos < lo-1e-9 || tk.pos > hi+1e-9 {
					t.Errorf("tick at 10^%g outside the range", tk.pos)
				}
			}
			if !slices.Equal(labels, c.labels) {
				t.Errorf("labels %q, want %q", labels, c.labels)
			}
			if minors < c.minorsMin {
				t.Errorf("%d unlabelled ticks, want at least %d", minors, c.minorsMin)
			}
		})
	}
}

func TestFrequencyLabelsOnChart(t *testing.T) {
	c := &Bode{Freq: logspace(10, 100e6, 50), Traces: []Trace{{Name: "Z", Values: make([]complex128, 50)}}}
	for i := range c.Traces[0].Values {
		c.Traces[0].Values[i] = 1
	}
	root := parse(t, c.SVG())
	labels := root.texts("tick")
	for _, want := range []string{"10 Hz", "1 kHz", "100 kHz", "100 MHz"} {
		if !slices.Contains(labels, want) {
			t.Errorf("frequency label %q missing from %q", want, labels)
		}
	}
}

func TestMagnitudeTicks(t *testing.T) {
	// 1 mΩ … 10 kΩ on a 180 px axis: every decade labelled, in SI prefixes.
	lo, hi := logRange(-3, 4)
	ticks := logTicks(lo, hi, 180/(hi-lo), 18, "Ω")
	var labels []string
	for _, tk := range ticks {
		if tk.label != "" {
			labels = append(labels, tk.label)
		}
	}
	want := []string{"1 mΩ", "10 mΩ", "100 mΩ", "1 Ω", "10 Ω", "100 Ω", "1 kΩ", "10 kΩ"}
	if !slices.Equal(labels, want) {
		t.Errorf("labels %q, want %q", labels, want)
	}
	// Dimensionless axis: no unit, prefixes still used.
	ticks = logTicks(0, 4, 50, 18, "")
	labels = labels[:0]
	for _, tk := range ticks {
		if tk.label != "" {
			labels = append(labels, tk.label)
		}
	}
	if want := []string{"1", "10", "100", "1k", "10k"}; !slices.Equal(labels, want) {
		t.Errorf("dimensionless labels %q, want %q", labels, want)
	}
}

func TestDecibelRange(t *testing.T) {
	cases := []struct{ lo, hi, px float64 }{
		{-40, 60, 180}, {0, 0, 180}, {-0.3, 0.2, 180}, {-120, 80, 100}, {3, 1000, 200}, {math.NaN(), math.NaN(), 180},
	}
	for _, c := range cases {
		lo, hi, ticks := dbRange(c.lo, c.hi, c.px)
		if !math.IsNaN(c.lo) && (lo > c.lo || hi < c.hi) {
			t.Errorf("dbRange(%g, %g) = [%g, %g] does not cover the data", c.lo, c.hi, lo, hi)
		}
		if hi-lo < 10 {
			t.Errorf("dbRange(%g, %g) = [%g, %g]: under 10 dB", c.lo, c.hi, lo, hi)
		}
		if len(ticks) < 2 || len(ticks) > int(c.px/28)+1 {
			t.Errorf("dbRange(%g, %g): %d ticks on %g px", c.lo, c.hi, len(ticks), c.px)
		}
		step := ticks[1].pos - ticks[0].pos
		m := step / math.Pow10(int(math.Floor(math.Log10(step))))
		if !slices.ContainsFunc([]float64{1, 2, 5}, func(x float64) bool { return math.Abs(x-m) < 1e-9 }) {
			t.Errorf("dbRange(%g, %g): step %g is not 1, 2 or 5 × 10^k", c.lo, c.hi, step)
		}
		if ticks[0].pos != lo || ticks[len(ticks)-1].pos != hi {
			t.Errorf("dbRange(%g, %g): ticks %g…%g do not reach the ends %g…%g", c.lo, c.hi, ticks[0].pos, ticks[len(ticks)-1].pos, lo, hi)
		}
	}
	_, _, ticks := dbRange(-40, 60, 180)
	var labels []string
	for _, tk := range ticks {
		labels = append(labels, tk.label)
	}
	if want := []string{"−40", "−20", "0", "20", "40", "60"}; !slices.Equal(labels, want) {
		t.Errorf("labels %q, want %q (U+2212 minus)", labels, want)
	}
}

func TestPhaseRange(t *testing.T) {
	cases := []struct {
		lo, hi, px float64
		step       float64
	}{
		{-270, 0, 130, 90}, {-90, 0, 130, 45}, {0, 0, 130, 45}, {-1000, 10, 130, 360}, {-1000, 10, 300, 180},
		{-179, 181, 240, 45}, {-179, 181, 200, 90}, {math.NaN(), math.NaN(), 130, 45},
	}
	for _, c := range cases {
		lo, hi, ticks := phaseRange(c.lo, c.hi, c.px)
		if !math.IsNaN(c.lo) && (lo > c.lo || hi < c.hi) {
			t.Errorf("phaseRange(%g, %g) = [%g, %g] does not cover the data", c.lo, c.hi, lo, hi)
		}
		if hi-lo < 90 {
			t.Errorf("phaseRange(%g, %g) = [%g, %g]: under 90°", c.lo, c.hi, lo, hi)
		}
		if got := ticks[1].pos - ticks[0].pos; got != c.step {
			t.Errorf("phaseRange(%g, %g): step %g°, want %g°", c.lo, c.hi, got, c.step)
		}
		for _, tk := range ticks {
			if math.Mod(tk.pos, 45) != 0 {
				t.Errorf("phaseRange(%g, %g): tick %g° is not a multiple of 45°", c.lo, c.hi, tk.pos)
			}
		}
	}
	_, _, ticks := phaseRange(-270, 0, 130)
	var labels []string
	for _, tk := range ticks {
		labels = append(labels, tk.label)
	}
	if want := []string{"−270°", "−180°", "−90°", "0°"}; !slices.Equal(labels, want) {
		t.Errorf("labels %q, want %q", labels, want)
	}
}

func TestEscaping(t *testing.T) {
	evil := `<img src=x onerror=alert(1)>`
	weird := "a&b \"q\" 's' \x00\x1b bad\xff utf8 \uFFFE end"
	f := logspace(1, 1e3, 20)
	v := make([]complex128, 20)
	for i := range v {
		v[i] = complex(1, float64(i))
	}
	c := &Bode{
		ID: `x" onload="alert(1)`, Title: evil, Freq: f, MagUnit: evil,
		Traces:  []Trace{{Name: evil, Class: `z" onclick="x`, Values: v}, {Name: weird, Values: v}},
		Markers: []Marker{{Freq: 30, Label: evil, Class: "<b>"}},
		HLines:  []HLine{{Value: 1, Label: evil}, {Panel: PhasePanel, Value: 45, Label: weird}},
	}
	h := &Histogram{ID: evil, Title: evil, XLabel: evil, Unit: evil, Edges: []float64{0, 1, 2}, Counts: []int{3, 4},
		Markers: []Marker{{Freq: 1, Label: evil}}}
	for name, out := range map[string]string{"bode": c.SVG(), "histogram": h.SVG()} {
		t.Run(name, func(t *testing.T) {
			if strings.Contains(out, "<img") || strings.Contains(out, "<b>") {
				t.Fatalf("markup from text reached the output")
			}
			root := parse(t, out)
			for _, n := range root.all(func(*node) bool { return true }) {
				if n.name == "img" || n.name == "b" || n.space != "http://www.w3.org/2000/svg" {
					t.Errorf("unexpected element %s:%s", n.space, n.name)
				}
				for a := range n.attr {
					if strings.HasPrefix(a, "on") {
						t.Errorf("event handler attribute %q on <%s>", a, n.name)
					}
				}
			}
			if got := root.all(byName("title"))[0].text; got != evil {
				t.Errorf("title text %q, want it verbatim %q", got, evil)
			}
			if !strings.Contains(root.all(byName("desc"))[0].text, evil) {
				t.Errorf("desc lost the text")
			}
		})
	}
	root := parse(t, c.SVG())
	mag, _ := tracePaths(root)
	if mag[0].attr["data-name"] != evil {
		t.Errorf("data-name %q, want %q", mag[0].attr["data-name"], evil)
	}
	if got := mag[1].attr["data-name"]; got != "a&b \"q\" 's' \uFFFD\uFFFD bad\uFFFD utf8 \uFFFD end" {
		t.Errorf("data-name %q: control characters and bad UTF-8 should become U+FFFD", got)
	}
	if cl := mag[0].attr["class"]; cl != "trace trace-zonclickx zc1" {
		t.Errorf("class %q: the class suffix must not add attributes or classes", cl)
	}
}

func FuzzBodeText(f *testing.F) {
	for _, s := range []string{"<img src=x onerror=alert(1)>", "]]>", "&amp;", "\x00", "\xff\xfe", "Z₀"} {
		f.Add(s)
	}
	freq := logspace(1, 100, 8)
	vals := make([]complex128, 8)
	for i := range vals {
		vals[i] = complex(float64(i), 1)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c := &Bode{ID: s, Title: s, Freq: freq, MagUnit: s,
			Traces:  []Trace{{Name: s, Class: s, Values: vals}},
			Markers: []Marker{{Freq: 10, Label: s, Class: s}}, HLines: []HLine{{Value: 1, Label: s, Class: s}}}
		parse(t, c.SVG())
		h := &Histogram{ID: s, Title: s, XLabel: s, Unit: s, Edges: []float64{1, 2}, Counts: []int{1}}
		parse(t, h.SVG())
	})
}

func TestGapsSplitThePath(t *testing.T) {
	f := logspace(10, 1e4, 30)
	v := make([]complex128, 30)
	for i := range v {
		v[i] = complex(float64(i+1), 1)
	}
	v[5] = cmplx.NaN()
	v[12] = cmplx.Inf()
	v[13] = 0             // no magnitude on a log axis, no phase
	v[20] = complex(1, 0) // stays
	v[28] = cmplx.NaN()   // leaves v[29] alone: drawn as a dot
	c := &Bode{Freq: f, Traces: []Trace{{Name: "Z", Values: v}}, MagUnit: "Ω"}
	root := parse(t, c.SVG())
	mag, ph := tracePaths(root)
	for _, p := range []*node{mag[0], ph[0]} {
		subs := pathPoints(t, p.attr["d"])
		if got := strings.Count(p.attr["d"], "M"); got != 4 {
			t.Errorf("%d subpaths, want 4 (gaps at 5, 12–13, 28): %s", got, p.attr["d"])
		}
		// Each subpath runs from the first to the last point of its run.
		x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
		xOf := func(i int) float64 { return x0 + math.Log10(f[i]/f[0])/math.Log10(f[29]/f[0])*(x1-x0) }
		runs := [][2]int{{0, 4}, {6, 11}, {14, 27}, {29, 29}}
		for k, s := range subs {
			if k >= len(runs) {
				break
			}
			first, last := s[0][0], s[len(s)-1][0]
			if math.Abs(first-xOf(runs[k][0])) > 0.051 || math.Abs(last-xOf(runs[k][1])) > 0.051 {
				t.Errorf("subpath %d spans x %g…%g, want %.2f…%.2f", k, first, last, xOf(runs[k][0]), xOf(runs[k][1]))
			}
		}
		if s := subs[len(subs)-1]; len(s) != 2 || s[0] != s[1] {
			t.Errorf("a lone point should be a zero-length dot, got %v", s)
		}
	}
	vals := attrFloats(t, mag[0], "data-values")
	for _, i := range []int{5, 12, 13, 28} {
		if !math.IsNaN(vals[2*i]) || !math.IsNaN(vals[2*i+1]) {
			t.Errorf("data-values at gap %d = %g %g, want NaN NaN", i, vals[2*i], vals[2*i+1])
		}
	}
	// Lengths that disagree with Freq: missing values are gaps, extra ones ignored.
	c.Traces[0].Values = v[:10]
	c.Traces = append(c.Traces, Trace{Name: "long", Values: append(v[:0:0], append(v, v...)...)})
	root = parse(t, c.SVG())
	mag, _ = tracePaths(root)
	if got := len(attrFloats(t, mag[0], "data-values")); got != 60 {
		t.Errorf("short trace: %d data values, want 60", got)
	}
	if got := len(attrFloats(t, mag[1], "data-values")); got != 60 {
		t.Errorf("long trace: %d data values, want 60", got)
	}
}

// distToPolyline returns the distance from p to the nearest segment of pts.
func distToPolyline(p [2]float64, pts [][2]float64) float64 {
	best := math.Inf(1)
	for i := 1; i < len(pts); i++ {
		a, c := pts[i-1], pts[i]
		dx, dy := c[0]-a[0], c[1]-a[1]
		u := 0.0
		if l2 := dx*dx + dy*dy; l2 > 0 {
			u = min(max(((p[0]-a[0])*dx+(p[1]-a[1])*dy)/l2, 0), 1)
		}
		best = min(best, math.Hypot(p[0]-a[0]-u*dx, p[1]-a[1]-u*dy))
	}
	return best
}

// TestPointsLieOnTheAxes maps every data point through the geometry the
// SVG declares (data-x0, data-my, …) and checks that the drawn line passes
// within 0.2 px of it: 0.05 px of rounding at each end of a segment plus
// 0.1 px of path simplification.
func TestPointsLieOnTheAxes(t *testing.T) {
	c := bode400x4()
	root := parse(t, c.SVG())
	x0, x1 := attrFloats(t, root, "data-x0")[0], attrFloats(t, root, "data-x1")[0]
	my, py := attrFloats(t, root, "data-my"), attrFloats(t, root, "data-py")
	freq := attrFloats(t, root, "data-freq")
	lf0, lf1 := math.Log10(freq[0]), math.Log10(freq[len(freq)-1])
	mag, ph := tracePaths(root)
	if len(mag) != 4 || len(ph) != 4 {
		t.Fatalf("%d magnitude and %d phase paths, want 4 each", len(mag), len(ph))
	}
	for k := range mag {
		vals := attrFloats(t, mag[k], "data-values")
		for panel, p := range []*node{mag[k], ph[k]} {
			subs := pathPoints(t, p.attr["d"])
			if len(subs) != 1 {
				t.Fatalf("trace %d: %d subpaths, want 1", k, len(subs))
			}
			pts := subs[0]
			r := my
			if panel == 1 {
				r = py
			}
			worst := 0.0
			for i, f := range freq {
				v := math.Log10(vals[2*i])
				if panel == 1 {
					v = vals[2*i+1]
				}
				want := [2]float64{
					x0 + (math.Log10(f)-lf0)/(lf1-lf0)*(x1-x0),
					r[1] + (v-r[2])/(r[3]-r[2])*(r[0]-r[1]),
				}
				worst = max(worst, distToPolyline(want, pts))
				if i == 0 && math.Hypot(pts[0][0]-want[0], pts[0][1]-want[1]) > 0.071 {
					t.Errorf("trace %d panel %d starts at %v, want %v", k, panel, pts[0], want)
				}
			}
			// Phases in data-values are rounded to 0.01°, about 0.01 px here.
			if worst > 0.21 {
				t.Errorf("trace %d panel %d: a data point lies %.3f px off the line", k, panel, worst)
			}
			for _, q := range pts {
				if q[0] < x0-0.05 || q[0] > x1+0.05 || q[1] < r[0]-0.05 || q[1] > r[1]+0.05 {
					t.Fatalf("trace %d panel %d: point (%g, %g) outside the panel", k, panel, q[0], q[1])
				}
			}
		}
	}
}

func TestDataValuesRoundTrip(t *testing.T) {
	// |Zo| = 0.99989902 Ω ∠ 88.8513° at 1 kHz and 70.530597 Ω ∠ 44.8543° at
	// 100 kHz for the stage of outputImpedance (REFERENCES.md §3 [derived]).
	f := []float64{1e3, 1e5}
	z, _ := outputImpedance(f)
	root := parse(t, (&Bode{Freq: f, Traces: []Trace{{Name: "Z", Values: z}}, MagUnit: "Ω"}).SVG())
	mag, _ := tracePaths(root)
	if got, want := mag[0].attr["data-values"], "0.999899 88.85 70.5306 44.85"; got != want {
		t.Errorf("data-values %q, want %q", got, want)
	}
	if got, want := root.attr["data-freq"], "1000 100000"; got != want {
		t.Errorf("data-freq %q, want %q", got, want)
	}
	var b []byte
	for _, v := range []float64{1.5e-5, 2e21, -3.25e-100, 123456789, 0} {
		b = appendSig6(append(b, ' '), v)
	}
	if got, want := string(b), " 1.5e-5 2e21 -3.25e-100 1.23457e8 0"; got != want {
		t.Errorf("appendSig6: %q, want %q", got, want)
	}
}

// A magnitude-only chart: one panel over the whole height, one path per
// trace (its data-values keep the phases, for the hover data), no phase
// axis, and a description that says nothing of phase.
func TestNoPhase(t *testing.T) {
	f := []float64{10, 1e3, 1e5}
	v := []complex128{4e-9, 4e-9, 2e-9}
	c := &Bode{Freq: f, Traces: []Trace{{Name: "output", Values: v}}, MagUnit: "V/√Hz", NoPhase: true,
		HLines: []HLine{{Panel: PhasePanel, Value: -180, Label: "−180°"}}}
	root := parse(t, c.SVG())
	mag, ph := tracePaths(root)
	if len(mag) != 1 || len(ph) != 0 {
		t.Fatalf("%d magnitude and %d phase paths, want 1 and 0", len(mag), len(ph))
	}
	if got, want := mag[0].attr["data-values"], "4e-9 0 4e-9 0 2e-9 0"; got != want {
		t.Errorf("data-values %q, want %q", got, want)
	}
	if _, ok := root.attr["data-py"]; ok {
		t.Error("a magnitude-only chart carries data-py")
	}
	my := strings.Fields(root.attr["data-my"])
	if len(my) != 4 || my[1] != "360" {
		t.Errorf("data-my %q: the magnitude panel should reach the frequency axis at 360", root.attr["data-my"])
	}
	svg := c.SVG()
	for _, no := range []string{"Phase (°)", "phase", "−180°"} {
		if strings.Contains(svg, no) {
			t.Errorf("the chart mentions %q", no)
		}
	}
}

func TestPhaseUnwrap(t *testing.T) {
	// A pure delay e^(−j2πfτ) has phase −360°·fτ (definition of a delay,
	// common practice): with τ = 1 ms up to 2 kHz it winds through two turns.
	const tau = 1e-3
	f := make([]float64, 200)
	delay := make([]complex128, len(f))
	for i := range f {
		f[i] = 10 * float64(i+1)
		delay[i] = cmplx.Exp(complex(0, -2*math.Pi*f[i]*tau))
	}
	// Three poles at 1 kHz, 10 kHz, 100 kHz: −3 arctan sums reach −270°.
	fp := logspace(10, 10e6, 300)
	tp := threePole(fp, 1e3, 1e3, 10e3, 100e3)
	// A phase starting just under +180° that crosses to the negative side.
	fs := []float64{1, 2, 3, 4}
	start := []complex128{cmplx.Rect(1, 179*math.Pi/180), cmplx.Rect(1, -179*math.Pi/180), cmplx.Rect(1, -170*math.Pi/180), cmplx.Rect(1, 170*math.Pi/180)}
	cases := []struct {
		name string
		f    []float64
		v    []complex128
		want func(i int) float64
	}{
		{"delay", f, delay, func(i int) float64 { return -360 * f[i] * tau }},
		{"three poles", fp, tp, func(i int) float64 {
			return -180 / math.Pi * (math.Atan(fp[i]/1e3) + math.Atan(fp[i]/10e3) + math.Atan(fp[i]/100e3))
		}},
		{"start near +180°", fs, start, func(i int) float64 { return []float64{179, 181, 190, 170}[i] }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			root := parse(t, (&Bode{Freq: c.f, Traces: []Trace{{Name: "T", Values: c.v}}}).SVG())
			mag, _ := tracePaths(root)
			vals := attrFloats(t, mag[0], "data-values")
			for i := range c.f {
				if got, want := vals[2*i+1], c.want(i); math.Abs(got-want) > 0.0051 {
					t.Errorf("phase at %g Hz = %g°, want %g°", c.f[i], got, want)
				}
			}
			py := attrFloats(t, root, "data-py")
			if lo, hi := py[2], py[3]; lo > c.want(len(c.f)-1) || hi < c.want(0) {
				t.Errorf("phase axis %g°…%g° does not hold the unwrapped phase", lo, hi)
			}
		})
	}
	// Gaps do not restart the unwrapping: it continues from the last point.
	d := slices.Clone(delay)
	for i := 40; i < 60; i++ {
		d[i] = cmplx.NaN()
	}
	root := parse(t, (&Bode{Freq: f, Traces: []Trace{{Name: "T", Values: d}}}).SVG())
	mag, _ := tracePaths(root)
	vals := attrFloats(t, mag[0], "data-values")
	if got, want := vals[2*100+1], -360*f[100]*tau; math.Abs(got-want) > 0.0051 {
		t.Errorf("after a gap: phase %g°, want %g°", got, want)
	}
}

func TestEmptyInput(t *testing.T) {
	nan := cmplx.NaN()
	cases := map[string]*Bode{
		"zero value":     {},
		"no traces":      {Freq: logspace(10, 1e6, 10)},
		"all NaN":        {Freq: logspace(10, 1e6, 3), Traces: []Trace{{Name: "Z", Values: []complex128{nan, nan, nan}}}},
		"no frequencies": {Traces: []Trace{{Name: "Z", Values: []complex128{1, 2}}}},
		"bad frequencies": {Freq: []float64{0, -1, math.NaN(), math.Inf(1)},
			Traces: []Trace{{Name: "Z", Values: []complex128{1, 2, 3, 4}}}},
		"all zero, dB":  {Freq: logspace(10, 1e6, 3), MagUnit: "dB", Traces: []Trace{{Name: "T", Values: make([]complex128, 3)}}},
		"tiny size":     {Width: 1, Height: 1, Freq: []float64{1}, Traces: []Trace{{Name: "Z", Values: []complex128{1}}}},
		"NaN reference": {HLines: []HLine{{Value: math.NaN()}, {Value: -1}}, Markers: []Marker{{Freq: math.NaN()}, {Freq: -5}}},
	}
	for name, c := range cases {
		t.Run(name, func(t *testing.T) {
			out := c.SVG()
			root := parse(t, out)
			notes := root.all(byClass("text", "note"))
			wantNote := name != "tiny size"
			if wantNote && (len(notes) != 1 || notes[0].text != "no finite values") {
				t.Errorf("want a single \"no finite values\" note, got %d notes", len(notes))
			}
			if !wantNote && len(notes) != 0 {
				t.Errorf("a drawable point still gave a note")
			}
			if len(root.texts("tick")) < 4 {
				t.Errorf("axes have too few labels: %q", root.texts("tick"))
			}
			if strings.Contains(out, "NaN\"") && !strings.Contains(out, "data-freq") {
				t.Errorf("NaN leaked into the geometry")
			}
			for _, p := range root.all(byName("path")) {
				if strings.Contains(p.attr["d"], "N") || strings.Contains(p.attr["d"], "I") {
					t.Errorf("non-finite number in path data %q", p.attr["d"])
				}
			}
		})
	}
}

func TestFlatAndWideTraces(t *testing.T) {
	f := logspace(1, 1e6, 60)
	flat := make([]complex128, len(f))
	wide := make([]complex128, len(f))
	for i := range f {
		flat[i] = 4700
		wide[i] = complex(math.Pow(10, -15+30*float64(i)/float64(len(f)-1)), 0)
	}
	for _, c := range []struct {
		name   string
		v      []complex128
		unit   string
		labels []string
	}{
		{"flat 4.7 kΩ", flat, "Ω", []string{"2 kΩ", "5 kΩ", "10 kΩ"}},
		{"30 decades", wide, "Ω", []string{"1 pΩ", "1 Ω", "1 TΩ"}},
		{"flat in dB", flat, "dB", []string{"70", "74"}},
		{"30 decades in dB", wide, "dB", []string{"−300", "0", "300"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			root := parse(t, (&Bode{Freq: f, MagUnit: c.unit, Traces: []Trace{{Name: "Z", Values: c.v}}}).SVG())
			my := attrFloats(t, root, "data-my")
			var ys []float64
			var labels []string
			for _, g := range root.all(byClass("g", "tick")) {
				if g.attr["text-anchor"] != "end" {
					continue
				}
				for _, tx := range g.all(byName("text")) {
					y, _ := strconv.ParseFloat(tx.attr["y"], 64)
					if y >= my[0]-0.1 && y <= my[1]+0.1 {
						ys = append(ys, y)
						labels = append(labels, tx.text)
					}
				}
			}
			if len(labels) < 2 {
				t.Fatalf("magnitude axis has %d labels, want at least 2: %q", len(labels), labels)
			}
			for _, want := range c.labels {
				if !slices.Contains(labels, want) {
					t.Errorf("label %q missing from %q", want, labels)
				}
			}
			slices.Sort(ys)
			for i := 1; i < len(ys); i++ {
				if ys[i]-ys[i-1] < 14 {
					t.Errorf("labels %g px apart: they would overlap (%q)", ys[i]-ys[i-1], labels)
				}
			}
		})
	}
}

func TestDeterministic(t *testing.T) {
	c := bode400x4()
	c.HLines = []HLine{{Value: 1, Label: "1 Ω"}, {Panel: PhasePanel, Value: -180, Label: "−180°"}}
	first := c.SVG()
	for range 3 {
		if c.SVG() != first {
			t.Fatal("two renderings of the same chart differ")
		}
	}
	var sb strings.Builder
	if _, err := c.WriteTo(&sb); err != nil || sb.String() != first {
		t.Fatalf("WriteTo differs from SVG (err %v)", err)
	}
	if got := string(c.AppendSVG([]byte("x"))); got != "x"+first {
		t.Fatalf("AppendSVG does not append")
	}
	h := sampleHistogram()
	hist := h.SVG()
	if h.SVG() != hist || sampleHistogram().SVG() != hist {
		t.Fatal("two renderings of the same histogram differ")
	}
}

func TestAccessibility(t *testing.T) {
	c := bode400x4()
	root := parse(t, c.SVG())
	if root.attr["role"] != "img" || root.attr["id"] != "p-out" || !root.hasClass("zplot") {
		t.Errorf("root attributes %v", root.attr)
	}
	for attr, el := range map[string]string{"aria-labelledby": "title", "aria-describedby": "desc"} {
		ids := root.all(func(n *node) bool { return n.name == el && n.attr["id"] == root.attr[attr] })
		if len(ids) != 1 {
			t.Errorf("%s=%q does not name the <%s>", attr, root.attr[attr], el)
		}
	}
	if got := root.kids[0].text; got != "Output impedance" {
		t.Errorf("first child text %q, want the title", got)
	}
	desc := root.all(byName("desc"))[0].text
	for _, want := range []string{"10.0 Hz to 100 MHz", "400 points", "Z (Blackman): ", "Z₀ (gain zero): 99.5 Ω, phase 0.0°.", "crossover 784 kHz"} {
		if !strings.Contains(desc, want) {
			t.Errorf("desc %q lacks %q", desc, want)
		}
	}
	legend := root.texts("legend")
	if want := []string{"Z (Blackman)", "Z₀ (gain zero)", "T", "G"}; !slices.Equal(legend, want) {
		t.Errorf("legend %q, want %q", legend, want)
	}
	// Colours come from classes and the style sheet, not from the elements.
	for _, n := range root.all(func(*node) bool { return true }) {
		for _, a := range []string{"stroke", "fill"} {
			if v, ok := n.attr[a]; ok && v != "none" && v != "currentColor" {
				t.Errorf("<%s %s=%q>: colour written into an element", n.name, a, v)
			}
		}
		if _, ok := n.attr["style"]; ok {
			t.Errorf("<%s> has a style attribute", n.name)
		}
	}
	if len(root.all(byName("style"))) != 1 {
		t.Errorf("want one embedded <style>")
	}
	c.NoStyle = true
	if strings.Contains(c.SVG(), "<style>") {
		t.Errorf("NoStyle still embeds the style sheet")
	}
	mag, _ := tracePaths(root)
	if got := mag[1].attr["class"]; got != "trace trace-z0 zc2 dashed" {
		t.Errorf("class %q", got)
	}
}

func TestMarkersAndReferenceLines(t *testing.T) {
	c := bode400x4()
	c.Markers = append(c.Markers, Marker{Freq: 1, Label: "outside"}, Marker{Freq: 50, Label: "low", Class: "pm"})
	c.HLines = []HLine{{Value: 1, Label: "|Z| = 1 Ω"}, {Panel: PhasePanel, Value: -180, Label: "−180°", Class: "crit"}}
	root := parse(t, c.SVG())
	markers := root.all(byClass("path", "marker"))
	if len(markers) != 2 {
		t.Errorf("%d marker lines, want 2 (one lies outside the frequency range)", len(markers))
	}
	if !markers[1].hasClass("marker-pm") {
		t.Errorf("marker class %q", markers[1].attr["class"])
	}
	if got := len(root.all(byClass("path", "hline"))); got != 2 {
		t.Errorf("%d reference lines, want 2", got)
	}
	labels := root.texts("label")
	if want := []string{"|Z| = 1 Ω", "−180°", "crossover 784 kHz, PM 47.4°", "low"}; !slices.Equal(labels, want) {
		t.Errorf("labels %q, want %q", labels, want)
	}
	// A marker right of centre puts its label on its left; a label too
	// long for either side moves inward, never past the plot's edges.
	lineX := func(m *node) float64 {
		x, err := strconv.ParseFloat(strings.Fields(strings.NewReplacer("M", "", "V", " ").Replace(m.attr["d"]))[0], 64)
		if err != nil {
			t.Fatal(err)
		}
		return x
	}
	for _, tx := range root.all(byClass("g", "label"))[0].kids {
		if tx.text == "crossover 784 kHz, PM 47.4°" {
			if x, _ := strconv.ParseFloat(tx.attr["x"], 64); x+textWidth(tx.text, 11) > lineX(markers[0])-3 {
				t.Errorf("right-hand marker label at x = %g runs over its line at %g", x, lineX(markers[0]))
			}
		}
	}
	narrow := bode400x4()
	narrow.Width = 340 // a phone's column
	narrow.Markers = []Marker{{Freq: 1e6, Label: "crossover 425 kHz, closure 22 dB/decade"}}
	nr := parse(t, narrow.SVG())
	x0, x1 := attrFloats(t, nr, "data-x0")[0], attrFloats(t, nr, "data-x1")[0]
	for _, tx := range nr.all(byClass("g", "label"))[0].kids {
		if x, _ := strconv.ParseFloat(tx.attr["x"], 64); x < x0 || x+textWidth(tx.text, 11) > x1 {
			t.Errorf("a long label spans %g … %g, outside the plot's %g … %g", x, x+textWidth(tx.text, 11), x0, x1)
		}
	}
	// The −180° line widens the phase axis to reach it.
	c2 := &Bode{Freq: logspace(1, 10, 5), Traces: []Trace{{Name: "R", Values: []complex128{1, 1, 1, 1, 1}}},
		HLines: []HLine{{Panel: PhasePanel, Value: -180}}}
	if py := attrFloats(t, parse(t, c2.SVG()), "data-py"); py[2] > -180 {
		t.Errorf("phase axis starts at %g°, want it to include −180°", py[2])
	}
}

func sampleHistogram() *Histogram {
	// Invented example: 2000 draws of a 4.7 kΩ resistor, 1 % tolerance as a
	// normal spread with σ = tolerance/3 (a common modelling choice).
	rng := rand.New(rand.NewPCG(1, 1))
	edges := make([]float64, 41)
	for i := range edges {
		edges[i] = 4700 * (0.985 + 0.03*float64(i)/40)
	}
	counts := make([]int, 40)
	for range 2000 {
		v := 4700 * (1 + 0.01/3*rng.NormFloat64())
		if i := int((v/4700 - 0.985) / 0.03 * 40); i >= 0 && i < 40 {
			counts[i]++
		}
	}
	return &Histogram{ID: "mc-r", Title: "Resistor value, 2000 trials (example)", XLabel: "R", Unit: "Ω",
		Edges: edges, Counts: counts,
		Markers: []Marker{{Freq: 4653, Label: "−1 %"}, {Freq: 4747, Label: "+1 %"}, {Freq: 4700, Label: "nominal", Class: "target"}}}
}

func TestHistogram(t *testing.T) {
	h := sampleHistogram()
	root := parse(t, h.SVG())
	bars := root.all(byClass("path", "bar"))
	if len(bars) != 1 {
		t.Fatalf("%d bar paths, want one for all bars", len(bars))
	}
	nonzero := 0
	total := 0
	for _, c := range h.Counts {
		total += c
		if c > 0 {
			nonzero++
		}
	}
	if got := strings.Count(bars[0].attr["d"], "Z"); got != nonzero {
		t.Errorf("%d bars, want %d", got, nonzero)
	}
	labels := root.texts("tick")
	for _, want := range []string{"0", "250", "4.64 kΩ", "4.70 kΩ", "4.76 kΩ"} {
		if !slices.Contains(labels, want) {
			t.Errorf("tick label %q missing from %q", want, labels)
		}
	}
	desc := root.all(byName("desc"))[0].text
	if !strings.Contains(desc, fmt.Sprintf("Histogram of %d samples in 40 bins from 4.63 kΩ to 4.77 kΩ", total)) {
		t.Errorf("desc %q", desc)
	}
	if got := len(root.all(byClass("path", "marker"))); got != 3 {
		t.Errorf("%d markers, want 3", got)
	}
	// Heights: the fullest bar reaches its count on the count axis.
	if n := len(root.all(byClass("text", "note"))); n != 0 {
		t.Errorf("valid histogram has a note")
	}

	bad := map[string]*Histogram{
		"no data":                    {},
		"invalid histogram: 2 edges": {Edges: []float64{0, 1}, Counts: []int{1, 2}},
		"edge 1 is not finite":       {Edges: []float64{0, math.NaN()}, Counts: []int{1}},
		"edge 2 is not above":        {Edges: []float64{0, 2, 1}, Counts: []int{1, 1}},
		"count 0 is negative":        {Edges: []float64{0, 1}, Counts: []int{-1}},
		"no samples":                 {Edges: []float64{0, 1}, Counts: []int{0}},
	}
	for want, h := range bad {
		t.Run(want, func(t *testing.T) {
			root := parse(t, h.SVG())
			notes := root.all(byClass("text", "note"))
			if len(notes) != 1 || !strings.Contains(notes[0].text, want) {
				t.Errorf("want a note containing %q, got %v", want, notes)
			}
		})
	}
}

func TestEngTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		unit   string
		want   []string
	}{
		{0, 1000, "Ω", []string{"0 Ω", "200 Ω", "400 Ω", "600 Ω", "800 Ω", "1.0 kΩ"}},
		{-1e-3, 1e-3, "V", []string{"−1.0 mV", "−500 µV", "0 V", "500 µV", "1.0 mV"}},
		{0.98, 1.02, "", []string{"980m", "985m", "990m", "995m", "1.000", "1.005", "1.010", "1.015", "1.020"}},
	}
	for _, c := range cases {
		var got []string
		for _, tk := range engTicks(c.lo, c.hi, 560, c.unit) {
			got = append(got, tk.label)
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("engTicks(%g, %g) = %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}

func TestTenths(t *testing.T) {
	cases := map[int][2]string{0: {"0", "0"}, 5: {"0.5", ".5"}, -5: {"-0.5", "-.5"}, 123: {"12.3", "12.3"}, -120: {"-12", "-12"}}
	for n, want := range cases {
		if got := string(appendTenths(nil, n, false)); got != want[0] {
			t.Errorf("appendTenths(%d) = %q, want %q", n, got, want[0])
		}
		if got := string(appendTenths(nil, n, true)); got != want[1] {
			t.Errorf("appendTenths(%d, short) = %q, want %q", n, got, want[1])
		}
	}
}

// TestSample writes the sample charts when run with -sample=PREFIX, e.g.
//
//	go test ./site/plot -run Sample -sample=/tmp/plot-sample
//
// giving PREFIX.svg, PREFIX-loop.svg, PREFIX-hist.svg and PREFIX.html.
func TestSample(t *testing.T) {
	if *sample == "" {
		t.Skip("no -sample path")
	}
	z := bode400x4()
	z.Traces = z.Traces[:2]
	z.Markers = []Marker{{Freq: 10e3, Label: "loop corner ×1000: 10 kHz"}}
	z.HLines = []HLine{{Value: 1, Label: "1 Ω"}}

	f := z.Freq
	tv := threePole(f, 1e4, 100, 2e6, 20e6)
	// Crossover |T| = 1 by bisection on the analytic loop gain.
	lo, hi := 1e3, 100e6
	for range 100 {
		m := math.Sqrt(lo * hi)
		if cmplx.Abs(threePole([]float64{m}, 1e4, 100, 2e6, 20e6)[0]) > 1 {
			lo = m
		} else {
			hi = m
		}
	}
	tc := threePole([]float64{lo}, 1e4, 100, 2e6, 20e6)[0]
	pm := 180 + cmplx.Phase(tc)*180/math.Pi
	loop := &Bode{ID: "p-loop", Title: "Loop gain (example)", Freq: f, MagUnit: "dB",
		Traces:  []Trace{{Name: "T (return ratio)", Class: "t", Values: tv}},
		Markers: []Marker{{Freq: lo, Label: "crossover " + value.Format(lo, "Hz", 3) + ", PM " + strconv.FormatFloat(pm, 'f', 1, 64) + "°"}},
		HLines:  []HLine{{Value: 0, Label: "0 dB"}, {Panel: PhasePanel, Value: -180, Label: "−180°"}}}
	h := sampleHistogram()
	write := func(name, s string) {
		if err := os.WriteFile(name, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(*sample+".svg", z.SVG())
	write(*sample+"-loop.svg", loop.SVG())
	write(*sample+"-hist.svg", h.SVG())
	write(*sample+".html", `<!doctype html><meta charset="utf-8"><title>plot sample</title>`+
		`<body style="margin:8px;background:#fff;color:#222">`+z.SVG()+loop.SVG()+h.SVG()+`</body>`)
	t.Logf("wrote %s.{svg,html}: %d bytes for the 400-point 4-trace chart", *sample, len(bode400x4().SVG()))
}

func BenchmarkBode400x4(b *testing.B) {
	c := bode400x4()
	b.ReportAllocs()
	b.ResetTimer()
	var out []byte
	for b.Loop() {
		out = c.AppendSVG(out[:0])
	}
	b.ReportMetric(float64(len(out)), "bytes/chart")
}

func BenchmarkHistogram40(b *testing.B) {
	h := sampleHistogram()
	b.ReportAllocs()
	var out []byte
	for b.Loop() {
		out = h.AppendSVG(out[:0])
	}
	b.ReportMetric(float64(len(out)), "bytes/chart")
}

// TestRandomCharts renders seeded random charts mixing ordinary numbers with
// NaN, ±Inf, zero, negative and extreme values in every input, and requires
// well-formed output with finite geometry every time.
func TestRandomCharts(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	odd := []float64{math.NaN(), math.Inf(1), math.Inf(-1), 0, -1, 1e-300, 1e300, 5e-324, math.MaxFloat64}
	num := func() float64 {
		if rng.IntN(6) == 0 {
			return odd[rng.IntN(len(odd))]
		}
		return math.Pow(10, -12+24*rng.Float64())
	}
	for k := range 300 {
		n := rng.IntN(12)
		f := make([]float64, n)
		for i := range f {
			f[i] = num()
		}
		if rng.IntN(2) == 0 {
			slices.Sort(f)
		}
		c := &Bode{Freq: f, MagUnit: []string{"Ω", "dB", "", "S"}[rng.IntN(4)], Width: rng.IntN(900), Height: rng.IntN(700)}
		for range rng.IntN(4) {
			v := make([]complex128, rng.IntN(n+2))
			for i := range v {
				v[i] = cmplx.Rect(num(), 2*math.Pi*rng.Float64()*float64(rng.IntN(3)))
				if rng.IntN(8) == 0 {
					v[i] = complex(odd[rng.IntN(len(odd))], odd[rng.IntN(len(odd))])
				}
			}
			c.Traces = append(c.Traces, Trace{Name: "t", Values: v, Dashed: rng.IntN(2) == 0})
		}
		for range rng.IntN(3) {
			c.Markers = append(c.Markers, Marker{Freq: num(), Label: "m"})
			c.HLines = append(c.HLines, HLine{Panel: Panel(rng.IntN(2)), Value: num() - 1, Label: "h"})
		}
		root := parse(t, c.SVG())
		for _, p := range root.all(byName("path")) {
			if d := p.attr["d"]; strings.ContainsAny(d, "NIae") {
				t.Fatalf("chart %d: bad path data %q", k, clip(d))
			}
		}
		for _, tx := range root.all(byName("text")) {
			for _, a := range []string{"x", "y"} {
				if v, err := strconv.ParseFloat(tx.attr[a], 64); err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("chart %d: text %q has %s=%q", k, tx.text, a, tx.attr[a])
				}
			}
		}

		nb := rng.IntN(6)
		h := &Histogram{Unit: "Ω"}
		for i := range nb + 1 {
			h.Edges = append(h.Edges, float64(i)*num())
		}
		for range nb + rng.IntN(2) {
			h.Counts = append(h.Counts, rng.IntN(1000)-10)
		}
		h.Markers = []Marker{{Freq: num()}}
		parse(t, h.SVG())
	}
}
