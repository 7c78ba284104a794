package transfer

import (
	"math"
	"math/big"
)

// ccwErrBound is the relative error bound of the floating-point orientation
// determinant evaluated as in orient (Shewchuk 1997, Discrete Comput. Geom.
// 18, ccwerrboundA = (3 + 16ε)ε with ε = 2⁻⁵³).
var ccwErrBound = (3 + 16*epsilon) * epsilon

const epsilon = 1.0 / (1 << 53)

// orient returns a value whose sign is the exact sign of the orientation
// determinant of a, b, c: positive when they turn counter-clockwise, zero
// when collinear, negative when clockwise. The magnitude is only
// approximate. The fast path is Shewchuk's filter; when it cannot certify
// the sign the determinant is evaluated in exact rational arithmetic.
func orient(a, b, c [2]float64) float64 {
	detL := (a[0] - c[0]) * (b[1] - c[1])
	detR := (a[1] - c[1]) * (b[0] - c[0])
	det := detL - detR
	bound := ccwErrBound * (math.Abs(detL) + math.Abs(detR))
	if det > bound || -det > bound {
		return det
	}
	return orientExact(a, b, c)
}

// orientExact evaluates the orientation determinant exactly (every float64
// is a rational number, so big.Rat arithmetic on them has no error).
func orientExact(a, b, c [2]float64) float64 {
	var r [6]big.Rat
	for i, v := range [6]float64{a[0], a[1], b[0], b[1], c[0], c[1]} {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return math.NaN()
		}
		r[i].SetFloat64(v)
	}
	var ax, ay, bx, by, l, rr big.Rat
	ax.Sub(&r[0], &r[4])
	ay.Sub(&r[1], &r[5])
	bx.Sub(&r[2], &r[4])
	by.Sub(&r[3], &r[5])
	l.Mul(&ax, &by)
	rr.Mul(&ay, &bx)
	l.Sub(&l, &rr)
	return float64(l.Sign())
}
