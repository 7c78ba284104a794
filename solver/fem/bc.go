package fem

import (
	"fmt"
	"math"
)

// Boundary conditions. Every condition names a boundary label (Mesh.Labels)
// or a named point (Mesh.Points). Prescribed values scale with the
// pseudo-time t unless a function of position and t is given.
//
// Engineering choices (recorded here, see DEVELOPERS.md):
//   - Dirichlet conditions are imposed on the unknown vector at each time
//     and their equations are replaced by identity rows (row and column of
//     the tangent cleared, diagonal kept), so the sparsity pattern never
//     depends on the boundary conditions; the residual of those equations,
//     kept before clearing, is the reaction.
//   - Tractions are dead loads: they act on the reference boundary and do
//     not follow the deformation. A pressure is a dead load too unless
//     Traction.Follower is set: then it acts on the current boundary along
//     the current normal (and contributes its nonsymmetric load stiffness
//     to the tangent). Pressure p > 0 pushes against the outward normal
//     (into the body).
//   - A pin (C(T) loading) is a rigid pin in frictionless contact with the
//     half of the hole surface that faces the direction of loading: the nodes
//     of that contact arc get the pin's motion in the loading component and
//     stay free in the other. The arc is chosen once, from the sign of the
//     load: nodes whose reference position relative to the hole centroid has
//     a non-negative projection on the loading direction. The pin force is
//     the reaction summed over the arc.

// Displacement prescribes displacement components on a label or a point.
type Displacement struct {
	Label string // boundary label, or
	Point string // named point (exactly one of Label and Point)
	// Fix selects the prescribed components (0: x or r, 1: y or z).
	Fix [2]bool
	// Value is the displacement at t = 1: u = Value·t.
	Value [2]float64
	// Func, when not nil, gives the displacement at reference position X and
	// time t instead of Value·t (for example a remote Williams K-field).
	Func func(X [2]float64, t float64) [2]float64
}

// Symmetry is a mirror plane on an axis-aligned straight label: the normal
// component Comp (0 when the line is x = const, 1 when y = const) is zero.
type Symmetry struct {
	Label string
	Comp  int
	// CrackPlane marks a plane the crack grows along (the ligament of a
	// half model, not an axis of revolution): a node stays held only while
	// an element in the assembly has an edge on the plane there, and is a
	// free crack-face node once those elements have left.
	CrackPlane bool
}

// Traction is a dead load on a label: the reference traction Value·t plus a
// pressure Pressure·t acting against the outward reference normal, plus,
// when Func is not nil, the traction Func(X, n)·t at reference position X
// with outward unit normal n (for example σ·n of a known stress field).
type Traction struct {
	Label    string
	Value    [2]float64
	Pressure float64
	Func     func(X, n [2]float64) [2]float64
	// Follower makes the pressure act on the deformed boundary (current
	// area and normal); Value and Func stay dead loads.
	Follower bool
}

// followerEdge is a boundary edge under follower pressure (value at t = 1).
type followerEdge struct {
	nodes    [3]int // A, Mid, B
	pressure float64
}

// PointLoad is a force Value·t at a named node (in axisymmetry a ring load:
// Value is the total force of the ring).
type PointLoad struct {
	Point string
	Value [2]float64
}

// Pin loads a hole through a rigid pin: the contact arc of the hole label
// moves by Value·t (or Func(t)) in component Comp. Point optionally names
// the load point whose displacement the pin motion represents (for output).
type Pin struct {
	Label string
	Point string
	Comp  int
	Value float64
	Func  func(t float64) float64
	// Contact is the half-angle in degrees of the contact arc about the
	// loading direction; 0 means 90 (the whole loaded half of the hole).
	// A narrow arc acts as a hinge: a half arc tied to one displacement
	// also resists the rotation of the hole and stiffens a C(T) specimen.
	Contact float64
}

// BCs collects the boundary conditions of a problem.
type BCs struct {
	Displacements []Displacement
	Symmetries    []Symmetry
	Tractions     []Traction
	PointLoads    []PointLoad
	Pins          []Pin
}

// prescribed is one Dirichlet unknown.
type prescribed struct {
	dof   int
	comp  int
	x     [2]float64
	value float64                                  // at t = 1
	fn    func(X [2]float64, t float64) [2]float64 // or nil
	pinFn func(t float64) float64                  // or nil
}

