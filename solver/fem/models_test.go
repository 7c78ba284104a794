package fem

import (
	"tearline/solver/material"
)

// henckyT is a test-only isotropic Hencky law in log space,
// T = λ tr E I + 2μ E (exact derivative), standing in for the material
// package's model in the element tests.
type henckyT struct {
	lam, mu float64
	c, r    float64 // regularisation returned to the element
}

func newHenckyT(E, nu float64) *henckyT {
	return &henckyT{lam: E * nu / ((1 + nu) * (1 - 2*nu)), mu: E / (2 * (1 + nu))}
}

func (h *henckyT) Initial() material.State            { return material.State{} }
func (h *henckyT) Regularisation() (float64, float64) { return h.c, h.r }
func (h *henckyT) Update(in *material.Input, old, nw *material.State, out *material.Response) error {
	*nw = *old
	E := in.E
	tr := E[0] + E[1] + E[2]
	*out = material.Response{}
	for i := 0; i < 4; i++ {
		out.T[i] = 2 * h.mu * E[i]
		out.DTdE[i][i] = 2 * h.mu
		if i < 3 {
			out.T[i] += h.lam * tr
			for j := 0; j < 3; j++ {
				out.DTdE[i][j] += h.lam
			}
		}
	}
	out.Energy = 0.5 * h.lam * tr * tr
	for i := 0; i < 4; i++ {
		out.Energy += h.mu * wSym[i] * E[i] * E[i]
	}
	return nil
}

// coupledT is a smooth synthetic law that exercises every coupling term of
// the element (nonsymmetric ∂T/∂E, ∂T/∂ā, ∂T/∂λ, p(E, ā, λ)) with exact
// derivatives, for the finite-difference tangent checks (V9):
//
//	T = λ_L tr E I + (2μ + k1 ā) E + k2 Λ I + k3 (E:E) I
//	p = k4 E:E + k5 ā tr E + k6 Λ²
type coupledT struct {
	lam, mu, k1, k2, k3, k4, k5, k6 float64
	c, r                            float64
}

func (h *coupledT) Initial() material.State            { return material.State{} }
func (h *coupledT) Regularisation() (float64, float64) { return h.c, h.r }
func (h *coupledT) Update(in *material.Input, old, nw *material.State, out *material.Response) error {
	*nw = *old
	E := in.E
	a, L := in.Abar, in.Lambda
	tr := E[0] + E[1] + E[2]
	ee := E.Ddot(E)
	*out = material.Response{}
	for i := 0; i < 4; i++ {
		out.T[i] = (2*h.mu+h.k1*a)*E[i] + delta[i]*(h.lam*tr+h.k2*L+h.k3*ee)
		out.DTdE[i][i] = 2*h.mu + h.k1*a
		for j := 0; j < 4; j++ {
			out.DTdE[i][j] += delta[i] * (h.lam*delta[j] + h.k3*2*wSym[j]*E[j])
		}
		out.DTdAbar[i] = h.k1 * E[i]
		out.DTdLambda[i] = h.k2 * delta[i]
		out.DPdE[i] = h.k4*2*wSym[i]*E[i] + h.k5*a*delta[i]
	}
	out.P = h.k4*ee + h.k5*a*tr + h.k6*L*L
	out.DPdAbar = h.k5 * tr
	out.DPdLambda = 2 * h.k6 * L
	nw.P = out.P
	return nil
}
