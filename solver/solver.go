// Package solver drives a finite-element problem (package fem) along a
// pseudo-time t with Newton's method: load stepping with adaptive
// increments, cut-back and retry from the last converged state on any
// failure, a backtracking line search, per-field convergence tests, and a
// clean stop with a stated reason when the increments become too small.
//
// A typical use:
//
//	p, _ := fem.NewProblem(mesh, model, fem.Options{}, bcs)
//	s, _ := solver.New(p, solver.DefaultOptions())
//	res, err := s.Run(func(st solver.Step) error {
//		f, _ := p.Reaction("top")
//		fmt.Println(st.T, f[1], st.Iterations)
//		return nil // or solver.ErrStop to end the run cleanly
//	})
//
// Convergence (DESIGN.md §3): for every field present (ux, uy, θ, P, ā, λ)
// the largest residual of a free unknown must be at most RTol times that
// field's force scale (fem.Problem.Scale: the mean absolute element
// contribution, i.e. the size of the internal forces that balance), and
// the largest Newton correction of each field, multiplied by the residual
// reduction ρ ≤ 1 that correction achieved (scaled residual norm after /
// before; ρ·correction estimates the next correction), at most UTol
// times the largest change of that field over the increment. A residual
// below RTol·TightFactor of its scale is accepted without the correction
// test. A linear problem therefore converges after one solve.
package solver

import (
	"errors"
	"fmt"
	"math"
	"time"

	"tearline/solver/fem"
	"tearline/solver/sparse"
)

// LinearSolver factorises the tangent and solves with it. *sparse.LU
// satisfies it; Analyze is called once per pattern.
type LinearSolver interface {
	Analyze(a *sparse.CSR) error
	Factorize(a *sparse.CSR) error
	Solve(dst, b []float64) error
}

// Options controls the step loop. Start from DefaultOptions.
type Options struct {
	TEnd     float64 // final pseudo-time
	Dt       float64 // first increment
	DtMin    float64 // smallest increment before a clean stop
	DtMax    float64 // largest increment
	MaxSteps int     // most converged steps in one Run
	MaxIter  int     // Newton iterations per attempt
	RTol     float64 // residual tolerance relative to the field's force scale
	UTol     float64 // correction tolerance relative to the increment's change
	// TightFactor: a residual below RTol·TightFactor·scale is converged
	// whatever the correction.
	TightFactor float64
	Grow        float64 // increment growth factor after an easy step
	EasyIter    int     // a step is easy if it converged in at most this many iterations
	Cut         float64 // increment reduction factor after a failure
	// PorosityStep, if > 0, is the largest porosity increase of any point
	// per increment the step size aims at: after a converged increment
	// the next is scaled to it (porosity growth taken as proportional to
	// the increment), never by less than Cut. Tearing steps whose
	// porosity jumps are the ones Newton fails on (see DEVELOPERS.md).
	PorosityStep float64
	// ProcessZone, if > 0, is the porosity from which a point belongs to
	// the process zone, and switches on the dissipation-driven control
	// (zone.go): once the zone exists, each increment prescribes the
	// growth of its plastic strain and the load factor may fall. The run
	// then ends when the load factor reaches TEnd.
	ProcessZone float64
	// LineSearch enables backtracking on the scaled residual norm
	// (Armijo condition, quadratic interpolation, α ≥ 0.1·previous α).
	LineSearch    bool
	LineSearchMax int // most backtracking trials per iteration
	// Diverge: an attempt fails when the scaled residual norm exceeds
	// Diverge times its value at the start of the increment.
	Diverge float64
	// Extrapolate starts each increment from the linear extrapolation of
	// the previous converged increment (scaled by the ratio of the
	// increments) instead of the last converged state; retries after a
	// failure start from the converged state.
	Extrapolate bool
	// Linear is the linear solver; nil means a sparse.LU with its default
	// options (which equilibrates the tangent's rows and columns).
	Linear LinearSolver
	// StrainCap, if > 0, limits a Newton correction to at most this
	// change of strain: where the relative displacement correction of the
	// corners of an active element, |Δu_a − Δu_b|/|X_a − X_b|, or the
	// correction of the volume variable θ or of ā exceeds it anywhere,
	// the whole correction is scaled down to it (damped Newton, common
	// practice). Near a solution corrections are tiny and the
	// quadratic convergence is untouched; far from it — a nearly released
	// element at a breaking tip, whose stiffness is almost lost — it stops
	// one correction from inverting elements.
	StrainCap float64
	// Failed, if not nil, hears of every failed attempt (the increment
	// from t that was tried and why it failed) before the cut-back.
	Failed func(t, dt float64, err error)
}

