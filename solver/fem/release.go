package fem

import (
	"fmt"

	"tearline/solver/material"
)

// Element vanish. An element whose Gauss points break one by one keeps,
// until the last one breaks, a stiffness of low rank: the midside nodes of
// a crack face that only it holds are then nearly free, Newton moves them
// far, and the neighbours see trial stresses of tens of GPa. Removing the
// element at once when its first point breaks drops its whole stress on
// the neighbours in one step, which their return mapping does not survive
// either. The element-vanish technique (Tvergaard 1982, J. Mech. Phys.
// Solids 30, 399 — from memory) does both halves right: at the commit in
// which an element's first point breaks, the element leaves the assembly
// (no stiffness), and the internal nodal forces it had at that moment are
// held as forces on its nodes and scaled down linearly to zero over
// Options.ReleaseSteps converged steps.

// Release is an element giving up its force (Options.ReleaseSteps).
type Release struct {
	// Elem is the element; it has left the assembly.
	Elem int
	// Force is the internal force of its displacement unknowns (node k:
	// 2k, 2k+1, the node order of Mesh.Tri) at the commit in which it
	// failed.
	Force [12]float64
	// Done counts the converged steps since then, up to ReleaseSteps; the
	// assemblies of the next step apply (1 − (Done+1)/ReleaseSteps)·Force.
	// The element stays on the list when its force is gone, so that a
	// checkpoint restores it as out of the assembly.
	Done int
}

// Releases returns the elements that left the assembly by a release, those
// still releasing their force and those done. The slice belongs to the
// problem; SetReleases copies.
func (p *Problem) Releases() []Release { return p.release }

// SetReleases replaces the list of Releases (when a checkpoint is
// restored, after SetState). Each element leaves the assembly.
func (p *Problem) SetReleases(r []Release) error {
	n := p.Opt.ReleaseSteps
	seen := make(map[int]bool, len(r))
	for i, q := range r {
		switch {
		case q.Elem < 0 || q.Elem >= len(p.Mesh.Tri):
			return fmt.Errorf("fem: release %d: element %d is not in the mesh of %d elements", i, q.Elem, len(p.Mesh.Tri))
		case seen[q.Elem]:
			return fmt.Errorf("fem: release %d: element %d is listed twice", i, q.Elem)
		case q.Done < 0 || q.Done > n:
			return fmt.Errorf("fem: release %d (element %d): %d steps done, must be in [0, %d] (release steps)", i, q.Elem, q.Done, n)
		}
		seen[q.Elem] = true
	}
	p.release = append(p.release[:0], r...)
	for _, q := range r {
		p.active[q.Elem] = false
	}
	p.updateConstraints()
	return nil
}

// addReleaseForces adds the held forces of the releasing elements to the
// residual.
func (p *Problem) addReleaseForces() {
	n := float64(p.Opt.ReleaseSteps)
	for i := range p.release {
		q := &p.release[i]
		s := 1 - float64(q.Done+1)/n
		if s <= 0 {
			continue
		}
		tri := &p.Mesh.Tri[q.Elem]
		for k := 0; k < 6; k++ {
			d := p.Dofs.Start[tri[k]]
			p.Full[d] += s * q.Force[2*k]
			p.Full[d+1] += s * q.Force[2*k+1]
		}
	}
}

// Releasing reports whether an element is still giving up its force: the
// next step's residual then changes by its share even at unchanged
// unknowns and load.
func (p *Problem) Releasing() bool {
	for i := range p.release {
		if p.release[i].Done < p.Opt.ReleaseSteps {
			return true
		}
	}
	return false
}

// advanceReleases counts a converged step for every element still
// releasing its force.
func (p *Problem) advanceReleases() {
	for i := range p.release {
		if q := &p.release[i]; q.Done < p.Opt.ReleaseSteps {
			q.Done++
		}
	}
}

// startRelease takes element e, which has a broken point in the state
// being committed, out of the assembly and holds its internal force at
// p.U. It must run before the element's new state is committed: the
// force is re-evaluated from the old state, as in the last assembly, which
// succeeded at p.U (should it fail all the same, the element is released
// at once, as with ReleaseSteps = 1).
func (p *Problem) startRelease(e int) {
	q := Release{Elem: e}
	w := &p.workers[0]
	if err := p.element(e, p.U, w, false); err == nil {
		copy(q.Force[:], w.re[:12])
	}
	p.release = append(p.release, q)
}

// startReleases takes out of the assembly the elements that start
// releasing their force at the commit under way (a broken point in the new
// state, or a damaged flap) and returns them marked: their new state is
// still committed.
func (p *Problem) startReleases() []bool {
	if len(p.relNow) != len(p.Mesh.Tri) {
		p.relNow = make([]bool, len(p.Mesh.Tri))
	}
	now := p.relNow
	clear(now)
	if p.Opt.ReleaseSteps == 0 {
		return now
	}
	for e := range p.Mesh.Tri {
		if p.active[e] && anyBroken(p.newState[e]) && !ElementBroken(p.newState[e]) {
			p.startRelease(e)
			p.active[e], now[e] = false, true
		}
	}
	if p.Opt.FlapPorosity > 0 {
		// one pass: a flap made by this pass waits for the next commit
		p.flaps = p.flaps[:0]
		for e := range p.Mesh.Tri {
			if p.active[e] && p.isFlap(e) && maxPorosity(p.newState[e]) >= p.Opt.FlapPorosity {
				p.flaps = append(p.flaps, e)
			}
		}
		for _, e := range p.flaps {
			p.startRelease(e)
			p.active[e], now[e] = false, true
		}
	}
	return now
}

// isFlap reports whether active element e is held by a single edge: at
// most one of its edges is shared with an active element, and at least one
// neighbour has left the assembly. Such a triangle in the wake of a crack
// (a wedge left at a blunted tip, a tooth of a zig-zag crack face) has
// nodes only it holds and a plastic tangent near zero: Newton moves them
// far, and the ill-conditioned system spoils the correction everywhere.
func (p *Problem) isFlap(e int) bool {
	if p.edgeNbr == nil {
		p.edgeNbr = p.Mesh.EdgeNeighbours()
	}
	held, gone := 0, false
	for _, n := range p.edgeNbr[e] {
		switch {
		case n >= 0 && p.active[n]:
			held++
		case n >= 0:
			gone = true
		}
	}
	return held <= 1 && gone
}

// maxPorosity returns the largest porosity of the points.
func maxPorosity(s []material.State) float64 {
	m := 0.0
	for i := range s {
		m = max(m, s[i].F)
	}
	return m
}

// anyBroken reports whether a point of the element is broken.
func anyBroken(s []material.State) bool { return brokenPoints(s) > 0 }

// brokenPoints counts the broken points of an element.
func brokenPoints(s []material.State) int {
	n := 0
	for i := range s {
		if s[i].Broken {
			n++
		}
	}
	return n
}
