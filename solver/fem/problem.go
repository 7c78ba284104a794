package fem

import (
	"errors"
	"fmt"
	"math"
	"runtime"

	"tearline/solver/material"
	"tearline/solver/sparse"
)

// Kinematics selects the 2D idealisation.
type Kinematics int

const (
	// PlaneStrain: coordinates (x, y), F₃₃ = 1, unit thickness.
	PlaneStrain Kinematics = iota
	// Axisymmetric: coordinates (r, z), F₃₃ = 1 + u_r/R, integration
	// weighted by 2πR (forces and reactions are those of the whole ring).
	Axisymmetric
)

func (k Kinematics) String() string {
	switch k {
	case PlaneStrain:
		return "plane strain"
	case Axisymmetric:
		return "axisymmetric"
	}
	return fmt.Sprintf("Kinematics(%d)", int(k))
}

// Options configures a Problem.
type Options struct {
	Kinematics Kinematics
	// DisplacementOnly switches the mixed u–θ–P formulation off (for the
	// locking comparison); by default the element is mixed.
	DisplacementOnly bool
	// Workers bounds the goroutines of the assembly; 0 means GOMAXPROCS.
	Workers int
	// ReleaseSteps, when positive, is the number of converged steps over
	// which an element gives up its force once one of its points has
	// broken (element vanish, see Release). 0 keeps an element in the
	// assembly until all its points are broken.
	ReleaseSteps int
	// FlapPorosity, when positive (and ReleaseSteps too), releases a flap
	// as well: an element left attached by a single edge, next to released
	// material, with a point at this porosity or above.
	FlapPorosity float64
}

// Validate reports an invalid option.
func (o Options) Validate() error {
	if o.Kinematics != PlaneStrain && o.Kinematics != Axisymmetric {
		return fmt.Errorf("fem options: kinematics %d is neither plane strain (0) nor axisymmetric (1)", int(o.Kinematics))
	}
	if o.Workers < 0 {
		return fmt.Errorf("fem options: workers %d must be ≥ 0 (0 = all cores)", o.Workers)
	}
	if !(o.FlapPorosity >= 0 && o.FlapPorosity < 1) {
		return fmt.Errorf("fem options: flap porosity %g must be in [0, 1) (0 = flaps are not released)", o.FlapPorosity)
	}
	if o.ReleaseSteps < 0 {
		return fmt.Errorf("fem options: release steps %d must be ≥ 0 (0 = an element leaves when all its points are broken)", o.ReleaseSteps)
	}
	return nil
}

