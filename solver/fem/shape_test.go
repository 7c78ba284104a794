package fem

import (
	"math"
	"testing"
)

// factorial for small integers.
func fact(n int) float64 {
	f := 1.0
	for i := 2; i <= n; i++ {
		f *= float64(i)
	}
	return f
}

// TestRulesIntegrateMonomials checks the quadrature rules against the
// closed-form integral ∫_T L1^a L2^b L3^c dA = 2A a! b! c! / (a+b+c+2)!
// (Eisenberg & Malvern 1973; any FE text, e.g. Zienkiewicz & Taylor vol. 1).
func TestRulesIntegrateMonomials(t *testing.T) {
	for _, tc := range []struct {
		name   string
		rule   Rule
		degree int
	}{{"Degree2", Degree2(), 2}, {"Degree4", Degree4(), 4}} {
		sum := 0.0
		for _, w := range tc.rule.W {
			sum += w
		}
		if math.Abs(sum-1) > 1e-14 {
			t.Errorf("%s: weights sum to %.16g, want 1", tc.name, sum)
		}
		for a := 0; a <= tc.degree; a++ {
			for b := 0; a+b <= tc.degree; b++ {
				for c := 0; a+b+c <= tc.degree; c++ {
					got := 0.0
					for i, l := range tc.rule.L {
						got += tc.rule.W[i] * math.Pow(l[0], float64(a)) * math.Pow(l[1], float64(b)) * math.Pow(l[2], float64(c))
					}
					// area-normalised: divide the closed form by A.
					want := 2 * fact(a) * fact(b) * fact(c) / fact(a+b+c+2)
					if math.Abs(got-want) > 1e-12 {
						t.Errorf("%s: L1^%d L2^%d L3^%d: got %.15g want %.15g", tc.name, a, b, c, got, want)
					}
				}
			}
		}
	}
}

// TestShapeP2 checks the Kronecker property at the nodes, the partition of
// unity, and the derivatives against central differences.
func TestShapeP2(t *testing.T) {
	nodes := [6][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {0.5, 0.5, 0}, {0, 0.5, 0.5}, {0.5, 0, 0.5}}
	for i, l := range nodes {
		n := ShapeP2(l)
		for j := range n {
			want := 0.0
			if i == j {
				want = 1
			}
			if math.Abs(n[j]-want) > 1e-15 {
				t.Errorf("N%d at node %d = %g, want %g", j, i, n[j], want)
			}
		}
	}
	l := [3]float64{0.2, 0.3, 0.5}
	dxi, deta := ShapeP2Deriv(l)
	const h = 1e-6
	np := ShapeP2([3]float64{l[0] + h, l[1], l[2] - h})
	nm := ShapeP2([3]float64{l[0] - h, l[1], l[2] + h})
	ep := ShapeP2([3]float64{l[0], l[1] + h, l[2] - h})
	em := ShapeP2([3]float64{l[0], l[1] - h, l[2] + h})
	sum := 0.0
	for j := 0; j < 6; j++ {
		sum += ShapeP2(l)[j]
		if d := (np[j] - nm[j]) / (2 * h); math.Abs(d-dxi[j]) > 1e-8 {
			t.Errorf("dN%d/dxi = %g, finite difference %g", j, dxi[j], d)
		}
		if d := (ep[j] - em[j]) / (2 * h); math.Abs(d-deta[j]) > 1e-8 {
			t.Errorf("dN%d/deta = %g, finite difference %g", j, deta[j], d)
		}
	}
	if math.Abs(sum-1) > 1e-15 {
		t.Errorf("partition of unity: sum %g", sum)
	}
	p := [2]float64{0.3, 0.2}
	bl := Barycentric(p, [2]float64{0, 0}, [2]float64{1, 0}, [2]float64{0, 1})
	if math.Abs(bl[0]-0.5) > 1e-15 || math.Abs(bl[1]-0.3) > 1e-15 || math.Abs(bl[2]-0.2) > 1e-15 {
		t.Errorf("Barycentric = %v, want [0.5 0.3 0.2]", bl)
	}
}
