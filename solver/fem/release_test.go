package fem

import (
	"math/rand/v2"
	"testing"

	"tearline/solver/material"
)

// TestFlaps: a flap is an element in the assembly held by at most one edge
// next to an element that has left. Checked against a brute-force count of
// triangles sharing two vertices, on a structured mesh with random
// elements taken out; and only a damaged flap is released. (The flap rule
// is our own, recorded in DEVELOPERS.md; no outside source.)
func TestFlaps(t *testing.T) {
	m, err := Structured(6, 5, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewProblem(m, newHenckyT(200e3, 0.3), Options{ReleaseSteps: 3, FlapPorosity: 0.02}, BCs{})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for e := range p.active {
		p.active[e] = rng.Float64() > 0.35
	}
	shared := func(a, b int) bool {
		n := 0
		for _, u := range m.Tri[a][:3] {
			for _, v := range m.Tri[b][:3] {
				if u == v {
					n++
				}
			}
		}
		return n == 2
	}
	flaps := 0
	for e := range m.Tri {
		if !p.active[e] {
			continue
		}
		held, gone := 0, false
		for o := range m.Tri {
			if o != e && shared(e, o) {
				if p.active[o] {
					held++
				} else {
					gone = true
				}
			}
		}
		want := held <= 1 && gone
		if got := p.isFlap(e); got != want {
			t.Errorf("element %d: flap %v, want %v (held by %d edges, neighbour gone %v)", e, got, want, held, gone)
		}
		if want {
			flaps++
		}
	}
	if flaps == 0 {
		t.Fatal("no flap in the test mesh: the check does not probe anything")
	}

	// Release at commit: only flaps with a point at the flap porosity.
	damaged := map[int]bool{}
	for e := range m.Tri {
		for g := range p.newState[e] {
			p.newState[e][g] = material.State{F: 0.01}
		}
		if p.active[e] && p.isFlap(e) && len(damaged) < flaps/2+1 {
			damaged[e] = true
			p.newState[e][2].F = 0.03
		}
	}
	wasActive := append([]bool(nil), p.active...)
	p.Commit()
	for e := range m.Tri {
		if !wasActive[e] {
			continue
		}
		if gone := !p.active[e]; gone != damaged[e] {
			t.Errorf("element %d: released %v, want %v (damaged flap)", e, gone, damaged[e])
		}
	}
	if n := len(p.Releases()); n != len(damaged) {
		t.Errorf("%d releases listed, want %d", n, len(damaged))
	}
}

// TestReleasing: an element is releasing its force while it has counted
// fewer converged steps than Options.ReleaseSteps (the residual of the next
// step changes by its share, Release.Done), and no longer once it has.
func TestReleasing(t *testing.T) {
	m, err := Structured(2, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewProblem(m, newHenckyT(200e3, 0.3), Options{ReleaseSteps: 3}, BCs{})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		done []int
		want bool
	}{{nil, false}, {[]int{0}, true}, {[]int{2}, true}, {[]int{3}, false}, {[]int{3, 1}, true}} {
		var rs []Release
		for i, d := range tc.done {
			rs = append(rs, Release{Elem: i, Done: d})
		}
		if err := p.SetReleases(rs); err != nil {
			t.Fatal(err)
		}
		if got := p.Releasing(); got != tc.want {
			t.Errorf("releases done %v: Releasing() = %v, want %v", tc.done, got, tc.want)
		}
	}
}
