package remesh

import (
	"encoding/gob"
	"errors"
	"fmt"
	"io"
	"time"

	"tearline/criteria"
	"tearline/remesh/size"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/transfer"
)

// checkpointVersion changes whenever the layout below does; an older
// checkpoint is refused with a clear error rather than misread.
const checkpointVersion = 4

// checkpoint is everything a run needs to continue exactly where it was:
// the mesh, the committed fields and Gauss-point state, the pseudo-time and
// next increment, the crack tips and the fine zone, and the counters.
type checkpoint struct {
	Version int
	Mesh    *fem.Mesh
	Fields  *transfer.Fields
	// T is the load factor, Tau the pseudo-time (they differ under an
	// opening control, whose constraint offset is Offset), Dt the next
	// increment of Tau.
	T, Tau, Dt      float64
	Offset          float64
	Steps, Remeshes int
	PeakDofs        int
	Da, DaProj      float64
	Tips            []criteria.Tip
	Zone            size.FineZone
	Wall            time.Duration
	// Prev is the solver's last converged increment (its predictor for
	// the next one).
	Prev solver.Previous
	// Releases are the elements that left the assembly by a release
	// (fem.Options.ReleaseSteps), still releasing their force or done.
	Releases []fem.Release
	// Extra is the caller's own state (the command line keeps its history
	// bookkeeping there).
	Extra []byte
}

// WriteCheckpoint writes the committed state of the run to w (encoding/gob).
// The caller makes the write atomic (temporary file, sync, rename).
func (c *Cycle) WriteCheckpoint(w io.Writer, extra []byte) error {
	f, err := c.fields(c.GaussPoints())
	if err != nil {
		return err
	}
	cp := checkpoint{
		Version: checkpointVersion, Mesh: c.mesh, Fields: f, T: c.prob.TCommitted, Tau: c.Tau(), Dt: c.solver.NextDt(),
		Steps: c.steps, Remeshes: c.remeshes, PeakDofs: c.peakDofs, Da: c.da, DaProj: c.daProj,
		Tips: c.tips, Zone: c.zone, Wall: c.wall, Extra: extra, Releases: c.prob.Releases(),
	}
	cp.Prev = c.solver.PreviousIncrement()
	if ctl := c.solver.Controlled(); ctl != nil {
		cp.Offset = ctl.Offset
	}
	return gob.NewEncoder(w).Encode(&cp)
}

// ResumeCycle rebuilds a run from a checkpoint written by WriteCheckpoint
// under the same configuration. It returns the caller's extra state.
func ResumeCycle(cfg CycleConfig, r io.Reader) (*Cycle, []byte, error) {
	var cp checkpoint
	if err := gob.NewDecoder(r).Decode(&cp); err != nil {
		return nil, nil, fmt.Errorf("checkpoint unreadable: %w", err)
	}
	if cp.Version != checkpointVersion {
		return nil, nil, fmt.Errorf("checkpoint version %d, this program reads version %d", cp.Version, checkpointVersion)
	}
	if cp.Mesh == nil || cp.Fields == nil {
		return nil, nil, errors.New("checkpoint holds no mesh or state")
	}
	if err := cp.Mesh.Check(); err != nil {
		return nil, nil, fmt.Errorf("checkpoint mesh: %w", err)
	}
	if err := cp.Fields.Check(cp.Mesh); err != nil {
		return nil, nil, fmt.Errorf("checkpoint state: %w", err)
	}
	c := &Cycle{stage: stage{cfg: &cfg}, steps: cp.Steps, remeshes: cp.Remeshes, da: cp.Da, daProj: cp.DaProj,
		tips: cp.Tips, zone: cp.Zone, wall: cp.Wall}
	c.seeds = initialTips(cfg.Domain)
	if err := c.setMesh(cp.Mesh); err != nil {
		return nil, nil, err
	}
	c.peakDofs = max(c.peakDofs, cp.PeakDofs)
	if err := c.install(cp.Fields, cp.T, true); err != nil {
		return nil, nil, fmt.Errorf("checkpoint state: %w", err)
	}
	if err := c.prob.SetReleases(cp.Releases); err != nil {
		return nil, nil, fmt.Errorf("checkpoint state: %w", err)
	}
	// Re-evaluate the committed state so that reactions and Gauss-point data
	// are those of the checkpoint (no iteration: the state is converged).
	if err := c.prob.Assemble(false); err != nil {
		return nil, nil, fmt.Errorf("checkpoint state: %w", err)
	}
	if err := c.resumeSolver(&cp); err != nil {
		return nil, nil, fmt.Errorf("checkpoint state: %w", err)
	}
	return c, cp.Extra, nil
}

// resumeSolver starts the solver where the checkpointed one was: its next
// increment, pseudo-time, control offset and previous increment (the
// predictor of the next one), so that the resumed run repeats the
// uninterrupted one.
func (c *Cycle) resumeSolver(cp *checkpoint) error {
	if err := c.startSolver(cp.Dt, cp.Tau); err != nil {
		return err
	}
	if ctl := c.solver.Controlled(); ctl != nil {
		ctl.Offset = cp.Offset
	}
	if cp.Prev.Dt > 0 || cp.Prev.ZoneRate > 0 || cp.Prev.ZoneStrain > 0 {
		if err := c.solver.SetPreviousIncrement(cp.Prev); err != nil {
			return err
		}
	}
	if c.solver.ZoneControlled() {
		c.solver.SetTime(cp.Tau)
	}
	return nil
}