// DefaultOptions returns the defaults: t from 0 to 1 in a first increment
// of 0.1 (0.1 ≤ Δt ≤ 1 adaptively, down to 1e-6), 15 iterations, RTol 1e-6,
// UTol 1e-4, TightFactor 1e-3, growth 1.5 after ≤ 4 iterations, halving on
// failure, line search on (4 trials), divergence at 1e6×, extrapolation on,
// corrections capped at a strain change of 0.25.
func DefaultOptions() Options {
	return Options{
		TEnd: 1, Dt: 0.1, DtMin: 1e-6, DtMax: 1, MaxSteps: 100000, MaxIter: 15, StrainCap: 0.25,
		RTol: 1e-6, UTol: 1e-4, TightFactor: 1e-3, Grow: 1.5, EasyIter: 4, Cut: 0.5,
		LineSearch: true, LineSearchMax: 4, Diverge: 1e6, Extrapolate: true,
	}
}

// Validate reports the first option outside its allowed range.
func (o Options) Validate() error {
	pos := func(name string, v float64) error {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("solver options: %s = %g must be finite and > 0", name, v)
		}
		return nil
	}
	for _, c := range []struct {
		n string
		v float64
	}{{"TEnd", o.TEnd}, {"Dt", o.Dt}, {"DtMin", o.DtMin}, {"DtMax", o.DtMax}, {"RTol", o.RTol}, {"UTol", o.UTol}, {"TightFactor", o.TightFactor}, {"Diverge", o.Diverge}} {
		if err := pos(c.n, c.v); err != nil {
			return err
		}
	}
	switch {
	case o.DtMin > o.Dt || o.Dt > o.DtMax:
		return fmt.Errorf("solver options: need DtMin ≤ Dt ≤ DtMax, have %g, %g, %g", o.DtMin, o.Dt, o.DtMax)
	case o.MaxSteps < 1:
		return fmt.Errorf("solver options: MaxSteps = %d must be ≥ 1", o.MaxSteps)
	case o.MaxIter < 1 || o.MaxIter > 1000:
		return fmt.Errorf("solver options: MaxIter = %d must be in [1, 1000]", o.MaxIter)
	case !(o.Grow >= 1):
		return fmt.Errorf("solver options: Grow = %g must be ≥ 1", o.Grow)
	case o.EasyIter < 0:
		return fmt.Errorf("solver options: EasyIter = %d must be ≥ 0", o.EasyIter)
	case !(o.Cut > 0 && o.Cut < 1):
		return fmt.Errorf("solver options: Cut = %g must be in (0, 1)", o.Cut)
	case o.LineSearch && (o.LineSearchMax < 1 || o.LineSearchMax > 50):
		return fmt.Errorf("solver options: LineSearchMax = %d must be in [1, 50]", o.LineSearchMax)
	case !(o.StrainCap >= 0) || math.IsInf(o.StrainCap, 0):
		return fmt.Errorf("solver options: StrainCap = %g must be finite and ≥ 0 (0 = no cap)", o.StrainCap)
	case !(o.TightFactor <= 1):
		return fmt.Errorf("solver options: TightFactor = %g must be ≤ 1", o.TightFactor)
	}
	return nil
}

// ErrStop, returned by a step callback, ends Run cleanly after that step.
var ErrStop = errors.New("solver: stop requested")

