package solver

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
// and the last increment strained it. Its rate is that increment's
// V per unit pseudo-time, so the pseudo-time goes on at the pace it had.
func (s *Solver) zoneSwitch() error {
	if !(s.Opt.ProcessZone > 0) || s.pending != nil || (s.ctl != nil && s.ctl.zone) {
		return nil
	}
	if _, _, _, n := s.P.ProcessZone(); n == 0 || !(s.zoneLast > 0) || !(s.zoneLastDt > 0) {
		return nil
	}
	// the last increment, scaled, is still the best start of the next
	dtPrev := s.dtPrev
	if err := s.SetControl(&Control{Rate: s.zoneLast / s.zoneLastDt, zone: true}, s.Time()); err != nil {
		return err
	}
	s.dtPrev = dtPrev
	return nil
}

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