// Problem is a discretised boundary-value problem on one mesh: unknowns,
// material state, boundary conditions, the tangent in a fixed sparse
// pattern, and the residual. The Newton loop (package solver) drives it:
//
//	p.SetTime(t)            // prescribed values at t, loads × t
//	p.Assemble(true)        // residual p.Res and tangent p.K at p.U
//	... solve K du = −Res, p.U += du ...
//	p.Commit() or p.Rollback()
type Problem struct {
	Mesh  *Mesh
	Model material.Model
	Opt   Options
	Dofs  *Dofs

	// U holds the current unknowns (the iterate); Committed the last
	// converged ones.
	U, Committed []float64
	// T is the current pseudo-time; TCommitted that of the last commit.
	T, TCommitted float64

	// K is the tangent, Res the residual with the rows of constrained
	// unknowns (prescribed, or orphaned by broken elements) cleared, and
	// Full the residual (internal − external force) before clearing, whose
	// constrained entries are the reactions.
	K         *sparse.CSR
	Res, Full []float64

	// Scale is, per field, the mean over elements and element unknowns of
	// the integral of the absolute terms of the residual (before they
	// cancel) at the last assembly: the size of the forces that balance, a
	// scale for convergence tests.
	Scale [NumFields]float64

	c, r    float64 // regularisation: c = σ₀ℓ², penalty r
	size    float64 // bounding-box diagonal of the mesh
	meanVol float64 // mean element volume (2πr included in axisymmetry)
	mixed   bool
	reg     bool
	rule    Rule
	nd      int // unknowns per element
	locN    [maxND]int8
	locOff  [maxND]int8
	locFld  [maxND]Field
	rows    []int // active generalised-strain rows

	// node adjacency in numbering order, with each neighbour's column
	// offset within the rows of the node.
	adjPtr, adj, adjOff []int

	colours [][]int
	workers []worker
	pool    *pool
	// elemScale holds each element's contribution to the force scales,
	// summed in element order after the parallel assembly: a per-worker
	// sum would depend on which worker took which chunk, and the
	// convergence tests would differ in the last bits from run to run.
	elemScale [][NumFields]float64
	active    []bool // element takes part in assembly (not broken)
	release   []Release
	relNow    []bool   // scratch: released at the commit under way
	edgeNbr   [][3]int // neighbour across edge k (vertices k, k+1) or −1
	flaps     []int    // scratch: flaps found at the commit under way
	oldState  [][]material.State
	newState  [][]material.State
	stBack    []material.State
	stBack2   []material.State

	gp            []GaussPoint // committed Gauss-point data (F, P, W, State copy)
	pendF         [][5]float64 // F and P at the last assembly
	pendP         [][5]float64
	presc         []prescribed
	fixed         []bool
	symDofs       []int  // unknowns held only by a crack-plane symmetry condition
	symEdges      []Edge // boundary edges on symmetry labels
	symHeld       []bool // per node: on a symmetry edge of an active element
	frozen        []bool
	constr        []int // fixed or frozen unknowns
	touched       []bool
	fext          []float64
	fextList      []int
	pinArcs       [][]int
	follower      []followerEdge
	followerScale float64 // largest nodal follower force at t = 1 (reference geometry)
	pinComp       []int
	label         map[string][]int // label → nodes
	rate          []float64        // dR/dT of the free unknowns, when tracked
	pz            *processZone     // process-zone plastic strain, when tracked
	imbalance     []float64        // out-of-balance force held (SetImbalance)
	imbScale      float64
}

const (
	maxND   = 24 // 12 displacement + 4 fields × 3 corners
	nEps    = 10 // generalised strain rows
	rowTh   = 4
	rowP    = 5
	rowA    = 6
	rowLam  = 9
	perElem = 6 // points of ElementRule
)

