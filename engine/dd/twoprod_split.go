//go:build wasm

package dd

// TwoProd returns p = fl(a·b) and e with p + e = a·b exactly. WebAssembly
// has no fused multiply-add in Go, whose math.FMA would then run in
// software, so this uses Dekker's splitting, which gives the same bits.
func TwoProd(a, b float64) (p, e float64) { return twoProdSplit(a, b) }
