package mna

// floorRow is the work of MulAddFloor: a sparse row of 64 entries over a
// vector of 64, with scattered columns, as the solves walk them.
var floorRow = func() (r struct {
	v    [64]complex128
	cols [64]int32
	y    [64]complex128
}) {
	for i := range r.v {
		r.v[i] = complex(1+float64(i)/64, -float64(i)/128)
		r.cols[i] = int32(i * 37 % 64)
		r.y[i] = complex(float64(i%7)/7, 1/float64(i+1))
	}
	return r
}()

// MulAddFloor performs n complex multiply-adds the way the LU's solves do
// (an entry of a sparse row times the vector's element at its column,
// subtracted from a running sum) and returns the sum, which the caller
// must keep so that the work is not optimized away. Benchmarks time it for
// an analysis's MulAdds, in the same run: the analysis's time over it is
// how far the analysis is from its arithmetic floor.
func MulAddFloor(n int) complex128 {
	r := &floorRow
	var s complex128
	for n > 0 {
		k := min(n, len(r.v))
		for p, v := range r.v[:k] {
			s -= v * r.y[r.cols[p]]
		}
		n -= k
	}
	return s
}
