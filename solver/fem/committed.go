package fem

import (
	"fmt"

	"tearline/solver/material"
)

// Queries and repairs of the committed state. A state transfer installs
// values the element never computed (interpolated displacement, projected
// material state); the adaptive cycle reads the committed strains to make
// the material state consistent with them, and repairs what the
// interpolation broke before the first assembly.

// Displacement returns the committed displacement of every node,
// (u_x, u_y) or (u_r, u_z).
func (p *Problem) Displacement() [][2]float64 {
	u := make([][2]float64, len(p.Mesh.X))
	for n := range u {
		u[n] = [2]float64{p.Committed[p.Dofs.Of(n, Ux)], p.Committed[p.Dofs.Of(n, Uy)]}
	}
	return u
}

// LinearFieldAt returns the committed corner field f (θ, P, ā or λ: linear
// on the element) at area coordinates l of element e, Σₖ lₖ fₖ over the
// corners. A field the problem does not carry is zero.
func (p *Problem) LinearFieldAt(f Field, e int, l [3]float64) float64 {
	var v float64
	for k := 0; k < 3; k++ {
		x, _ := p.Nodal(p.Committed, p.Mesh.Tri[e][k], f)
		v += l[k] * x
	}
	return v
}

// LogStrain returns the logarithmic strain E = ½ ln(FᵀF) of the committed
// displacement at point g of ElementRule in element e (Hencky's strain, the
// element's strain measure; Miehe, Apel & Lambrecht 2002, CMAME 191). An
// element the displacement inverts there (det F ≤ 0) gives an
// *ElementError with Inverted set: its log strain does not exist.
func (p *Problem) LogStrain(e, g int) (material.Sym, error) {
	if g < 0 || g >= perElem {
		return material.Sym{}, fmt.Errorf("fem: point %d out of range (%d points)", g, perElem)
	}
	F, err := p.DeformationGradient(e, p.rule.L[g], p.Committed)
	if err != nil {
		return material.Sym{}, err
	}
	C := material.Sym{F[0]*F[0] + F[2]*F[2], F[1]*F[1] + F[3]*F[3], F[4] * F[4], F[0]*F[1] + F[2]*F[3]}
	if det := (F[0]*F[3] - F[1]*F[2]) * F[4]; !(det > 0) {
		return material.Sym{}, &ElementError{Elem: e, Point: g, Reason: fmt.Sprintf("committed det F = %g ≤ 0", det), Inverted: true}
	}
	E, _ := material.LogStrain(C)
	return E, nil
}

// MaterialStrain returns the strain the material sees at point g of
// element e in the committed unknowns: the log strain of LogStrain, and in
// the three-field element its trace replaced by the volume variable θ,
// Ẽ = E + ((θ − tr E)/3) I (Simo, Taylor & Pister 1985, CMAME 51, in log
// strain form, as in the element). The elastic strain of a point is
// Ẽ − Eᵖ, so the mean stress the material computes is K(θ − tr Eᵖ); tr E
// would give a different one wherever θ and the displacement disagree.
// Errors are those of LogStrain.
func (p *Problem) MaterialStrain(e, g int) (material.Sym, error) {
	E, err := p.LogStrain(e, g)
	if err != nil || !p.mixed {
		return E, err
	}
	d := (p.LinearFieldAt(Theta, e, p.rule.L[g]) - E.Trace()) / 3
	E[0], E[1], E[2] = E[0]+d, E[1]+d, E[2]+d
	return E, nil
}

// Straighten puts the displacement of each midside node of element e at
// the mean of its edge's corner nodes, in the iterate and the committed
// unknowns, and reports whether any value changed. With straight edges the
// displacement is linear on the element and F is that of the corner
// triangle, constant and with det F > 0 whenever the deformed corner
// triangle keeps its orientation; a curved quadratic element can invert
// inside (negative Jacobian of the isoparametric map) although its corners
// do not (the admissible midside positions of the 6-node triangle are
// limited; Zienkiewicz, Taylor & Zhu, The Finite Element Method: Its Basis
// and Fundamentals, ch. on isoparametric mapping). A displacement
// interpolated from strongly distorted elements can curve an edge that far.
func (p *Problem) Straighten(e int) bool {
	t := p.Mesh.Tri[e]
	changed := false
	for k := 0; k < 3; k++ {
		a, b, m := t[k], t[(k+1)%3], t[3+k]
		for _, f := range [2]Field{Ux, Uy} {
			da, db, dm := p.Dofs.Of(a, f), p.Dofs.Of(b, f), p.Dofs.Of(m, f)
			if da < 0 || db < 0 || dm < 0 {
				continue
			}
			v := 0.5 * (p.Committed[da] + p.Committed[db])
			if p.Committed[dm] != v {
				changed = true
			}
			p.Committed[dm], p.U[dm] = v, v
		}
	}
	return changed
}

// ProjectVolume sets the volume variable θ of a three-field problem to the
// lumped L2 projection of tr E of the committed displacement,
//
//	θ_a = Σ N_a tr E dA / Σ N_a dA
//
// over the points of the active elements (row-sum lumped mass matrix of
// the linear field, common practice). The element's δP equation,
// ∫ (tr E − θ) δP = 0, makes θ the L2 projection of tr E at equilibrium;
// a θ interpolated from another mesh need not agree with the displacement
// where θ varied steeply, and the mean stress K(θ − tr Eᵖ) of the first
// Newton corrections then leaves the range the material can carry. Points
// whose element the displacement inverts are left out (Straighten repairs
// them later); nodes without a contribution keep their θ. Without the
// mixed element it does nothing.
func (p *Problem) ProjectVolume() error {
	if !p.mixed {
		return nil
	}
	num := make([]float64, len(p.Mesh.X))
	den := make([]float64, len(p.Mesh.X))
	for e := range p.Mesh.Tri {
		if p.Released(e) {
			continue
		}
		for g := 0; g < perElem; g++ {
			E, err := p.LogStrain(e, g)
			if err != nil {
				continue
			}
			_, da := p.pointGeometry(e, g)
			for k := 0; k < 3; k++ {
				n := p.Mesh.Tri[e][k]
				num[n] += p.rule.L[g][k] * E.Trace() * da
				den[n] += p.rule.L[g][k] * da
			}
		}
	}
	theta := make([]float64, len(p.Mesh.X))
	if err := p.NodalField(Theta, theta); err != nil {
		return err
	}
	for n := range theta {
		if den[n] > 0 {
			theta[n] = num[n] / den[n]
		}
	}
	return p.SetNodalField(Theta, theta)
}

// ResetRegularisation sets ā = pl and λ = 0 at the corners of element e,
// in the iterate and the committed unknowns: the local solution of the
// regularisation equations (p − ā = 0 with no gradient term; Forest 2009,
// J. Eng. Mech. 135; Peerlings et al. 1996, IJNME 39). ā and λ are
// unknowns, not history, so restarting them loses nothing the next
// equilibrium does not restore; an interpolated λ next to a softening zone
// can leave a point no elastic range, A = R + λ + r(p − ā) ≤ 0.
func (p *Problem) ResetRegularisation(e int, pl float64) {
	for k := 0; k < 3; k++ {
		n := p.Mesh.Tri[e][k]
		if d := p.Dofs.Of(n, Abar); d >= 0 {
			p.Committed[d], p.U[d] = pl, pl
		}
		if d := p.Dofs.Of(n, Lambda); d >= 0 {
			p.Committed[d], p.U[d] = 0, 0
		}
	}
}