func (p *prescribed) at(t float64) float64 {
	switch {
	case p.fn != nil:
		return p.fn(p.x, t)[p.comp]
	case p.pinFn != nil:
		return p.pinFn(t)
	}
	return p.value * t
}

// labelNodes returns the nodes (corner and midside) on the edges of label l.
func (m *Mesh) labelNodes(l int) []int {
	seen := make(map[int]bool)
	var out []int
	for _, e := range m.Boundary {
		if e.Label != l {
			continue
		}
		for _, n := range [3]int{e.A, e.Mid, e.B} {
			if !seen[n] {
				seen[n] = true
				out = append(out, n)
			}
		}
	}
	return out
}

// nodesOf resolves a label or point to node indices.
func (p *Problem) nodesOf(what, label, point string) ([]int, error) {
	m := p.Mesh
	switch {
	case label != "" && point != "":
		return nil, fmt.Errorf("%s: give a label or a point, not both (label %q, point %q)", what, label, point)
	case label != "":
		l := m.Label(label)
		if l < 0 {
			return nil, fmt.Errorf("%s: no boundary label %q (the mesh has %v)", what, label, m.Labels)
		}
		nodes := m.labelNodes(l)
		if len(nodes) == 0 {
			return nil, fmt.Errorf("%s: boundary label %q has no edges", what, label)
		}
		return nodes, nil
	case point != "":
		n, ok := m.Points[point]
		if !ok {
			return nil, fmt.Errorf("%s: no named point %q", what, point)
		}
		return []int{n}, nil
	}
	return nil, fmt.Errorf("%s: needs a label or a point", what)
}

// setBCs validates the conditions and builds the prescribed list and the
// reference external force vector.
func (p *Problem) setBCs(b BCs) error {
	d := dirichlet{p: p, byDof: make(map[int]int)}
	if err := d.displacements(b.Displacements); err != nil {
		return err
	}
	if err := d.symmetries(b.Symmetries); err != nil {
		return err
	}
	if err := d.pins(b.Pins); err != nil {
		return err
	}
	if p.Opt.Kinematics == Axisymmetric {
		d.axis()
	}
	if err := p.setLoads(b.Tractions, b.PointLoads); err != nil {
		return err
	}
	p.fixed = make([]bool, p.Dofs.N)
	for _, q := range p.presc {
		p.fixed[q.dof] = true
	}
	return nil
}

// dirichlet builds the prescribed unknowns p.presc, one condition after
// the other; byDof maps an unknown to its index in p.presc.
type dirichlet struct {
	p     *Problem
	byDof map[int]int
}

