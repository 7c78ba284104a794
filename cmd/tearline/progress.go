package main

import (
	"fmt"
	"math"

	"tearline/solver/fem"
)

// progressWindow is the number of recent steps the time to go is taken
// over: recent enough to follow a run that slows down as the crack grows,
// long enough to smooth one slow step.
const progressWindow = 5

// timeToGo estimates the wall time left to the stop criterion that comes
// first: stop.da at the recent rate of Δa per wall second (once the crack
// grows), stop.t at the recent rate of t. It returns the seconds and the
// criterion's key, or ok false while no rate is known.
func timeToGo(rows []historyRow, stop stopSection) (secs float64, key string, ok bool) {
	n := len(rows)
	if n < 2 {
		return 0, "", false
	}
	first, last := rows[max(0, n-1-progressWindow)], rows[n-1]
	wall := last.Wall - first.Wall
	if !(wall > 0) {
		return 0, "", false
	}
	best := math.Inf(1)
	try := func(target, now, before float64, name string) {
		rate := (now - before) / wall
		if rate > 0 && finite(now) && finite(before) {
			if s := math.Max(0, target-now) / rate; s < best {
				best, key = s, name
			}
		}
	}
	if stop.Da > 0 {
		try(stop.Da, last.Da, first.Da, "stop.da")
	}
	try(stop.T, last.T, first.T, "stop.t")
	return best, key, !math.IsInf(best, 1)
}

// duration writes seconds the way a progress line reads them.
func duration(s float64) string {
	switch {
	case s < 120:
		return fmt.Sprintf("%.0f s", s)
	case s < 2*3600:
		return fmt.Sprintf("%.0f min", s/60)
	}
	return fmt.Sprintf("%.1f h", s/3600)
}

// ringsInProcessZone reports whether the annulus [in, out] about tip holds
// a point of the process zone: porosity past the onset of coalescence f_c
// and not yet broken. The domain integral assumes a material that stores
// the work done on it, so a domain that holds softening material loses
// path independence (Rice 1968; Moran and Shih 1987), as happens when the
// tip jumps ahead and leaves the zone it grew through inside the rings.
func ringsInProcessZone(gp *fem.GaussPoints, tip [2]float64, in, out, fc float64) bool {
	for i := range gp.Points {
		p := &gp.Points[i]
		if p.State.Broken || p.State.F < fc {
			continue
		}
		if r := math.Hypot(p.X[0]-tip[0], p.X[1]-tip[1]); r >= in && r <= out {
			return true
		}
	}
	return false
}
