package plane

import "math"

// Expansion arithmetic (Shewchuk 1997, §2): a value is held as a sum of
// non-overlapping float64 components in increasing magnitude; the sign of the
// value is the sign of the last (largest) component. The exact stages keep
// all their buffers in fixed-size local arrays sized for the worst case, so
// they do not allocate.

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
	return closeExp(pushNonzero(h[:0], y), x)
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
		h = pushNonzero(h, hh)
	}
	return closeExp(h, q)
}

// expScale returns e·b in h[:0] (Shewchuk 1997, Theorem 19, scale
// expansion, with zero elimination).
func expScale(e []float64, b float64, h []float64) []float64 {
	h = h[:0]
	q, hh := twoProd(e[0], b)
	h = pushNonzero(h, hh)
	for k := 1; k < len(e); k++ {
		p1, p0 := twoProd(e[k], b)
		var sum float64
		sum, hh = twoSum(q, p0)
		h = pushNonzero(h, hh)
		q, hh = twoSum(p1, sum)
		h = pushNonzero(h, hh)
	}
	return closeExp(h, q)
}

// pushNonzero appends the component x to h unless it is zero (zero
// elimination, Shewchuk 1997, §2.5).
func pushNonzero(h []float64, x float64) []float64 {
	if x != 0 {
		return append(h, x)
	}
	return h
}

// closeExp appends the largest component q; an expansion of value zero
// keeps a single zero component.
func closeExp(h []float64, q float64) []float64 {
	if q != 0 || len(h) == 0 {
		return append(h, q)
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
