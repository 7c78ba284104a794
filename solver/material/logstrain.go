package material

import "math"

// Logarithmic strain E = ½ ln C of a 2D problem and its first and second
// derivatives with respect to the right Cauchy–Green tensor C (Miehe, Apel &
// Lambrecht 2002, Comput. Methods Appl. Mech. Engrg. 191, 5383–5425).
//
// C is given as a Sym: the in-plane 2×2 block (C₁₁, C₂₂, C₁₂) and C₃₃
// (plane strain: C₃₃ = 1; axisymmetry: C₃₃ = (1 + u_r/R)²). The out-of-plane
// direction is a principal direction, so E₃₃ = ½ ln C₃₃.
//
// The in-plane block is decomposed spectrally in closed form. Writing
// m = (C₁₁+C₂₂)/2 and D = C − m I (traceless, D² = q I with
// q = ((C₁₁−C₂₂)/2)² + C₁₂²), the eigenvalues are m ± √q and Sylvester's
// formula for f = ½ ln gives the spectral sum Σₐ f(λₐ) Nₐ⊗Nₐ as
//
//	E = ¼ ln(det C) I + g D,   g = (ln λ₁ − ln λ₂)/(2(λ₁−λ₂)) = h(q/m²)/(2m),
//
// with h(s) = atanh(√s)/√s = Σₖ sᵏ/(2k+1). h is analytic in s, so E and its
// derivatives are smooth functions of the components of C; the equal-
// eigenvalue limit (q → 0, where the spectral projections are undefined) is
// the series of h, and g → 1/(2m) = f′(m), the limit given by Miehe, Apel &
// Lambrecht 2002 for coalescent eigenvalues.
//
// Component conventions (see Sym): derivatives treat C₁₂ = C₂₁ as a single
// variable, so dEᵢ = Σⱼ dEdC[i][j] dCⱼ with dC₃ = dC₁₂.

// LogStrain returns E = ½ ln C and dEdC[i][j] = ∂Eᵢ/∂Cⱼ. C must be positive
// definite (det F ≠ 0); the caller checks J = det F > 0 before calling.
func LogStrain(C Sym) (E Sym, dEdC [4][4]float64) {
	var k logKernel
	k.eval(C, false)
	E = k.e
	dEdC = k.d
	return E, dEdC
}

// LogStrainCurvature returns K[j][k] = Σᵢ wᵢ Tᵢ ∂²Eᵢ/∂Cⱼ∂Cₖ = T : ∂²E/∂Cⱼ∂Cₖ
// (the Sym double contraction, weights w = 1, 1, 1, 2), with C₁₂ treated as a
// single variable as in LogStrain. It is the geometric part of the material
// tangent in C-space; see SecondPKTangent.
func LogStrainCurvature(C, T Sym) [4][4]float64 {
	var k logKernel
	k.eval(C, true)
	return k.curvature(T)
}

// SecondPK returns the second Piola–Kirchhoff stress S = 2 T : ∂E/∂C as a Sym
// of tensor components.
//
// The weight of the 12 component: the stress power is
// ½ S:Ċ = ½ Σⱼ wⱼ Sⱼ Ċⱼ (w = 1, 1, 1, 2) and also T:Ė = Σᵢ wᵢ Tᵢ Σⱼ dEdC[i][j] Ċⱼ,
// so Sⱼ = (2/wⱼ) Σᵢ wᵢ Tᵢ dEdC[i][j]: the normal components carry a factor 2,
// the shear component S₁₂ = Σᵢ wᵢ Tᵢ dEdC[i][3] carries none, because dEdC
// differentiates with respect to C₁₂ counted once while the contraction
// counts the tensor component twice. Equivalently, for a stored energy ψ(C),
// Sⱼ = (2/wⱼ) ∂ψ/∂Cⱼ, so S₁₂ = ∂ψ/∂C₁₂.
func SecondPK(T Sym, dEdC [4][4]float64) Sym {
	var S Sym
	for j := 0; j < 4; j++ {
		var v float64
		for i := 0; i < 4; i++ {
			v += symWeight[i] * T[i] * dEdC[i][j]
		}
		S[j] = 2 * v / symWeight[j]
	}
	return S
}