// Step describes a converged increment.
type Step struct {
	Index      int     // 1, 2, … within the run
	T, Dt      float64 // time reached and the increment taken
	Load       float64 // load factor reached (= T unless under a Control)
	Iterations int     // Newton iterations (linear solves) of the converged attempt
	Cutbacks   int     // failed attempts before it
	// PorosityGrowth is the largest porosity increase of a point of an
	// active element over the increment (fem.Problem.PorosityGrowth).
	PorosityGrowth float64
	// Residuals is the scaled residual norm at each iteration of the
	// converged attempt (before each solve, and the final one); it is
	// reused by the next step: copy it to keep it.
	Residuals []float64
	Wall      time.Duration // wall time of the step, attempts included
}

// Status is the outcome of a run.
type Status int

const (
	Completed Status = iota // reached TEnd
	Stopped                 // stopped early; Result.Reason says why
)

func (s Status) String() string {
	if s == Completed {
		return "completed"
	}
	return "stopped"
}

// Result summarises a run.
type Result struct {
	Status     Status
	Reason     string // why the run stopped (empty when completed)
	Steps      int    // converged steps
	T          float64
	Iterations int // total Newton iterations of converged steps
	Cutbacks   int // total failed attempts
}

// Solver runs the Newton loop on one problem (one mesh: the symbolic
// analysis of the tangent is done once).
type Solver struct {
	P   *fem.Problem
	Opt Options
	lin LinearSolver

	du, u0   []float64
	rBase    []float64
	fscale   [fem.NumFields]float64
	rho      float64 // scaled residual reduction of the last iteration, ≤ 1
	history  []float64
	analysed bool
	dt       float64
	dPrev    []float64 // last converged increment of the unknowns
	dtPrev   float64   // and its time increment (0: none usable)
	dLamPrev float64   // and its load-factor increment (under a Control)
	// zoneLast is the process zone's plastic strain V of the last
	// converged increment, zoneLoad its load-factor increment.
	zoneLast, zoneLoad float64
	// zoneSearch: the line search applies under the dissipation-driven
	// control although its constraint is not yet met (it is nonlinear)
	zoneSearch bool

	ctl *Control // nil: the pseudo-time is the load factor
	// pending is the control of a problem the solver was rebound to,
	// anchored once the transferred state is settled (see Rebind).
	pending *Control
	tauC    float64   // committed pseudo-time under a Control
	x2      []float64 // response to the load rate (bordered solve)
}

// New returns a solver for p.
func New(p *fem.Problem, opt Options) (*Solver, error) {
	if p == nil {
		return nil, errors.New("solver: nil problem")
	}
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	s := &Solver{P: p, Opt: opt, lin: opt.Linear, dt: opt.Dt}
	if s.lin == nil {
		s.lin = defaultLinear()
	}
	s.allocate(p.Dofs.N)
	s.history = make([]float64, 0, opt.MaxIter+1)
	if err := s.trackZone(); err != nil {
		return nil, err
	}
	return s, nil
}

// defaultLinear is the linear solver used when Options.Linear is nil.
func defaultLinear() LinearSolver { return &sparse.LU{} }

// allocate sizes the work vectors for n unknowns.
func (s *Solver) allocate(n int) {
	s.du = make([]float64, n)
	s.u0 = make([]float64, n)
	s.rBase = make([]float64, n)
	s.dPrev = make([]float64, n)
}

// attemptError is a failed Newton attempt (the solver cuts back).
type attemptError struct {
	reason string
	err    error
}

func (e *attemptError) Error() string {
	if e.err != nil {
		return e.reason + ": " + e.err.Error()
	}
	return e.reason
}
func (e *attemptError) Unwrap() error { return e.err }

// Increment attempts one increment from the committed state to time t. On
// success the state is committed and the step returned; on failure the
// problem is rolled back to the committed state and the error says why.
// t equal to the committed time re-establishes equilibrium at fixed load
// (after a state transfer).
func (s *Solver) Increment(t float64) (Step, error) { return s.increment(t, s.Time()) }

