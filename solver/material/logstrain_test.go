package material

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// randomC returns C = FᵀF for a random in-plane F with det F > 0 and a random
// C₃₃: stretches up to about e^±1.
func randomC(rng *rand.Rand) Sym {
	for {
		f11 := 1 + 1.6*(rng.Float64()-0.5)
		f22 := 1 + 1.6*(rng.Float64()-0.5)
		f12 := 1.6 * (rng.Float64() - 0.5)
		f21 := 1.6 * (rng.Float64() - 0.5)
		if f11*f22-f12*f21 < 0.2 {
			continue
		}
		c33 := 0.5 + 1.5*rng.Float64()
		return Sym{f11*f11 + f21*f21, f12*f12 + f22*f22, c33, f11*f12 + f21*f22}
	}
}

// nearEqualC returns a C whose in-plane eigenvalues are λ and λ(1+δ), with
// principal axes at angle θ.
func nearEqualC(lambda, delta, theta, c33 float64) Sym {
	l1, l2 := lambda*(1+delta), lambda
	co, si := math.Cos(theta), math.Sin(theta)
	return Sym{l1*co*co + l2*si*si, l1*si*si + l2*co*co, c33, (l1 - l2) * si * co}
}

type logCase struct {
	name string
	C    Sym
	// spectral: the spectral twin is well conditioned here (eigenvalue gap
	// not too small); otherwise the invariant twin is used.
	spectral bool
}

func logCases() []logCase {
	rng := rand.New(rand.NewPCG(1, 2))
	var cs []logCase
	for i := 0; i < 20; i++ {
		cs = append(cs, logCase{fmt.Sprintf("random%d", i), randomC(rng), true})
	}
	cs = append(cs,
		logCase{"gap1e-2", nearEqualC(1.3, 1e-2, 0.4, 0.9), true},
		logCase{"gap1e-3", nearEqualC(0.7, 1e-3, 1.1, 1.2), true},
		logCase{"gap1e-5", nearEqualC(1.1, 1e-5, 0.3, 1.0), false},
		logCase{"gap1e-8", nearEqualC(2.0, 1e-8, 2.2, 1.0), false},
		logCase{"gap1e-12", nearEqualC(0.8, 1e-12, 0.9, 1.1), false},
		logCase{"equal-alphaI", Sym{1.7, 1.7, 1.7, 0}, false},
		logCase{"equal-inplane", Sym{0.6, 0.6, 1.3, 0}, false},
		logCase{"identity", Sym{1, 1, 1, 0}, false},
	)
	return cs
}

func maxAbs4(d [4][4]float64) float64 {
	var m float64
	for i := range d {
		for j := range d[i] {
			m = math.Max(m, math.Abs(d[i][j]))
		}
	}
	return m
}

// Reference: the spectral definition E = Σ ½ ln λₐ Nₐ⊗Nₐ (Miehe, Apel &
// Lambrecht 2002) evaluated with gonum's symmetric eigensolver on the full
// 3×3 tensor.
func TestLogStrainAgainstEigensolver(t *testing.T) {
	for _, tc := range logCases() {
		C := tc.C
		m := mat.NewSymDense(3, []float64{C[0], C[3], 0, C[3], C[1], 0, 0, 0, C[2]})
		var es mat.EigenSym
		if !es.Factorize(m, true) {
			t.Fatalf("%s: eigensolver failed", tc.name)
		}
		vals := es.Values(nil)
		var vecs mat.Dense
		es.VectorsTo(&vecs)
		var ref [3][3]float64
		for a := 0; a < 3; a++ {
			f := 0.5 * math.Log(vals[a])
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					ref[i][j] += f * vecs.At(i, a) * vecs.At(j, a)
				}
			}
		}
		E, _ := LogStrain(C)
		want := Sym{ref[0][0], ref[1][1], ref[2][2], ref[0][1]}
		for i := range E {
			if math.Abs(E[i]-want[i]) > 1e-13*(1+math.Abs(want[i])) {
				t.Errorf("%s: E[%d] = %.16g, eigensolver gives %.16g", tc.name, i, E[i], want[i])
			}
		}
	}
}

