package solver

import "math"

// The dissipation-driven control. Once the process zone exists — points
// whose porosity has passed Options.ProcessZone (the onset of
// coalescence) — each increment prescribes how much the zone's matrix
// plastic strain grows, V = Σ (p − pₙ)·dV over the zone (fem.Problem.
// ProcessZone), and the load factor is solved for with the displacements;
// it falls where the structure snaps back. The plastic work the zone
// dissipates is V times its flow stress, so this is a dissipation-based
// path following in the sense of Gutiérrez 2004 (Commun. Numer. Meth.
// Engng 20) and Verhoosel, Remmers & Gutiérrez 2009 (IJNME 77), with the
// dissipation measured where it happens, as in the local constraint of
// Lorentz & Badel 2004 (IJNME 60). A tearing element that runs away at
// fixed load — the porosity of a point jumping by the same amount however
// small the load increment — is followed at the rate the increment
// prescribes instead of failing Newton.

// zoneSwitch puts the dissipation-driven control in use when
// Options.ProcessZone asks for it, the committed state has a process zone
// and the last increment strained it while the load rose (zonePace).
func (s *Solver) zoneSwitch() error {
	if !(s.Opt.ProcessZone > 0) || s.pending != nil || (s.ctl != nil && s.ctl.zone) {
		return nil
	}
	if _, _, _, n := s.P.ProcessZone(); n == 0 || !(s.zoneLast > 0) || !(s.zoneLoad > 0) {
		return nil
	}
	// the last increment, scaled, is still the best start of the next
	dtPrev := s.dtPrev
	if err := s.SetControl(&Control{Rate: s.zoneLast / s.zoneLoad, zone: true}, s.Time()); err != nil {
		return err
	}
	s.dtPrev = dtPrev
	return nil
}

// zonePace re-sets the rate of the dissipation-driven control in use to
// the zone's plastic strain per unit load factor over the increment just
// converged, when the load rose in it: an increment of pseudo-time then
// asks for about as much straining as the same increment of load would
// give, and Options.DtMax bounds the steps as under load control. Near a
// load maximum that ratio grows without bound, and the straining asked of
// the next increment would jump with it: the rate grows by at most
// Options.Grow per increment. Where the load falls (a snap-back) the rate
// stays.
func (s *Solver) zonePace() {
	c := s.ctl
	if c == nil || !c.zone || !(s.zoneLast > 0) || !(s.zoneLoad > 0) {
		return
	}
	c.Rate = math.Min(s.zoneLast/s.zoneLoad, s.Opt.Grow*c.Rate)
}

// zoneFallback changes how the attempts of a zone-controlled step go on
// once zoneFallbackAfter of them have failed: the next attempt holds the
// load factor at its committed value if an element is releasing its force,
// and from then on each increment
// size is tried twice, as a load step (the load factor rising with the
// pseudo-time, as under load control) and under the zone constraint,
// before it is cut back. An element giving up its force
// (fem.Options.ReleaseSteps) changes the equilibrium by a finite amount
// each converged step however small the increment, and the zone may have
// to strain by more than the increment asks to take it up, so that no
// cut-back of the zone constraint converges, while a hold or a small load
// step lets the body redistribute it; through a snap-back only the zone
// constraint passes. It reports whether to retry the same increment.
func (s *Solver) zoneFallback(cuts int) bool {
	c := s.ctl
	if c == nil || !c.zone || cuts < zoneFallbackAfter {
		return false
	}
	switch k := cuts - zoneFallbackAfter; {
	case k == 0 && s.P.Releasing():
		// (with no release under way the committed state is already in
		// equilibrium at its load: a hold would be a step that does nothing)
		c.fallback, c.loadPace = true, 0
		return true
	case k == 0 || k%2 == 1:
		c.fallback, c.loadPace = true, 1
		return true
	}
	c.fallback = false
	return false
}

// zoneFallbackAfter is the number of failed attempts of a zone-controlled
// step after which the load factor is prescribed instead.
const zoneFallbackAfter = 2

// ZoneControlled reports whether the dissipation-driven control is in use.
func (s *Solver) ZoneControlled() bool {
	return (s.ctl != nil && s.ctl.zone) || (s.pending != nil && s.pending.zone)
}

// trackZone makes the problem measure its process zone when the options
// ask for the dissipation-driven control.
func (s *Solver) trackZone() error {
	if !(s.Opt.ProcessZone > 0) {
		return nil
	}
	return s.P.TrackProcessZone(s.Opt.ProcessZone)
}
