package aids

import (
	"fmt"
	"math"
	"slices"

	"zport/engine/numeric"
)

// MaxFullCorners is the largest number of spreads whose every combination
// of limits (2ⁿ corners) is run; above it, corners are chosen by
// sensitivity (see the package doc).
const MaxFullCorners = 12

// corners runs a MonteCarlo's worst-case corners one at a time.
type corners struct {
	mc     *MonteCarlo
	method string
	n      int
	list   [][]int8 // the corners of the "sensitivity" method; nil for "all"
	done   int

	min, max     []float64
	minAt, maxAt [][]int8
	undefined    []int
	failed       int
	firstErr     error

	signs []int8
	x     []float64
	s     Sample
}

func newCorners(mc *MonteCarlo) (*corners, error) {
	n := len(mc.spreads)
	nq := len(mc.qs)
	c := &corners{mc: mc, n: n, method: "all", signs: make([]int8, n), x: make([]float64, len(mc.nomX)),
		s: newSample(len(mc.m.Ports)), min: make([]float64, nq), max: make([]float64, nq),
		minAt: make([][]int8, nq), maxAt: make([][]int8, nq), undefined: make([]int, nq)}
	for q := range nq {
		c.min[q], c.max[q] = math.NaN(), math.NaN()
	}
	if n > MaxFullCorners {
		c.method = "sensitivity"
		if err := c.choose(); err != nil {
			return nil, err
		}
	}
	return c, nil
}

// choose picks two corners per quantity: every spread at the limit that
// raises the quantity, and every spread at the limit that lowers it. The
// direction of each spread comes from moving it alone from its low to its
// high limit (a difference over the whole tolerance, not a derivative, so a
// part whose effect is small but curved is still judged by what the
// tolerance does).
func (c *corners) choose() error {
	mc := c.mc
	nq := len(mc.qs)
	delta := make([][]float64, nq) // [quantity][spread]
	for q := range delta {
		delta[q] = make([]float64, c.n)
	}
	lo, hi := make([]float64, nq), make([]float64, nq)
	for j, sp := range mc.spreads {
		if err := mc.m.stopped(j, c.n, "parts moved to their limits"); err != nil {
			return fmt.Errorf("choosing corners: %w", err)
		}
		for side, v := range []float64{sp.Lo, sp.Hi} {
			copy(c.x, mc.nomX)
			c.x[sp.Param] = v
			if err := mc.ev.eval(c.x, &c.s); err != nil {
				return fmt.Errorf("choosing corners, %s at %g: %w", mc.m.Params[sp.Param].Name, v, err)
			}
			dst := lo
			if side == 1 {
				dst = hi
			}
			for q := range mc.qs {
				dst[q] = mc.qs[q].Of(&c.s)
			}
		}
		for q, qu := range mc.qs {
			d := hi[q] - lo[q]
			if qu.angular() {
				d = numeric.Wrap180(d)
			}
			delta[q][j] = d
		}
	}
	seen := map[string]bool{}
	for q := range mc.qs {
		for _, dir := range []int8{1, -1} {
			s := make([]int8, c.n)
			for j := range s {
				s[j] = dir
				if delta[q][j] < 0 {
					s[j] = -dir
				}
			}
			key := string(bytesOf(s))
			if !seen[key] {
				seen[key] = true
				c.list = append(c.list, s)
			}
		}
	}
	return nil
}

func bytesOf(s []int8) []byte {
	b := make([]byte, len(s))
	for i, v := range s {
		b[i] = byte(v + 1)
	}
	return b
}

func (c *corners) total() int {
	if c == nil {
		return 0
	}
	if c.list != nil {
		return len(c.list)
	}
	return 1 << c.n
}

func (c *corners) doneCount() int {
	if c == nil {
		return 0
	}
	return c.done
}

// corner writes corner k's signs into c.signs: for the "all" method bit j
// of k set puts spread j at its high limit.
func (c *corners) corner(k int) []int8 {
	if c.list != nil {
		copy(c.signs, c.list[k])
		return c.signs
	}
	for j := range c.signs {
		c.signs[j] = -1
		if k>>j&1 == 1 {
			c.signs[j] = 1
		}
	}
	return c.signs
}

func (c *corners) step() {
	mc := c.mc
	signs := c.corner(c.done)
	copy(c.x, mc.nomX)
	for j, sp := range mc.spreads {
		c.x[sp.Param] = sp.Lo
		if signs[j] > 0 {
			c.x[sp.Param] = sp.Hi
		}
	}
	if err := mc.ev.eval(c.x, &c.s); err != nil {
		c.failed++
		if c.firstErr == nil {
			c.firstErr = err
		}
	}
	for q := range mc.qs {
		v := mc.qs[q].Of(&c.s)
		switch {
		case math.IsNaN(v):
			c.undefined[q]++
		default:
			if math.IsNaN(c.min[q]) || v < c.min[q] {
				c.min[q], c.minAt[q] = v, slices.Clone(signs)
			}
			if math.IsNaN(c.max[q]) || v > c.max[q] {
				c.max[q], c.maxAt[q] = v, slices.Clone(signs)
			}
		}
	}
	c.done++
}

func (c *corners) rangeOf(q int) CornerRange {
	return CornerRange{Min: c.min[q], Max: c.max[q], MinAt: slices.Clone(c.minAt[q]), MaxAt: slices.Clone(c.maxAt[q]), Undefined: c.undefined[q]}
}