// increment attempts one increment from pseudo-time from (the committed
// one) to t.
func (s *Solver) increment(t, from float64) (Step, error) {
	p := s.P
	st := Step{T: t, Dt: t - from}
	s.history = s.history[:0]
	it, err := s.newton(t, from)
	st.Iterations = it
	st.Residuals = s.history
	if err != nil {
		p.Rollback()
		s.dtPrev = 0 // retry from the converged state
		return st, err
	}
	st.PorosityGrowth = p.PorosityGrowth()
	s.zoneLast, _, _, _ = p.ProcessZone()
	s.zoneLoad = p.T - p.TCommitted
	for i := range s.dPrev {
		s.dPrev[i] = p.U[i] - p.Committed[i]
	}
	s.dtPrev = st.Dt
	s.dLamPrev = p.T - p.TCommitted
	p.Commit()
	st.Load = p.TCommitted
	if s.ctl != nil {
		s.tauC = t
	}
	return st, nil
}

// newton runs the iterations of one attempt; it returns the number of
// linear solves.
func (s *Solver) newton(t, from float64) (int, error) {
	o := s.Opt
	m0, err := s.begin(t, from)
	if err != nil {
		return 0, err
	}
	first := true
	lastCap := -10 // the last iteration whose correction was capped
	for it := 0; ; it++ {
		conv := s.converged(!first) && s.controlResidual(t) <= o.UTol
		if conv {
			return it, nil
		}
		if it == o.MaxIter {
			return it, &attemptError{reason: fmt.Sprintf("no convergence in %d iterations (scaled residual %.3g)", it, s.history[len(s.history)-1])}
		}
		dLoad, err := s.correction(t)
		if err != nil {
			return it, err
		}
		if o.StrainCap > 0 {
			if c := s.strainCorrection(); c > o.StrainCap {
				lastCap = it
				f := o.StrainCap / c
				for i := range s.du {
					s.du[i] *= f
				}
				dLoad *= f
			}
		}
		s.zoneSearch = !first
		alpha, m, mBase, err := s.lineSearch(t, dLoad)
		if err != nil {
			return it + 1, err
		}
		s.history = append(s.history, m)
		if first && s.ctl != nil {
			// under a Control the load enters with the first correction:
			// the start of the increment may be in equilibrium
			m0 = math.Max(m0, m)
		}
		s.rho = 1
		if mBase > 0 && m < mBase {
			s.rho = m / mBase
		}
		if err := s.progress(it, lastCap, m, m0); err != nil {
			return it + 1, err
		}
		if alpha < 1 {
			for i := range s.du {
				s.du[i] *= alpha
			}
		}
		first = false
	}
}

// begin starts an attempt to pseudo-time t from the committed state (at
// pseudo-time from): it
// extrapolates the last converged increment (Options.Extrapolate),
// assembles, analyses the tangent's pattern the first time, and returns the
// scaled residual m0 it starts from (recorded in the history).
func (s *Solver) begin(t, from float64) (float64, error) {
	p, o := s.P, s.Opt
	p.Rollback()
	load := s.startLoad(t)
	extrapolated := false
	if dt := t - from; o.Extrapolate && s.dtPrev > 0 && dt > 0 {
		extrapolated = true
		f := dt / s.dtPrev
		for i, d := range s.dPrev {
			p.U[i] += f * d
		}
		if s.ctl != nil {
			load += f * s.dLamPrev
		}
	}
	p.SetTime(load)
	if err := p.Assemble(true); err != nil {
		// The extrapolation may overshoot where the response turns (an
		// element near breaking): start again from the converged state.
		if !extrapolated {
			return 0, &attemptError{"assembly at the start of the increment failed", err}
		}
		p.Rollback()
		p.SetTime(s.startLoad(t))
		if err := p.Assemble(true); err != nil {
			return 0, &attemptError{"assembly at the start of the increment failed", err}
		}
	}
	if !s.analysed {
		if err := s.lin.Analyze(p.K); err != nil {
			return 0, &attemptError{"symbolic analysis of the tangent failed", err}
		}
		s.analysed = true
	}
	s.setScales()
	m0 := s.merit(p.Res)
	s.history = append(s.history, m0)
	return m0, nil
}

