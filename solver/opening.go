package solver

import (
	"errors"
	"fmt"
	"math"
)

// Control replaces the load factor by a linear combination of unknowns
// (a crack opening, say) as the quantity that follows the pseudo-time: the
// load factor T of the problem becomes an unknown found with the
// displacements, and each increment of pseudo-time τ prescribes
//
//	Σ Weights[i]·U[Dofs[i]] = Offset + Rate·τ.
//
// This is displacement control of a crack-opening measure (common
// practice for tearing under load control, where the response passes a
// limit or the crack runs at nearly constant load: the opening of a point
// behind the tip keeps growing with the crack). Each Newton iteration
// solves the bordered system with one factorisation of the tangent
//
//	K·x₁ = −R,  K·x₂ = −∂R/∂T,  ΔT = −(g + w·x₁)/(w·x₂),  Δu = x₁ + ΔT·x₂,
//
// g being the constraint's residual (Batoz & Dhatt 1979, displacement
// control of a single combination).
type Control struct {
	Dofs    []int
	Weights []float64
	Rate    float64 // change of the controlled value per unit pseudo-time
	Offset  float64 // controlled value at τ = 0 (SetControl sets it)
	// zone: the controlled quantity is the process zone's plastic strain
	// over the increment (dissipation-driven control, see zone.go), not
	// the combination of unknowns.
	zone bool
	// fallback: this attempt of a zone-controlled step prescribes the
	// load factor instead, T = Tₙ + loadPace·(τ − τₙ) (see
	// Solver.zoneFallback).
	fallback bool
	loadPace float64
}

// ErrHeldControl is the error of a control whose unknowns are prescribed
// (a support, a symmetry plane) or belong to no element: it cannot follow
// the load.
var ErrHeldControl = errors.New("the controlled displacement is prescribed or belongs to no element; it must be free to move")

// Value is the controlled combination at the unknowns u.
func (c *Control) Value(u []float64) float64 {
	var v float64
	for i, d := range c.Dofs {
		v += c.Weights[i] * u[d]
	}
	return v
}

// SetControl switches the solver to control c from pseudo-time tau on
// (nil switches it back to load-factor control, with τ = T). The offset is
// set so that the committed unknowns satisfy the constraint at tau; the
// previous increment is forgotten.
func (s *Solver) SetControl(c *Control, tau float64) error {
	s.pending = nil
	if c == nil {
		s.ctl = nil
		return nil
	}
	if !c.zone {
		if err := s.checkControl(c); err != nil {
			return err
		}
	}
	p := s.P
	if err := p.TrackLoadRate(); err != nil {
		return err
	}
	cc := *c
	cc.Dofs = append([]int(nil), c.Dofs...)
	cc.Weights = append([]float64(nil), c.Weights...)
	cc.Offset = cc.Value(p.Committed) - cc.Rate*tau
	s.ctl = &cc
	s.tauC = tau
	s.dtPrev = 0
	if s.x2 == nil {
		s.x2 = make([]float64, p.Dofs.N)
	}
	return nil
}

// checkControl reports what makes c unusable on the solver's problem.
func (s *Solver) checkControl(c *Control) error {
	p := s.P
	if len(c.Dofs) == 0 || len(c.Dofs) != len(c.Weights) {
		return fmt.Errorf("solver: control has %d unknowns and %d weights; need as many, at least one", len(c.Dofs), len(c.Weights))
	}
	if !(c.Rate != 0) || math.IsInf(c.Rate, 0) {
		return fmt.Errorf("solver: control rate %g must be finite and non-zero", c.Rate)
	}
	for i, d := range c.Dofs {
		if d < 0 || d >= p.Dofs.N {
			return fmt.Errorf("solver: control unknown %d outside 0…%d", d, p.Dofs.N-1)
		}
		if p.Constrained(d) {
			return fmt.Errorf("solver: control unknown %d (node %d): %w", d, p.Dofs.NodeOf[d], ErrHeldControl)
		}
		if w := c.Weights[i]; w == 0 || math.IsNaN(w) || math.IsInf(w, 0) {
			return fmt.Errorf("solver: control weight %d is %g; must be finite and non-zero", i, w)
		}
	}
	return nil
}

// Controlled returns the control in use (nil under load-factor control).
func (s *Solver) Controlled() *Control { return s.ctl }

// Time is the committed pseudo-time: τ under a Control (or one waiting to
// be anchored after a Rebind), else the problem's committed load factor.
func (s *Solver) Time() float64 {
	if s.ctl != nil || s.pending != nil {
		return s.tauC
	}
	return s.P.TCommitted
}

// SetTime sets the committed pseudo-time τ of a controlled run (resume);
// the constraint's offset is kept.
func (s *Solver) SetTime(tau float64) { s.tauC = tau }

// borderedStep turns the Newton correction x₁ = s.du of the factorised
// tangent into that of the bordered system at pseudo-time t, and returns
// the load-factor correction.
func (s *Solver) borderedStep(t float64) (float64, error) {
	p, c := s.P, s.ctl
	rate := p.LoadRate()
	for i, r := range rate {
		s.u0[i] = -r
	}
	if err := s.lin.Solve(s.x2, s.u0); err != nil {
		return 0, err
	}
	g, ax1, den := s.border(t)
	if !(math.Abs(den) > 0) || math.IsInf(den, 0) {
		if c.zone {
			return 0, errors.New("the process zone's plastic strain does not respond to the load factor")
		}
		return 0, errors.New("the controlled opening does not respond to the load factor")
	}
	dT := -(g + ax1) / den
	if math.IsNaN(dT) || math.IsInf(dT, 0) {
		return 0, errors.New("load-factor correction is not finite")
	}
	for i, x := range s.x2 {
		s.du[i] += dT * x
	}
	return dT, nil
}

// gap is the constraint's residual g at pseudo-time t: the controlled
// value less its target.
func (s *Solver) gap(t float64) float64 {
	c := s.ctl
	if c.fallback {
		return s.P.T - s.P.TCommitted - c.loadPace*(t-s.tauC)
	}
	if c.zone {
		v, _, _, _ := s.P.ProcessZone()
		return v - c.Rate*(t-s.tauC)
	}
	return c.Value(s.P.U) - (c.Offset + c.Rate*t)
}

// border returns the constraint's residual g at pseudo-time t and its
// linearisation along the corrections x₁ = s.du (a·x₁) and x₂ = s.x2 plus
// the load factor's own contribution (a·x₂ + ∂g/∂T).
func (s *Solver) border(t float64) (g, ax1, ax2 float64) {
	c := s.ctl
	if c.fallback {
		return s.gap(t), 0, 1
	}
	if !c.zone {
		return s.gap(t), c.Value(s.du), c.Value(s.x2)
	}
	_, grad, dT, _ := s.P.ProcessZone()
	for i, a := range grad {
		ax1 += a * s.du[i]
		ax2 += a * s.x2[i]
	}
	return s.gap(t), ax1, ax2 + dT
}

// controlResidual is |g| of the constraint at pseudo-time t relative to the
// controlled change over the increment (0 without a control).
func (s *Solver) controlResidual(t float64) float64 {
	c := s.ctl
	if c == nil {
		return 0
	}
	g := s.gap(t)
	d := math.Abs(c.Rate * (t - s.tauC))
	if c.fallback {
		d = math.Max(math.Abs(s.P.TCommitted), 1)
	}
	if d == 0 {
		d = math.Max(math.Abs(c.Value(s.P.Committed)), 1e-300)
	}
	return math.Abs(g) / d
}