// Reference: complex-step differentiation, ∂f/∂x = Im f(x + ih)/h with no
// subtractive error (Squire & Trapp 1998, SIAM Review 40).
func TestLogStrainDerivativeComplexStep(t *testing.T) {
	const h = 1e-30
	for _, tc := range logCases() {
		_, D := LogStrain(tc.C)
		var ref [4][4]float64
		for j := 0; j < 4; j++ {
			var c [4]complex128
			for k := range c {
				c[k] = complex(tc.C[k], 0)
			}
			c[j] += complex(0, h)
			var e [4]complex128
			if tc.spectral {
				e = complexLogSpectral(c)
			} else {
				e = complexLogInvariant(c)
			}
			for i := 0; i < 4; i++ {
				ref[i][j] = imag(e[i]) / h
			}
		}
		scale := maxAbs4(ref)
		for i := 0; i < 4; i++ {
			for j := 0; j < 4; j++ {
				if math.Abs(D[i][j]-ref[i][j]) > 1e-8*scale {
					t.Errorf("%s: dE[%d]/dC[%d] = %.12g, complex step %.12g", tc.name, i, j, D[i][j], ref[i][j])
				}
			}
		}
	}
}

// Reference: at C = αI the matrix logarithm has the Taylor series
// ln(αI + X) = ln α I + X/α − X²/(2α²) + O(X³) (Higham 2008, Functions of
// Matrices, SIAM, §11), so ∂E/∂C = 𝕀/(2α) and
// T:∂²E/∂C² is the Hessian of −T:X²/(4α²).
func TestLogStrainEqualEigenvaluesClosedForm(t *testing.T) {
	for _, alpha := range []float64{0.5, 1, 1.9} {
		C := Sym{alpha, alpha, alpha, 0}
		T := Sym{0.3, -1.2, 0.7, 0.45}
		E, D := LogStrain(C)
		K := LogStrainCurvature(C, T)
		for i := 0; i < 4; i++ {
			wantE := 0.5 * math.Log(alpha)
			if i == 3 {
				wantE = 0
			}
			if math.Abs(E[i]-wantE) > 1e-15 {
				t.Errorf("α=%g: E[%d] = %g, want %g", alpha, i, E[i], wantE)
			}
			for j := 0; j < 4; j++ {
				want := 0.0
				if i == j {
					want = 0.5 / alpha
				}
				if math.Abs(D[i][j]-want) > 1e-15 {
					t.Errorf("α=%g: dE[%d]/dC[%d] = %g, want %g", alpha, i, j, D[i][j], want)
				}
			}
		}
		f := -2 / (4 * alpha * alpha)
		wantK := [4][4]float64{
			{f * T[0], 0, 0, f * T[3]},
			{0, f * T[1], 0, f * T[3]},
			{0, 0, f * T[2], 0},
			{f * T[3], f * T[3], 0, f * (T[0] + T[1])},
		}
		for j := 0; j < 4; j++ {
			for k := 0; k < 4; k++ {
				if math.Abs(K[j][k]-wantK[j][k]) > 1e-14 {
					t.Errorf("α=%g: K[%d][%d] = %g, series gives %g", alpha, j, k, K[j][k], wantK[j][k])
				}
			}
		}
	}
}

