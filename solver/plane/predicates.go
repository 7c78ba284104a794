package plane

import (
	"math"
	"math/big"
)

// Robust orientation and in-circle tests.
//
// Both follow Shewchuk 1997 ("Adaptive precision floating-point arithmetic
// and fast robust geometric predicates", Discrete Comput. Geom. 18): a
// floating-point evaluation whose sign is accepted when the result exceeds
// a forward error bound, and an exact evaluation otherwise. The
// intermediate adaptive stages of the paper are skipped: the filter fails
// rarely, and the exact stage is then computed directly. The implementation
// is our own.
//
// Shewchuk's error bounds and his exact arithmetic assume that no product
// underflows. Orient checks that and falls back to rational arithmetic
// (math/big) when a product is too small; InCircle assumes it (mesh
// coordinates are never that close to zero apart from exact zeros).

// eps is half the unit roundoff of float64 (2⁻⁵³), the ε of Shewchuk 1997.
const eps = 1.0 / (1 << 53)

// Error-bound coefficients of the floating-point filters (Shewchuk 1997,
// §4.2: ccwerrboundA and iccerrboundA).
const (
	ccwErrBound = (3 + 16*eps) * eps
	iccErrBound = (10 + 96*eps) * eps
)

// minSafe is 2⁻⁹⁶⁹: products at least this large are normal numbers whose
// fused-multiply-add error terms are exact, and Shewchuk's relative bound
// holds for them.
const minSafe = 0x1p-969

// maxSafe bounds the products of the exact stage so that sums of a few of
// them cannot overflow.
const maxSafe = 0x1p1000

// Orient returns a value whose sign is the exact sign of the orientation
// determinant of a, b, c: positive when they turn counter-clockwise, zero
// when they are collinear, negative when clockwise. The magnitude is the
// floating-point determinant when the filter certifies its sign and
// otherwise only a value of the right sign. It is NaN when a coordinate is
// not finite and the filter cannot decide.
//
// The stages: Shewchuk's filter, guarded against underflow; an error-free
// split of the two products by a fused multiply-add when the coordinate
// differences are exact (orientExactDiff); Shewchuk's expansion arithmetic
// when the differences are inexact but no product underflows; exact
// rational arithmetic otherwise.
func Orient(a, b, c [2]float64) float64 {
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
	if s, ok := orientExpansion(a, b, c); ok {
		return s
	}
	return orientRational(a, b, c)
}

// orientExactDiff decides the sign without expansions when the four
// coordinate differences are exact in floating point (common for mesh
// points that lie close together or on a shared line). Each product is then
// split exactly into a rounded part and its error by a fused multiply-add
// (Ogita, Rump & Oishi 2005, SIAM J. Sci. Comput. 26): with p = p₁ + p₂ and
// q = q₁ + q₂, rounding is monotonic, so p₁ ≠ q₁ already orders p and q, and
// otherwise the sign of p₂ − q₂ (a rounded difference keeps its sign)
// decides. ok is false when a difference is inexact or a product overflows
// or comes near the underflow range.
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

// orientExpansion evaluates the orientation determinant exactly with
// floating-point expansions (Shewchuk 1997, §2 and §4). ok is false when a
// product of two expansion components could underflow or overflow, where
// the error-free transformations stop being exact. It does not allocate.
func orientExpansion(a, b, c [2]float64) (float64, bool) {
	var b1, b2, b3, b4 [2]float64
	acx := twoDiffExp(a[0], c[0], b1[:])
	bcy := twoDiffExp(b[1], c[1], b2[:])
	acy := twoDiffExp(a[1], c[1], b3[:])
	bcx := twoDiffExp(b[0], c[0], b4[:])
	if !safeProducts(acx, bcy) || !safeProducts(acy, bcx) {
		return 0, false
	}
	var l1, l2, r1, r2 [8]float64
	var tmp [4]float64
	var out [16]float64
	l := expMul(acx, bcy, l1[:], l2[:], tmp[:])
	r := expNeg(expMul(acy, bcx, r1[:], r2[:], tmp[:]))
	return expSign(expSum(l, r, out[:])), true
}

// safeProducts reports whether every product of a component of e with a
// component of f is zero by a zero factor or lies in [minSafe, maxSafe].
func safeProducts(e, f []float64) bool {
	for _, x := range e {
		for _, y := range f {
			if x == 0 || y == 0 {
				continue
			}
			if p := math.Abs(x * y); !(p >= minSafe && p <= maxSafe) {
				return false
			}
		}
	}
	return true
}

