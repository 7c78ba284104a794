package remesh

import (
	"fmt"
	"math"
	"strings"
	"tearline/remesh/carve"
	"tearline/remesh/geom"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/remesh/trigger"
	"tearline/solver/fem"
	"tearline/transfer"
	"time"
)

// remesh builds the new geometry and mesh for decision d, transfers the
// state onto it and re-establishes equilibrium at the same load. The new
// mesh replaces the current one only once it is in equilibrium: a failed
// remesh leaves the run at its last converged state.
func (c *Cycle) remesh(d trigger.Decision, gp *fem.GaussPoints) (*RemeshRecord, error) {
	rr := &RemeshRecord{
		Index: c.remeshes + 1, Step: c.steps, T: c.Tau(), Da: c.da, Reason: d.Reason,
		DofsBefore: c.prob.Dofs.N, ElemsBefore: len(c.mesh.Tri),
	}
	var err error
	if _, rr.ForceBefore, err = c.cfg.Measure(c.prob); err != nil {
		return nil, err
	}
	t0 := time.Now()
	field, released, err := c.sizeField(gp)
	if err != nil {
		return nil, err
	}
	carved, err := c.newGeometry(field, released, rr)
	if err != nil {
		return nil, err
	}
	rr.GeomWall = time.Since(t0)
	t0 = time.Now()
	m, err := c.newMeshOf(carved, field, rr)
	if err != nil {
		return nil, err
	}
	rr.MeshWall = time.Since(t0)
	t0 = time.Now()
	next, err := c.transferTo(m, gp, rr)
	if err != nil {
		return nil, err
	}
	rr.MapWall = time.Since(t0)
	if err := c.settleOn(next, rr); err != nil {
		next.prob.Close()
		return nil, err
	}
	c.adopt(next, field, rr)
	return rr, nil
}

// sizeField is the tip-following size field of the next mesh, with the
// elements that leave the geometry: those out of the assembly (broken,
// or releasing their force; what force they still held is part of the
// out-of-balance force re-equilibration relaxes).
func (c *Cycle) sizeField(gp *fem.GaussPoints) (*size.TipField, []bool, error) {
	released := make([]bool, len(c.mesh.Tri))
	for e := range released {
		released[e] = c.prob.Released(e)
	}
	damaged, err := size.DamagedPoints(gp, released, c.cfg.Trigger.FAlert, c.cfg.Trigger.PAlert)
	if err != nil {
		return nil, nil, err
	}
	tf, err := size.NewTipField(c.tips, damaged, nil, c.cfg.Follow)
	if err != nil {
		return nil, nil, fmt.Errorf("size field: %w", err)
	}
	return tf, released, nil
}

// newGeometry is the domain of the material left when the released
// elements are carved away, with the old elements it removed.
func (c *Cycle) newGeometry(field *size.TipField, released []bool, rr *RemeshRecord) (*carve.Result, error) {
	carved, err := carve.Domain(c.mesh, released, c.cfg.Domain, c.tips, field.At, c.cfg.Carve)
	if err != nil {
		return nil, fmt.Errorf("new geometry: %w", err)
	}
	for _, r := range carved.Removed {
		if r {
			rr.Removed++
		}
	}
	return carved, nil
}

// newMeshOf is the new mesh: local when Local is on and the patch can be
// meshed, else of the whole domain.
func (c *Cycle) newMeshOf(carved *carve.Result, field *size.TipField, rr *RemeshRecord) (*fem.Mesh, error) {
	m, err := c.newLocalMesh(carved, field, rr)
	if m == nil && err == nil {
		m, err = c.newMesh(carved.Domain, field, rr)
	}
	return m, err
}

// newLocalMesh meshes the new domain by rebuilding only a patch of the
// current mesh (when Local is on). It returns a nil mesh and no error when
// the patch cannot be meshed: the caller then meshes the whole domain, and
// rr.LocalNote says why.
func (c *Cycle) newLocalMesh(carved *carve.Result, field *size.TipField, rr *RemeshRecord) (*fem.Mesh, error) {
	if !c.cfg.Local {
		return nil, nil
	}
	tips := make([][2]float64, len(c.tips))
	for i, tp := range c.tips {
		tips[i] = tp.X
	}
	patch := meshing.Patch(c.mesh, carved.Removed, tips, field.At, c.cfg.Patch)
	m, rep, err := meshing.MeshLocal(c.mesh, carved.Domain, patch, field.At, c.cfg.Mesh, c.cfg.Patch)
	if err != nil {
		rr.LocalNote = "whole mesh: " + err.Error()
		return nil, nil
	}
	rr.KeptElements = rep.Kept
	rr.LocalNote = strings.Join(rep.Retries, "; ")
	rr.MinAngle = rep.MinAngleDeg
	rr.MinSize = minSize(m)
	return m, nil
}

