package material

import "math"

// Plastic is implemented by models whose stress is bounded by a yield
// surface σ*(T) ≤ A. Its methods let a caller bring a state the model did
// not integrate itself — one mapped from another mesh — back into the
// elastic domain before the first update, which a return mapping from a
// trial stress far outside the surface may not survive.
type Plastic interface {
	Model
	// FlowStress returns the flow stress A at matrix plastic strain p with
	// the non-local ā and the multiplier λ at the point (a local model
	// ignores them).
	FlowStress(p, abar, lambda float64) float64
	// LocalFlowStress returns the hardening law's flow stress R(p), the
	// flow stress without the gradient terms.
	LocalFlowStress(p float64) float64
	// ScaleToYield scales the elastic strain E − Eᵖ of s back onto the
	// surface σ* = flow when its stress lies outside, keeping the total
	// strain E (Eᵖ takes up the difference). It reports whether s changed.
	ScaleToYield(s *State, E Sym, flow float64) (bool, error)
}

// LocalFlowStress returns R(p) of the hardening law.
func (m *GTN) LocalFlowStress(p float64) float64 {
	r, _ := m.par.Hardening.Flow(p)
	return r
}

// ScaleToYield scales the elastic strain Eᵉ = E − Eᵖ of s to κEᵉ with
// σ*(T(κEᵉ)) = max(flow, 10⁻³σ₀) when σ*(T(Eᵉ)) exceeds it, keeping E:
// Eᵖ = E − κEᵉ. The elasticity is linear in log space and σ* is
// homogeneous of degree one in the stress (Gurson 1977, J. Eng. Mater.
// Technol. 99, with Tvergaard's q₁, q₂, 1981), so κ = flow/σ* puts the
// stress on the surface exactly, along the same direction. The floor keeps
// κ > 0 where the flow stress vanishes. A converged state's stress lies on or
// inside the surface, but a least-squares fit of a transferred state next
// to a steep gradient (crack faces left by removed elements) can put it
// far outside, where the return mapping fails. The caller applies it only
// to points whose update fails: the projected state is the better estimate
// everywhere else.
func (m *GTN) ScaleToYield(s *State, E Sym, flow float64) (bool, error) {
	var ee Sym
	for k := 0; k < 4; k++ {
		ee[k] = E[k] - s.Ep[k]
	}
	seff, err := m.EffectiveStress(m.par.Elastic.Stress(ee), s.F)
	if err != nil {
		return false, err
	}
	r := math.Max(flow, 1e-3*m.sigma0)
	if !(seff > r) {
		return false, nil
	}
	scale := r / seff
	for k := 0; k < 4; k++ {
		s.Ep[k] = E[k] - scale*ee[k]
	}
	return true, nil
}

var _ Plastic = (*GTN)(nil)
