package remesh

import (
	"errors"
	"fmt"
	"math"
	"time"

	"tearline/criteria"
	"tearline/remesh/carve"
	"tearline/remesh/geom"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/remesh/trigger"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/transfer"
)

// CycleConfig is everything an adaptive crack-growth run needs. The command
// line builds it from a case file; tests build it directly.
type CycleConfig struct {
	Domain *geom.Domain
	// Size sets up the initial mesh's size field (fine zone around every
	// crack tip of Domain); Mesh the triangulator.
	Size size.Options
	Mesh meshing.Options

	FE       fem.Options
	Material material.Model
	// Fc is the material's porosity at the onset of coalescence: the
	// damage front is the contour 2·Fc (criteria.FrontOptions). Fc = 0
	// means a material without porosity (no damage front, Δa stays 0).
	Fc float64

	// BCs returns the boundary conditions of a mesh (labels and named
	// points survive remeshing, so the same function serves every mesh).
	BCs func(m *fem.Mesh) (fem.BCs, error)
	// Gauge, when not nil, reads the specimen's gauge in a converged state
	// (StepRecord.Gauge; NaN without one).
	Gauge func(p *fem.Problem) (float64, error)
	// Measure returns the history's control quantity (applied
	// displacement, K, …) and force of the converged state; NaN where one
	// does not apply.
	Measure func(p *fem.Problem) (control, force float64, err error)

	Solver solver.Options
	// Control, when not nil, returns the opening control of a mesh's
	// problem: the pseudo-time then drives that opening and the load
	// factor (fem.Problem.T) is solved for (see solver.Control).
	Control func(p *fem.Problem) (*solver.Control, error)

	// Adapt switches the adaptive cycle on; the options below are used
	// only then.
	Adapt    bool
	Trigger  trigger.Options
	Follow   size.FollowOptions
	Carve    carve.Options
	Transfer transfer.Options
	// Local switches local remeshing on: a remesh rebuilds only a patch
	// (chosen by Patch) and keeps every other element, its nodes and its
	// state verbatim; when the patch cannot be meshed the remesh falls
	// back to the whole mesh (RemeshRecord.LocalNote says why).
	Local bool
	Patch meshing.PatchRule

	// J configures the domain integral (rings in units of ℓ, or of h_fine
	// for a local model); nil switches J off (axisymmetric cases).
	J *JConfig
	// KField, when not nil, gives the far-field J of the applied K at t:
	// K·t (small-scale yielding).
	KField *criteria.KField
	// Symmetric marks a half model with a mirror plane on the crack line:
	// J is doubled and CTOD is twice the upper face's opening.
	Symmetric bool

	// StopDa ends the run once the crack has grown this far (0 = no limit).
	StopDa float64
	// Deadline ends the run cleanly at this wall-clock time (zero = none).
	Deadline time.Time
}

// JConfig sets the domain-integral rings: ring i spans
// [Rings[i].In, Rings[i].Out]·Unit around the current tip.
type JConfig struct {
	Rings []criteria.Ring
	Unit  float64
}

// StepRecord is what the cycle reports after each converged step. NaN marks
// a quantity that does not apply.
type StepRecord struct {
	Step             int
	T, Load          float64 // pseudo-time and load factor (equal unless under a Control)
	Control, Force   float64
	JFar, JDomain    float64
	JRings           []float64
	Da, DaProj, CTOD float64
	// DaFront is Δa to the damage front inside the elements
	// (criteria.Growth.DAFront) at this step, the largest over the tips;
	// NaN without a front. Unlike Da it is not a running maximum.
	DaFront           float64
	Dofs, Elements    int
	Remeshes, Iters   int
	Cutbacks          int
	MaxPorosity       float64
	Gauge             float64 // the specimen's gauge reading (NaN: none)
	TipX              [2]float64
	Residuals         []float64
	StepWall, CumWall time.Duration
	// Unmeasured lists the measures that could not be evaluated at this
	// step (J rings leaving the body, a tip outside the mesh): their
	// values are NaN.
	Unmeasured []error
}

