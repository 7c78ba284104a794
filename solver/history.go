package solver

import "fmt"

// Previous is the last converged increment: of the unknowns, of the
// pseudo-time (0 when there is none usable) and of the load factor.
type Previous struct {
	Du        []float64
	Dt, DLoad float64
}

// PreviousIncrement returns a copy of the last converged increment. A
// checkpoint stores it so that a resumed run extrapolates its first
// increment exactly as the uninterrupted run would have.
func (s *Solver) PreviousIncrement() Previous {
	return Previous{Du: append([]float64(nil), s.dPrev...), Dt: s.dtPrev, DLoad: s.dLamPrev}
}

// SetPreviousIncrement restores what PreviousIncrement returned.
func (s *Solver) SetPreviousIncrement(pr Previous) error {
	if pr.Dt == 0 {
		s.dtPrev = 0
		return nil
	}
	if len(pr.Du) != len(s.dPrev) {
		return fmt.Errorf("solver: previous increment has %d unknowns, the problem %d", len(pr.Du), len(s.dPrev))
	}
	copy(s.dPrev, pr.Du)
	s.dtPrev, s.dLamPrev = pr.Dt, pr.DLoad
	return nil
}
