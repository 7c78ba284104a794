package transfer

import (
	"math"
	"math/big"
)

// ccwErrBound is the relative error bound of the floating-point orientation
// determinant evaluated as in orient (Shewchuk 1997, Discrete Comput. Geom.
// 18, ccwerrboundA = (3 + 16ε)ε with ε = 2⁻⁵³).
const ccwErrBound = (3 + 16*epsilon) * epsilon

const epsilon = 1.0 / (1 << 53)

// minSafe is 2⁻⁹⁶⁹: products at least this large are normal numbers whose
// fused-multiply-add error terms are exact, and Shewchuk's relative bound
// holds for them.
const minSafe = 0x1p-969

// orient returns a value whose sign is the exact sign of the orientation
// determinant of a, b, c: positive when they turn counter-clockwise, zero
// when collinear, negative when clockwise. The magnitude is only
// approximate. The fast path is Shewchuk's filter; when it cannot certify
// the sign the determinant is evaluated in exact rational arithmetic.
func orient(a, b, c [2]float64) float64 {
	detL := (a[0] - c[0]) * (b[1] - c[1])
	detR := (a[1] - c[1]) * (b[0] - c[0])
	det := detL - detR
	mag := math.Abs(detL) + math.Abs(detR)
	bound := ccwErrBound * mag
	// The relative bound fails when the products underflow.
	if mag >= minSafe && (det > bound || -det > bound) {
		return det
	}
	if s, ok := orientExactDiff(a, b, c); ok {
		return s
	}
	return orientExact(a, b, c)
}

// orientExactDiff decides the sign without big numbers when the four
// coordinate differences are exact in floating point (common for mesh
// points that lie close together or on a shared line). Each product is then
// split exactly into a rounded part and its error by a fused multiply-add
// (Ogita, Rump & Oishi 2005, SIAM J. Sci. Comput. 26): with p = p₁ + p₂ and
// q = q₁ + q₂, rounding is monotonic, so p₁ ≠ q₁ already orders p and q, and
// otherwise the sign of p₂ − q₂ (a rounded difference keeps its sign)
// decides. ok is false when a difference is inexact or a product overflows.
func orientExactDiff(a, b, c [2]float64) (float64, bool) {
	acx, ok1 := exactDiff(a[0], c[0])
	bcy, ok2 := exactDiff(b[1], c[1])
	acy, ok3 := exactDiff(a[1], c[1])
	bcx, ok4 := exactDiff(b[0], c[0])
	if !(ok1 && ok2 && ok3 && ok4) {
		return 0, false
	}
	p1, q1 := acx*bcy, acy*bcx
	if !finite(p1) || !finite(q1) {
		return 0, false
	}
	switch {
	case p1 > q1:
		return 1, true
	case p1 < q1:
		return -1, true
	}
	// A product near the underflow range has an inexact error term; leave
	// that to the rational evaluation (an exact zero factor is fine).
	if (math.Abs(p1) < minSafe && acx != 0 && bcy != 0) || (math.Abs(q1) < minSafe && acy != 0 && bcx != 0) {
		return 0, false
	}
	p2 := math.FMA(acx, bcy, -p1)
	q2 := math.FMA(acy, bcx, -q1)
	return p2 - q2, true
}

// exactDiff returns x − y and whether it is exact (the error term of Knuth's
// TwoSum vanishes; Knuth, TAOCP vol. 2, §4.2.2).
func exactDiff(x, y float64) (float64, bool) {
	s := x - y
	bb := s - x
	err := (x - (s - bb)) + (-y - bb)
	return s, err == 0 && finite(s)
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