// displacements prescribes the fixed components of each displacement
// condition on all its nodes.
func (d *dirichlet) displacements(ds []Displacement) error {
	p := d.p
	for i, dc := range ds {
		what := fmt.Sprintf("displacement condition %d", i)
		nodes, err := p.nodesOf(what, dc.Label, dc.Point)
		if err != nil {
			return err
		}
		if !dc.Fix[0] && !dc.Fix[1] {
			return fmt.Errorf("%s: no component fixed (Fix is [false false])", what)
		}
		for c := 0; c < 2; c++ {
			if !dc.Fix[c] {
				continue
			}
			if math.IsNaN(dc.Value[c]) || math.IsInf(dc.Value[c], 0) {
				return fmt.Errorf("%s: component %d value %g is not finite", what, c, dc.Value[c])
			}
			for _, n := range nodes {
				q := prescribed{dof: p.Dofs.Of(n, Field(c)), comp: c, x: p.Mesh.X[n], value: dc.Value[c], fn: dc.Func}
				if err := d.add(what, q); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// symmetries fixes the normal component on each symmetry line and records
// the unknowns and edges of the lines that are crack planes.
func (d *dirichlet) symmetries(ss []Symmetry) error {
	p, m := d.p, d.p.Mesh
	for i, s := range ss {
		what := fmt.Sprintf("symmetry condition %d", i)
		if s.Comp != 0 && s.Comp != 1 {
			return fmt.Errorf("%s: component %d must be 0 (x = const line) or 1 (y = const line)", what, s.Comp)
		}
		nodes, err := p.nodesOf(what, s.Label, "")
		if err != nil {
			return err
		}
		x0 := m.X[nodes[0]][s.Comp]
		for _, n := range nodes {
			if math.Abs(m.X[n][s.Comp]-x0) > 1e-9*p.size {
				return fmt.Errorf("%s: label %q is not a straight line with coordinate %d constant (node %d at %v, first at %g)", what, s.Label, s.Comp, n, m.X[n], x0)
			}
			dof := p.Dofs.Of(n, Field(s.Comp))
			_, taken := d.byDof[dof]
			if err := d.add(what, prescribed{dof: dof, comp: s.Comp, x: m.X[n]}); err != nil {
				return err
			}
			if !taken && s.CrackPlane {
				p.symDofs = append(p.symDofs, dof)
			}
		}
		if !s.CrackPlane {
			continue
		}
		l := m.Label(s.Label)
		for _, ed := range m.Boundary {
			if ed.Label == l {
				p.symEdges = append(p.symEdges, ed)
			}
		}
	}
	return nil
}

// pins prescribes the loading component on the contact arc of each pin
// and records the arcs.
func (d *dirichlet) pins(pins []Pin) error {
	p := d.p
	for i, pn := range pins {
		what := fmt.Sprintf("pin condition %d", i)
		if err := p.checkPin(what, pn); err != nil {
			return err
		}
		nodes, err := p.nodesOf(what, pn.Label, "")
		if err != nil {
			return err
		}
		if !(pn.Contact >= 0 && pn.Contact <= 90) {
			return fmt.Errorf("%s: contact half-angle %g° must lie in [0, 90]", what, pn.Contact)
		}
		arc := p.pinArc(nodes, pn)
		for _, n := range arc {
			q := prescribed{dof: p.Dofs.Of(n, Field(pn.Comp)), comp: pn.Comp, x: p.Mesh.X[n], value: pn.Value, pinFn: pn.Func}
			if err := d.add(what, q); err != nil {
				return err
			}
		}
		p.pinArcs = append(p.pinArcs, arc)
		p.pinComp = append(p.pinComp, pn.Comp)
	}
	return nil
}

// checkPin checks a pin's component, loading direction and load point.
func (p *Problem) checkPin(what string, pn Pin) error {
	if pn.Comp != 0 && pn.Comp != 1 {
		return fmt.Errorf("%s: component %d must be 0 or 1", what, pn.Comp)
	}
	if pn.Func == nil && pn.Value == 0 {
		return fmt.Errorf("%s: Value is zero and no Func: the loading direction is undefined", what)
	}
	if pn.Point != "" {
		if _, ok := p.Mesh.Points[pn.Point]; !ok {
			return fmt.Errorf("%s: no named point %q", what, pn.Point)
		}
	}
	return nil
}

// pinArc returns the contact arc of a pin among the hole nodes: the nodes
// within the contact half-angle of the loading direction (the sign of the
// load at t = 1) seen from the centroid of the hole nodes.
func (p *Problem) pinArc(nodes []int, pn Pin) []int {
	m := p.Mesh
	var cx [2]float64
	for _, n := range nodes {
		cx[0] += m.X[n][0] / float64(len(nodes))
		cx[1] += m.X[n][1] / float64(len(nodes))
	}
	sign := 1.0
	if pn.Func != nil {
		if v := pn.Func(1); v < 0 {
			sign = -1
		}
	} else if pn.Value < 0 {
		sign = -1
	}
	cosC := 0.0
	if pn.Contact > 0 && pn.Contact < 90 {
		cosC = math.Cos(pn.Contact * math.Pi / 180)
	}
	var arc []int
	for _, n := range nodes {
		d := math.Hypot(m.X[n][0]-cx[0], m.X[n][1]-cx[1])
		if sign*(m.X[n][pn.Comp]-cx[pn.Comp]) >= cosC*d-1e-12*p.size {
			arc = append(arc, n)
		}
	}
	return arc
}

// add prescribes q. Two conditions on one unknown are allowed when they
// agree (a corner shared by two labels with the same field, or a symmetry
// line meeting a fixed edge), checked at t = 0.5 and t = 1; then the first
// stays.
func (d *dirichlet) add(what string, q prescribed) error {
	p := d.p
	if i, ok := d.byDof[q.dof]; ok {
		o := p.presc[i]
		agree := func(t float64) bool {
			x, y := o.at(t), q.at(t)
			return math.Abs(x-y) <= 1e-9*math.Max(math.Abs(x), math.Abs(y))+1e-14*p.size
		}
		if agree(0.5) && agree(1) {
			return nil
		}
		return fmt.Errorf("%s: node %d component %d is already prescribed by another condition", what, p.Dofs.NodeOf[q.dof], q.comp)
	}
	d.byDof[q.dof] = len(p.presc)
	p.presc = append(p.presc, q)
	return nil
}

// axis fixes u_r on the axis r = 0 unless a condition did: nodes there
// cannot move radially (symmetry of the body of revolution).
func (d *dirichlet) axis() {
	p := d.p
	for n, x := range p.Mesh.X {
		if math.Abs(x[0]) <= 1e-12*p.size {
			if dof := p.Dofs.Of(n, Ux); !hasDof(d.byDof, dof) {
				d.byDof[dof] = len(p.presc)
				p.presc = append(p.presc, prescribed{dof: dof, comp: 0, x: x})
			}
		}
	}
}

// setLoads builds the reference external force vector p.fext (and the
// list of its non-zero entries) from the dead tractions and point loads,
// and collects the follower pressures.
func (p *Problem) setLoads(trs []Traction, pls []PointLoad) error {
	m := p.Mesh
	p.fext = make([]float64, p.Dofs.N)
	for i, tr := range trs {
		what := fmt.Sprintf("traction condition %d", i)
		l := m.Label(tr.Label)
		if l < 0 {
			return fmt.Errorf("%s: no boundary label %q (the mesh has %v)", what, tr.Label, m.Labels)
		}
		for _, v := range [3]float64{tr.Value[0], tr.Value[1], tr.Pressure} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%s: value %g is not finite", what, v)
			}
		}
		pres := tr.Pressure
		if tr.Follower && pres != 0 {
			p.addFollower(l, pres)
			pres = 0
		}
		p.addTraction(l, tr.Value, pres, tr.Func)
	}
	for i, pl := range pls {
		what := fmt.Sprintf("point load %d", i)
		n, ok := m.Points[pl.Point]
		if !ok {
			return fmt.Errorf("%s: no named point %q", what, pl.Point)
		}
		p.fext[p.Dofs.Of(n, Ux)] += pl.Value[0]
		p.fext[p.Dofs.Of(n, Uy)] += pl.Value[1]
	}
	p.fextList = p.fextList[:0]
	for d, v := range p.fext {
		if v != 0 {
			p.fextList = append(p.fextList, d)
		}
	}
	return nil
}

// addFollower puts the edges of label l under the follower pressure pres
// and raises p.followerScale to the largest edge force |pres|·length/3.
func (p *Problem) addFollower(l int, pres float64) {
	m := p.Mesh
	for _, e := range m.Boundary {
		if e.Label == l {
			p.follower = append(p.follower, followerEdge{nodes: [3]int{e.A, e.Mid, e.B}, pressure: pres})
			length := math.Hypot(m.X[e.B][0]-m.X[e.A][0], m.X[e.B][1]-m.X[e.A][1])
			if p.Opt.Kinematics == Axisymmetric {
				length *= 2 * math.Pi * math.Max(m.X[e.A][0], m.X[e.B][0])
			}
			p.followerScale = math.Max(p.followerScale, math.Abs(pres)*length/3)
		}
	}
}

// addTraction integrates the dead load of one label into p.fext with a
// 3-point Gauss–Legendre rule along each quadratic edge (exact for the
// straight-edge case; the axisymmetric weight 2πr is included).
func (p *Problem) addTraction(l int, value [2]float64, pressure float64, fn func(X, n [2]float64) [2]float64) {
	m := p.Mesh
	gx := [3]float64{-math.Sqrt(0.6), 0, math.Sqrt(0.6)}
	gw := [3]float64{5.0 / 9, 8.0 / 9, 5.0 / 9}
	for _, e := range m.Boundary {
		if e.Label != l {
			continue
		}
		nodes := [3]int{e.A, e.Mid, e.B}
		for g := 0; g < 3; g++ {
			s := gx[g]
			n := [3]float64{0.5 * s * (s - 1), 1 - s*s, 0.5 * s * (s + 1)}
			dn := [3]float64{s - 0.5, -2 * s, s + 0.5}
			var x, dx [2]float64
			for k, a := range nodes {
				for c := 0; c < 2; c++ {
					x[c] += n[k] * m.X[a][c]
					dx[c] += dn[k] * m.X[a][c]
				}
			}
			// Interior on the left of A→B: outward normal × ds = (dy, −dx) ds/dξ.
			nds := [2]float64{dx[1], -dx[0]}
			w := gw[g]
			if p.Opt.Kinematics == Axisymmetric {
				w *= 2 * math.Pi * x[0]
			}
			jl := math.Hypot(dx[0], dx[1])
			tv := value
			if fn != nil {
				fv := fn(x, [2]float64{nds[0] / jl, nds[1] / jl})
				tv[0] += fv[0]
				tv[1] += fv[1]
			}
			for k, a := range nodes {
				for c := 0; c < 2; c++ {
					f := tv[c]*jl - pressure*nds[c]
					p.fext[p.Dofs.Of(a, Field(c))] += w * n[k] * f
				}
			}
		}
	}
}

func hasDof(m map[int]int, d int) bool { _, ok := m[d]; return ok }

// assembleFollower adds the follower pressures at time p.T to the residual
// (Full −= t·f) and, if tangent, their load stiffness −t ∂f/∂u. With the
// current edge x(ξ) = Σ N_k (X_k + u_k) and interior on the left of A→B,
// the nodal forces are f_a = −p ∫ N_a (x₂′, −x₁′) dξ, times 2πr in
// axisymmetry (3-point Gauss–Legendre rule).
func (p *Problem) assembleFollower(tangent bool) {
	if len(p.follower) == 0 {
		return
	}
	gx := [3]float64{-math.Sqrt(0.6), 0, math.Sqrt(0.6)}
	gw := [3]float64{5.0 / 9, 8.0 / 9, 5.0 / 9}
	axi := p.Opt.Kinematics == Axisymmetric
	for _, fe := range p.follower {
		var x [3][2]float64
		var dof [3][2]int
		for k, n := range fe.nodes {
			for c := 0; c < 2; c++ {
				dof[k][c] = p.Dofs.Of(n, Field(c))
				x[k][c] = p.Mesh.X[n][c] + p.U[dof[k][c]]
			}
		}
		q := p.T * fe.pressure
		var f [3][2]float64
		var df [3][2][3][2]float64 // ∂f[a][c]/∂x[b][d]
		for g := 0; g < 3; g++ {
			s := gx[g]
			N := [3]float64{0.5 * s * (s - 1), 1 - s*s, 0.5 * s * (s + 1)}
			dN := [3]float64{s - 0.5, -2 * s, s + 0.5}
			var r, x1, x2 float64
			for k := 0; k < 3; k++ {
				r += N[k] * x[k][0]
				x1 += dN[k] * x[k][0]
				x2 += dN[k] * x[k][1]
			}
			w := gw[g] * q
			ra := 1.0
			if axi {
				ra = 2 * math.Pi * r
			}
			for a := 0; a < 3; a++ {
				f[a][0] -= w * ra * N[a] * x2
				f[a][1] += w * ra * N[a] * x1
				if !tangent {
					continue
				}
				for b := 0; b < 3; b++ {
					df[a][0][b][1] -= w * ra * N[a] * dN[b]
					df[a][1][b][0] += w * ra * N[a] * dN[b]
					if axi {
						df[a][0][b][0] -= w * 2 * math.Pi * N[b] * N[a] * x2
						df[a][1][b][0] += w * 2 * math.Pi * N[b] * N[a] * x1
					}
				}
			}
		}
		for a := 0; a < 3; a++ {
			for c := 0; c < 2; c++ {
				p.Full[dof[a][c]] -= f[a][c]
				if !tangent {
					continue
				}
				for b := 0; b < 3; b++ {
					for d := 0; d < 2; d++ {
						if v := df[a][c][b][d]; v != 0 {
							p.K.Val[p.pos(dof[a][c], dof[b][d])] -= v
						}
					}
				}
			}
		}
	}
}
