package remesh

import (
	"errors"
	"fmt"
	"math"

	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/plane"
	"tearline/transfer"
)

// stage is a problem on one mesh, with the run's configuration: the
// current one, or a new mesh's while its transferred state settles.
type stage struct {
	cfg  *CycleConfig
	mesh *fem.Mesh
	prob *fem.Problem
	gp   fem.GaussPoints
	// loc is the point locator of mesh, built on first use.
	loc *plane.Locator
}

// locator returns the stage's point locator on its mesh.
func (c *stage) locator() *plane.Locator {
	if c.loc == nil {
		c.loc = c.mesh.CornerLocator()
	}
	return c.loc
}

// GaussPoints returns the committed Gauss-point data of the stage's
// problem (refreshed on every call; the slice is reused).
func (c *stage) GaussPoints() *fem.GaussPoints {
	c.prob.GaussPoints(&c.gp)
	return &c.gp
}

// linearFields lists the corner-node fields a transfer carries, in the
// order of transfer.Fields.Linear (those switched on).
func linearFields() [4]fem.Field {
	return [4]fem.Field{fem.Theta, fem.Pressure, fem.Abar, fem.Lambda}
}

// fields collects the committed state of the current problem for a transfer.
func (c *stage) fields(gp *fem.GaussPoints) (*transfer.Fields, error) {
	f := &transfer.Fields{U: c.prob.Displacement()}
	nn := len(c.mesh.X)
	for _, fd := range linearFields() {
		if !c.prob.Dofs.Has(fd) {
			continue
		}
		v := make([]float64, nn)
		if err := c.prob.NodalField(fd, v); err != nil {
			return nil, err
		}
		f.Linear = append(f.Linear, v[:c.mesh.NumCorners])
	}
	n := len(gp.Points)
	f.State = make([]material.State, n)
	f.Gauss = make([]transfer.GaussData, n)
	for i := range gp.Points {
		g := &gp.Points[i]
		f.State[i] = g.State
		d := &f.Gauss[i]
		d.W, d.F, d.P = g.W, g.F, g.P
		// The elastic strain the material saw (see reconcilePlasticStrain);
		// zero where the element is inverted.
		E, err := c.prob.MaterialStrain(i/gp.PerElement, i%gp.PerElement)
		if inverted(err) {
			continue
		}
		if err != nil {
			return nil, err
		}
		for k := 0; k < 4; k++ {
			d.Ee[k] = E[k] - g.State.Ep[k]
		}
	}
	return f, nil
}

// reconcilePlasticStrain makes the transferred state compatible with the
// transferred displacement: at a new Gauss point where the two disagree by
// more than twice the elastic strain, the plastic strain is set to
// Eᵖ = Ẽ(u) − Eᵉ, with Ẽ the strain the material sees
// (fem.Problem.MaterialStrain) and Eᵉ the projected elastic strain
// (transfer.GaussData.Ee). The recovered Eᵖ is smoothed where the plastic
// strain peaks, while u is interpolated exactly; their mismatch would
// appear as an elastic strain of the size of the plastic one (stresses of
// tens of GPa at a crack tip). Transferring the elastic strain and letting
// Eᵖ absorb the difference keeps the stress continuous (common practice; cf. Perić et al. 1996, CMAME 137,
// on transfer operators for evolving meshes).
func (c *stage) reconcilePlasticStrain(f *transfer.Fields) error {
	if f.Gauss == nil {
		return nil
	}
	nq := fem.ElementRule().Len()
	st := c.prob.State()
	fixed := make([][]material.State, len(st))
	for e := range st {
		fixed[e] = append([]material.State(nil), st[e]...)
		for g := 0; g < nq; g++ {
			s := &fixed[e][g]
			if s.Broken {
				continue
			}
			E, err := c.prob.MaterialStrain(e, g)
			if inverted(err) && c.prob.Straighten(e) {
				E, err = c.prob.MaterialStrain(e, g)
			}
			if err != nil {
				return err
			}
			i := e*nq + g
			// Only where the mismatch is large against the elastic strain
			// itself: elsewhere the projected Eᵖ is the better estimate
			// and is kept.
			ee := f.Gauss[i].Ee
			var mis material.Sym
			for k := 0; k < 4; k++ {
				mis[k] = E[k] - s.Ep[k] - ee[k]
			}
			if math.Sqrt(mis.Ddot(mis)) > 2*math.Max(math.Sqrt(ee.Ddot(ee)), 1e-4) {
				for k := 0; k < 4; k++ {
					s.Ep[k] = E[k] - ee[k]
				}
			}
		}
	}
	return c.prob.SetState(fixed)
}

