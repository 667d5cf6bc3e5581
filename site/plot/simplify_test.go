package plot

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSimplify checks the path simplification on seeded shapes: every input
// point stays within simplifyTol of the drawn polyline (plus float slack),
// both ends are kept exactly, and a straight run collapses to one segment.
func TestSimplify(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	shapes := map[string]func(i int) (float64, float64){
		"straight":    func(i int) (float64, float64) { return float64(13 * i), float64(-7 * i) },
		"sine":        func(i int) (float64, float64) { return float64(14 * i), 800 * math.Sin(float64(i)/25) },
		"steep sine":  func(i int) (float64, float64) { return float64(3 * i), 2000 * math.Sin(float64(i)/3) },
		"random walk": nil,
		"backtrack": func(i int) (float64, float64) {
			if i < 100 {
				return float64(10 * i), 0
			}
			return float64(10 * (200 - i)), 3 // turns back on itself
		},
		"circle": func(i int) (float64, float64) {
			a := float64(i) / 200 * 2 * math.Pi
			return 1000 * math.Cos(a), 1000 * math.Sin(a)
		},
	}
	for name, shape := range shapes {
		t.Run(name, func(t *testing.T) {
			var run []int
			x, y := 0.0, 0.0
			for i := range 200 {
				if shape == nil {
					x += 10 + 20*rng.Float64()
					y += 40 * rng.NormFloat64()
				} else {
					x, y = shape(i)
				}
				run = append(run, int(math.Round(x)), int(math.Round(y)))
			}
			d := string(appendRun(nil, run))
			subs := pathPoints(t, d)
			if len(subs) != 1 {
				t.Fatalf("%d subpaths", len(subs))
			}
			// pathPoints reads pixels; the run is in tenths.
			pts := subs[0]
			for i := range pts {
				pts[i] = [2]float64{pts[i][0] * 10, pts[i][1] * 10}
			}
			n := len(run) / 2
			if got, want := pts[len(pts)-1], [2]float64{float64(run[2*n-2]), float64(run[2*n-1])}; math.Hypot(got[0]-want[0], got[1]-want[1]) > 1e-6 {
				t.Errorf("last point %v, want %v", got, want)
			}
			worst := 0.0
			for i := range n {
				worst = max(worst, distToPolyline([2]float64{float64(run[2*i]), float64(run[2*i+1])}, pts))
			}
			if worst > simplifyTol+1e-9 {
				t.Errorf("a point lies %.3f tenths from the line, tolerance %g", worst, simplifyTol)
			}
			if name == "straight" && len(pts) != 2 {
				t.Errorf("straight run kept %d points, want 2", len(pts))
			}
			t.Logf("%d of %d points kept", len(pts), n)
		})
	}
}
