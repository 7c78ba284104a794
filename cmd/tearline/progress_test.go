package main

import (
	"bytes"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// TestTimeToGo: the time left toward the first stop criterion at the
// recent rate (arithmetic: the distance left over the rate of the last
// progressWindow steps).
func TestTimeToGo(t *testing.T) {
	nan := math.NaN()
	steady := func(n int, dt, dda, wall float64) []historyRow {
		var rows []historyRow
		for i := 1; i <= n; i++ {
			rows = append(rows, historyRow{T: dt * float64(i), Da: dda * float64(i), Wall: wall * float64(i)})
		}
		return rows
	}
	for _, c := range []struct {
		name string
		rows []historyRow
		stop stopSection
		secs float64
		key  string
		ok   bool
	}{
		{"one step: no rate yet", steady(1, 0.1, 0, 1), stopSection{T: 1}, 0, "", false},
		{"t at 0.1 per second", steady(3, 0.1, 0, 1), stopSection{T: 1}, 7, "stop.t", true},
		{"Δa comes first", steady(4, 0.01, 0.1, 2), stopSection{T: 1, Da: 1}, 12, "stop.da", true},
		{"t comes first", steady(4, 0.1, 0.01, 2), stopSection{T: 1, Da: 1}, 12, "stop.t", true},
		{"no growth: t rules", steady(4, 0.1, 0, 2), stopSection{T: 1, Da: 1}, 12, "stop.t", true},
		{"untracked Δa", []historyRow{{T: 0.1, Da: nan, Wall: 1}, {T: 0.2, Da: nan, Wall: 2}}, stopSection{T: 1, Da: 1}, 8, "stop.t", true},
		{"recent rate only", slowStart(), stopSection{T: 1}, 2, "stop.t", true},
		{"past the end", steady(3, 0.5, 0, 1), stopSection{T: 1}, 0, "stop.t", true},
	} {
		secs, key, ok := timeToGo(c.rows, c.stop)
		if ok != c.ok || key != c.key || math.Abs(secs-c.secs) > 1e-9 {
			t.Errorf("%s: %g s to %q (%v), want %g s to %q (%v)", c.name, secs, key, ok, c.secs, c.key, c.ok)
		}
	}
}

// slowStart is a run whose first two steps took 100 s each and the next
// six 1 s each, 0.1 in t per step.
func slowStart() []historyRow {
	rows := []historyRow{{T: 0.1, Wall: 100}, {T: 0.2, Wall: 200}}
	for i := 3; i <= 8; i++ {
		rows = append(rows, historyRow{T: 0.1 * float64(i), Wall: 200 + float64(i-2)})
	}
	return rows
}

// TestRingsInProcessZone: a point past f_c and not broken inside the
// annulus flags the domain J; one outside it, below f_c or broken does
// not (the definition of the flag).
func TestRingsInProcessZone(t *testing.T) {
	const fc = 0.02
	point := func(x, y, f float64, broken bool) fem.GaussPoint {
		return fem.GaussPoint{X: [2]float64{x, y}, State: material.State{F: f, Broken: broken}}
	}
	for _, c := range []struct {
		name string
		p    fem.GaussPoint
		want bool
	}{
		{"softening point in the ring", point(-1, 0.5, 0.05, false), true},
		{"softening point inside the inner radius", point(0.2, 0, 0.05, false), false},
		{"softening point beyond the ring", point(3, 0, 0.05, false), false},
		{"intact point in the ring", point(-1, 0.5, 0.01, false), false},
		{"broken point in the ring", point(-1, 0.5, 0.3, true), false},
	} {
		gp := &fem.GaussPoints{PerElement: 1, Points: []fem.GaussPoint{point(0, 0, 0.2, false), c.p}}
		if got := ringsInProcessZone(gp, [2]float64{0, 0}, 1, 2, fc); got != c.want {
			t.Errorf("%s: %v, want %v", c.name, got, c.want)
		}
	}
}

// TestProgressLine: the progress line of a run gives Δa, J and the force
// in the case's units and the time to go toward stop.t once a rate is
// known; history.csv's J_domain_flag is 0 for an elastic body (no process
// zone), and its last column da_front is empty (no damage front).
func TestProgressLine(t *testing.T) {
	for _, c := range []struct {
		system string
		want   []string
	}{
		{"mm-N-MPa", []string{"Δa        0 mm", " N/mm  F ", "N/mm ", "to stop.t"}},
		{"m-N-Pa", []string{"Δa        0 m ", " N/m  F ", "to stop.t"}},
	} {
		dir := filepath.Join(t.TempDir(), "run")
		var stdout, stderr bytes.Buffer
		if code := dispatch([]string{"run", writeCase(t, goodElastic), "-o", dir, "--set", "units.system=" + c.system}, &stdout, &stderr); code != 0 {
			t.Fatalf("%s: exit %d: %s", c.system, code, stderr.String())
		}
		lines := strings.Split(stdout.String(), "\n")
		var steps []string
		for _, l := range lines {
			if strings.HasPrefix(l, "step ") {
				steps = append(steps, l)
			}
		}
		if len(steps) != 2 {
			t.Fatalf("%s: %d step lines, want 2: %s", c.system, len(steps), stdout.String())
		}
		if strings.Contains(steps[0], "to stop") {
			t.Errorf("%s: a time to go after one step: %s", c.system, steps[0])
		}
		for _, w := range c.want {
			if !strings.Contains(steps[1], w) {
				t.Errorf("%s: step line %q lacks %q", c.system, steps[1], w)
			}
		}
		header, rows := readCSV(t, filepath.Join(dir, "history.csv"))
		n := len(header)
		if header[n-2] != "J_domain_flag" || header[n-1] != "da_front" {
			t.Fatalf("history.csv ends with %q, want J_domain_flag, da_front", header[n-2:])
		}
		for _, r := range rows {
			if r[n-2] != "0" || r[n-1] != "" {
				t.Errorf("%s: J_domain_flag %q, da_front %q for an elastic body, want 0 and empty", c.system, r[n-2], r[n-1])
			}
		}
	}
}
