package remesh

import (
	"io"
	"time"

	"tearline/solver/fem"
)

// View is a read-only view of a run: what observers and the caller may
// look at between steps. The mesh and Gauss-point data it returns belong
// to the cycle and must not be changed.
type View struct{ c *Cycle }

// View returns the read-only view of the run.
func (c *Cycle) View() View { return View{c} }

// Progress is where a run stands.
type Progress struct {
	Steps, Remeshes int
	// T is the committed pseudo-time (the load factor, or under an
	// opening control the pseudo-time that drives the opening).
	T          float64
	Da, DaProj float64
	PeakDofs   int
	Wall       time.Duration // wall time so far, resumes included
	// Tracked is false when the domain has no crack tip (Δa does not
	// apply).
	Tracked bool
}

// Progress returns the run's counters.
func (v View) Progress() Progress {
	c := v.c
	return Progress{Steps: c.steps, Remeshes: c.remeshes, T: c.Tau(), Da: c.da, DaProj: c.daProj,
		PeakDofs: c.peakDofs, Wall: c.wall, Tracked: len(c.seeds) > 0}
}

// Mesh returns the current mesh.
func (v View) Mesh() *fem.Mesh { return v.c.mesh }

// Displacement returns the committed nodal displacement.
func (v View) Displacement() [][2]float64 { return v.c.prob.Displacement() }

// NodalField fills dst with the committed nodal values of field f; it
// reports false when the problem does not carry f.
func (v View) NodalField(f fem.Field, dst []float64) (bool, error) {
	if !v.c.prob.Dofs.Has(f) {
		return false, nil
	}
	return true, v.c.prob.NodalField(f, dst)
}

// Released reports whether element e is out of the assembly (broken, or
// releasing its force).
func (v View) Released(e int) bool { return v.c.prob.Released(e) }

// GaussPoints returns the committed Gauss-point data.
func (v View) GaussPoints() *fem.GaussPoints { return v.c.GaussPoints() }

// RequestStop asks the cycle to end the run cleanly after the current
// step, with status Stopped and the given reason (an observer that has
// seen what it needs: a load drop, a band width).
func (v View) RequestStop(reason string) { v.c.stopRequest = reason }

// WriteCheckpoint writes the committed state of the run to w; see
// Cycle.WriteCheckpoint.
func (v View) WriteCheckpoint(w io.Writer, extra []byte) error { return v.c.WriteCheckpoint(w, extra) }