// SecondPKTangent returns D[j][k] = ∂Sⱼ/∂Cₖ (C₁₂ a single variable) of
// S = SecondPK(T, dEdC), given the material tangent dTdE[i][l] = ∂Tᵢ/∂Eₗ,
// dEdC from LogStrain and the curvature K from LogStrainCurvature:
//
//	∂Sⱼ/∂Cₖ = (2/wⱼ) ( Σᵢₗ wᵢ dEdC[i][j] dTdE[i][l] dEdC[l][k] + K[j][k] ),
//
// the component form of ℂ = 2 ∂S/∂C = 4 ∂E/∂C : ∂T/∂E : ∂E/∂C + 4 T : ∂²E/∂C².
func SecondPKTangent(dTdE, dEdC, K [4][4]float64) [4][4]float64 {
	// tmp[i][k] = Σₗ dTdE[i][l] dEdC[l][k]
	var tmp, D [4][4]float64
	for i := 0; i < 4; i++ {
		for k := 0; k < 4; k++ {
			var v float64
			for l := 0; l < 4; l++ {
				v += dTdE[i][l] * dEdC[l][k]
			}
			tmp[i][k] = v
		}
	}
	for j := 0; j < 4; j++ {
		for k := 0; k < 4; k++ {
			v := K[j][k]
			for i := 0; i < 4; i++ {
				v += symWeight[i] * dEdC[i][j] * tmp[i][k]
			}
			D[j][k] = 2 * v / symWeight[j]
		}
	}
	return D
}

// symWeight are the weights of the Sym double contraction.
var symWeight = [4]float64{1, 1, 1, 2}

// logKernel holds the intermediate quantities of the closed form so that the
// first and second derivatives share them. In-plane variables are numbered
// x = (C₁₁, C₂₂, C₁₂) → 0, 1, 2.
type logKernel struct {
	e    Sym
	d    [4][4]float64
	c33  float64
	d11  float64    // (C₁₁−C₂₂)/2
	c12  float64    // C₁₂
	det  float64    // det of the in-plane block
	detX [3]float64 // ∂det/∂x
	g    float64
	gX   [3]float64    // ∂g/∂x
	gXX  [3][3]float64 // ∂²g/∂x∂y (only when second derivatives are asked)
}

// sym index of the in-plane variables x = 0, 1, 2.
var inplaneIndex = [3]int{0, 1, 3}

