package plane

import (
	"math"
	"math/big"
	"math/rand"
	randv2 "math/rand/v2"
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
				if got, want := sign(Orient(p[0], p[1], p[2])), bigOrient(p[0], p[1], p[2]); got != want {
					t.Fatalf("Orient%v = %g, exact %g", p[:3], got, want)
				}
				if got, want := sign(InCircle(p[0], p[1], p[2], p[3])), bigInCircle(p[0], p[1], p[2], p[3]); got != want {
					t.Fatalf("InCircle%v = %g, exact %g", p, got, want)
				}
				if bigInCircle(p[0], p[1], p[2], p[3]) == 0 {
					zeros++
				}
			}
			t.Logf("%d exactly degenerate in-circle cases", zeros)
		})
	}
}

// TestOrientNearDegenerate checks the orientation sign on the classic
// near-collinear grid of Kettner, Mehlhorn, Pion, Schirra & Yap 2008
// ("Classroom examples of robustness problems in geometric computations",
// Comput. Geom. 40): p = (0.5 + i·2⁻⁵³, 0.5 + j·2⁻⁵³), q = (12, 12),
// r = (24, 24). q and r lie on the line y = x, so p is left of q→r exactly
// when its y exceeds its x (closed form): sign = sign(j − i).
func TestOrientNearDegenerate(t *testing.T) {
	q, r := [2]float64{12, 12}, [2]float64{24, 24}
	naiveWrong := 0
	for i := 0; i < 64; i++ {
		for j := 0; j < 64; j++ {
			p := [2]float64{0.5 + float64(i)*eps, 0.5 + float64(j)*eps}
			// 0.5 + k·2⁻⁵³ is exact (the ulp of 0.5 is 2⁻⁵³); skip any that is not.
			if p[0]-0.5 != float64(i)*eps || p[1]-0.5 != float64(j)*eps {
				continue
			}
			want := sign(float64(j - i))
			if got := sign(Orient(p, q, r)); got != want {
				t.Fatalf("Orient(%v, q, r) sign %g, want %g", p, got, want)
			}
			naive := (q[0]-p[0])*(r[1]-p[1]) - (q[1]-p[1])*(r[0]-p[0])
			if sign(naive) != want {
				naiveWrong++
			}
		}
	}
	t.Logf("plain floating-point orientation wrong on %d of the grid points; robust one on none", naiveWrong)
}

// TestOrientAgainstRational compares the orientation sign of Orient and of
// each of its exact stages (where it accepts the input) with exact rational
// arithmetic (math/big) on near-collinear triples: points on lines through
// dyadic and non-dyadic coordinates, moved by a few ulps, small integers
// and huge and tiny magnitudes (exact differences and inexact ones,
// underflowing products).
func TestOrientAgainstRational(t *testing.T) {
	rng := randv2.New(randv2.NewPCG(4, 4))
	for _, sc := range []float64{1, 1e-3, 1e8, 1e-160, 1e150} {
		stages := [2]int{}
		for i := 0; i < 4000; i++ {
			a := [2]float64{sc * rng.Float64(), sc * rng.Float64()}
			if i%3 == 0 {
				a = [2]float64{sc * float64(rng.IntN(9)) / 8, sc * float64(rng.IntN(9)) / 8}
			}
			d := [2]float64{sc * (rng.Float64() - 0.5), sc * (rng.Float64() - 0.5)}
			s1, s2 := rng.Float64(), 1+rng.Float64()
			b := [2]float64{a[0] + s1*d[0], a[1] + s1*d[1]}
			c := [2]float64{a[0] + s2*d[0], a[1] + s2*d[1]}
			b[rng.IntN(2)] = nudge(b[rng.IntN(2)], rng.IntN(5)-2)
			if i%5 == 0 {
				c = b
			}
			want := bigOrient(a, b, c)
			if got := sign(Orient(a, b, c)); got != want {
				t.Fatalf("Orient(%v, %v, %v) sign %g, exact %g", a, b, c, got, want)
			}
			if got := sign(orientRational(a, b, c)); got != want {
				t.Fatalf("orientRational(%v, %v, %v) sign %g, exact %g", a, b, c, got, want)
			}
			if s, ok := orientExactDiff(a, b, c); ok {
				stages[0]++
				if sign(s) != want {
					t.Fatalf("orientExactDiff(%v, %v, %v) sign %g, exact %g", a, b, c, sign(s), want)
				}
			}
			if s, ok := orientExpansion(a, b, c); ok {
				stages[1]++
				if sign(s) != want {
					t.Fatalf("orientExpansion(%v, %v, %v) sign %g, exact %g", a, b, c, sign(s), want)
				}
			}
		}
		t.Logf("scale %g: exact differences accepted %d times, expansions %d times of 4000", sc, stages[0], stages[1])
	}
}

// TestOrientUnderflow: products below 2⁻⁹⁶⁹ defeat the relative error bound
// and the error-free product split, so Orient must fall back to rational
// arithmetic. The points lie on the line y = x scaled down to subnormal
// differences (closed form: collinear, so zero; one ulp up, positive).
func TestOrientUnderflow(t *testing.T) {
	for _, c := range []struct {
		name    string
		a, b, c [2]float64
		want    float64
	}{
		{"collinear subnormal", [2]float64{0, 0}, [2]float64{3e-320, 3e-320}, [2]float64{5e-320, 5e-320}, 0},
		{"left of the line by one subnormal ulp", [2]float64{0, 0}, [2]float64{3e-320, 3e-320}, [2]float64{5e-320, nudge(5e-320, 1)}, 1},
		{"right of the line", [2]float64{1e-300, 1e-300}, [2]float64{2e-300, 2e-300}, [2]float64{nudge(3e-300, 1), 3e-300}, -1},
	} {
		if got := sign(Orient(c.a, c.b, c.c)); got != c.want || bigOrient(c.a, c.b, c.c) != c.want {
			t.Errorf("%s: Orient sign %g, rational %g, want %g", c.name, got, bigOrient(c.a, c.b, c.c), c.want)
		}
	}
	if !math.IsNaN(Orient([2]float64{math.NaN(), 0}, [2]float64{1, 0}, [2]float64{0, 1})) {
		t.Errorf("Orient with a NaN coordinate is not NaN")
	}
}

func BenchmarkOrient(b *testing.B) {
	for _, c := range []struct {
		name    string
		a, b, c [2]float64
	}{
		{"filter", [2]float64{0, 0}, [2]float64{1, 0}, [2]float64{0.3, 0.7}},
		{"exact differences", [2]float64{0.5, 0.5}, [2]float64{0.75, 0.75}, [2]float64{1, 1}},
		{"expansions", [2]float64{0.1, 0.1}, [2]float64{0.3, 0.3}, [2]float64{0.7, 0.7}},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			for b.Loop() {
				s += Orient(c.a, c.b, c.c)
			}
			if math.IsNaN(s) {
				b.Fatal(s)
			}
		})
	}
}
