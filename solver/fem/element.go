package fem

import (
	"fmt"
	"math"

	"tearline/solver/material"
)

// The element: a 6-node triangle in total Lagrangian form with the
// logarithmic strain E = ½ ln C, C = FᵀF (Miehe, Apel & Lambrecht 2002,
// CMAME 191), and optional linear corner fields.
//
// Mixed u–θ–P (Simo, Taylor & Pister 1985, CMAME 51, in log-strain form):
// the material sees Ẽ = E + ((θ − tr E)/3) I and returns T̃; the stress
// conjugate to E is T_E = dev T̃ + P I. With the generalised strains
// ε = (E₁₁, E₂₂, E₃₃, E₁₂, θ, P, ā, ∂ā/∂X₁, ∂ā/∂X₂, λ) the weak form is
//
//	R = ∫ σ(ε) · ∂ε/∂q dV,
//	σ = (T_E (tensor shear weighted twice), tr T̃/3 − P, tr E − θ,
//	     −(λ + r(p − ā)), c ∇ā, p − ā),
//
// i.e. δu: ∫ S:½δC, δθ: ∫ (tr T̃/3 − P) δθ, δP: ∫ (tr E − θ) δP, and the
// regularisation of Forest 2009 (J. Eng. Mech. 135) / Peerlings et al. 1996
// (IJNME 39) with penalty r: δā: ∫ c∇ā·∇δā − (λ + r(p − ā)) δā,
// δλ: ∫ (p − ā) δλ. The tangent is the exact derivative of this residual:
// K = ∫ Bᵀ (∂σ/∂ε) B dV + the geometric term of E(u) (curvature of the log
// map and of C(u)); it is nonsymmetric when the material tangent is.
//
// Plane strain: F₃₃ = 1. Axisymmetry: F₃₃ = 1 + u_r/R and dV = 2πR dA; the
// element is only evaluated at interior Gauss points, where R > 0, so nodes
// on the axis need no special treatment beyond u_r = 0 (fixed by NewProblem).

// worker holds the per-goroutine scratch of the element routine and the
// assembly; nothing in the Newton loop allocates.
type worker struct {
	gd   [maxND]int // global unknowns of the element
	ke   [maxND][maxND]float64
	re   [maxND]float64
	b    [nEps][maxND]float64 // ∂ε/∂q
	db   [nEps][maxND]float64 // (∂σ/∂ε)·B
	d    [nEps][nEps]float64
	sig  [nEps]float64
	mag  [nEps]float64
	bc   [4][12]float64 // ∂C/∂u
	kcb  [4][12]float64
	in   material.Input
	resp material.Response
	// per-worker partial sums and the first error
	scale [NumFields]float64
	err   error
	// process-zone sums of the element (Problem.TrackProcessZone)
	pzGrad  [maxND]float64
	pzValue float64
	pos     [6][6]int     // row offsets of node pairs (assembly)
	colOff  [6][maxND]int // column offsets of the element's unknowns in the rows of each node
}

// ElementError reports a failure at a Gauss point: det F ≤ 0, a non-finite
// value, or a material integration error (wrapped).
type ElementError struct {
	Elem, Point int
	Reason      string
	Err         error
	Inverted    bool // det F ≤ 0 at the point
}

func (e *ElementError) Error() string {
	if e.Err != nil {
		return fmt.Sprintf("element %d point %d: %s: %v", e.Elem, e.Point, e.Reason, e.Err)
	}
	return fmt.Sprintf("element %d point %d: %s", e.Elem, e.Point, e.Reason)
}

func (e *ElementError) Unwrap() error { return e.Err }

var delta = [4]float64{1, 1, 1, 0}
var wSym = [4]float64{1, 1, 1, 2}

// rowRange returns the generalised-strain rows that local unknown a feeds.
func (p *Problem) rowRange(a int) (int, int) {
	switch p.locFld[a] {
	case Ux, Uy:
		return 0, 4
	case Theta:
		return rowTh, rowTh + 1
	case Pressure:
		return rowP, rowP + 1
	case Abar:
		return rowA, rowA + 3
	}
	return rowLam, rowLam + 1
}