// Reference: hyper-dual numbers give exact first and second derivatives
// (Fike & Alonso 2011, AIAA 2011-886); φ(C) = T:E(C) with T fixed has
// gradient T:∂E/∂C and Hessian T:∂²E/∂C∂C.
func TestLogStrainCurvatureHyperDual(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, tc := range logCases() {
		T := Sym{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		_, D := LogStrain(tc.C)
		K := LogStrainCurvature(tc.C, T)
		var refK [4][4]float64
		var refG, gotG [4]float64
		for j := 0; j < 4; j++ {
			for i := 0; i < 4; i++ {
				gotG[j] += symWeight[i] * T[i] * D[i][j]
			}
			for k := 0; k < 4; k++ {
				c := hdSeed(tc.C, j, k)
				e := hdLog(c, tc.spectral)
				var phi hd
				for i := 0; i < 4; i++ {
					phi = phi.add(e[i].scale(symWeight[i] * T[i]))
				}
				refK[j][k] = phi.d
				refG[j] = phi.b
			}
		}
		scale := maxAbs4(refK)
		for j := 0; j < 4; j++ {
			if math.Abs(gotG[j]-refG[j]) > 1e-8*math.Max(1, math.Abs(refG[j])) {
				t.Errorf("%s: (T:dE/dC)[%d] = %.12g, hyper-dual %.12g", tc.name, j, gotG[j], refG[j])
			}
			for k := 0; k < 4; k++ {
				if math.Abs(K[j][k]-refK[j][k]) > 1e-8*scale {
					t.Errorf("%s: K[%d][%d] = %.12g, hyper-dual %.12g", tc.name, j, k, K[j][k], refK[j][k])
				}
			}
		}
	}
}

// henckyEnergyHD is ψ = μ E:E + (λ/2)(tr E)² (isotropic Hencky energy) for
// hyper-dual C, through the spectral twin of the logarithm.
func henckyEnergyHD(c [4]hd, lam, mu float64, spectral bool) hd {
	e := hdLog(c, spectral)
	tr := e[0].add(e[1]).add(e[2])
	var ee hd
	for i := 0; i < 4; i++ {
		ee = ee.add(e[i].mul(e[i]).scale(symWeight[i]))
	}
	return ee.scale(mu).add(tr.mul(tr).scale(0.5 * lam))
}

// Reference: hyperelasticity, S = 2 ∂ψ/∂C (e.g. Holzapfel 2000, Nonlinear
// Solid Mechanics, §6.1), with the Sym convention Sⱼ = (2/wⱼ) ∂ψ/∂Cⱼ, and
// ∂S/∂C from the Hessian of ψ; derivatives exact by hyper-dual numbers. Also
// checked by a central finite difference of ψ as an independent sanity check.
func TestSecondPKAgainstStoredEnergy(t *testing.T) {
	const lam, mu = 1.7, 0.9
	for _, tc := range logCases() {
		E, D := LogStrain(tc.C)
		tr := E.Trace()
		T := Sym{lam*tr + 2*mu*E[0], lam*tr + 2*mu*E[1], lam*tr + 2*mu*E[2], 2 * mu * E[3]}
		var dTdE [4][4]float64
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				dTdE[i][j] = lam
			}
			dTdE[i][i] += 2 * mu
		}
		dTdE[3][3] = 2 * mu
		S := SecondPK(T, D)
		DS := SecondPKTangent(dTdE, D, LogStrainCurvature(tc.C, T))
		var scaleS float64
		for j := 0; j < 4; j++ {
			scaleS = math.Max(scaleS, math.Abs(S[j]))
		}
		var ref [4][4]float64
		for j := 0; j < 4; j++ {
			var grad float64
			for k := 0; k < 4; k++ {
				c := hdSeed(tc.C, j, k)
				psi := henckyEnergyHD(c, lam, mu, tc.spectral)
				grad = psi.b
				ref[j][k] = 2 / symWeight[j] * psi.d
			}
			want := 2 / symWeight[j] * grad
			if math.Abs(S[j]-want) > 1e-10*math.Max(1, scaleS) {
				t.Errorf("%s: S[%d] = %.12g, 2/w ∂ψ/∂C = %.12g", tc.name, j, S[j], want)
			}
			// Central difference of ψ, step 1e-6: truncation error ~1e-12.
			const step = 1e-6
			cp, cm := tc.C, tc.C
			cp[j] += step
			cm[j] -= step
			fd := (henckyEnergy(cp, lam, mu) - henckyEnergy(cm, lam, mu)) / (2 * step)
			if math.Abs(S[j]-2/symWeight[j]*fd) > 1e-6*math.Max(1, scaleS) {
				t.Errorf("%s: S[%d] = %.12g, finite difference %.12g", tc.name, j, S[j], 2/symWeight[j]*fd)
			}
		}
		scale := maxAbs4(ref)
		for j := 0; j < 4; j++ {
			for k := 0; k < 4; k++ {
				if math.Abs(DS[j][k]-ref[j][k]) > 1e-8*scale {
					t.Errorf("%s: dS[%d]/dC[%d] = %.12g, hyper-dual %.12g", tc.name, j, k, DS[j][k], ref[j][k])
				}
			}
		}
	}
}

func henckyEnergy(C Sym, lam, mu float64) float64 {
	E, _ := LogStrain(C)
	tr := E.Trace()
	return mu*E.Ddot(E) + 0.5*lam*tr*tr
}

