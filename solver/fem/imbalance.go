package fem

import "fmt"

// SetImbalance adds −scale·r to the residual of every later assembly (nil
// removes it). Starting from a state whose residual is r, scale = 1 puts
// that state in equilibrium; lowering scale to 0 in steps relaxes the
// out-of-balance forces gradually (after a state transfer, when one full
// Newton solve at fixed load inverts elements).
func (p *Problem) SetImbalance(r []float64, scale float64) error {
	if r == nil {
		p.imbalance, p.imbScale = nil, 0
		return nil
	}
	if len(r) != p.Dofs.N {
		return fmt.Errorf("fem: imbalance has %d entries, the problem %d unknowns", len(r), p.Dofs.N)
	}
	if p.imbalance == nil {
		p.imbalance = make([]float64, p.Dofs.N)
	}
	copy(p.imbalance, r)
	p.imbScale = scale
	return nil
}

// SetImbalanceScale changes the scale of the imbalance set by SetImbalance.
func (p *Problem) SetImbalanceScale(scale float64) { p.imbScale = scale }
