package remesh

import (
	"errors"
	"fmt"
	"math"
	"sort"
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
	// F0, Fc and FBreak are the material's porosity levels (initial,
	// coalescence onset, broken): they set the transfer bounds and the
	// damage-front levels. Fc = 0 means a material without porosity (no
	// damage front, Δa stays 0).
	F0, Fc, FBreak float64
	// Length is the internal length ℓ (0 = local model); the adaptive
	// cycle measures its zones in Length, or in 2·h_fine for a local model.
	Length float64

	// BCs returns the boundary conditions of a mesh (labels and named
	// points survive remeshing, so the same function serves every mesh).
	BCs func(m *fem.Mesh) (fem.BCs, error)
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
	Step              int
	T, Load           float64 // pseudo-time and load factor (equal unless under a Control)
	Control, Force    float64
	JFar, JDomain     float64
	JRings            []float64
	Da, DaProj, CTOD  float64
	Dofs, Elements    int
	Remeshes, Iters   int
	Cutbacks          int
	MaxPorosity       float64
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
	Index                       int
	Step                        int
	T, Da                       float64
	Reason                      string
	DofsBefore, DofsAfter       int
	ElemsBefore, ElemsAfter     int
	MinSize, MinAngle           float64
	ForceBefore, ForceTransfer  float64
	ForceAfter                  float64
	MaxFBefore, MaxFAfter       float64
	IntPBefore, IntPAfter       float64
	WorkBefore, WorkAfter       float64
	Removed, Verbatim           int
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
// run stops (see DEVELOPERS.md, decision log: a failed re-equilibration
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
	Zone  size.FineZone
	Seeds []criteria.Tip
	// Tips are the current crack tips (initially the domain's).
	Tips []criteria.Tip
	// Steps, Remeshes count converged steps and remeshes; PeakDofs is the
	// largest problem so far.
	Steps, Remeshes int
	PeakDofs        int
	Da, DaProj      float64
	// Wall is the wall time of the run so far (carried across resumes).
	Wall time.Duration

	solver *solver.Solver
	// wall0 and started: the wall time before this Run and its start.
	wall0   time.Duration
	started time.Time
	// remeshFails counts the remeshes that failed in a row.
	remeshFails int
}

// stage is a problem on one mesh, with the run's configuration: the
// current one, or a new mesh's while its transferred state settles.
type stage struct {
	Cfg  *CycleConfig
	Mesh *fem.Mesh
	Prob *fem.Problem
	gp   fem.GaussPoints
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
	c := &Cycle{stage: stage{Cfg: &cfg}}
	c.Zone = size.InitialZone(sf, c.hWake())
	for _, name := range sortedTipNames(cfg.Domain) {
		pt := cfg.Domain.Points[name]
		tip := criteria.Tip{Name: name, X: pt.X, Dir: pt.Dir}
		c.Seeds = append(c.Seeds, tip)
		c.Tips = append(c.Tips, tip)
	}
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
	opt := c.Cfg.Solver
	opt.Dt = math.Min(math.Max(dt, opt.DtMin), opt.DtMax)
	s, err := solver.New(c.Prob, opt)
	if err != nil {
		return err
	}
	c.solver = s
	ctl, err := c.control(c.Prob)
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
	if c.Cfg.Control == nil {
		return nil, nil
	}
	ctl, err := c.Cfg.Control(p)
	if err != nil {
		return nil, fmt.Errorf("opening control: %w", err)
	}
	return ctl, nil
}

// Tau is the committed pseudo-time: the load factor, or under a control
// the pseudo-time that drives the opening.
func (c *Cycle) Tau() float64 { return c.solver.Time() }

// sortedTipNames lists the domain's crack-tip points in name order, so that
// every run (and every resume) sees them in the same order.
func sortedTipNames(d *geom.Domain) []string {
	var names []string
	for name, p := range d.Points {
		if p.Tip {
			names = append(names, name)
		}
	}
	sort.Strings(names)
	return names
}

// hWake is the size damaged points outside the fine zone may have.
func (c *Cycle) hWake() float64 {
	if c.Cfg.Adapt {
		return c.Cfg.Follow.HWake()
	}
	return c.Cfg.Size.WithDefaults().HFar
}

