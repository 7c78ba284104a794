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

// zoneHold turns the next attempt of a zone-controlled step that has
// failed zoneHoldAfter times into one that holds the load factor. An
// element giving up its force (fem.Options.ReleaseSteps) changes the
// equilibrium by a finite amount each converged step however small the
// increment, and the zone may have to strain by more than the increment
// asks to take it up, so no cut-back converges; at the committed load the
// body redistributes it. The increment of pseudo-time is taken all the
// same (zone.go).
func (s *Solver) zoneHold(cuts int) bool {
	c := s.ctl
	if c == nil || !c.zone || cuts != zoneHoldAfter {
		return false
	}
	c.hold = true
	return true
}

// zoneHoldAfter is the number of failed attempts of a zone-controlled
// step after which one attempt holds the load factor.
const zoneHoldAfter = 2

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