// minSize is the smallest longest edge of m's elements.
func minSize(m *fem.Mesh) float64 {
	s := math.Inf(1)
	for e := range m.Tri {
		s = math.Min(s, trigger.LongestEdge(m, e))
	}
	return s
}

// newMesh meshes the new domain to the size field.
func (c *Cycle) newMesh(dom *geom.Domain, field *size.TipField, rr *RemeshRecord) (*fem.Mesh, error) {
	m, rep, err := meshing.Mesh(dom, field.At, c.cfg.Mesh)
	if err != nil {
		return nil, fmt.Errorf("new mesh: %w", err)
	}
	rr.MinAngle = rep.MinAngleDeg
	rr.MinSize = minSize(m)
	return m, nil
}

// transferTo maps the committed state onto mesh m: the new problem, its
// committed state the transferred one, made compatible with the
// transferred displacement (volume projection, plastic strain).
func (c *Cycle) transferTo(m *fem.Mesh, gp *fem.GaussPoints, rr *RemeshRecord) (*stage, error) {
	from, err := c.fields(gp)
	if err != nil {
		return nil, err
	}
	to, trec, err := transfer.Map(c.mesh, from, m, c.cfg.Transfer)
	if err != nil {
		return nil, fmt.Errorf("transfer: %w", err)
	}
	rr.MaxFBefore, rr.MaxFAfter = trec.Before.MaxF, trec.After.MaxF
	rr.IntPBefore, rr.IntPAfter = trec.Before.IntP, trec.After.IntP
	rr.WorkBefore, rr.WorkAfter = trec.Before.Work, trec.After.Work
	rr.Verbatim = trec.Verbatim
	if n := trec.Verbatim + trec.Broken + trec.Projected + trec.Extrapolated; n > 0 {
		rr.VerbatimShare = float64(trec.Verbatim) / float64(n)
	}
	next, err := c.newStage(m)
	if err != nil {
		return nil, err
	}
	if err := next.installTransferred(to, c.prob.TCommitted); err != nil {
		next.prob.Close()
		return nil, err
	}
	return next, nil
}

// installTransferred puts the transferred fields into the new problem at
// load factor t and makes them compatible with the transferred
// displacement.
func (c *stage) installTransferred(to *transfer.Fields, t float64) error {
	if err := c.install(to, t, false); err != nil {
		return fmt.Errorf("install transferred state: %w", err)
	}
	if err := c.prob.ProjectVolume(); err != nil {
		return fmt.Errorf("transferred state: %w", err)
	}
	if err := c.reconcilePlasticStrain(to); err != nil {
		return fmt.Errorf("transferred state: %w", err)
	}
	return nil
}

// settleOn evaluates the transferred state on the new stage (repairing
// the points whose update fails on it), records the force right after the
// transfer, moves the solver onto the new problem and re-establishes
// equilibrium at the same load.
func (c *Cycle) settleOn(next *stage, rr *RemeshRecord) error {
	if _, err := next.settleTransferred(); err != nil {
		return fmt.Errorf("assembly after transfer: %w", err)
	}
	next.prob.AdoptAssembled()
	var err error
	if _, rr.ForceTransfer, err = c.cfg.Measure(next.prob); err != nil {
		return err
	}
	t0 := time.Now()
	if err := c.rebindSolver(next.prob); err != nil {
		return err
	}
	its, err := next.reequilibrate(c.solver)
	rr.Iterations = its
	if err != nil {
		return fmt.Errorf("re-equilibration at load factor %g: %w", next.prob.TCommitted, err)
	}
	rr.EquilWall = time.Since(t0)
	_, rr.ForceAfter, err = c.cfg.Measure(next.prob)
	return err
}

// adopt makes the re-equilibrated new stage the current one.
func (c *Cycle) adopt(next *stage, field *size.TipField, rr *RemeshRecord) {
	rr.DofsAfter, rr.ElemsAfter = next.prob.Dofs.N, len(next.mesh.Tri)
	c.prob.Close()
	c.stage = *next
	c.peakDofs = max(c.peakDofs, next.prob.Dofs.N)
	c.zone = field.Zone()
	c.remeshes++
}
