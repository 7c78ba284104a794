package solver

import "fmt"

// Previous is the last converged increment: of the unknowns, of the
// pseudo-time (0 when there is none usable) and of the load factor; and
// the state of the dissipation-driven control (zone.go): the last
// increment's zone strain and load-factor change, which decide when it
// takes over, and its rate once it has (0 before).
type Previous struct {
	Du        []float64
	Dt, DLoad float64

	ZoneStrain, ZoneLoad, ZoneRate float64
}

// PreviousIncrement returns a copy of the last converged increment. A
// checkpoint stores it so that a resumed run extrapolates its first
// increment exactly as the uninterrupted run would have.
func (s *Solver) PreviousIncrement() Previous {
	pr := Previous{Du: append([]float64(nil), s.dPrev...), Dt: s.dtPrev, DLoad: s.dLamPrev,
		ZoneStrain: s.zoneLast, ZoneLoad: s.zoneLoad}
	if c := s.ctl; c != nil && c.zone {
		pr.ZoneRate = c.Rate
	}
	return pr
}

// SetPreviousIncrement restores what PreviousIncrement returned, the
// dissipation-driven control included (at the committed pseudo-time).
func (s *Solver) SetPreviousIncrement(pr Previous) error {
	s.zoneLast, s.zoneLoad = pr.ZoneStrain, pr.ZoneLoad
	if pr.ZoneRate > 0 {
		if !(s.Opt.ProcessZone > 0) {
			return fmt.Errorf("solver: the previous increment was under the dissipation-driven control, which the options do not ask for")
		}
		if err := s.SetControl(&Control{Rate: pr.ZoneRate, zone: true}, s.Time()); err != nil {
			return err
		}
	}
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