// RemeshRecord is the record of one remesh (remesh.csv).
type RemeshRecord struct {
	Index                      int
	Step                       int
	T, Da                      float64
	Reason                     string
	DofsBefore, DofsAfter      int
	ElemsBefore, ElemsAfter    int
	MinSize, MinAngle          float64
	ForceBefore, ForceTransfer float64
	ForceAfter                 float64
	MaxFBefore, MaxFAfter      float64
	IntPBefore, IntPAfter      float64
	WorkBefore, WorkAfter      float64
	Removed, Verbatim          int
	// VerbatimShare is the share of the new mesh's Gauss points kept
	// verbatim (Verbatim over all of them).
	VerbatimShare float64
	// KeptElements counts the elements a local remesh kept; LocalNote
	// says why a local remesh grew its patch or fell back to the whole
	// mesh (empty when it did neither or was off).
	KeptElements                int
	LocalNote                   string
	Iterations                  int
	GeomWall, MeshWall, MapWall time.Duration
	EquilWall                   time.Duration
}

// Observer receives the cycle's records as they happen, with a read-only
// view of the run. Any error it returns stops the run (and is returned by
// Run).
type Observer interface {
	Step(r *StepRecord, v View) error
	Remesh(r *RemeshRecord, v View) error
}

// RemeshFailureObserver is an Observer that also hears of a remesh that
// failed and was put off: the run goes on with the old mesh and tries
// again after the next step.
type RemeshFailureObserver interface {
	RemeshFailed(index, step int, err error) error
}

// remeshAttempts is how many times in a row a remesh may fail before the
// run stops (DEVELOPERS.md, Decisions → the adaptive cycle: a failed re-equilibration
// passed one step later).
const remeshAttempts = 3

// Outcome is how a run ended.
type Outcome struct {
	Status  solver.Status
	Reason  string
	Steps   int
	T       float64
	Da      float64
	PeakDof int
}

// Cycle is the state of an adaptive run: the current mesh and problem, the
// solver that advances it, the crack tips and the counters. Observers see
// it through a View.
type Cycle struct {
	stage // the current mesh and problem
	zone  size.FineZone
	seeds []criteria.Tip
	// tips are the current crack tips (initially the domain's).
	tips []criteria.Tip
	// steps, remeshes count converged steps and remeshes; peakDofs is the
	// largest problem so far.
	steps, remeshes int
	peakDofs        int
	da, daProj      float64
	daFront         float64 // this step's Δa to the front inside the elements (StepRecord.DaFront)
	// wall is the wall time of the run so far (carried across resumes).
	wall time.Duration

	solver *solver.Solver
	// wall0 and started: the wall time before this Run and its start.
	wall0   time.Duration
	started time.Time
	// remeshFails counts the remeshes that failed in a row.
	remeshFails int
	// stopRequest is an observer's reason to end the run (View.RequestStop).
	stopRequest string
}

// NewCycle meshes the domain and sets up the first problem.
func NewCycle(cfg CycleConfig) (*Cycle, error) {
	if cfg.Domain == nil || cfg.Material == nil || cfg.BCs == nil || cfg.Measure == nil {
		return nil, errors.New("cycle: Domain, Material, BCs and Measure are required")
	}
	sf, err := size.NewField(cfg.Domain, cfg.Size)
	if err != nil {
		return nil, fmt.Errorf("cycle: initial size field: %w", err)
	}
	m, _, err := meshing.Mesh(cfg.Domain, sf.At, cfg.Mesh)
	if err != nil {
		return nil, fmt.Errorf("cycle: initial mesh: %w", err)
	}
	c := &Cycle{stage: stage{cfg: &cfg}}
	c.zone = size.InitialZone(sf, c.hWake())
	c.seeds = initialTips(cfg.Domain)
	c.tips = append([]criteria.Tip(nil), c.seeds...)
	if err := c.setMesh(m); err != nil {
		return nil, err
	}
	if err := c.startSolver(cfg.Solver.Dt, 0); err != nil {
		return nil, err
	}
	return c, nil
}

// startSolver makes the solver of the current problem, with first
// increment dt and, under an opening control, pseudo-time tau.
func (c *Cycle) startSolver(dt, tau float64) error {
	opt := c.cfg.Solver
	opt.Dt = math.Min(math.Max(dt, opt.DtMin), opt.DtMax)
	s, err := solver.New(c.prob, opt)
	if err != nil {
		return err
	}
	c.solver = s
	ctl, err := c.control(c.prob)
	if err != nil || ctl == nil {
		return err
	}
	if err := s.SetControl(ctl, tau); err != nil {
		return fmt.Errorf("opening control: %w", err)
	}
	return nil
}

