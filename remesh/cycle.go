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
	Reequilibrium     bool // the step re-established equilibrium after a transfer
	StepWall, CumWall time.Duration
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

// Observer receives the cycle's records as they happen. Any error it
// returns stops the run (and is returned by Run).
type Observer interface {
	Step(r *StepRecord, c *Cycle) error
	Remesh(r *RemeshRecord, c *Cycle) error
}

// RemeshFailureObserver is an Observer that also hears of a remesh that
// failed and was put off: the run goes on with the old mesh and tries
// again after the next step.
type RemeshFailureObserver interface {
	RemeshFailed(index, step int, err error) error
}

// remeshAttempts is how many times in a row a remesh may fail before the
// run stops (our choice: the 30ℓ boundary-layer run passed, one step
// later, a remesh whose re-equilibration had failed).
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
// crack tips and what has been recorded so far.
type Cycle struct {
	Cfg   CycleConfig
	Mesh  *fem.Mesh
	Prob  *fem.Problem
	Zone  size.FineZone
	Seeds []criteria.Tip
	// Tips are the current crack tips (initially the domain's).
	Tips []criteria.Tip
	// Steps, Remeshes count converged steps and remeshes; Dt is the next
	// increment; PeakDofs the largest problem so far.
	Steps, Remeshes int
	Dt              float64
	PeakDofs        int
	Da, DaProj      float64
	// Wall is the wall time of the run so far (carried across resumes).
	Wall time.Duration
	// Tau is the committed pseudo-time: the load factor, or under a
	// Control the pseudo-time that drives the opening.
	Tau float64

	gp     fem.GaussPoints
	solver *solver.Solver
	// prev: the solver's last converged increment, restored from a
	// checkpoint into the first solver of a resumed run, with the
	// control's offset (hasOffset).
	prev      solver.Previous
	offset    float64
	hasOffset bool
	started   time.Time
	stop      *stopRequest
	// remeshFails counts the remeshes that failed in a row.
	remeshFails int
}

type stopRequest struct {
	remesh    bool
	completed bool
	reason    string
	decision  trigger.Decision
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
	c := &Cycle{Cfg: cfg, Dt: cfg.Solver.Dt}
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
	return c, nil
}

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

// newProblem builds the problem on mesh m (its state virgin).
func (c *Cycle) newProblem(m *fem.Mesh) (*fem.Problem, error) {
	bcs, err := c.Cfg.BCs(m)
	if err != nil {
		return nil, fmt.Errorf("cycle: boundary conditions: %w", err)
	}
	p, err := fem.NewProblem(m, c.Cfg.Material, c.Cfg.FE, bcs)
	if err != nil {
		return nil, fmt.Errorf("cycle: problem: %w", err)
	}
	return p, nil
}

// setMesh makes the problem on mesh m (its state virgin) the current one.
func (c *Cycle) setMesh(m *fem.Mesh) error {
	p, err := c.newProblem(m)
	if err != nil {
		return err
	}
	if c.Prob != nil {
		c.Prob.Close()
	}
	c.Mesh, c.Prob = m, p
	if p.Dofs.N > c.PeakDofs {
		c.PeakDofs = p.Dofs.N
	}
	return nil
}

// GaussPoints returns the committed Gauss-point data of the current problem
// (refreshed on every call; the slice is reused).
func (c *Cycle) GaussPoints() *fem.GaussPoints {
	c.Prob.GaussPoints(&c.gp)
	return &c.gp
}

