package material

import (
	"math"
	"math/cmplx"
)

// Test-only reference arithmetic: a complex128 twin of the 2×2 spectral
// logarithm for complex-step first derivatives (Squire & Trapp 1998, SIAM
// Review 40; Martins, Sturdza & Alonso 2003, ACM TOMS 29), and hyper-dual
// numbers for exact second derivatives (Fike & Alonso 2011, AIAA 2011-886).
// Both are written from the textbook eigen-decomposition, independently of
// the invariant form in logstrain.go.

// complexEigen2 returns the eigenvalues λ₁,₂ = m ± r of the complex in-plane
// block and the projection P₁ = (C − λ₂I)/(λ₁ − λ₂).
func complexEigen2(c [4]complex128) (l1, l2 complex128, p1 [2][2]complex128) {
	a, b, s := c[0], c[1], c[3]
	m := (a + b) / 2
	d := (a - b) / 2
	r := cmplx.Sqrt(d*d + s*s)
	l1, l2 = m+r, m-r
	p1 = [2][2]complex128{{(a - l2) / (2 * r), s / (2 * r)}, {s / (2 * r), (b - l2) / (2 * r)}}
	return l1, l2, p1
}

// complexLogSpectral returns ½ ln C for complex components by the spectral
// sum ½ ln λ₁ P₁ + ½ ln λ₂ (I − P₁).
func complexLogSpectral(c [4]complex128) [4]complex128 {
	l1, l2, p1 := complexEigen2(c)
	f1, f2 := cmplx.Log(l1)/2, cmplx.Log(l2)/2
	return [4]complex128{
		f2 + (f1-f2)*p1[0][0],
		f2 + (f1-f2)*p1[1][1],
		cmplx.Log(c[2]) / 2,
		(f1 - f2) * p1[0][1],
	}
}

// complexLogInvariant is the complex twin of the invariant form (needed at
// exactly equal eigenvalues, where the spectral projections do not exist and
// a complex perturbation would meet the branch point of the square root).
func complexLogInvariant(c [4]complex128) [4]complex128 {
	a, b, s := c[0], c[1], c[3]
	m := (a + b) / 2
	d := (a - b) / 2
	q := d*d + s*s
	z := q / (m * m)
	var h complex128
	if cmplx.Abs(z) < 0.05 {
		for k := 40; k >= 0; k-- {
			h = h*z + complex(1/float64(2*k+1), 0)
		}
	} else {
		x := cmplx.Sqrt(z)
		h = cmplx.Atanh(x) / x
	}
	g := h / (2 * m)
	phi := cmplx.Log(a*b-s*s) / 4
	return [4]complex128{phi + g*d, phi - g*d, cmplx.Log(c[2]) / 2, g * s}
}

// hd is a hyper-dual number a + b ε₁ + c ε₂ + d ε₁ε₂ (ε₁² = ε₂² = 0).
type hd struct{ a, b, c, d float64 }

func hdc(x float64) hd          { return hd{a: x} }
func (x hd) add(y hd) hd        { return hd{x.a + y.a, x.b + y.b, x.c + y.c, x.d + y.d} }
func (x hd) sub(y hd) hd        { return hd{x.a - y.a, x.b - y.b, x.c - y.c, x.d - y.d} }
func (x hd) scale(s float64) hd { return hd{s * x.a, s * x.b, s * x.c, s * x.d} }
func (x hd) mul(y hd) hd {
	return hd{x.a * y.a, x.a*y.b + x.b*y.a, x.a*y.c + x.c*y.a, x.a*y.d + x.b*y.c + x.c*y.b + x.d*y.a}
}

// fn applies a scalar function with value f0 and derivatives f1, f2 at x.a.
func (x hd) fn(f0, f1, f2 float64) hd {
	return hd{f0, f1 * x.b, f1 * x.c, f1*x.d + f2*x.b*x.c}
}
func (x hd) inv() hd     { return x.fn(1/x.a, -1/(x.a*x.a), 2/(x.a*x.a*x.a)) }
func (x hd) div(y hd) hd { return x.mul(y.inv()) }
func (x hd) sqrt() hd {
	r := math.Sqrt(x.a)
	return x.fn(r, 0.5/r, -0.25/(r*x.a))
}
func (x hd) log() hd { return x.fn(math.Log(x.a), 1/x.a, -1/(x.a*x.a)) }