// control is the opening control of problem p (nil under load control).
func (c *Cycle) control(p *fem.Problem) (*solver.Control, error) {
	if c.cfg.Control == nil {
		return nil, nil
	}
	ctl, err := c.cfg.Control(p)
	if err != nil {
		return nil, fmt.Errorf("opening control: %w", err)
	}
	return ctl, nil
}

// Tau is the committed pseudo-time: the load factor, or under a control
// the pseudo-time that drives the opening.
func (c *Cycle) Tau() float64 { return c.solver.Time() }

// initialTips are the domain's crack tips in name order, so that every run
// (and every resume) sees them in the same order.
func initialTips(d *geom.Domain) []criteria.Tip {
	var tips []criteria.Tip
	for _, name := range d.Tips() {
		pt := d.Points[name]
		tips = append(tips, criteria.Tip{Name: name, X: pt.X, Dir: pt.Dir})
	}
	return tips
}

// hWake is the size damaged points outside the fine zone may have.
func (c *Cycle) hWake() float64 {
	if c.cfg.Adapt {
		return c.cfg.Follow.HWake()
	}
	return c.cfg.Size.WithDefaults().HFar
}

// newStage builds the problem on mesh m (its state virgin).
func (c *Cycle) newStage(m *fem.Mesh) (*stage, error) {
	bcs, err := c.cfg.BCs(m)
	if err != nil {
		return nil, fmt.Errorf("cycle: boundary conditions: %w", err)
	}
	p, err := fem.NewProblem(m, c.cfg.Material, c.cfg.FE, bcs)
	if err != nil {
		return nil, fmt.Errorf("cycle: problem: %w", err)
	}
	return &stage{cfg: c.cfg, mesh: m, prob: p}, nil
}

// setMesh makes the problem on mesh m (its state virgin) the current one.
func (c *Cycle) setMesh(m *fem.Mesh) error {
	next, err := c.newStage(m)
	if err != nil {
		return err
	}
	if c.prob != nil {
		c.prob.Close()
	}
	c.stage = *next
	c.peakDofs = max(c.peakDofs, next.prob.Dofs.N)
	return nil
}

// Run advances the run until stop.t, stop.da, the deadline, the step
// limit or a stall of the solver, calling obs after every step and remesh.
// One pass of the loop is the adaptive cycle: solve an increment → locate
// the damage front → record → decide → (remesh: size field → new geometry
// → mesh → transfer → settle → re-equilibrate).
func (c *Cycle) Run(obs Observer) (Outcome, error) {
	c.started, c.wall0 = time.Now(), c.wall
	c.stopRequest = ""
	for {
		if end, done := c.atLimit(); done {
			return c.outcome(end), nil
		}
		st, end, err := c.solveIncrement()
		if err != nil || end.stop {
			return c.outcome(end), err
		}
		gp := c.GaussPoints()
		front, err := c.locateFront(gp)
		if err != nil {
			return c.outcome(verdict{}), err
		}
		c.follow(front)
		rec, err := c.record(st, gp)
		if err != nil {
			return c.outcome(verdict{}), err
		}
		if err := obs.Step(rec, View{c}); err != nil {
			return c.outcome(verdict{}), err
		}
		v, err := c.decide(gp)
		if err != nil || v.stop {
			return c.outcome(v), err
		}
		if !v.remesh.Remesh {
			continue
		}
		if v, err := c.remeshOrRetry(v.remesh, gp, obs); err != nil || v.stop {
			return c.outcome(v), err
		}
	}
}

// verdict is what the cycle does after a step: go on, remesh, or stop
// with a status and reason.
type verdict struct {
	stop   bool
	status solver.Status
	reason string
	remesh trigger.Decision
}

func stopWith(status solver.Status, reason string) verdict {
	return verdict{stop: true, status: status, reason: reason}
}

