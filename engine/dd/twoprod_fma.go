//go:build !wasm

package dd

// TwoProd returns p = fl(a·b) and e with p + e = a·b exactly. Here it uses
// the fused multiply-add, which Go compiles to one instruction on this
// architecture.
func TwoProd(a, b float64) (p, e float64) { return twoProdFMA(a, b) }