// yieldStress is the current flow stress of the point at barycentric
// coordinates l of element e with cumulative plastic strain p, with the
// interpolated nodal ā and λ of the regularised model.
func (c *stage) yieldStress(m material.Plastic, e int, l [3]float64, p float64) float64 {
	if !c.prob.Regularised() {
		return m.FlowStress(p, 0, 0)
	}
	return m.FlowStress(p, c.prob.LinearFieldAt(fem.Abar, e, l), c.prob.LinearFieldAt(fem.Lambda, e, l))
}

// inverted reports whether err is that of an element the displacement
// inverts.
func inverted(err error) bool {
	var ee *fem.ElementError
	return errors.As(err, &ee) && ee.Inverted
}

// maxRepairs bounds the points settleTransferred may repair in one remesh.
const maxRepairs = 200

// settleTransferred evaluates the transferred state. Where a point's
// material update fails on it (a trial stress far outside the yield
// surface, which the return mapping cannot bring back), that point's
// elastic strain is scaled back onto the surface of a plastic model
// (material.Plastic) and the evaluation is repeated. Only failing points
// are repaired: elsewhere the projected state is the better estimate, and
// scaling every point outside the surface disturbs a converged state more
// than re-equilibration repairs. It returns the number of points repaired.
func (c *stage) settleTransferred() (int, error) {
	pm, _ := c.cfg.Material.(material.Plastic)
	rule := fem.ElementRule()
	for n := 0; ; n++ {
		err := c.prob.Assemble(false)
		var ee *fem.ElementError
		if err == nil || n == maxRepairs || !errors.As(err, &ee) {
			return n, err
		}
		if ee.Inverted {
			// The transferred displacement inverts a quadratic element
			// (its midside nodes interpolated from strongly distorted old
			// elements): straighten its edges, i.e. put each midside
			// node's displacement at the mean of its edge's corners.
			if !c.prob.Straighten(ee.Elem) {
				return n, err
			}
			continue
		}
		if pm == nil {
			return n, err
		}
		st := c.prob.State()
		fixed := make([][]material.State, len(st))
		copy(fixed, st)
		fixed[ee.Elem] = append([]material.State(nil), st[ee.Elem]...)
		s := &fixed[ee.Elem][ee.Point]
		l := rule.L[ee.Point]
		E, err2 := c.prob.MaterialStrain(ee.Elem, ee.Point)
		if err2 != nil {
			return n, err
		}
		flow := c.yieldStress(pm, ee.Elem, l, s.P)
		if r := pm.LocalFlowStress(s.P); c.prob.Regularised() && flow < 0.5*r {
			// The interpolated multiplier field (λ varies steeply between
			// nodes next to a softening zone) leaves no elastic range,
			// A = R + λ + r(p − ā) ≤ 0. λ and ā are unknowns, not
			// history: restart them at the element's corners from the
			// local solution and let the re-equilibration find them.
			c.prob.ResetRegularisation(ee.Elem, s.P)
			continue
		}
		changed, err2 := pm.ScaleToYield(s, E, flow)
		if err2 != nil {
			return n, err
		}
		if !changed {
			// inside the surface by this measure and still failing:
			// release half of the elastic strain and try again
			for k := 0; k < 4; k++ {
				s.Ep[k] = 0.5 * (s.Ep[k] + E[k])
			}
		}
		if err := c.prob.SetState(fixed); err != nil {
			return n, err
		}
	}
}