// correction factorises the tangent and solves for the Newton correction
// s.du; under a Control it returns the load-factor correction of the
// bordered solve as well.
func (s *Solver) correction(t float64) (dLoad float64, err error) {
	p := s.P
	if err := s.lin.Factorize(p.K); err != nil {
		return 0, &attemptError{"factorisation of the tangent failed", err}
	}
	for i, r := range p.Res {
		s.u0[i] = -r
	}
	if err := s.lin.Solve(s.du, s.u0); err != nil {
		return 0, &attemptError{"linear solve failed", err}
	}
	if s.ctl != nil {
		if dLoad, err = s.borderedStep(t); err != nil {
			return 0, &attemptError{"bordered solve of the opening control failed", err}
		}
	}
	for _, v := range s.du {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, &attemptError{reason: "Newton correction is not finite"}
		}
	}
	return dLoad, nil
}

// lineSearch applies the correction s.du (and dLoad to the load factor
// under a Control) with a backtracking line search on the scaled residual
// (Options.LineSearch): it returns the step length alpha taken, the scaled
// residual m there and mBase of the base, both with the trial's force
// scales. The problem is left assembled at the accepted point.
func (s *Solver) lineSearch(t, dLoad float64) (alpha, m, mBase float64, err error) {
	p, o := s.P, s.Opt
	load0 := p.T
	// Under a Control the first correction brings the load in: its
	// base may be in equilibrium, so the residual cannot judge it;
	// the line search starts once the constraint holds.
	search := o.LineSearch && (s.controlResidual(t) <= o.UTol || (s.ctl != nil && s.ctl.zone && s.zoneSearch))
	copy(s.u0, p.U)
	copy(s.rBase, p.Res)
	alpha = 1.0
	for ls := 0; ; ls++ {
		for i := range p.U {
			p.U[i] = s.u0[i] + alpha*s.du[i]
		}
		if s.ctl != nil {
			p.SetTime(load0 + alpha*dLoad)
		}
		aerr := p.Assemble(true)
		if aerr == nil {
			// compare base and trial with the trial's force scales
			s.setScales()
			mBase, m = s.merit(s.rBase), s.merit(p.Res)
			if !search || m <= (1-1e-4*alpha)*mBase || ls >= o.LineSearchMax {
				return alpha, m, mBase, nil
			}
		} else if !o.LineSearch || ls >= o.LineSearchMax {
			return alpha, m, mBase, &attemptError{"assembly failed", aerr}
		}
		// quadratic interpolation of ½m² along the step, safeguarded
		next := 0.5 * alpha
		if aerr == nil && m > 0 && !math.IsInf(m, 0) {
			// φ(α) = ½m², φ'(0) = −m0² (Newton direction)
			phi0, phi1 := 0.5*mBase*mBase, 0.5*m*m
			d := phi1 - phi0 + 2*phi0*alpha
			if d > 0 {
				next = phi0 * alpha * alpha / d
			}
		}
		alpha = math.Min(math.Max(next, 0.1*alpha), 0.5*alpha)
	}
}

// progress stops an attempt whose scaled residual m (after iteration it;
// m0 at its start) diverges or stagnates; lastCap is the last iteration
// whose correction was capped.
func (s *Solver) progress(it, lastCap int, m, m0 float64) error {
	if math.IsNaN(m) || m > s.Opt.Diverge*math.Max(m0, 1e-300) {
		return &attemptError{reason: fmt.Sprintf("divergence: scaled residual %.3g from %.3g", m, m0)}
	}
	// Stagnation: a Newton iteration that converges reduces the
	// residual many times over in three iterations; one that has not
	// halved it by then is not worth finishing (common practice).
	if h := s.history; len(h) > stagnantAfter && it-lastCap > 3 && m > stagnantBelow && m > 0.5*h[len(h)-4] {
		return &attemptError{reason: fmt.Sprintf("stagnation: scaled residual %.3g after %d iterations, %.3g three iterations before", m, it+1, h[len(h)-4])}
	}
	return nil
}