// Reference: Taylor series of the logarithm, ½ ln(I + X) = ½X − ¼X² + O(X³)
// (Higham 2008, Functions of Matrices, §11): E → ½(C − I) at small strain with
// a second-order error −¼X², and the remainder after that term is O(|X|³).
func TestLogStrainSmallStrainLimit(t *testing.T) {
	dir := Sym{0.8, -0.5, 0.3, 0.6}
	var prevErr1 float64
	for n, eps := range []float64{1e-2, 1e-3, 1e-4} {
		X := Sym{eps * dir[0], eps * dir[1], eps * dir[2], eps * dir[3]}
		C := Sym{1 + X[0], 1 + X[1], 1 + X[2], X[3]}
		E, _ := LogStrain(C)
		x2 := Sym{X[0]*X[0] + X[3]*X[3], X[1]*X[1] + X[3]*X[3], X[2] * X[2], X[3] * (X[0] + X[1])}
		var err1, err2 float64
		for i := 0; i < 4; i++ {
			err1 = math.Max(err1, math.Abs(E[i]-0.5*X[i]))
			err2 = math.Max(err2, math.Abs(E[i]-0.5*X[i]+0.25*x2[i]))
		}
		if err1 > 0.5*eps*eps {
			t.Errorf("ε=%g: |E − ½(C−I)| = %g exceeds ½ε²", eps, err1)
		}
		if err2 > 0.5*eps*eps*eps+1e-16 {
			t.Errorf("ε=%g: |E − ½X + ¼X²| = %g exceeds ½ε³", eps, err2)
		}
		if n > 0 {
			// Second-order error: shrinks 100× when ε shrinks 10×.
			if r := prevErr1 / err1; r < 90 || r > 110 {
				t.Errorf("ε=%g: error ratio %g, want ≈ 100 (second order)", eps, r)
			}
		}
		prevErr1 = err1
	}
}

func BenchmarkLogStrain(b *testing.B) {
	C := Sym{1.2, 0.9, 1.05, 0.15}
	T := Sym{100, 50, 70, 20}
	var sink float64
	for b.Loop() {
		E, D := LogStrain(C)
		K := LogStrainCurvature(C, T)
		sink += E[0] + D[0][0] + K[0][0]
	}
	_ = sink
}

// Reference: the eigenprojection formula for ∂E/∂C (Miehe, Apel & Lambrecht
// 2002; Carlson & Hoger 1986) in complex arithmetic: its real part checks
// LogStrain's ∂E/∂C, and its complex-step derivative (Squire & Trapp 1998)
// checks T:∂²E/∂C² from LogStrainCurvature, on the cases where the
// eigenvalues are distinct enough for the projections.
func TestLogStrainCurvatureComplexStep(t *testing.T) {
	const h = 1e-30
	rng := rand.New(rand.NewPCG(5, 6))
	for _, tc := range logCases() {
		if !tc.spectral {
			continue
		}
		T := Sym{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		_, D := LogStrain(tc.C)
		K := LogStrainCurvature(tc.C, T)
		var c0 [4]complex128
		for l := range c0 {
			c0[l] = complex(tc.C[l], 0)
		}
		D0 := complexDLogSpectral(c0)
		var ref [4][4]float64
		for i := 0; i < 4; i++ {
			for j := 0; j < 4; j++ {
				ref[i][j] = real(D0[i][j])
			}
		}
		scaleD := maxAbs4(ref)
		for i := 0; i < 4; i++ {
			for j := 0; j < 4; j++ {
				if math.Abs(D[i][j]-ref[i][j]) > 1e-10*scaleD {
					t.Errorf("%s: dE[%d]/dC[%d] = %.12g, projection formula %.12g", tc.name, i, j, D[i][j], ref[i][j])
				}
			}
		}
		var refK [4][4]float64
		for k := 0; k < 4; k++ {
			c := c0
			c[k] += complex(0, h)
			Dk := complexDLogSpectral(c)
			for j := 0; j < 4; j++ {
				var v complex128
				for i := 0; i < 4; i++ {
					v += complex(symWeight[i]*T[i], 0) * Dk[i][j]
				}
				refK[j][k] = imag(v) / h
			}
		}
		scale := maxAbs4(refK)
		for j := 0; j < 4; j++ {
			for k := 0; k < 4; k++ {
				if math.Abs(K[j][k]-refK[j][k]) > 1e-8*scale {
					t.Errorf("%s: K[%d][%d] = %.12g, complex step of T:dE/dC %.12g", tc.name, j, k, K[j][k], refK[j][k])
				}
			}
		}
	}
}