// gaussData unpacks the Gauss-point data of f into W and, for an exact
// (checkpointed) state, F and P, in the layout of
// fem.Problem.SetGaussData. Transferred F and P are not those of the
// transferred displacement: they stay nil, and the caller adopts the
// assembled ones instead.
func gaussData(f *transfer.Fields, exact bool) (F, P [][5]float64, W []float64, err error) {
	if f.Gauss == nil {
		return nil, nil, nil, errors.New("the state holds no Gauss-point data (W, F, P)")
	}
	n := len(f.Gauss)
	W = make([]float64, n)
	if exact {
		F, P = make([][5]float64, n), make([][5]float64, n)
	}
	for i, d := range f.Gauss {
		W[i] = d.W
		if exact {
			F[i], P[i] = d.F, d.P
		}
	}
	return F, P, W, nil
}

// install puts transferred (or checkpointed, exact) fields into the
// current problem as its committed state at pseudo-time t.
func (c *stage) install(f *transfer.Fields, t float64, exact bool) error {
	p := c.prob
	nn := len(c.mesh.X)
	ux, uy := make([]float64, nn), make([]float64, nn)
	for i, u := range f.U {
		ux[i], uy[i] = u[0], u[1]
	}
	if err := p.SetNodalField(fem.Ux, ux); err != nil {
		return err
	}
	if err := p.SetNodalField(fem.Uy, uy); err != nil {
		return err
	}
	k := 0
	for _, fd := range linearFields() {
		if !p.Dofs.Has(fd) {
			continue
		}
		if k >= len(f.Linear) {
			return fmt.Errorf("install: field %v missing from the transferred state", fd)
		}
		v := make([]float64, nn)
		copy(v, f.Linear[k])
		if err := p.SetNodalField(fd, v); err != nil {
			return err
		}
		k++
	}
	nq := fem.ElementRule().Len()
	st := make([][]material.State, len(c.mesh.Tri))
	for e := range st {
		st[e] = f.State[e*nq : (e+1)*nq]
	}
	if err := p.SetState(st); err != nil {
		return err
	}
	F, P, W, err := gaussData(f, exact)
	if err != nil {
		return err
	}
	if err := p.SetGaussData(F, P, W); err != nil {
		return err
	}
	p.Restart(t)
	return nil
}

// reequilibrate brings the transferred state into equilibrium at the
// committed load factor: one increment to the same load, or — when that fails (a
// full Newton solve against the whole out-of-balance force inverts
// elements at a blunted, softening tip) — by relaxing the out-of-balance
// force r₀ of the transferred state in steps, R(u) = (1 − s)·r₀ for s
// rising to 1 (common practice: incremental release of the residual
// forces after a mesh change). It returns the Newton iterations spent.
func (c *stage) reequilibrate(s *solver.Solver) (int, error) {
	st, err := s.Settle()
	its := st.Iterations
	if err == nil {
		return its, nil
	}
	first := err
	var ee *fem.ElementError
	if errors.As(err, &ee) && ee.Elem >= 0 && ee.Elem < len(c.mesh.Tri) {
		var x [2]float64
		for k := 0; k < 3; k++ {
			q := c.mesh.X[c.mesh.Tri[ee.Elem][k]]
			x[0], x[1] = x[0]+q[0]/3, x[1]+q[1]/3
		}
		first = fmt.Errorf("%w (element centred at (%.4g, %.4g))", err, x[0], x[1])
	}
	p := c.prob
	if err := p.Assemble(false); err != nil {
		return its, first
	}
	if err := p.SetImbalance(p.Res, 1); err != nil {
		return its, err
	}
	defer p.SetImbalance(nil, 0)
	done, ds := 0.0, 0.25
	for done < 1 {
		next := math.Min(1, done+ds)
		p.SetImbalanceScale(1 - next)
		st, err := s.Settle()
		its += st.Iterations
		if err != nil {
			if ds /= 2; ds < 1.0/256 {
				return its, fmt.Errorf("%v; relaxing the out-of-balance force stopped at %.1f%%: %w", first, 100*done, err)
			}
			continue
		}
		done = next
	}
	return its, nil
}