// hdLogSpectral is the hyper-dual twin of complexLogSpectral.
func hdLogSpectral(c [4]hd) [4]hd {
	a, b, s := c[0], c[1], c[3]
	m := a.add(b).scale(0.5)
	d := a.sub(b).scale(0.5)
	r := d.mul(d).add(s.mul(s)).sqrt()
	l1, l2 := m.add(r), m.sub(r)
	f1, f2 := l1.log().scale(0.5), l2.log().scale(0.5)
	r2 := r.scale(2)
	p11 := a.sub(l2).div(r2)
	p22 := b.sub(l2).div(r2)
	p12 := s.div(r2)
	df := f1.sub(f2)
	return [4]hd{f2.add(df.mul(p11)), f2.add(df.mul(p22)), c[2].log().scale(0.5), df.mul(p12)}
}

// hdLogSeries is the hyper-dual twin of the invariant form with the series of
// h, valid for q/m² < 0.05 (including exactly equal eigenvalues).
func hdLogSeries(c [4]hd) [4]hd {
	a, b, s := c[0], c[1], c[3]
	m := a.add(b).scale(0.5)
	d := a.sub(b).scale(0.5)
	q := d.mul(d).add(s.mul(s))
	z := q.div(m.mul(m))
	var h hd
	for k := 40; k >= 0; k-- {
		h = h.mul(z).add(hdc(1 / float64(2*k+1)))
	}
	g := h.div(m.scale(2))
	phi := a.mul(b).sub(s.mul(s)).log().scale(0.25)
	return [4]hd{phi.add(g.mul(d)), phi.sub(g.mul(d)), c[2].log().scale(0.5), g.mul(s)}
}

// hdSeed returns C as hyper-dual numbers with ε₁ seeded in component j and
// ε₂ in component k.
func hdSeed(C Sym, j, k int) [4]hd {
	var c [4]hd
	for l := range c {
		c[l] = hdc(C[l])
	}
	c[j].b = 1
	c[k].c = 1
	return c
}

// hdLog is the hyper-dual logarithmic strain, spectral or series form.
func hdLog(c [4]hd, spectral bool) [4]hd {
	if spectral {
		return hdLogSpectral(c)
	}
	return hdLogSeries(c)
}

// complexDLogSpectral returns ∂E/∂C (Sym convention, C₁₂ one variable) for
// complex C by the closed-form derivative of an isotropic tensor function in
// terms of the eigenprojections (Miehe, Apel & Lambrecht 2002; Carlson &
// Hoger 1986, Q. Appl. Math. 44):
//
//	∂f(C)/∂C = Σₐ f′(λₐ) Pₐ⊗Pₐ + θ (P₁⊠P₂ + P₂⊠P₁),  θ = (f(λ₁)−f(λ₂))/(λ₁−λ₂),
//
// with (A⊠B)ᵢⱼₖₗ = ½(AᵢₖBⱼₗ + AᵢₗBⱼₖ); the 12 column counts C₁₂ and C₂₁.
func complexDLogSpectral(c [4]complex128) [4][4]complex128 {
	l1, l2, p1 := complexEigen2(c)
	f1, f2 := cmplx.Log(l1)/2, cmplx.Log(l2)/2
	g1, g2 := 1/(2*l1), 1/(2*l2)
	th := (f1 - f2) / (l1 - l2)
	p2 := [2][2]complex128{{1 - p1[0][0], -p1[0][1]}, {-p1[1][0], 1 - p1[1][1]}}
	t4 := func(i, j, k, l int) complex128 {
		return g1*p1[i][j]*p1[k][l] + g2*p2[i][j]*p2[k][l] +
			th*0.5*(p1[i][k]*p2[j][l]+p1[i][l]*p2[j][k]+p2[i][k]*p1[j][l]+p2[i][l]*p1[j][k])
	}
	pairs := [4][2]int{{0, 0}, {1, 1}, {-1, -1}, {0, 1}}
	var D [4][4]complex128
	for I, pi := range pairs {
		for J, pj := range pairs {
			if pi[0] < 0 || pj[0] < 0 {
				continue
			}
			v := t4(pi[0], pi[1], pj[0], pj[1])
			if pj[0] != pj[1] {
				v *= 2
			}
			D[I][J] = v
		}
	}
	D[2][2] = 1 / (2 * c[2])
	return D
}