// startLoad is the load factor an attempt to pseudo-time t starts from,
// before extrapolation: t itself, or under a Control the committed load
// factor (the constraint finds the new one).
func (s *Solver) startLoad(t float64) float64 {
	if s.ctl != nil {
		return s.P.TCommitted
	}
	return t
}

// strainCorrection is the largest relative displacement correction of the
// corners of an active element, or the largest θ or ā correction.
func (s *Solver) strainCorrection() float64 {
	p := s.P
	var m float64
	for e, t := range p.Mesh.Tri {
		if p.Released(e) {
			continue
		}
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			xa, xb := p.Mesh.X[a], p.Mesh.X[b]
			l := math.Hypot(xa[0]-xb[0], xa[1]-xb[1])
			ax, ay := p.Dofs.Of(a, fem.Ux), p.Dofs.Of(a, fem.Uy)
			bx, by := p.Dofs.Of(b, fem.Ux), p.Dofs.Of(b, fem.Uy)
			d := math.Hypot(s.du[ax]-s.du[bx], s.du[ay]-s.du[by])
			if l > 0 && d > m*l {
				m = d / l
			}
		}
	}
	// θ and ā are strains themselves
	for d, v := range s.du {
		if f := p.Dofs.FieldOf[d]; f == fem.Theta || f == fem.Abar {
			m = math.Max(m, math.Abs(v))
		}
	}
	return m
}

// stagnantAfter is the number of iterations before the stagnation test
// applies.
const stagnantAfter = 6

// stagnantBelow is the scaled residual below which an attempt is never
// stopped for stagnation: close to convergence, points that break or
// unload during the iteration slow Newton to a linear rate for a few
// iterations, and such attempts converge within the iteration limit when
// let run.
const stagnantBelow = 1e-2

// setScales freezes, for the attempt, the force scale of each field.
func (s *Solver) setScales() {
	p := s.P
	for f := range s.fscale {
		s.fscale[f] = p.Scale[f]
	}
	u := math.Max(math.Max(p.Scale[fem.Ux], p.Scale[fem.Uy]), p.LoadScale())
	s.fscale[fem.Ux], s.fscale[fem.Uy] = u, u
}

// merit is the scaled residual norm √(Σ_fields (‖R_f‖₂ / scale_f)²) over
// free unknowns.
func (s *Solver) merit(r []float64) float64 {
	p := s.P
	var sum [fem.NumFields]float64
	for d, v := range r {
		sum[p.Dofs.FieldOf[d]] += v * v
	}
	var m float64
	for f, v := range sum {
		if v == 0 {
			continue
		}
		sc := s.fscale[f]
		if sc == 0 {
			return math.Inf(1)
		}
		m += v / (sc * sc)
	}
	return math.Sqrt(m)
}

// converged applies the per-field tests to p.Res and, if withCorr, to the
// last correction s.du against the change over the increment.
func (s *Solver) converged(withCorr bool) bool {
	p, o := s.P, s.Opt
	var rmax, cmax, dmax [fem.NumFields]float64
	for d, v := range p.Res {
		f := p.Dofs.FieldOf[d]
		rmax[f] = math.Max(rmax[f], math.Abs(v))
		if withCorr && !p.Constrained(d) {
			cmax[f] = math.Max(cmax[f], math.Abs(s.du[d]))
			dmax[f] = math.Max(dmax[f], math.Abs(p.U[d]-p.Committed[d]))
		}
	}
	// the two displacement components share one test
	for _, arr := range []*[fem.NumFields]float64{&rmax, &cmax, &dmax} {
		m := math.Max(arr[fem.Ux], arr[fem.Uy])
		arr[fem.Ux], arr[fem.Uy] = m, m
	}
	for f := fem.Field(0); f < fem.NumFields; f++ {
		if !p.Dofs.Has(f) {
			continue
		}
		sc := s.fscale[f]
		if rmax[f] <= o.RTol*o.TightFactor*sc {
			continue
		}
		if rmax[f] > o.RTol*sc || !withCorr {
			return false
		}
		// the correction just made, or the next one estimated from the
		// residual reduction it achieved, must be small against the
		// field's change over the increment
		if cmax[f]*s.rho > o.UTol*dmax[f] {
			return false
		}
	}
	return true
}