// NewProblem builds the problem of mesh m with material mat under the
// conditions bcs. The mesh must pass Mesh.Check; in axisymmetry every node
// must have r ≥ 0.
func NewProblem(m *Mesh, mat material.Model, opt Options, bcs BCs) (*Problem, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	if mat == nil {
		return nil, errors.New("fem: no material model")
	}
	if len(m.Tri) == 0 {
		return nil, errors.New("fem: mesh has no triangles")
	}
	c, r := mat.Regularisation()
	if !(c >= 0) || !(r >= 0) || math.IsInf(c, 0) || math.IsInf(r, 0) {
		return nil, fmt.Errorf("fem: material regularisation c = %g, r = %g must be finite and ≥ 0", c, r)
	}
	p := &Problem{Mesh: m, Model: mat, Opt: opt, c: c, r: r, mixed: !opt.DisplacementOnly, reg: c > 0, rule: ElementRule()}
	if p.rule.Len() != perElem {
		return nil, fmt.Errorf("fem: element rule has %d points, the element is written for %d", p.rule.Len(), perElem)
	}
	d, err := NewDofs(m, p.mixed, p.reg)
	if err != nil {
		return nil, err
	}
	p.Dofs = d
	lo, hi := [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, x := range m.X {
		for c := 0; c < 2; c++ {
			lo[c] = math.Min(lo[c], x[c])
			hi[c] = math.Max(hi[c], x[c])
		}
	}
	p.size = math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	if opt.Kinematics == Axisymmetric && lo[0] < -1e-12*p.size {
		return nil, fmt.Errorf("fem: axisymmetric mesh has a node at r = %g < 0", lo[0])
	}

	p.setLayout()
	if err := p.buildPattern(); err != nil {
		return nil, err
	}
	if err := p.buildColours(); err != nil {
		return nil, err
	}
	p.startWorkers()

	p.initElements()

	n := d.N
	p.U = make([]float64, n)
	p.Committed = make([]float64, n)
	p.Res = make([]float64, n)
	p.Full = make([]float64, n)
	p.frozen = make([]bool, n)
	if err := p.setBCs(bcs); err != nil {
		return nil, err
	}
	p.label = make(map[string][]int)
	for l, name := range m.Labels {
		p.label[name] = m.labelNodes(l)
	}
	p.updateConstraints()
	p.meanVol = p.Volume() / float64(len(m.Tri))
	return p, nil
}

// setLayout sets the local unknown layout of the element: 12
// displacements (node k: 2k, 2k+1), then each switched-on corner field in
// blocks of three; and the generalised-strain rows that are active.
func (p *Problem) setLayout() {
	for k := 0; k < 6; k++ {
		for c := 0; c < 2; c++ {
			a := 2*k + c
			p.locN[a], p.locOff[a], p.locFld[a] = int8(k), int8(c), Field(c)
		}
	}
	p.nd = 12
	p.rows = []int{0, 1, 2, 3}
	for f := Theta; f < NumFields; f++ {
		if !p.Dofs.Has(f) {
			continue
		}
		for k := 0; k < 3; k++ {
			a := p.nd + k
			p.locN[a], p.locOff[a], p.locFld[a] = int8(k), int8(p.Dofs.offset[f]), f
		}
		p.nd += 3
		switch f {
		case Theta:
			p.rows = append(p.rows, rowTh)
		case Pressure:
			p.rows = append(p.rows, rowP)
		case Abar:
			p.rows = append(p.rows, rowA, rowA+1, rowA+2)
		case Lambda:
			p.rows = append(p.rows, rowLam)
		}
	}
}

// startWorkers makes the assembly workers (Opt.Workers, 0 for GOMAXPROCS)
// and, for more than one, the pool that runs all but the first; the pool
// closes when p is collected.
func (p *Problem) startWorkers() {
	nw := p.Opt.Workers
	if nw == 0 {
		nw = runtime.GOMAXPROCS(0)
	}
	p.workers = make([]worker, nw)
	if nw > 1 {
		p.pool = newPool(nw - 1)
		runtime.AddCleanup(p, func(pl *pool) { pl.close() }, p.pool)
	}
}

// initElements makes the per-element and per-point arrays: every element
// active, every point in the material's initial state with F = 1.
func (p *Problem) initElements() {
	ne := len(p.Mesh.Tri)
	p.elemScale = make([][NumFields]float64, ne)
	p.active = make([]bool, ne)
	for e := range p.active {
		p.active[e] = true
	}
	p.stBack = make([]material.State, ne*perElem)
	p.stBack2 = make([]material.State, ne*perElem)
	p.oldState = make([][]material.State, ne)
	p.newState = make([][]material.State, ne)
	init := p.Model.Initial()
	for e := 0; e < ne; e++ {
		p.oldState[e] = p.stBack[e*perElem : (e+1)*perElem : (e+1)*perElem]
		p.newState[e] = p.stBack2[e*perElem : (e+1)*perElem : (e+1)*perElem]
		for g := range p.oldState[e] {
			p.oldState[e][g] = init
			p.newState[e][g] = init
		}
	}
	p.gp = make([]GaussPoint, ne*perElem)
	p.pendF = make([][5]float64, ne*perElem)
	p.pendP = make([][5]float64, ne*perElem)
	for i := range p.gp {
		p.gp[i].F = [5]float64{1, 0, 0, 1, 1}
		p.pendF[i] = p.gp[i].F
	}
}

// Regularised reports whether the ā, λ fields are present (c > 0).
func (p *Problem) Regularised() bool { return p.reg }

// Mixed reports whether the θ, P fields are present.
func (p *Problem) Mixed() bool { return p.mixed }

// Constrained reports whether unknown d is prescribed or frozen (its
// equation is an identity row).
func (p *Problem) Constrained(d int) bool { return p.fixed[d] || p.frozen[d] }

// SetTime moves the problem to pseudo-time t: prescribed unknowns take
// their values at t and the dead loads scale with t. Free unknowns keep
// their values.
func (p *Problem) SetTime(t float64) {
	p.T = t
	for i := range p.presc {
		q := &p.presc[i]
		if p.fixed[q.dof] { // not a symmetry unknown on the crack faces
			p.U[q.dof] = q.at(t)
		}
	}
}

// Commit accepts the current iterate as converged: the new material state
// becomes the old one, the stress work W is accumulated (trapezoidal rule
// on P:dF), elements whose points are all broken leave the assembly (or,
// with Options.ReleaseSteps, those with a broken point start releasing
// their force), and unknowns no longer attached to any active element are
// frozen. The last assembly must have been at p.U.
func (p *Problem) Commit() {
	p.advanceReleases()
	commit := p.startReleases()
	for e := range p.Mesh.Tri {
		if !p.active[e] && !commit[e] {
			continue
		}
		for g := 0; g < perElem; g++ {
			i := e*perElem + g
			gp := &p.gp[i]
			var dw float64
			for k := 0; k < 5; k++ {
				dw += 0.5 * (gp.P[k] + p.pendP[i][k]) * (p.pendF[i][k] - gp.F[k])
			}
			gp.W += dw
			gp.F, gp.P = p.pendF[i], p.pendP[i]
			p.oldState[e][g] = p.newState[e][g]
		}
		if ElementBroken(p.oldState[e]) {
			p.active[e] = false
		}
	}
	copy(p.Committed, p.U)
	p.TCommitted = p.T
	p.updateConstraints()
	p.updateProcessZone()
}

// PorosityGrowth returns the largest porosity increase over the points of
// the active elements between the committed state and the last assembly
// (0 for a material without porosity). The solver sizes its increments by
// it: the GTN response turns steeply once f passes f_c, and an increment
// that lets a point's porosity jump is the one Newton fails on.
func (p *Problem) PorosityGrowth() float64 {
	var m float64
	for e := range p.Mesh.Tri {
		if !p.active[e] {
			continue
		}
		for g := 0; g < perElem; g++ {
			if d := p.newState[e][g].F - p.oldState[e][g].F; d > m {
				m = d
			}
		}
	}
	return m
}

// Restart declares the current unknowns and state converged at time t
// (after a state transfer onto a new mesh, or to resume): T and TCommitted
// become t, prescribed unknowns take their values at t, and Committed
// becomes U. Re-equilibrate with an increment to the same t.
func (p *Problem) Restart(t float64) {
	p.SetTime(t)
	p.TCommitted = t
	copy(p.Committed, p.U)
}

// Rollback returns the unknowns and time to the last converged state (the
// material state was never overwritten: each assembly integrates from it).
func (p *Problem) Rollback() {
	copy(p.U, p.Committed)
	p.T = p.TCommitted
}

// updateConstraints rebuilds the list of constrained unknowns: prescribed
// ones and those of nodes no active element touches.
//
// With duringStep, elements whose points have all broken in the current
// iterate (not yet committed) count as gone too: their stiffness is zero,
// and the unknowns only they touch would make the tangent singular.
func (p *Problem) updateConstraints() {
	p.releaseSymmetry()
	p.refreshConstraints(false)
}

func (p *Problem) refreshConstraints(duringStep bool) {
	if len(p.touched) != len(p.Mesh.X) {
		p.touched = make([]bool, len(p.Mesh.X))
		p.constr = make([]int, 0, p.Dofs.N)
	}
	touched := p.touched
	clear(touched)
	for e, t := range p.Mesh.Tri {
		if !p.active[e] {
			continue
		}
		if duringStep && ElementBroken(p.newState[e]) {
			continue
		}
		for _, n := range t {
			touched[n] = true
		}
	}
	p.constr = p.constr[:0]
	for d := range p.frozen {
		p.frozen[d] = !touched[p.Dofs.NodeOf[d]]
		if p.fixed[d] || p.frozen[d] {
			p.constr = append(p.constr, d)
		}
	}
}

// releaseSymmetry frees the unknowns of a crack-plane symmetry
// (Symmetry.CrackPlane) at nodes that no longer lie on a symmetry edge of
// an active element: once the elements with an edge on
// the symmetry line there have left the assembly, the crack has passed and
// the node is on a crack face, even when an intact element still holds it
// at a vertex. (Held at zero, such a vertex pins its element to the plane
// while the flank opens, and the element is stretched without bound: the
// fixed-mesh counterpart of the remesh dropping material held only at a
// vertex.)
func (p *Problem) releaseSymmetry() {
	if len(p.symDofs) == 0 {
		return
	}
	if len(p.symHeld) != len(p.Mesh.X) {
		p.symHeld = make([]bool, len(p.Mesh.X))
	}
	held := p.symHeld
	clear(held)
	for _, ed := range p.symEdges {
		if p.active[ed.Tri] {
			held[ed.A], held[ed.Mid], held[ed.B] = true, true, true
		}
	}
	for _, d := range p.symDofs {
		p.fixed[d] = held[p.Dofs.NodeOf[d]]
	}
}

// Released reports whether element e has left the assembly: all its points
// are broken, or it is releasing its force (Options.ReleaseSteps) or has
// released it.
func (p *Problem) Released(e int) bool { return !p.active[e] }

// State returns the committed material state, [element][point of
// ElementRule]. The slices belong to the problem; SetState copies.
func (p *Problem) State() [][]material.State { return p.oldState }

// SetState replaces the committed material state (after a transfer). Elements
// whose points are all broken leave the assembly; no element is releasing
// its force (SetReleases restores those of a checkpoint).
func (p *Problem) SetState(s [][]material.State) error {
	if len(s) != len(p.oldState) {
		return fmt.Errorf("fem: SetState with %d elements, the mesh has %d", len(s), len(p.oldState))
	}
	for e := range s {
		if len(s[e]) != perElem {
			return fmt.Errorf("fem: SetState element %d has %d points, want %d", e, len(s[e]), perElem)
		}
		copy(p.oldState[e], s[e])
		copy(p.newState[e], s[e])
		p.active[e] = !ElementBroken(s[e])
	}
	p.release = p.release[:0]
	p.updateConstraints()
	p.updateProcessZone()
	return nil
}

// Nodal returns the value of field f at node n of the unknown vector u
// (p.U or p.Committed), and false if the node does not carry f.
func (p *Problem) Nodal(u []float64, n int, f Field) (float64, bool) {
	d := p.Dofs.Of(n, f)
	if d < 0 {
		return 0, false
	}
	return u[d], true
}

// NodalField fills dst (len = number of nodes) with field f of the
// committed solution; nodes without the field (midside nodes for the
// linear fields) get the mean of their edge's end values, so output can
// use quadratic cells throughout. It returns an error if f is switched off.
func (p *Problem) NodalField(f Field, dst []float64) error {
	m := p.Mesh
	if !p.Dofs.Has(f) {
		return fmt.Errorf("fem: field %v is not part of this problem", f)
	}
	if len(dst) != len(m.X) {
		return fmt.Errorf("fem: NodalField dst has %d entries for %d nodes", len(dst), len(m.X))
	}
	for n := range m.X {
		if d := p.Dofs.Of(n, f); d >= 0 {
			dst[n] = p.Committed[d]
		}
	}
	if f > Uy {
		for _, t := range m.Tri {
			for k := 0; k < 3; k++ {
				dst[t[3+k]] = 0.5 * (dst[t[k]] + dst[t[(k+1)%3]])
			}
		}
	}
	return nil
}

// SetNodalField sets field f of both the iterate and the committed
// solution from per-node values (midside values are ignored for the linear
// fields). Used after a transfer.
func (p *Problem) SetNodalField(f Field, v []float64) error {
	if !p.Dofs.Has(f) {
		return fmt.Errorf("fem: field %v is not part of this problem", f)
	}
	if len(v) != len(p.Mesh.X) {
		return fmt.Errorf("fem: SetNodalField has %d values for %d nodes", len(v), len(p.Mesh.X))
	}
	for n := range p.Mesh.X {
		if d := p.Dofs.Of(n, f); d >= 0 {
			p.U[d], p.Committed[d] = v[n], v[n]
		}
	}
	return nil
}

// Reaction returns the resultant of the residual force (internal −
// external) over the nodes of a boundary label at the last assembly: the
// reaction of the prescribed displacements there (in axisymmetry, the
// force on the whole ring). Nodes the label shares with another
// constrained label (corners) contribute the reactions of both; use
// NodeReaction to separate them.
func (p *Problem) Reaction(label string) ([2]float64, error) {
	nodes, ok := p.label[label]
	if !ok {
		return [2]float64{}, fmt.Errorf("fem: no boundary label %q (the mesh has %v)", label, p.Mesh.Labels)
	}
	var f [2]float64
	for _, n := range nodes {
		f[0] += p.Full[p.Dofs.Of(n, Ux)]
		f[1] += p.Full[p.Dofs.Of(n, Uy)]
	}
	return f, nil
}

// LabelNodes returns the nodes of a boundary label (corner and midside);
// the slice belongs to the problem.
func (p *Problem) LabelNodes(label string) ([]int, error) {
	nodes, ok := p.label[label]
	if !ok {
		return nil, fmt.Errorf("fem: no boundary label %q (the mesh has %v)", label, p.Mesh.Labels)
	}
	return nodes, nil
}

// NodeReaction returns the residual force (internal − external) at node n
// at the last assembly: the reaction where n is constrained. A node shared
// by two constrained labels (a corner) carries the reactions of both.
func (p *Problem) NodeReaction(n int) ([2]float64, error) {
	if n < 0 || n >= len(p.Mesh.X) {
		return [2]float64{}, fmt.Errorf("fem: node %d out of range (%d nodes)", n, len(p.Mesh.X))
	}
	return [2]float64{p.Full[p.Dofs.Of(n, Ux)], p.Full[p.Dofs.Of(n, Uy)]}, nil
}

// PinForce returns the force of pin i (in the order of BCs.Pins) in its
// loading component: the reaction summed over its contact arc.
func (p *Problem) PinForce(i int) (float64, error) {
	if i < 0 || i >= len(p.pinArcs) {
		return 0, fmt.Errorf("fem: pin %d of %d", i, len(p.pinArcs))
	}
	var f float64
	for _, n := range p.pinArcs[i] {
		f += p.Full[p.Dofs.Of(n, Field(p.pinComp[i]))]
	}
	return f, nil
}

// LoadScale returns the largest nodal load at the current time,
// |t|·max|f_ext| (follower pressures estimated on the reference geometry;
// zero without tractions and point loads).
func (p *Problem) LoadScale() float64 {
	m := p.followerScale
	for _, d := range p.fextList {
		m = math.Max(m, math.Abs(p.fext[d]))
	}
	return math.Abs(p.T) * m
}

// ElementBroken reports whether an element with these Gauss-point states
// is broken: when all of its points are. (Removal once most points are
// broken was tried: the abrupt release of the remaining stress made the
// neighbours' return mapping fail on the boundary-layer case.)
func ElementBroken(s []material.State) bool { return brokenPoints(s) == len(s) }