// newStage builds the problem on mesh m (its state virgin).
func (c *Cycle) newStage(m *fem.Mesh) (*stage, error) {
	bcs, err := c.Cfg.BCs(m)
	if err != nil {
		return nil, fmt.Errorf("cycle: boundary conditions: %w", err)
	}
	p, err := fem.NewProblem(m, c.Cfg.Material, c.Cfg.FE, bcs)
	if err != nil {
		return nil, fmt.Errorf("cycle: problem: %w", err)
	}
	return &stage{Cfg: c.Cfg, Mesh: m, Prob: p}, nil
}

// setMesh makes the problem on mesh m (its state virgin) the current one.
func (c *Cycle) setMesh(m *fem.Mesh) error {
	next, err := c.newStage(m)
	if err != nil {
		return err
	}
	if c.Prob != nil {
		c.Prob.Close()
	}
	c.stage = *next
	c.PeakDofs = max(c.PeakDofs, next.Prob.Dofs.N)
	return nil
}

// GaussPoints returns the committed Gauss-point data of the stage's
// problem (refreshed on every call; the slice is reused).
func (c *stage) GaussPoints() *fem.GaussPoints {
	c.Prob.GaussPoints(&c.gp)
	return &c.gp
}

// Run advances the run until stop.t, stop.da, the deadline, the step
// limit or a stall of the solver, calling obs after every step and remesh.
// One pass of the loop is the adaptive cycle: solve an increment → locate
// the damage front → record → decide → (remesh: size field → new geometry
// → mesh → transfer → settle → re-equilibrate).
func (c *Cycle) Run(obs Observer) (Outcome, error) {
	c.started, c.wall0 = time.Now(), c.Wall
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
		if v, err := c.remeshOrRetry(v.remesh, obs); err != nil || v.stop {
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
	c.Wall = c.wall0 + time.Since(c.started)
	status := v.status
	if !v.stop {
		status = solver.Stopped // an error ended the run
	}
	return Outcome{Status: status, Reason: v.reason, Steps: c.Steps, T: c.Tau(), Da: c.Da, PeakDof: c.PeakDofs}
}

// atLimit reports whether the run has reached stop.t or the step limit.
func (c *Cycle) atLimit() (verdict, bool) {
	if c.solver.Done() {
		return stopWith(solver.Completed, ""), true
	}
	if max := c.Cfg.Solver.MaxSteps; c.Steps >= max {
		return stopWith(solver.Stopped, fmt.Sprintf("step limit %d reached at t = %g", max, c.Tau())), true
	}
	return verdict{}, false
}

// solveIncrement advances the solver by one converged increment. A stall
// (increments cut below the minimum) ends the run with its reason.
func (c *Cycle) solveIncrement() (solver.Step, verdict, error) {
	st, err := c.solver.Next()
	c.Wall = c.wall0 + time.Since(c.started)
	var stall *solver.StallError
	if errors.As(err, &stall) {
		return st, stopWith(solver.Stopped, stall.Error()), nil
	}
	if err != nil {
		return st, verdict{}, err
	}
	c.Steps++
	return st, verdict{}, nil
}

// decide ends the run when the crack has grown far enough or the deadline
// has passed, and asks the trigger whether a remesh is due.
func (c *Cycle) decide(gp *fem.GaussPoints) (verdict, error) {
	if c.Cfg.StopDa > 0 && c.Da >= c.Cfg.StopDa {
		return stopWith(solver.Completed, fmt.Sprintf("crack growth Δa = %.4g reached stop.da = %g", c.Da, c.Cfg.StopDa)), nil
	}
	if !c.Cfg.Deadline.IsZero() && time.Now().After(c.Cfg.Deadline) {
		return stopWith(solver.Stopped, "wall-clock limit stop.hours reached"), nil
	}
	if !c.Cfg.Adapt {
		return verdict{}, nil
	}
	d, err := trigger.Check(c.Mesh, gp, c.Tips, &c.Zone, c.Remeshes, c.Cfg.Trigger)
	return verdict{remesh: d}, err
}

// remeshOrRetry remeshes for decision d. A failed remesh leaves the run on
// its old mesh and state, to try again after the next step (a transient
// failure, typically in re-equilibration), unless it has failed
// remeshAttempts times in a row.
func (c *Cycle) remeshOrRetry(d trigger.Decision, obs Observer) (verdict, error) {
	rr, err := c.remesh(d)
	if err == nil {
		c.remeshFails = 0
		return verdict{}, obs.Remesh(rr, View{c})
	}
	c.remeshFails++
	if c.remeshFails >= remeshAttempts {
		return stopWith(solver.Stopped, fmt.Sprintf("remesh %d failed %d times in a row, last: %v", c.Remeshes+1, c.remeshFails, err)), nil
	}
	if err := c.rebindSolver(c.Prob); err != nil {
		return verdict{}, err
	}
	if fo, ok := obs.(RemeshFailureObserver); ok {
		return verdict{}, fo.RemeshFailed(c.Remeshes+1, c.Steps, err)
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
	p := c.Prob
	rec := &StepRecord{
		Step: c.Steps, T: c.Tau(), Load: p.TCommitted, Dofs: p.Dofs.N, Elements: len(c.Mesh.Tri) - c.brokenCount(),
		Remeshes: c.Remeshes, Iters: st.Iterations, Cutbacks: st.Cutbacks,
		JFar: math.NaN(), JDomain: math.NaN(), CTOD: math.NaN(),
		Residuals: append([]float64(nil), st.Residuals...),
		StepWall:  st.Wall, CumWall: c.Wall,
	}
	var err error
	rec.Control, rec.Force, err = c.Cfg.Measure(p)
	if err != nil {
		return nil, err
	}
	for i := range gp.Points {
		rec.MaxPorosity = math.Max(rec.MaxPorosity, gp.Points[i].State.F)
	}
	if k := c.Cfg.KField; k != nil {
		rec.JFar = criteria.FarFieldJMixed(k.K*p.TCommitted, k.KII*p.TCommitted, k.El)
	}
	if len(c.Seeds) == 0 {
		return rec, nil
	}
	rec.Da, rec.DaProj = c.Da, c.DaProj
	rec.TipX = c.Tips[0].X
	if c.Cfg.J != nil {
		js, err := c.domainJ(gp)
		if err != nil {
			rec.Unmeasured = append(rec.Unmeasured, fmt.Errorf("domain J: %w", err))
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
	if !(c.Cfg.Fc > 0) || len(c.Seeds) == 0 {
		return nil, nil
	}
	front, err := criteria.LocateFront(c.Mesh, gp, criteria.FrontOptions{Fc: c.Cfg.Fc, Tips: c.Seeds})
	if err != nil {
		return nil, fmt.Errorf("step %d: crack tip: %w", c.Steps, err)
	}
	return front, nil
}

// follow moves the crack tips to the located front; the run's Δa is that
// of the tip that has grown furthest.
func (c *Cycle) follow(front *criteria.Front) {
	if front == nil {
		return
	}
	for i, t := range front.Tips {
		if t.DA >= c.Da {
			c.Da, c.DaProj = t.DA, t.DAProj
		}
		if i < len(c.Tips) && t.Grown {
			c.Tips[i] = t.Tip
		}
	}
}

// domainJ evaluates J on the configured rings around the first tip.
func (c *Cycle) domainJ(gp *fem.GaussPoints) ([]float64, error) {
	jc := c.Cfg.J
	rings := make([]criteria.Ring, len(jc.Rings))
	for i, r := range jc.Rings {
		rings[i] = criteria.Ring{In: r.In * jc.Unit, Out: r.Out * jc.Unit}
	}
	t := c.Tips[0]
	return criteria.DomainJ(c.Mesh, gp, criteria.JOptions{Tip: t.X, Dir: t.Dir, Rings: rings, Symmetric: c.Cfg.Symmetric})
}

// ctod measures the crack-tip opening at the first tip.
func (c *Cycle) ctod() (float64, error) {
	u, err := c.Displacement()
	if err != nil {
		return 0, err
	}
	t := c.Tips[0]
	op, err := criteria.CTOD(c.Mesh, u, criteria.CTODOptions{Tip: t.X, Dir: t.Dir, Symmetric: c.Cfg.Symmetric})
	return op.Delta, err
}

// Displacement returns the committed nodal displacement.
func (c *Cycle) Displacement() ([][2]float64, error) {
	n := len(c.Mesh.X)
	ux, uy := make([]float64, n), make([]float64, n)
	if err := c.Prob.NodalField(fem.Ux, ux); err != nil {
		return nil, err
	}
	if err := c.Prob.NodalField(fem.Uy, uy); err != nil {
		return nil, err
	}
	u := make([][2]float64, n)
	for i := range u {
		u[i] = [2]float64{ux[i], uy[i]}
	}
	return u, nil
}

func (c *Cycle) brokenCount() int {
	n := 0
	for e := range c.Mesh.Tri {
		if c.Prob.Released(e) {
			n++
		}
	}
	return n
}