// StallError is returned by Next when the increment has been cut back
// below Opt.DtMin: the problem stays at its last converged state.
type StallError struct {
	T, Dt    float64 // committed pseudo-time and the increment last tried
	DtMin    float64
	Cutbacks int   // failed attempts of the step
	Last     error // why the last attempt failed
}

func (e *StallError) Error() string {
	return fmt.Sprintf("increment %.3g below the minimum %.3g at t = %g after %d cut-backs; last failure: %v", e.Dt, e.DtMin, e.T, e.Cutbacks, e.Last)
}

func (e *StallError) Unwrap() error { return e.Last }

// Done reports whether the committed pseudo-time has reached Opt.TEnd.
func (s *Solver) Done() bool {
	if s.ZoneControlled() {
		return s.P.TCommitted >= s.Opt.TEnd*(1-1e-12)
	}
	return s.Time() >= s.Opt.TEnd*(1-1e-12)
}

// Next advances by one converged increment: it tries the current increment
// size (no further than Opt.TEnd), cuts it back by Opt.Cut and retries from
// the committed state after every failure, and returns a *StallError once
// it falls below Opt.DtMin. After an easy step (at most Opt.EasyIter
// iterations, no cut-back) the next increment grows by Opt.Grow, up to
// Opt.DtMax.
func (s *Solver) Next() (Step, error) {
	if err := s.anchor(); err != nil {
		return Step{}, err
	}
	if err := s.zoneSwitch(); err != nil {
		return Step{}, err
	}
	o := s.Opt
	start := time.Now()
	dt := s.dt
	if !s.ZoneControlled() {
		dt = math.Min(dt, o.TEnd-s.Time())
	}
	cuts := 0
	for {
		st, err := s.Increment(s.Time() + dt)
		if err == nil {
			if s.ctl != nil {
				s.ctl.fallback = false
			}
			st.Cutbacks = cuts
			st.Wall = time.Since(start)
			if st.Iterations <= o.EasyIter && cuts == 0 {
				s.dt = math.Min(dt*o.Grow, o.DtMax)
			} else {
				s.dt = dt
			}
			s.dt = math.Min(s.dt, s.porosityDt(dt, st.PorosityGrowth))
			s.zonePace()
			return st, nil
		}
		if o.Failed != nil {
			o.Failed(s.Time(), dt, err)
		}
		cuts++
		if s.zoneFallback(cuts) {
			continue // the same increment, at the committed load
		}
		dt *= o.Cut
		s.dt = dt
		if dt < o.DtMin {
			if s.ctl != nil {
				s.ctl.fallback = false
			}
			return Step{T: s.Time(), Cutbacks: cuts, Wall: time.Since(start)}, &StallError{T: s.Time(), Dt: dt, DtMin: o.DtMin, Cutbacks: cuts, Last: err}
		}
	}
}

// porosityDt is the increment that would have grown the porosity by
// Opt.PorosityStep, from the increment dt just taken and the growth df it
// gave (porosity growth taken as proportional to the increment), never
// below dt·Opt.Cut; +Inf when there is no target or no growth.
func (s *Solver) porosityDt(dt, df float64) float64 {
	o := s.Opt
	if !(o.PorosityStep > 0) || !(df > 0) {
		return math.Inf(1)
	}
	return math.Max(dt*o.PorosityStep/df, dt*o.Cut)
}

