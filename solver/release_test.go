package solver

import (
	"math"
	"strings"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// releaseStrip is a strip [0,4]×[0,1] of 4 × 1 cells, both ends held, the
// right end pulled by 0.1% of the length at t = 1, and the Increment-driving
// solver on it.
func releaseStrip(t *testing.T, steps int) (*fem.Problem, *Solver) {
	t.Helper()
	m, err := fem.Structured(4, 1, fem.Rectangle(0, 0, 4, 1))
	if err != nil {
		t.Fatal(err)
	}
	bcs := fem.BCs{Displacements: []fem.Displacement{
		{Label: "left", Fix: [2]bool{true, true}},
		{Label: "right", Fix: [2]bool{true, true}, Value: [2]float64{0.004, 0}},
	}}
	p, err := fem.NewProblem(m, hencky(t, 0.3), fem.Options{ReleaseSteps: steps}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	s, err := New(p, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	return p, s
}

// middleColumn returns the two elements of the cell x ∈ [2, 3].
func middleColumn(p *fem.Problem) []int {
	var out []int
	for e, tri := range p.Mesh.Tri {
		var cx float64
		for k := 0; k < 3; k++ {
			cx += p.Mesh.X[tri[k]][0] / 3
		}
		if cx > 2 && cx < 3 {
			out = append(out, e)
		}
	}
	return out
}

// TestElementRelease checks the element-vanish release (fem.Release) on a
// strip whose middle column of elements fails across the whole section.
// Reference — statics: once the column has left the assembly, the forces
// it holds are the only load path between the two halves, so the right
// reaction is the held fraction of the force at failure, R = (1 − k/n)·R₀
// after k of n steps. With n = 0 an element with one broken point keeps
// carrying its stress. (The last step of a release, to zero force, is not
// solved here: the two halves are then unloaded and have no force scale
// to converge against.)
func TestElementRelease(t *testing.T) {
	for _, c := range []struct {
		name  string
		steps int
		want  []float64 // right reaction / R₀ after each further step
	}{
		{"stays until all points break", 0, []float64{1, 1, 1}},
		{"at once", 1, nil},
		{"over four steps", 4, []float64{0.75, 0.5, 0.25}},
	} {
		t.Run(c.name, func(t *testing.T) {
			p, s := releaseStrip(t, c.steps)
			if _, err := s.Increment(1); err != nil {
				t.Fatal(err)
			}
			r0, err := p.Reaction("right")
			if err != nil {
				t.Fatal(err)
			}
			col := middleColumn(p)
			if len(col) != 2 {
				t.Fatalf("middle column has %d elements, want 2", len(col))
			}
			// One point of each column element breaks (the flag is carried
			// through by the elastic law, which keeps its stress).
			st := make([][]material.State, len(p.State()))
			for e, s := range p.State() {
				st[e] = append([]material.State(nil), s...)
			}
			for _, e := range col {
				st[e][0].Broken = true
			}
			if err := p.SetState(st); err != nil {
				t.Fatal(err)
			}
			// The step in which the break is committed still carries the
			// column's stress.
			if _, err := s.Increment(1); err != nil {
				t.Fatal(err)
			}
			if r, _ := p.Reaction("right"); math.Abs(r[0]/r0[0]-1) > 1e-9 {
				t.Fatalf("reaction in the breaking step %g, want R₀ = %g", r[0], r0[0])
			}
			for k, w := range c.want {
				if _, err := s.Increment(1); err != nil {
					t.Fatalf("step %d after the break: %v", k+1, err)
				}
				r, _ := p.Reaction("right")
				l, _ := p.Reaction("left")
				if got := r[0] / r0[0]; math.Abs(got-w) > 1e-6 {
					t.Errorf("step %d: right reaction %.8f R₀, want %.2f R₀", k+1, got, w)
				}
				if math.Abs(r[0]+l[0]) > 1e-6*math.Abs(r0[0]) {
					t.Errorf("step %d: left %g and right %g reactions do not balance", k+1, l[0], r[0])
				}
			}
			released := c.steps > 0
			for _, e := range col {
				if p.Released(e) != released {
					t.Errorf("element %d out of the assembly = %v, want %v", e, p.Released(e), released)
				}
			}
			// Released elements stay listed (a checkpoint restores them as
			// out of the assembly), with the steps done.
			wantListed, wantDone := 0, 0
			if released {
				wantListed, wantDone = len(col), min(len(c.want), c.steps)
			}
			if got := len(p.Releases()); got != wantListed {
				t.Errorf("%d elements listed as released, want %d", got, wantListed)
			}
			for _, q := range p.Releases() {
				if q.Done != wantDone {
					t.Errorf("element %d: %d release steps done, want %d", q.Elem, q.Done, wantDone)
				}
			}
			// A checkpoint's view (state, releases, unknowns) restores
			// the same residual.
			q, _ := releaseStrip(t, c.steps)
			if err := q.SetState(p.State()); err != nil {
				t.Fatal(err)
			}
			if err := q.SetReleases(p.Releases()); err != nil {
				t.Fatal(err)
			}
			copy(q.U, p.Committed)
			q.Restart(p.TCommitted)
			if err := p.Assemble(false); err != nil {
				t.Fatal(err)
			}
			if err := q.Assemble(false); err != nil {
				t.Fatal(err)
			}
			for d := range p.Full {
				if q.Full[d] != p.Full[d] {
					t.Fatalf("restored residual at unknown %d: %g, want %g", d, q.Full[d], p.Full[d])
				}
			}
		})
	}
}

// TestSetReleasesBadInput: a checkpoint's release list is checked against
// the mesh and the release steps.
func TestSetReleasesBadInput(t *testing.T) {
	p, _ := releaseStrip(t, 3)
	for _, c := range []struct {
		name string
		r    []fem.Release
		want string
	}{
		{"element out of range", []fem.Release{{Elem: 8}}, "not in the mesh"},
		{"negative element", []fem.Release{{Elem: -1}}, "not in the mesh"},
		{"listed twice", []fem.Release{{Elem: 2}, {Elem: 2}}, "twice"},
		{"more steps done than the release has", []fem.Release{{Elem: 2, Done: 4}}, "must be in [0, 3]"},
	} {
		err := p.SetReleases(c.r)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	if err := p.SetReleases([]fem.Release{{Elem: 2, Done: 1}}); err != nil {
		t.Fatal(err)
	}
	if !p.Released(2) || len(p.Releases()) != 1 {
		t.Errorf("restored release: element 2 out of the assembly %v, %d releasing", p.Released(2), len(p.Releases()))
	}
}