// outcome is the run's end as the caller sees it.
func (c *Cycle) outcome(v verdict) Outcome {
	c.wall = c.wall0 + time.Since(c.started)
	status := v.status
	if !v.stop {
		status = solver.Stopped // an error ended the run
	}
	return Outcome{Status: status, Reason: v.reason, Steps: c.steps, T: c.Tau(), Da: c.da, PeakDof: c.peakDofs}
}

// atLimit reports whether the run has reached stop.t or the step limit.
func (c *Cycle) atLimit() (verdict, bool) {
	if c.solver.Done() {
		return stopWith(solver.Completed, ""), true
	}
	if max := c.cfg.Solver.MaxSteps; c.steps >= max {
		return stopWith(solver.Stopped, fmt.Sprintf("step limit %d reached at t = %g", max, c.Tau())), true
	}
	return verdict{}, false
}

// solveIncrement advances the solver by one converged increment. A stall
// (increments cut below the minimum) ends the run with its reason.
func (c *Cycle) solveIncrement() (solver.Step, verdict, error) {
	st, err := c.solver.Next()
	c.wall = c.wall0 + time.Since(c.started)
	var stall *solver.StallError
	if errors.As(err, &stall) {
		return st, stopWith(solver.Stopped, stall.Error()), nil
	}
	if err != nil {
		return st, verdict{}, err
	}
	c.steps++
	return st, verdict{}, nil
}

// decide ends the run when an observer asked for it, the crack has grown
// far enough or the deadline has passed, and asks the trigger whether a remesh is due.
func (c *Cycle) decide(gp *fem.GaussPoints) (verdict, error) {
	if c.stopRequest != "" {
		return stopWith(solver.Stopped, c.stopRequest), nil
	}
	if c.cfg.StopDa > 0 && c.da >= c.cfg.StopDa {
		return stopWith(solver.Completed, fmt.Sprintf("crack growth Δa = %.4g reached stop.da = %g", c.da, c.cfg.StopDa)), nil
	}
	if !c.cfg.Deadline.IsZero() && time.Now().After(c.cfg.Deadline) {
		return stopWith(solver.Stopped, "wall-clock limit stop.hours reached"), nil
	}
	if !c.cfg.Adapt {
		return verdict{}, nil
	}
	d, err := trigger.Check(c.mesh, gp, c.tips, &c.zone, c.remeshes, c.cfg.Trigger)
	return verdict{remesh: d}, err
}

// remeshOrRetry remeshes for decision d. A failed remesh leaves the run on
// its old mesh and state, to try again after the next step (a transient
// failure, typically in re-equilibration), unless it has failed
// remeshAttempts times in a row.
func (c *Cycle) remeshOrRetry(d trigger.Decision, gp *fem.GaussPoints, obs Observer) (verdict, error) {
	rr, err := c.remesh(d, gp)
	if err == nil {
		c.remeshFails = 0
		return verdict{}, obs.Remesh(rr, View{c})
	}
	c.remeshFails++
	if c.remeshFails >= remeshAttempts {
		return stopWith(solver.Stopped, fmt.Sprintf("remesh %d failed %d times in a row, last: %v", c.remeshes+1, c.remeshFails, err)), nil
	}
	if err := c.rebindSolver(c.prob); err != nil {
		return verdict{}, err
	}
	if fo, ok := obs.(RemeshFailureObserver); ok {
		return verdict{}, fo.RemeshFailed(c.remeshes+1, c.steps, err)
	}
	return verdict{}, nil
}

// rebindSolver moves the solver onto problem p with p's control.
func (c *Cycle) rebindSolver(p *fem.Problem) error {
	ctl, err := c.control(p)
	if err != nil {
		return err
	}
	if err := c.solver.Rebind(p, ctl); err != nil {
		return fmt.Errorf("opening control: %w", err)
	}
	return nil
}