// Run advances from the committed time to Opt.TEnd by Next, calling each
// (if not nil) after every converged step. It returns a Result with
// Status Stopped and a Reason when the increment falls below DtMin,
// MaxSteps is reached, or each returns ErrStop; other errors from each
// end the run and are returned.
func (s *Solver) Run(each func(Step) error) (Result, error) {
	res := Result{T: s.Time()}
	for {
		if s.Done() {
			res.Status = Completed
			return res, nil
		}
		if res.Steps >= s.Opt.MaxSteps {
			res.Status, res.Reason = Stopped, fmt.Sprintf("step limit %d reached at t = %g", s.Opt.MaxSteps, s.Time())
			return res, nil
		}
		st, err := s.Next()
		res.Cutbacks += st.Cutbacks
		res.T = s.Time()
		var stall *StallError
		if errors.As(err, &stall) {
			res.Status, res.Reason = Stopped, stall.Error()
			return res, nil
		}
		if err != nil {
			return res, err
		}
		res.Steps++
		res.Iterations += st.Iterations
		st.Index = res.Steps
		if each != nil {
			if err := each(st); err != nil {
				if errors.Is(err, ErrStop) {
					res.Status, res.Reason = Stopped, err.Error()
					return res, nil
				}
				return res, err
			}
		}
	}
}

// Rebind moves the solver onto problem p — the same run on a new mesh,
// whose committed state was transferred from the old one — keeping the
// pseudo-time and the next increment size. The previous increment is
// forgotten (its unknowns belong to the old mesh) and the new tangent's
// pattern is analysed at the next factorisation. ctl (nil: load-factor
// control) is the new mesh's control: it is checked now and anchored at
// the committed state once that is in equilibrium (see Settle), by the
// first Next.
func (s *Solver) Rebind(p *fem.Problem, ctl *Control) error {
	if p == nil {
		return errors.New("solver: rebind to a nil problem")
	}
	tau := s.Time()
	s.P = p
	s.lin = s.Opt.Linear
	if s.lin == nil {
		s.lin = defaultLinear()
	}
	s.analysed = false
	s.allocate(p.Dofs.N)
	s.dtPrev, s.dLamPrev = 0, 0
	s.zoneLast, s.zoneLoad = 0, 0
	if err := s.trackZone(); err != nil {
		return err
	}
	if s.ZoneControlled() {
		// the dissipation-driven control goes on, at its rate
		zc := s.ctl
		if zc == nil {
			zc = s.pending
		}
		s.ctl, s.x2, s.pending = nil, nil, &Control{Rate: zc.Rate, zone: true}
		s.tauC = tau
		return nil
	}
	s.ctl, s.x2, s.pending = nil, nil, nil
	if ctl == nil {
		return nil
	}
	if err := s.checkControl(ctl); err != nil {
		return err
	}
	s.pending, s.tauC = ctl, tau
	return nil
}

// anchor puts a control waiting since Rebind into use at the committed
// state. The tangent is analysed anew for the first increment under it:
// the LU plans its factorisation from the first matrix after an analysis,
// and the increments on a new mesh should not depend on the matrices of
// its re-equilibration.
func (s *Solver) anchor() error {
	if s.pending == nil {
		return nil
	}
	s.analysed = false
	return s.SetControl(s.pending, s.tauC)
}

// Settle re-establishes equilibrium at the committed load factor after the
// state was changed from outside (a transfer): one attempt at fixed load
// under load-factor control, without cut-backs; the pseudo-time does not
// move. Call it again (relaxing an imposed imbalance, say) until the state
// is settled; a control waiting since Rebind is anchored by the first Next.
func (s *Solver) Settle() (Step, error) {
	if s.ctl != nil {
		return Step{}, errors.New("solver: Settle is for a rebound solver, before its control is anchored")
	}
	// the increment is in the load factor, from its committed value
	return s.increment(s.P.TCommitted, s.P.TCommitted)
}

// NextDt returns the increment the next step will try.
func (s *Solver) NextDt() float64 { return s.dt }