func (k *logKernel) eval(C Sym, second bool) {
	a, b, c := C[0], C[1], C[3]
	m := 0.5 * (a + b)
	d11 := 0.5 * (a - b)
	q := d11*d11 + c*c
	det := a*b - c*c
	s := q / (m * m)
	h, h1, h2 := atanhRatio(s)

	// g(m, q) = h(s) u(m), s = q/m², u = 1/(2m).
	u := 0.5 / m
	um := -0.5 / (m * m)
	sm := -2 * q / (m * m * m)
	sq := 1 / (m * m)
	g := h * u
	gm := h1*sm*u + h*um
	gq := h1 * sq * u

	mX := [3]float64{0.5, 0.5, 0}
	qX := [3]float64{d11, -d11, 2 * c}
	detX := [3]float64{b, a, -2 * c}
	var gX [3]float64
	for j := 0; j < 3; j++ {
		gX[j] = gm*mX[j] + gq*qX[j]
	}

	k.c33 = C[2]
	k.d11, k.c12, k.det, k.detX, k.g, k.gX = d11, c, det, detX, g, gX

	phi := 0.25 * math.Log(det)
	k.e = Sym{phi + g*d11, phi - g*d11, 0.5 * math.Log(C[2]), g * c}

	d11X := [3]float64{0.5, -0.5, 0}
	c12X := [3]float64{0, 0, 1}
	k.d = [4][4]float64{}
	for j := 0; j < 3; j++ {
		phiJ := 0.25 * detX[j] / det
		col := inplaneIndex[j]
		k.d[0][col] = phiJ + gX[j]*d11 + g*d11X[j]
		k.d[1][col] = phiJ - gX[j]*d11 - g*d11X[j]
		k.d[3][col] = gX[j]*c + g*c12X[j]
	}
	k.d[2][2] = 0.5 / C[2]

	if !second {
		return
	}
	smm := 6 * q / (m * m * m * m)
	smq := -2 / (m * m * m)
	umm := 1 / (m * m * m)
	gmm := h2*sm*sm*u + h1*smm*u + 2*h1*sm*um + h*umm
	gmq := h2*sm*sq*u + h1*smq*u + h1*sq*um
	gqq := h2 * sq * sq * u
	qXX := [3][3]float64{{0.5, -0.5, 0}, {-0.5, 0.5, 0}, {0, 0, 2}}
	for j := 0; j < 3; j++ {
		for l := 0; l < 3; l++ {
			k.gXX[j][l] = gmm*mX[j]*mX[l] + gmq*(mX[j]*qX[l]+mX[l]*qX[j]) +
				gqq*qX[j]*qX[l] + gq*qXX[j][l]
		}
	}
}

// curvature returns Σᵢ wᵢ Tᵢ ∂²Eᵢ/∂Cⱼ∂Cₖ; eval(C, true) must have run.
func (k *logKernel) curvature(T Sym) [4][4]float64 {
	detXX := [3][3]float64{{0, 1, 0}, {1, 0, 0}, {0, 0, -2}}
	d11X := [3]float64{0.5, -0.5, 0}
	c12X := [3]float64{0, 0, 1}
	tSum := T[0] + T[1] // multiplies ∂²φ, φ = ¼ ln det
	tDif := T[0] - T[1] // multiplies ∂²(g d11)
	tShr := 2 * T[3]    // multiplies ∂²(g c12)
	var K [4][4]float64
	for j := 0; j < 3; j++ {
		for l := 0; l < 3; l++ {
			phiJL := 0.25 * (detXX[j][l]/k.det - k.detX[j]*k.detX[l]/(k.det*k.det))
			gd := k.gXX[j][l]*k.d11 + k.gX[j]*d11X[l] + k.gX[l]*d11X[j]
			gc := k.gXX[j][l]*k.c12 + k.gX[j]*c12X[l] + k.gX[l]*c12X[j]
			K[inplaneIndex[j]][inplaneIndex[l]] = tSum*phiJL + tDif*gd + tShr*gc
		}
	}
	K[2][2] = -T[2] * 0.5 / (k.c33 * k.c33)
	return K
}

// atanhRatio returns h(s) = atanh(√s)/√s = Σₖ sᵏ/(2k+1) and its first two
// derivatives for 0 ≤ s < 1. The closed forms h′ = (1/(1−s) − h)/(2s) and
// h″ = (1/(1−s)² − 3h′)/(2s) cancel for small s, where the series is used.
func atanhRatio(s float64) (h, h1, h2 float64) {
	if s < 0.05 {
		// Horner evaluation of the three series, 18 terms (0.05¹⁶ < 1e-20).
		for k := 17; k >= 0; k-- {
			fk := float64(k)
			h = h*s + 1/(2*fk+1)
			if k >= 1 {
				h1 = h1*s + fk/(2*fk+1)
			}
			if k >= 2 {
				h2 = h2*s + fk*(fk-1)/(2*fk+1)
			}
		}
		return h, h1, h2
	}
	x := math.Sqrt(s)
	h = math.Atanh(x) / x
	h1 = (1/(1-s) - h) / (2 * s)
	h2 = (1/((1-s)*(1-s)) - 3*h1) / (2 * s)
	return h, h1, h2
}