// Run advances the run until stop.t, stop.da, the deadline, or a clean
// solver stop, calling obs after every step and remesh.
func (c *Cycle) Run(obs Observer) (Outcome, error) {
	c.started = time.Now()
	wall0 := c.Wall
	for {
		opt := c.Cfg.Solver
		opt.Dt = math.Min(math.Max(c.Dt, opt.DtMin), opt.DtMax)
		opt.MaxSteps = max(1, opt.MaxSteps-c.Steps)
		s, err := solver.New(c.Prob, opt)
		if err != nil {
			return Outcome{}, err
		}
		if c.Cfg.Control != nil {
			ctl, err := c.Cfg.Control(c.Prob)
			if err != nil {
				return Outcome{}, fmt.Errorf("opening control: %w", err)
			}
			if err := s.SetControl(ctl, c.Tau); err != nil {
				return Outcome{}, fmt.Errorf("opening control: %w", err)
			}
			if c.hasOffset {
				s.Controlled().Offset = c.offset
				c.hasOffset = false
			}
		}
		if c.prev.Dt > 0 {
			if err := s.SetPreviousIncrement(c.prev); err != nil {
				return Outcome{}, err
			}
			c.prev = solver.Previous{}
		}
		c.solver = s
		c.stop = nil
		res, err := s.Run(func(st solver.Step) error {
			c.Wall = wall0 + time.Since(c.started)
			c.Dt = s.NextDt()
			c.Tau = s.Time()
			c.Steps++
			rec, err := c.record(st, false)
			if err != nil {
				return err
			}
			if err := obs.Step(rec, c); err != nil {
				return err
			}
			return c.decide(rec)
		})
		c.Wall = wall0 + time.Since(c.started)
		out := Outcome{Status: res.Status, Reason: res.Reason, Steps: c.Steps, T: c.Tau, Da: c.Da, PeakDof: c.PeakDofs}
		if err != nil && !errors.Is(err, solver.ErrStop) {
			return out, err
		}
		if c.stop == nil {
			return out, nil
		}
		if c.stop.completed {
			out.Status, out.Reason = solver.Completed, c.stop.reason
			return out, nil
		}
		if !c.stop.remesh {
			out.Status, out.Reason = solver.Stopped, c.stop.reason
			return out, nil
		}
		rr, err := c.remesh(c.stop.decision)
		if err != nil {
			// The old mesh and state are intact: go on with them and try
			// again after the next step, when the state has moved on (a
			// transient failure, typically in re-equilibration), unless the
			// remesh has failed remeshAttempts times in a row.
			c.remeshFails++
			if c.remeshFails >= remeshAttempts {
				out.Status, out.Reason = solver.Stopped, fmt.Sprintf("remesh %d failed %d times in a row, last: %v", c.Remeshes+1, c.remeshFails, err)
				return out, nil
			}
			if fo, ok := obs.(RemeshFailureObserver); ok {
				if err := fo.RemeshFailed(c.Remeshes+1, c.Steps, err); err != nil {
					return out, err
				}
			}
			continue
		}
		c.remeshFails = 0
		if err := obs.Remesh(rr, c); err != nil {
			return out, err
		}
	}
}

// decide ends the solver's run after a step when the crack has grown far
// enough, the deadline has passed, or a remesh is due.
func (c *Cycle) decide(rec *StepRecord) error {
	if c.Cfg.StopDa > 0 && c.Da >= c.Cfg.StopDa {
		c.stop = &stopRequest{completed: true, reason: fmt.Sprintf("crack growth Δa = %.4g reached stop.da = %g", c.Da, c.Cfg.StopDa)}
		return solver.ErrStop
	}
	if !c.Cfg.Deadline.IsZero() && time.Now().After(c.Cfg.Deadline) {
		c.stop = &stopRequest{reason: "wall-clock limit stop.hours reached"}
		return solver.ErrStop
	}
	if !c.Cfg.Adapt {
		return nil
	}
	d, err := trigger.Check(c.Mesh, &c.gp, c.Tips, &c.Zone, c.Remeshes, c.Cfg.Trigger)
	if err != nil {
		return err
	}
	if d.Remesh {
		c.stop = &stopRequest{remesh: true, decision: d}
		return solver.ErrStop
	}
	return nil
}

// record evaluates the crack-growth measures of the converged state.
func (c *Cycle) record(st solver.Step, equil bool) (*StepRecord, error) {
	p := c.Prob
	gp := c.GaussPoints()
	rec := &StepRecord{
		Step: c.Steps, T: c.Tau, Load: p.TCommitted, Dofs: p.Dofs.N, Elements: len(c.Mesh.Tri) - c.brokenCount(),
		Remeshes: c.Remeshes, Iters: st.Iterations, Cutbacks: st.Cutbacks,
		JFar: math.NaN(), JDomain: math.NaN(), CTOD: math.NaN(),
		Residuals: append([]float64(nil), st.Residuals...), Reequilibrium: equil,
		StepWall: st.Wall, CumWall: c.Wall,
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
	if err := c.locateTips(gp); err != nil {
		return nil, err
	}
	rec.Da, rec.DaProj = c.Da, c.DaProj
	rec.TipX = c.Tips[0].X
	if c.Cfg.J != nil {
		if js, err := c.domainJ(gp); err == nil && len(js) > 0 {
			rec.JRings = js
			// The outermost ring: the most remote from the process zone,
			// where incremental plasticity and damage spoil path
			// independence least (common practice).
			rec.JDomain = js[len(js)-1]
		}
	}
	if op, err := c.ctod(); err == nil {
		rec.CTOD = op
	}
	return rec, nil
}

// locateTips moves the crack tips to the current damage front and updates
// Δa. A material without porosity (Fc = 0) has no front: the tips stay.
func (c *Cycle) locateTips(gp *fem.GaussPoints) error {
	if !(c.Cfg.Fc > 0) {
		return nil
	}
	front, err := criteria.LocateFront(c.Mesh, gp, criteria.FrontOptions{Fc: c.Cfg.Fc, Tips: c.Seeds})
	if err != nil {
		return fmt.Errorf("step %d: crack tip: %w", c.Steps, err)
	}
	// The run's Δa is that of the tip that has grown furthest.
	for i, t := range front.Tips {
		if t.DA >= c.Da {
			c.Da, c.DaProj = t.DA, t.DAProj
		}
		if i < len(c.Tips) && t.Grown {
			c.Tips[i] = t.Tip
		}
	}
	return nil
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
		if c.Prob.Broken(e) {
			n++
		}
	}
	return n
}