// record evaluates the crack-growth measures of the converged state whose
// Gauss-point data is gp.
func (c *Cycle) record(st solver.Step, gp *fem.GaussPoints) (*StepRecord, error) {
	p := c.prob
	rec := &StepRecord{
		Step: c.steps, T: c.Tau(), Load: p.TCommitted, Dofs: p.Dofs.N, Elements: len(c.mesh.Tri) - c.releasedCount(),
		Remeshes: c.remeshes, Iters: st.Iterations, Cutbacks: st.Cutbacks,
		JFar: math.NaN(), JDomain: math.NaN(), CTOD: math.NaN(), Gauge: math.NaN(),
		Residuals: append([]float64(nil), st.Residuals...),
		StepWall:  st.Wall, CumWall: c.wall,
	}
	var err error
	rec.Control, rec.Force, err = c.cfg.Measure(p)
	if err != nil {
		return nil, err
	}
	for i := range gp.Points {
		rec.MaxPorosity = math.Max(rec.MaxPorosity, gp.Points[i].State.F)
	}
	if c.cfg.Gauge != nil {
		if rec.Gauge, err = c.cfg.Gauge(p); err != nil {
			return nil, fmt.Errorf("step %d: gauge: %w", c.steps, err)
		}
	}
	if k := c.cfg.KField; k != nil {
		rec.JFar = criteria.FarFieldJMixed(k.K*p.TCommitted, k.KII*p.TCommitted, k.El)
	}
	if len(c.seeds) == 0 {
		return rec, nil
	}
	rec.Da, rec.DaProj, rec.DaFront = c.da, c.daProj, c.daFront
	rec.TipX = c.tips[0].X
	if c.cfg.J != nil {
		js, err := c.domainJ(gp)
		if err != nil {
			rec.Unmeasured = append(rec.Unmeasured, err) // criteria names it
		}
		if len(js) > 0 {
			rec.JRings = js
			// The outermost ring: the most remote from the process zone,
			// where incremental plasticity and damage spoil path
			// independence least (common practice).
			rec.JDomain = js[len(js)-1]
		}
	}
	if op, err := c.ctod(); err != nil {
		rec.Unmeasured = append(rec.Unmeasured, fmt.Errorf("CTOD: %w", err))
	} else {
		rec.CTOD = op
	}
	return rec, nil
}

// locateFront locates the damage front of the converged state: how far
// each tip has grown. A material without porosity (Fc = 0), or a domain
// without crack tips, has no front: nil.
func (c *Cycle) locateFront(gp *fem.GaussPoints) (*criteria.Front, error) {
	if !(c.cfg.Fc > 0) || len(c.seeds) == 0 {
		return nil, nil
	}
	front, err := criteria.LocateFront(c.mesh, gp, criteria.FrontOptions{Fc: c.cfg.Fc, Tips: c.seeds})
	if err != nil {
		return nil, fmt.Errorf("step %d: crack tip: %w", c.steps, err)
	}
	return front, nil
}

// follow moves the crack tips to the located front; the run's Δa is that
// of the tip that has grown furthest.
func (c *Cycle) follow(front *criteria.Front) {
	c.daFront = math.NaN()
	if front == nil {
		return
	}
	c.daFront = 0
	for i, t := range front.Tips {
		c.daFront = math.Max(c.daFront, t.DAFront)
		if t.DA >= c.da {
			c.da, c.daProj = t.DA, t.DAProj
		}
		if i < len(c.tips) && t.Grown {
			c.tips[i] = t.Tip
		}
	}
}

// domainJ evaluates J on the configured rings around the first tip.
func (c *Cycle) domainJ(gp *fem.GaussPoints) ([]float64, error) {
	jc := c.cfg.J
	rings := make([]criteria.Ring, len(jc.Rings))
	for i, r := range jc.Rings {
		rings[i] = criteria.Ring{In: r.In * jc.Unit, Out: r.Out * jc.Unit}
	}
	t := c.tips[0]
	return criteria.DomainJ(c.mesh, gp, criteria.JOptions{Tip: t.X, Dir: t.Dir, Rings: rings, Symmetric: c.cfg.Symmetric})
}

// ctod measures the crack-tip opening at the first tip.
func (c *Cycle) ctod() (float64, error) {
	t := c.tips[0]
	op, err := criteria.CTOD(c.mesh, c.prob.Displacement(), criteria.CTODOptions{Tip: t.X, Dir: t.Dir, Symmetric: c.cfg.Symmetric, Locator: c.locator()})
	return op.Delta, err
}

// releasedCount is the number of elements out of the assembly.
func (c *Cycle) releasedCount() int {
	n := 0
	for e := range c.mesh.Tri {
		if c.prob.Released(e) {
			n++
		}
	}
	return n
}