// element computes the residual w.re and, if tangent, the tangent w.ke of
// element e at the unknowns u, integrating the material from the committed
// state into the new state; it records F and P at each point.
func (p *Problem) element(e int, u []float64, w *worker, tangent bool) error {
	m := p.Mesh
	tri := &m.Tri[e]
	nd := p.nd
	for a := 0; a < nd; a++ {
		w.gd[a] = p.Dofs.Start[tri[p.locN[a]]] + int(p.locOff[a])
		w.re[a] = 0
	}
	if tangent {
		for a := 0; a < nd; a++ {
			row := w.ke[a][:nd]
			for b := range row {
				row[b] = 0
			}
		}
	}
	zone := p.pz != nil && tangent
	if zone {
		w.pzGrad, w.pzValue = [maxND]float64{}, 0
	}
	var xe, ue [6][2]float64
	for k := 0; k < 6; k++ {
		xe[k] = m.X[tri[k]]
		s := p.Dofs.Start[tri[k]]
		ue[k] = [2]float64{u[s], u[s+1]}
	}
	var fv [NumFields][3]float64 // corner values of the linear fields
	for a := 12; a < nd; a++ {
		fv[p.locFld[a]][p.locN[a]] = u[w.gd[a]]
	}
	axi := p.Opt.Kinematics == Axisymmetric
	mixed, reg := p.mixed, p.reg
	rows := p.rows

	for g := 0; g < perElem; g++ {
		l := p.rule.L[g]
		N := ShapeP2(l)
		dxi, deta := ShapeP2Deriv(l)
		var xx, xe1, ye1, xe2, ye2 float64 // x_ξ, y_ξ, x_η, y_η
		for k := 0; k < 6; k++ {
			xx += N[k] * xe[k][0]
			xe1 += dxi[k] * xe[k][0]
			ye1 += dxi[k] * xe[k][1]
			xe2 += deta[k] * xe[k][0]
			ye2 += deta[k] * xe[k][1]
		}
		detJ := xe1*ye2 - xe2*ye1
		if !(detJ > 0) {
			return &ElementError{Elem: e, Point: g, Reason: fmt.Sprintf("reference Jacobian %g ≤ 0 (inverted or degenerate curved triangle)", detJ)}
		}
		var dN [6][2]float64
		for k := 0; k < 6; k++ {
			dN[k][0] = (ye2*dxi[k] - ye1*deta[k]) / detJ
			dN[k][1] = (-xe2*dxi[k] + xe1*deta[k]) / detJ
		}
		// gradients of the area coordinates (linear fields)
		dL := [3][2]float64{{ye2 / detJ, -xe2 / detJ}, {-ye1 / detJ, xe1 / detJ}}
		dL[2] = [2]float64{-dL[0][0] - dL[1][0], -dL[0][1] - dL[1][1]}
		dV := 0.5 * detJ * p.rule.W[g]
		if axi {
			dV *= 2 * math.Pi * xx
		}

		// deformation gradient
		F11, F12, F21, F22, F33 := 1.0, 0.0, 0.0, 1.0, 1.0
		var ur float64
		for k := 0; k < 6; k++ {
			F11 += ue[k][0] * dN[k][0]
			F12 += ue[k][0] * dN[k][1]
			F21 += ue[k][1] * dN[k][0]
			F22 += ue[k][1] * dN[k][1]
			ur += ue[k][0] * N[k]
		}
		if axi {
			F33 = 1 + ur/xx
		}
		J := (F11*F22 - F12*F21) * F33
		if !(J > 0) {
			return &ElementError{Elem: e, Point: g, Reason: fmt.Sprintf("det F = %g ≤ 0", J), Inverted: true}
		}
		C := material.Sym{F11*F11 + F21*F21, F12*F12 + F22*F22, F33 * F33, F11*F12 + F21*F22}
		E, dEdC := material.LogStrain(C)

		// ∂C/∂u (rows 11, 22, 33, 12)
		for k := 0; k < 6; k++ {
			a0, a1 := 2*k, 2*k+1
			w.bc[0][a0] = 2 * F11 * dN[k][0]
			w.bc[1][a0] = 2 * F12 * dN[k][1]
			w.bc[3][a0] = F11*dN[k][1] + F12*dN[k][0]
			w.bc[0][a1] = 2 * F21 * dN[k][0]
			w.bc[1][a1] = 2 * F22 * dN[k][1]
			w.bc[3][a1] = F21*dN[k][1] + F22*dN[k][0]
			w.bc[2][a1] = 0
			if axi {
				w.bc[2][a0] = 2 * F33 * N[k] / xx
			} else {
				w.bc[2][a0] = 0
			}
		}
		// B rows of E: ∂E/∂u = dEdC · ∂C/∂u
		for i := 0; i < 4; i++ {
			for a := 0; a < 12; a++ {
				w.b[i][a] = dEdC[i][0]*w.bc[0][a] + dEdC[i][1]*w.bc[1][a] + dEdC[i][2]*w.bc[2][a] + dEdC[i][3]*w.bc[3][a]
			}
		}
		// rows of the linear fields
		var th, pr, ab, lam, gab0, gab1 float64
		for a := 12; a < nd; a++ {
			k := p.locN[a]
			switch p.locFld[a] {
			case Theta:
				w.b[rowTh][a] = l[k]
				th += l[k] * fv[Theta][k]
			case Pressure:
				w.b[rowP][a] = l[k]
				pr += l[k] * fv[Pressure][k]
			case Abar:
				w.b[rowA][a] = l[k]
				w.b[rowA+1][a] = dL[k][0]
				w.b[rowA+2][a] = dL[k][1]
				ab += l[k] * fv[Abar][k]
				gab0 += dL[k][0] * fv[Abar][k]
				gab1 += dL[k][1] * fv[Abar][k]
			case Lambda:
				w.b[rowLam][a] = l[k]
				lam += l[k] * fv[Lambda][k]
			}
		}

		// material input
		w.in.E = E
		trE := E[0] + E[1] + E[2]
		if mixed {
			s := (th - trE) / 3
			w.in.E[0] += s
			w.in.E[1] += s
			w.in.E[2] += s
		}
		w.in.Abar, w.in.Lambda = ab, lam
		if err := p.Model.Update(&w.in, &p.oldState[e][g], &p.newState[e][g], &w.resp); err != nil {
			return &ElementError{Elem: e, Point: g, Reason: "material update failed", Err: err}
		}
		rs := &w.resp
		Tt := rs.T
		A := &rs.DTdE

		// generalised stresses σ and their derivatives D = ∂σ/∂ε
		var TE material.Sym
		var dTE [4][4]float64
		var dTEth, dTEab, dTElam, pE [4]float64
		var pth float64
		if mixed {
			trT := Tt[0] + Tt[1] + Tt[2]
			for i := 0; i < 4; i++ {
				TE[i] = Tt[i] - delta[i]*trT/3 + pr*delta[i]
			}
			// AQ = A·Q, Q = I − δδᵀ/3
			var AQ [4][4]float64
			var Ad [4]float64 // A·δ/3
			for i := 0; i < 4; i++ {
				s := (A[i][0] + A[i][1] + A[i][2]) / 3
				for j := 0; j < 4; j++ {
					AQ[i][j] = A[i][j] - s*delta[j]
				}
				Ad[i] = s
			}
			// Q·AQ and Q·Ad, and the θ row
			var colTr [4]float64
			var adTr float64
			for j := 0; j < 4; j++ {
				colTr[j] = (AQ[0][j] + AQ[1][j] + AQ[2][j]) / 3
			}
			adTr = (Ad[0] + Ad[1] + Ad[2]) / 3
			abTr := (rs.DTdAbar[0] + rs.DTdAbar[1] + rs.DTdAbar[2]) / 3
			lmTr := (rs.DTdLambda[0] + rs.DTdLambda[1] + rs.DTdLambda[2]) / 3
			for i := 0; i < 4; i++ {
				for j := 0; j < 4; j++ {
					dTE[i][j] = AQ[i][j] - delta[i]*colTr[j]
				}
				dTEth[i] = Ad[i] - delta[i]*adTr
				dTEab[i] = rs.DTdAbar[i] - delta[i]*abTr
				dTElam[i] = rs.DTdLambda[i] - delta[i]*lmTr
			}
			w.sig[rowTh] = trT/3 - pr
			w.sig[rowP] = trE - th
			d := &w.d
			for j := 0; j < 4; j++ {
				d[rowTh][j] = colTr[j]
				d[rowP][j] = delta[j]
			}
			d[rowTh][rowTh] = adTr
			d[rowTh][rowP] = -1
			d[rowTh][rowA] = abTr
			d[rowTh][rowLam] = lmTr
			d[rowP][rowTh] = -1
			d[rowP][rowP] = 0
			for i := 0; i < 4; i++ {
				d[i][rowP] = wSym[i] * delta[i]
				d[i][rowTh] = wSym[i] * dTEth[i]
			}
			for j := 0; j < 4; j++ {
				pE[j] = rs.DPdE[j] - delta[j]*(rs.DPdE[0]+rs.DPdE[1]+rs.DPdE[2])/3
			}
			pth = (rs.DPdE[0] + rs.DPdE[1] + rs.DPdE[2]) / 3
		} else {
			TE = Tt
			dTE = *A
			dTEab = rs.DTdAbar
			dTElam = rs.DTdLambda
			pE = rs.DPdE
		}
		for i := 0; i < 4; i++ {
			w.sig[i] = wSym[i] * TE[i]
			for j := 0; j < 4; j++ {
				w.d[i][j] = wSym[i] * dTE[i][j]
			}
			w.d[i][rowA] = wSym[i] * dTEab[i]
			w.d[i][rowLam] = wSym[i] * dTElam[i]
		}
		if reg {
			c, r := p.c, p.r
			pp := rs.P
			w.sig[rowA] = -(lam + r*(pp-ab))
			w.sig[rowA+1] = c * gab0
			w.sig[rowA+2] = c * gab1
			w.sig[rowLam] = pp - ab
			d := &w.d
			for j := 0; j < 4; j++ {
				d[rowA][j] = -r * pE[j]
				d[rowLam][j] = pE[j]
				d[rowA+1][j], d[rowA+2][j] = 0, 0
			}
			d[rowA][rowTh] = -r * pth
			d[rowA][rowP] = 0
			d[rowA][rowA] = r * (1 - rs.DPdAbar)
			d[rowA][rowA+1], d[rowA][rowA+2] = 0, 0
			d[rowA][rowLam] = -1 - r*rs.DPdLambda
			d[rowA+1][rowA+1], d[rowA+2][rowA+2] = c, c
			d[rowA+1][rowA+2], d[rowA+2][rowA+1] = 0, 0
			for _, k := range [4]int{rowTh, rowP, rowA, rowLam} {
				d[rowA+1][k], d[rowA+2][k] = 0, 0
			}
			d[rowLam][rowTh] = pth
			d[rowLam][rowP] = 0
			d[rowLam][rowA] = rs.DPdAbar - 1
			d[rowLam][rowA+1], d[rowLam][rowA+2] = 0, 0
			d[rowLam][rowLam] = rs.DPdLambda
		}
		for _, v := range w.sig {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return &ElementError{Elem: e, Point: g, Reason: "non-finite stress"}
			}
		}

		// stresses for output: S = 2 T_E:∂E/∂C, P = F S
		S := material.SecondPK(TE, dEdC)
		i := e*perElem + g
		p.pendF[i] = [5]float64{F11, F12, F21, F22, F33}
		p.pendP[i] = [5]float64{F11*S[0] + F12*S[3], F11*S[3] + F12*S[1], F21*S[0] + F22*S[3], F21*S[3] + F22*S[1], F33 * S[2]}

		// magnitudes of the terms that balance in each equation, for the
		// per-field force scales (the sum of absolute values before
		// cancellation)
		for i := 0; i < 4; i++ {
			w.mag[i] = math.Abs(w.sig[i])
		}
		if mixed {
			w.mag[rowTh] = math.Abs(Tt[0]+Tt[1]+Tt[2])/3 + math.Abs(pr)
			w.mag[rowP] = math.Abs(trE) + math.Abs(th)
		}
		if reg {
			w.mag[rowA] = math.Abs(lam) + p.r*(math.Abs(rs.P)+math.Abs(ab))
			w.mag[rowA+1], w.mag[rowA+2] = math.Abs(w.sig[rowA+1]), math.Abs(w.sig[rowA+2])
			w.mag[rowLam] = math.Abs(rs.P) + math.Abs(ab)
		}
		// residual
		for a := 0; a < nd; a++ {
			lo, hi := p.rowRange(a)
			var v, s float64
			for r := lo; r < hi; r++ {
				v += w.sig[r] * w.b[r][a]
				s += w.mag[r] * math.Abs(w.b[r][a])
			}
			w.re[a] += v * dV
			w.scale[p.locFld[a]] += s * dV
		}
		if !tangent {
			continue
		}
		if zone && p.pz.in[i] {
			p.processZonePoint(e, g, w, pE, pth, dV)
		}
		// K = ∫ Bᵀ D B dV + geometric part. The displacement block is formed
		// in C-space: K_uu = ∂C/∂uᵀ [dEdCᵀ D_EE dEdC + T_E:∂²E/∂C²] ∂C/∂u
		// + S:∂²C/∂u²; the blocks that involve a linear field use B.
		Kc := material.LogStrainCurvature(C, TE)
		var dc, tmp [4][4]float64
		for i := 0; i < 4; i++ {
			for k := 0; k < 4; k++ {
				tmp[i][k] = w.d[i][0]*dEdC[0][k] + w.d[i][1]*dEdC[1][k] + w.d[i][2]*dEdC[2][k] + w.d[i][3]*dEdC[3][k]
			}
		}
		for j := 0; j < 4; j++ {
			for k := 0; k < 4; k++ {
				dc[j][k] = (Kc[j][k] + dEdC[0][j]*tmp[0][k] + dEdC[1][j]*tmp[1][k] + dEdC[2][j]*tmp[2][k] + dEdC[3][j]*tmp[3][k]) * dV
			}
		}
		for j := 0; j < 4; j++ {
			for b := 0; b < 12; b++ {
				v := dc[j][0]*w.bc[0][b] + dc[j][1]*w.bc[1][b] + dc[j][3]*w.bc[3][b]
				if axi {
					v += dc[j][2] * w.bc[2][b]
				}
				w.kcb[j][b] = v
			}
		}
		for a := 0; a < 12; a++ {
			b0, b1, b2, b3 := w.bc[0][a], w.bc[1][a], w.bc[2][a], w.bc[3][a]
			row := &w.ke[a]
			k0, k1, k2, k3 := &w.kcb[0], &w.kcb[1], &w.kcb[2], &w.kcb[3]
			if axi {
				for b := 0; b < 12; b++ {
					row[b] += b0*k0[b] + b1*k1[b] + b2*k2[b] + b3*k3[b]
				}
			} else {
				for b := 0; b < 12; b++ {
					row[b] += b0*k0[b] + b1*k1[b] + b3*k3[b]
				}
			}
		}
		for ka := 0; ka < 6; ka++ {
			for kb := 0; kb < 6; kb++ {
				gs := (S[0]*dN[ka][0]*dN[kb][0] + S[1]*dN[ka][1]*dN[kb][1] +
					S[3]*(dN[ka][0]*dN[kb][1]+dN[ka][1]*dN[kb][0])) * dV
				w.ke[2*ka][2*kb] += gs
				w.ke[2*ka+1][2*kb+1] += gs
				if axi {
					w.ke[2*ka][2*kb] += S[2] * N[ka] * N[kb] / (xx * xx) * dV
				}
			}
		}
		if nd == 12 {
			continue
		}
		// blocks with the linear fields: DB = D·B for the columns needed
		for b := 0; b < nd; b++ {
			lo, hi := p.rowRange(b)
			for _, r := range rows {
				if b < 12 && r < 4 {
					continue // displacement block done above
				}
				var v float64
				for k := lo; k < hi; k++ {
					v += w.d[r][k] * w.b[k][b]
				}
				w.db[r][b] = v * dV
			}
		}
		for a := 0; a < nd; a++ {
			lo, hi := p.rowRange(a)
			row := &w.ke[a]
			b0 := 0
			if a < 12 {
				b0 = 12
			}
			for r := lo; r < hi; r++ {
				bra := w.b[r][a]
				if bra == 0 {
					continue
				}
				dbr := &w.db[r]
				for b := b0; b < nd; b++ {
					row[b] += bra * dbr[b]
				}
			}
		}
	}
	return nil
}
