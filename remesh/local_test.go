package remesh

import (
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// keptStates returns, for every element of m, its six node coordinates
// as a key, with the committed states of its Gauss points.
func keptStates(m *fem.Mesh, gp *fem.GaussPoints) map[[6][2]float64][]material.State {
	out := make(map[[6][2]float64][]material.State, len(m.Tri))
	for e, t := range m.Tri {
		var k [6][2]float64
		for i, n := range t {
			k[i] = m.X[n]
		}
		st := make([]material.State, gp.PerElement)
		for q := range st {
			st[q] = gp.At(e, q).State
		}
		out[k] = st
	}
	return out
}

// TestLocalRemesh: with local remeshing on, a remesh of a converged
// elastic-plastic, damaged state keeps most elements verbatim and every
// kept element carries exactly its old state into the new problem. The
// first remesh moves from the initial mesh to the tip-following field and
// rebuilds much of the fine zone; at the second the targets hold:
// at least 70% of the Gauss points verbatim and the peak porosity lowered
// by at most 2% through the transfer.
func TestLocalRemesh(t *testing.T) {
	cfg, _, par := plasticSSY(t, 2500, 0.6)
	cfg.Measure = func(p *fem.Problem) (float64, float64, error) {
		r, err := p.Reaction("remote")
		return p.TCommitted, r[1], err
	}
	cfg.Solver.Dt, cfg.Solver.DtMax, cfg.Solver.TEnd = 0.25, 0.25, 0.5
	c, err := NewCycle(cfg)
	if err != nil {
		t.Fatal(err)
	}
	c.cfg.Adapt = false // reach the plastic state on the first mesh
	var rec recorder
	if _, err := c.Run(&rec); err != nil {
		t.Fatal(err)
	}
	if f := maxPorosity(c); f <= par.F0 {
		t.Fatalf("no void growth before the remesh (max f %g)", f)
	}
	c.cfg.Adapt, c.cfg.Local = true, true
	for i := 1; i <= 2; i++ {
		old := keptStates(c.mesh, c.GaussPoints())
		rr, err := c.remeshLocalProbe(t, old)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("remesh %d: %d → %d elements, %d kept, verbatim share %.3f, max f %.6g → %.6g, force %.6g → %.6g → %.6g, %d iterations; %s",
			i, rr.ElemsBefore, rr.ElemsAfter, rr.KeptElements, rr.VerbatimShare, rr.MaxFBefore, rr.MaxFAfter,
			rr.ForceBefore, rr.ForceTransfer, rr.ForceAfter, rr.Iterations, rr.LocalNote)
		if i > 1 && rr.VerbatimShare < 0.7 {
			t.Errorf("remesh %d kept %.1f%% of the Gauss points verbatim, want ≥ 70%%", i, 100*rr.VerbatimShare)
		}
		if i > 1 && rr.MaxFAfter < 0.98*rr.MaxFBefore {
			t.Errorf("remesh %d: max porosity %.6g → %.6g, below 0.98×", i, rr.MaxFBefore, rr.MaxFAfter)
		}
	}
}

// remeshLocalProbe is Cycle.remesh with a check between installing the
// transferred state and re-equilibrating: every element of the new mesh
// that equals an old one (all six nodes) has its old states bit for bit.
func (c *Cycle) remeshLocalProbe(t *testing.T, old map[[6][2]float64][]material.State) (*RemeshRecord, error) {
	t.Helper()
	gp := c.GaussPoints()
	rr := &RemeshRecord{Index: c.remeshes + 1, Reason: "test", DofsBefore: c.prob.Dofs.N, ElemsBefore: len(c.mesh.Tri)}
	var err error
	if _, rr.ForceBefore, err = c.cfg.Measure(c.prob); err != nil {
		return nil, err
	}
	field, released, err := c.sizeField(gp)
	if err != nil {
		return nil, err
	}
	carved, err := c.newGeometry(field, released, rr)
	if err != nil {
		return nil, err
	}
	m, err := c.newMeshOf(carved, field, rr)
	if err != nil {
		return nil, err
	}
	next, err := c.transferTo(m, gp, rr)
	if err != nil {
		return nil, err
	}
	got := keptStates(next.mesh, next.GaussPoints())
	same, differ := 0, 0
	for k, st := range got {
		if ost, ok := old[k]; ok {
			same++
			for q := range st {
				if st[q] != ost[q] {
					differ++
					break
				}
			}
		}
	}
	if same < rr.KeptElements {
		t.Errorf("%d new elements equal old ones, the local mesh kept %d", same, rr.KeptElements)
	}
	if differ > 0 {
		t.Errorf("%d of %d kept elements changed state through the transfer", differ, same)
	}
	if err := c.settleOn(next, rr); err != nil {
		next.prob.Close()
		return nil, err
	}
	c.adopt(next, field, rr)
	return rr, nil
}
