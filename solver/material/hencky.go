package material

import (
	"fmt"
	"math"
)

// Elastic holds isotropic elastic constants: Young's modulus and Poisson's
// ratio. In the logarithmic-strain frame they give the isotropic Hencky law
// T = λ tr(E) I + 2μ E, which coincides with linear elasticity at small strain.
type Elastic struct {
	Young   float64 // E > 0
	Poisson float64 // ν in (−1, 0.5)
}

// Validate reports whether the constants describe a stable isotropic solid.
func (e Elastic) Validate() error {
	if !(e.Young > 0) || math.IsInf(e.Young, 0) {
		return fmt.Errorf("material: Young's modulus %g must be a finite number > 0", e.Young)
	}
	if !(e.Poisson > -1 && e.Poisson < 0.5) {
		return fmt.Errorf("material: Poisson's ratio %g must lie in (-1, 0.5)", e.Poisson)
	}
	return nil
}

// Lame returns the Lamé constants λ = Eν/((1+ν)(1−2ν)) and μ = E/(2(1+ν)).
func (e Elastic) Lame() (lambda, mu float64) {
	mu = e.Young / (2 * (1 + e.Poisson))
	lambda = e.Young * e.Poisson / ((1 + e.Poisson) * (1 - 2*e.Poisson))
	return lambda, mu
}

// Stress returns the Kirchhoff stress of the Hencky law at the elastic
// logarithmic strain ee: τ = λ tr(ee) I + 2μ ee.
func (e Elastic) Stress(ee Sym) Sym {
	l, m := e.Lame()
	var t Sym
	hookeStress(l, m, ee, &t)
	return t
}

// Bulk returns the bulk modulus K = E/(3(1−2ν)).
func (e Elastic) Bulk() float64 { return e.Young / (3 * (1 - 2*e.Poisson)) }

// Hencky is the isotropic Hencky elastic model: stored energy
// ψ = μ E:E + (λ/2)(tr E)² in the logarithmic strain E (Hencky 1928,
// Z. techn. Phys. 9), stress T = ∂ψ/∂E = λ tr(E) I + 2μ E.
// It carries no plastic state and no regularisation.
type Hencky struct {
	lambda, mu float64
}

// NewHencky validates the constants and returns the model.
func NewHencky(e Elastic) (*Hencky, error) {
	if err := e.Validate(); err != nil {
		return nil, err
	}
	l, m := e.Lame()
	return &Hencky{lambda: l, mu: m}, nil
}

// Initial returns the zero state.
func (h *Hencky) Initial() State { return State{} }

// Regularisation returns zero: Hencky is a local model.
func (h *Hencky) Regularisation() (c, r float64) { return 0, 0 }

// Update computes T, ∂T/∂E and the stored energy; new is a copy of old.
func (h *Hencky) Update(in *Input, old, new *State, out *Response) error {
	*new = *old
	*out = Response{}
	hookeStress(h.lambda, h.mu, in.E, &out.T)
	hookeTangent(h.lambda, h.mu, &out.DTdE)
	out.Energy = 0.5 * out.T.Ddot(in.E)
	return nil
}

// hookeStress sets T = λ tr(E) I + 2μ E.
func hookeStress(lambda, mu float64, e Sym, t *Sym) {
	tr := lambda * e.Trace()
	t[0] = tr + 2*mu*e[0]
	t[1] = tr + 2*mu*e[1]
	t[2] = tr + 2*mu*e[2]
	t[3] = 2 * mu * e[3]
}

// hookeTangent sets D[i][j] = ∂Tᵢ/∂Eⱼ of the isotropic law (E₁₂ counted
// once, so D[3][3] = 2μ).
func hookeTangent(lambda, mu float64, d *[4][4]float64) {
	*d = [4][4]float64{}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			d[i][j] = lambda
		}
		d[i][i] += 2 * mu
	}
	d[3][3] = 2 * mu
}
