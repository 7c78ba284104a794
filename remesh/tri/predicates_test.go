package tri

import (
	"math"
	"math/big"
	"math/rand"
	"testing"
)

// Reference: exact rational arithmetic (math/big), an evaluation independent
// of the floating-point expansions, of the orientation and in-circle
// determinants (the definitions in Shewchuk 1997, §4).

func ratSign(x *big.Rat) float64 { return float64(x.Sign()) }

func bigOrient(a, b, c [2]float64) float64 {
	r := func(v float64) *big.Rat { return new(big.Rat).SetFloat64(v) }
	acx := new(big.Rat).Sub(r(a[0]), r(c[0]))
	bcy := new(big.Rat).Sub(r(b[1]), r(c[1]))
	acy := new(big.Rat).Sub(r(a[1]), r(c[1]))
	bcx := new(big.Rat).Sub(r(b[0]), r(c[0]))
	l := new(big.Rat).Mul(acx, bcy)
	return ratSign(l.Sub(l, new(big.Rat).Mul(acy, bcx)))
}

func bigInCircle(a, b, c, d [2]float64) float64 {
	r := func(v float64) *big.Rat { return new(big.Rat).SetFloat64(v) }
	diff := func(p [2]float64) (x, y, l *big.Rat) {
		x = new(big.Rat).Sub(r(p[0]), r(d[0]))
		y = new(big.Rat).Sub(r(p[1]), r(d[1]))
		l = new(big.Rat).Add(new(big.Rat).Mul(x, x), new(big.Rat).Mul(y, y))
		return
	}
	ax, ay, al := diff(a)
	bx, by, bl := diff(b)
	cx, cy, cl := diff(c)
	minor := func(px, py, qx, qy *big.Rat) *big.Rat {
		m := new(big.Rat).Mul(px, qy)
		return m.Sub(m, new(big.Rat).Mul(qx, py))
	}
	det := new(big.Rat).Mul(al, minor(bx, by, cx, cy))
	det.Add(det, new(big.Rat).Mul(bl, minor(cx, cy, ax, ay)))
	det.Add(det, new(big.Rat).Mul(cl, minor(ax, ay, bx, by)))
	return ratSign(det)
}

func sign(x float64) float64 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// nudge moves x by k units in the last place.
func nudge(x float64, k int) float64 {
	for ; k > 0; k-- {
		x = math.Nextafter(x, math.Inf(1))
	}
	for ; k < 0; k++ {
		x = math.Nextafter(x, math.Inf(-1))
	}
	return x
}

func TestPredicatesExact(t *testing.T) {
	r := rand.New(rand.NewSource(7))
	cases := []struct {
		name string
		gen  func() [4][2]float64
	}{
		{"random", func() [4][2]float64 {
			var p [4][2]float64
			for k := range p {
				p[k] = [2]float64{r.Float64(), r.Float64()}
			}
			return p
		}},
		{"near-collinear and near-cocircular (ulp perturbations)", func() [4][2]float64 {
			// points on the line y = x/3 + 0.1 and on the unit circle, then
			// moved by a few ulps: the filters fail and the exact stage decides
			s := 0.5 + r.Float64()
			var p [4][2]float64
			for k := 0; k < 3; k++ {
				x := r.Float64() * s
				p[k] = [2]float64{nudge(x, r.Intn(5)-2), nudge(x/3+0.1, r.Intn(5)-2)}
			}
			a := r.Float64() * 2 * math.Pi
			p[3] = [2]float64{nudge(math.Cos(a), r.Intn(5)-2), nudge(math.Sin(a), r.Intn(5)-2)}
			for k := 0; k < 3; k++ {
				a := r.Float64() * 2 * math.Pi
				if k == 0 || r.Intn(2) == 0 {
					p[k] = [2]float64{math.Cos(a), math.Sin(a)}
				}
			}
			return p
		}},
		{"integer grid (exactly cocircular and collinear)", func() [4][2]float64 {
			var p [4][2]float64
			for k := range p {
				p[k] = [2]float64{float64(r.Intn(5)), float64(r.Intn(5))}
			}
			return p
		}},
		{"grid plus tiny offsets (inexact differences)", func() [4][2]float64 {
			var p [4][2]float64
			for k := range p {
				p[k] = [2]float64{float64(r.Intn(3)), float64(r.Intn(3))}
				if r.Intn(2) == 0 {
					p[k][r.Intn(2)] += (r.Float64() - 0.5) * 1e-20
				}
			}
			return p
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			zeros := 0
			for i := 0; i < 1500; i++ {
				p := c.gen()
				if got, want := sign(orient(p[0], p[1], p[2])), bigOrient(p[0], p[1], p[2]); got != want {
					t.Fatalf("orient%v = %g, exact %g", p[:3], got, want)
				}
				if got, want := sign(inCircle(p[0], p[1], p[2], p[3])), bigInCircle(p[0], p[1], p[2], p[3]); got != want {
					t.Fatalf("inCircle%v = %g, exact %g", p, got, want)
				}
				if bigInCircle(p[0], p[1], p[2], p[3]) == 0 {
					zeros++
				}
			}
			t.Logf("%d exactly degenerate in-circle cases", zeros)
		})
	}
}