// orientRational evaluates the orientation determinant exactly (every
// float64 is a rational number, so big.Rat arithmetic on them has no
// error). It returns NaN for a coordinate that is not finite.
func orientRational(a, b, c [2]float64) float64 {
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

// InCircle returns a positive value if d lies inside the circle through the
// counter-clockwise triangle a, b, c, a negative value if outside and zero
// if on it. The sign is exact (products must not underflow, see above).
func InCircle(a, b, c, d [2]float64) float64 {
	adx, ady := a[0]-d[0], a[1]-d[1]
	bdx, bdy := b[0]-d[0], b[1]-d[1]
	cdx, cdy := c[0]-d[0], c[1]-d[1]
	bdxcdy, cdxbdy := bdx*cdy, cdx*bdy
	cdxady, adxcdy := cdx*ady, adx*cdy
	adxbdy, bdxady := adx*bdy, bdx*ady
	alift := adx*adx + ady*ady
	blift := bdx*bdx + bdy*bdy
	clift := cdx*cdx + cdy*cdy
	det := alift*(bdxcdy-cdxbdy) + blift*(cdxady-adxcdy) + clift*(adxbdy-bdxady)
	perm := (math.Abs(bdxcdy)+math.Abs(cdxbdy))*alift +
		(math.Abs(cdxady)+math.Abs(adxcdy))*blift +
		(math.Abs(adxbdy)+math.Abs(bdxady))*clift
	if math.Abs(det) > iccErrBound*perm {
		return det
	}
	return inCircleExact(a, b, c, d)
}

func inCircleExact(a, b, c, d [2]float64) float64 {
	adx, adxt := twoSum(a[0], -d[0])
	ady, adyt := twoSum(a[1], -d[1])
	bdx, bdxt := twoSum(b[0], -d[0])
	bdy, bdyt := twoSum(b[1], -d[1])
	cdx, cdxt := twoSum(c[0], -d[0])
	cdy, cdyt := twoSum(c[1], -d[1])
	if adxt == 0 && adyt == 0 && bdxt == 0 && bdyt == 0 && cdxt == 0 && cdyt == 0 {
		return inCircleExactDiff(adx, ady, bdx, bdy, cdx, cdy)
	}
	return inCircleExactGeneral(a, b, c, d)
}

// inCircleExactDiff evaluates the in-circle determinant exactly when the
// coordinate differences are themselves exact (the common case for nearby
// points, Sterbenz's lemma), with short expansions.
func inCircleExactDiff(adx, ady, bdx, bdy, cdx, cdy float64) float64 {
	var t1, t2, t3, o1, o2, o3 [32]float64
	var s1 [64]float64
	var s2 [96]float64
	ta := icTermDiff(adx, ady, bdx, bdy, cdx, cdy, t1[:], o1[:])
	tb := icTermDiff(bdx, bdy, cdx, cdy, adx, ady, t2[:], o2[:])
	tc := icTermDiff(cdx, cdy, adx, ady, bdx, bdy, t3[:], o3[:])
	return expSign(expSum(expSum(ta, tb, s1[:]), tc, s2[:]))
}

// icTermDiff returns (px²+py²)·(qx·ry − rx·qy) exactly, in out or other
// (capacity 32 each).
func icTermDiff(px, py, qx, qy, rx, ry float64, out, other []float64) []float64 {
	var u, v [2]float64
	var minor, lift [4]float64
	var tmp [8]float64
	u[1], u[0] = twoProd(qx, ry)
	v[1], v[0] = twoProd(rx, qy)
	v[0], v[1] = -v[0], -v[1]
	mi := expSum(compact(u[:]), compact(v[:]), minor[:])
	u[1], u[0] = twoProd(px, px)
	v[1], v[0] = twoProd(py, py)
	li := expSum(compact(u[:]), compact(v[:]), lift[:])
	return expMul(li, mi, out, other, tmp[:])
}

// compact drops zero components of a two-component expansion.
func compact(e []float64) []float64 {
	if e[0] == 0 {
		return e[1:]
	}
	return e
}

// icBuf holds the buffers of one in-circle term lift(p)·(q×r).
type icBuf struct {
	m1, m2, m3, m4 [8]float64
	minor, lift    [16]float64
	t1, t2         [512]float64
	tmp            [32]float64
}

// term returns (px²+py²)·(qx·ry − rx·qy) exactly.
func (w *icBuf) term(px, py, qx, qy, rx, ry []float64) []float64 {
	var tmp [4]float64
	u := expMul(qx, ry, w.m1[:], w.m2[:], tmp[:])
	v := expNeg(expMul(rx, qy, w.m3[:], w.m4[:], tmp[:]))
	minor := expSum(u, v, w.minor[:])
	u = expMul(px, px, w.m1[:], w.m2[:], tmp[:])
	v = expMul(py, py, w.m3[:], w.m4[:], tmp[:])
	lift := expSum(u, v, w.lift[:])
	return expMul(lift, minor, w.t1[:], w.t2[:], w.tmp[:])
}

func inCircleExactGeneral(a, b, c, d [2]float64) float64 {
	var b1, b2, b3, b4, b5, b6 [2]float64
	adx := twoDiffExp(a[0], d[0], b1[:])
	ady := twoDiffExp(a[1], d[1], b2[:])
	bdx := twoDiffExp(b[0], d[0], b3[:])
	bdy := twoDiffExp(b[1], d[1], b4[:])
	cdx := twoDiffExp(c[0], d[0], b5[:])
	cdy := twoDiffExp(c[1], d[1], b6[:])
	var w icBuf
	var s1 [1024]float64
	var s2 [1536]float64
	ta := w.term(adx, ady, bdx, bdy, cdx, cdy)
	sum := append(s1[:0], ta...)
	tb := w.term(bdx, bdy, cdx, cdy, adx, ady)
	sum2 := expSum(sum, tb, s2[:])
	tc := w.term(cdx, cdy, adx, ady, bdx, bdy)
	return expSign(expSum(sum2, tc, s1[:]))
}

func finite(x float64) bool { return !math.IsInf(x, 0) && !math.IsNaN(x) }
