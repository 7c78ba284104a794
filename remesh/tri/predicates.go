package tri

import "math"

// Robust geometric predicates.
//
// orient and inCircle follow the scheme of Shewchuk (1997), "Adaptive
// precision floating-point arithmetic and fast robust geometric predicates",
// Discrete Comput. Geom. 18: a floating-point evaluation whose sign is
// accepted when the result exceeds a forward error bound, and an exact
// evaluation with floating-point expansions otherwise. The intermediate
// adaptive stages of the paper are skipped: the filter fails rarely, and the
// exact stage is then computed directly. The implementation is our own.

// eps is half the unit roundoff of float64 (2^-53), the ε of Shewchuk (1997).
const eps = 1.0 / (1 << 53)

// Error-bound coefficients of the floating-point filters (Shewchuk 1997, §4.2).
const (
	ccwErrBoundA = (3 + 16*eps) * eps
	iccErrBoundA = (10 + 96*eps) * eps
)

// orient returns a positive value if a, b, c are in counter-clockwise order,
// a negative value if clockwise and zero if they are collinear. The sign is
// exact.
func orient(a, b, c [2]float64) float64 {
	detLeft := (a[0] - c[0]) * (b[1] - c[1])
	detRight := (a[1] - c[1]) * (b[0] - c[0])
	det := detLeft - detRight
	detSum := math.Abs(detLeft) + math.Abs(detRight)
	if math.Abs(det) > ccwErrBoundA*detSum {
		return det
	}
	return orientExact(a, b, c)
}

// inCircle returns a positive value if d lies inside the circle through the
// counter-clockwise triangle a, b, c, a negative value if outside and zero if
// on it. The sign is exact.
func inCircle(a, b, c, d [2]float64) float64 {
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
	if math.Abs(det) > iccErrBoundA*perm {
		return det
	}
	return inCircleExact(a, b, c, d)
}

// Expansion arithmetic (Shewchuk 1997, §2): a value is held as a sum of
// non-overlapping float64 components in increasing magnitude; the sign of the
// value is the sign of the last (largest) component.

// twoSum returns x = fl(a+b) and the exact rounding error y (Knuth's
// two-sum; Shewchuk 1997, Theorem 7).
func twoSum(a, b float64) (x, y float64) {
	x = a + b
	bv := x - a
	av := x - bv
	y = (a - av) + (b - bv)
	return
}

// twoProd returns x = fl(a·b) and the exact error y, using the fused
// multiply-add (the product error is representable exactly).
func twoProd(a, b float64) (x, y float64) {
	x = a * b
	y = math.FMA(a, b, -x)
	return
}

// twoDiffExp returns a−b as an expansion (at most two components).
func twoDiffExp(a, b float64, h []float64) []float64 {
	x, y := twoSum(a, -b)
	h = h[:0]
	if y != 0 {
		h = append(h, y)
	}
	if x != 0 || len(h) == 0 {
		h = append(h, x)
	}
	return h
}

// expSum returns the expansion e+f in h[:0] (h must not alias e or f): the
// components of e and f merged by increasing magnitude and accumulated with
// two-sum (Shewchuk 1997, Theorem 13, fast expansion sum, with zero
// elimination).
func expSum(e, f, h []float64) []float64 {
	h = h[:0]
	n := len(e) + len(f)
	if n == 0 {
		return append(h, 0)
	}
	i, j := 0, 0
	var q float64
	for k := 0; k < n; k++ {
		var g float64
		if j >= len(f) || (i < len(e) && math.Abs(e[i]) <= math.Abs(f[j])) {
			g = e[i]
			i++
		} else {
			g = f[j]
			j++
		}
		if k == 0 {
			q = g
			continue
		}
		var hh float64
		q, hh = twoSum(q, g)
		if hh != 0 {
			h = append(h, hh)
		}
	}
	if q != 0 || len(h) == 0 {
		h = append(h, q)
	}
	return h
}

// expScale returns e·b in h[:0] (Shewchuk 1997, Theorem 19, scale
// expansion, with zero elimination).
func expScale(e []float64, b float64, h []float64) []float64 {
	h = h[:0]
	q, hh := twoProd(e[0], b)
	if hh != 0 {
		h = append(h, hh)
	}
	for k := 1; k < len(e); k++ {
		p1, p0 := twoProd(e[k], b)
		var sum float64
		sum, hh = twoSum(q, p0)
		if hh != 0 {
			h = append(h, hh)
		}
		q, hh = twoSum(p1, sum)
		if hh != 0 {
			h = append(h, hh)
		}
	}
	if q != 0 || len(h) == 0 {
		h = append(h, q)
	}
	return h
}

// expMul returns the exact product e·f, built in the buffers a and b (each
// of capacity ≥ 2·len(e)·len(f)) with tmp (capacity ≥ 2·len(e)) for the
// scaled terms. The result lies in a or b.
func expMul(e, f, a, b, tmp []float64) []float64 {
	acc := append(a[:0], 0)
	other := b
	for _, fk := range f {
		if fk == 0 {
			continue
		}
		tmp = expScale(e, fk, tmp)
		res := expSum(acc, tmp, other)
		other = acc
		acc = res
	}
	return acc
}

func expNeg(e []float64) []float64 {
	for k := range e {
		e[k] = -e[k]
	}
	return e
}

func expSign(e []float64) float64 {
	for k := len(e) - 1; k >= 0; k-- {
		if e[k] != 0 {
			return e[k]
		}
	}
	return 0
}

// The exact stages keep all their buffers in fixed-size local arrays sized
// for the worst case, so they do not allocate.

func orientExact(a, b, c [2]float64) float64 {
	var b1, b2, b3, b4 [2]float64
	var l1, l2, r1, r2 [8]float64
	var tmp [4]float64
	var out [16]float64
	acx := twoDiffExp(a[0], c[0], b1[:])
	bcy := twoDiffExp(b[1], c[1], b2[:])
	acy := twoDiffExp(a[1], c[1], b3[:])
	bcx := twoDiffExp(b[0], c[0], b4[:])
	l := expMul(acx, bcy, l1[:], l2[:], tmp[:])
	r := expNeg(expMul(acy, bcx, r1[:], r2[:], tmp[:]))
	return expSign(expSum(l, r, out[:]))
}

// icTerm is the exact value of lift(p)·(q×r) for the in-circle determinant.
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
