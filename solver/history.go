package solver

import "fmt"

// PreviousIncrement returns a copy of the last converged increment of the
// unknowns and its time increment (dt = 0 when there is none usable). A
// checkpoint stores it so that a resumed run extrapolates its first
// increment exactly as the uninterrupted run would have.
func (s *Solver) PreviousIncrement() (d []float64, dt float64) {
	return append([]float64(nil), s.dPrev...), s.dtPrev
}

// SetPreviousIncrement restores what PreviousIncrement returned.
func (s *Solver) SetPreviousIncrement(d []float64, dt float64) error {
	if dt == 0 {
		s.dtPrev = 0
		return nil
	}
	if len(d) != len(s.dPrev) {
		return fmt.Errorf("solver: previous increment has %d unknowns, the problem %d", len(d), len(s.dPrev))
	}
	copy(s.dPrev, d)
	s.dtPrev = dt
	return nil
}
