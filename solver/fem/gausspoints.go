package fem

import (
	"fmt"
	"math"
)

// GaussPoints fills dst with the committed Gauss-point data of every
// element in the order of ElementRule: reference position, area weight
// (no 2πr factor), deformation gradient, first Piola–Kirchhoff stress,
// accumulated stress work W and material state. Broken elements keep the
// values they had when they broke. dst.Points is reused when its capacity
// suffices.
func (p *Problem) GaussPoints(dst *GaussPoints) {
	n := len(p.Mesh.Tri) * perElem
	if cap(dst.Points) < n {
		dst.Points = make([]GaussPoint, n)
	}
	dst.Points = dst.Points[:n]
	dst.PerElement = perElem
	for e := range p.Mesh.Tri {
		for g := 0; g < perElem; g++ {
			i := e*perElem + g
			x, da := p.pointGeometry(e, g)
			gp := p.gp[i]
			gp.X, gp.DA = x, da
			gp.State = p.oldState[e][g]
			dst.Points[i] = gp
		}
	}
}

// pointGeometry returns the reference position and area weight of point g
// of element e (isoparametric map of the 6-node triangle).
func (p *Problem) pointGeometry(e, g int) ([2]float64, float64) {
	tri := &p.Mesh.Tri[e]
	l := p.rule.L[g]
	N := ShapeP2(l)
	dxi, deta := ShapeP2Deriv(l)
	var x [2]float64
	var j [2][2]float64
	for k := 0; k < 6; k++ {
		xk := p.Mesh.X[tri[k]]
		for c := 0; c < 2; c++ {
			x[c] += N[k] * xk[c]
			j[c][0] += dxi[k] * xk[c]
			j[c][1] += deta[k] * xk[c]
		}
	}
	return x, 0.5 * (j[0][0]*j[1][1] - j[0][1]*j[1][0]) * p.rule.W[g]
}

// Volume returns the reference volume of the active elements (in
// axisymmetry including 2πr; in plane strain per unit thickness).
func (p *Problem) Volume() float64 {
	var v float64
	for e := range p.Mesh.Tri {
		if !p.active[e] {
			continue
		}
		for g := 0; g < perElem; g++ {
			x, da := p.pointGeometry(e, g)
			if p.Opt.Kinematics == Axisymmetric {
				da *= 2 * math.Pi * x[0]
			}
			v += da
		}
	}
	return v
}

// Stress returns the Cauchy stress σ = P Fᵀ/J (components 11, 22, 33, 12)
// of the committed state at point g of element e.
func (p *Problem) Stress(e, g int) ([4]float64, error) {
	if e < 0 || e >= len(p.Mesh.Tri) || g < 0 || g >= perElem {
		return [4]float64{}, fmt.Errorf("fem: point %d of element %d out of range (%d elements, %d points)", g, e, len(p.Mesh.Tri), perElem)
	}
	gp := &p.gp[e*perElem+g]
	return Cauchy(gp.F, gp.P), nil
}

// Cauchy returns σ = P Fᵀ / det F (components 11, 22, 33, 12) from F and
// the first Piola–Kirchhoff stress P in the GaussPoint layout
// (11, 12, 21, 22, 33).
func Cauchy(F, P [5]float64) [4]float64 {
	J := (F[0]*F[3] - F[1]*F[2]) * F[4]
	return [4]float64{
		(P[0]*F[0] + P[1]*F[1]) / J,
		(P[2]*F[2] + P[3]*F[3]) / J,
		P[4] * F[4] / J,
		(P[0]*F[2] + P[1]*F[3]) / J,
	}
}

// DeformationGradient returns F (components 11, 12, 21, 22, 33) of the
// unknowns u at area coordinates l of element e, e.g. at a vertex for
// nodal stresses. It returns an error for an element index out of range.
func (p *Problem) DeformationGradient(e int, l [3]float64, u []float64) ([5]float64, error) {
	if e < 0 || e >= len(p.Mesh.Tri) {
		return [5]float64{}, fmt.Errorf("fem: element %d out of range (%d elements)", e, len(p.Mesh.Tri))
	}
	if len(u) != p.Dofs.N {
		return [5]float64{}, fmt.Errorf("fem: %d unknowns given, the problem has %d", len(u), p.Dofs.N)
	}
	tri := &p.Mesh.Tri[e]
	N := ShapeP2(l)
	dxi, deta := ShapeP2Deriv(l)
	var xx, xe1, ye1, xe2, ye2 float64
	for k := 0; k < 6; k++ {
		x := p.Mesh.X[tri[k]]
		xx += N[k] * x[0]
		xe1 += dxi[k] * x[0]
		ye1 += dxi[k] * x[1]
		xe2 += deta[k] * x[0]
		ye2 += deta[k] * x[1]
	}
	detJ := xe1*ye2 - xe2*ye1
	F := [5]float64{1, 0, 0, 1, 1}
	var ur float64
	for k := 0; k < 6; k++ {
		s := p.Dofs.Start[tri[k]]
		d0 := (ye2*dxi[k] - ye1*deta[k]) / detJ
		d1 := (-xe2*dxi[k] + xe1*deta[k]) / detJ
		F[0] += u[s] * d0
		F[1] += u[s] * d1
		F[2] += u[s+1] * d0
		F[3] += u[s+1] * d1
		ur += u[s] * N[k]
	}
	if p.Opt.Kinematics == Axisymmetric {
		if xx > 0 {
			F[4] = 1 + ur/xx
		} else {
			F[4] = F[0] // on the axis: u_r/R → ∂u_r/∂R
		}
	}
	return F, nil
}

// Elements returns the number of elements the Gauss-point data covers, or
// an error when it is missing or its points do not fill whole elements.
func (g *GaussPoints) Elements() (int, error) {
	if g == nil || g.PerElement <= 0 {
		return 0, fmt.Errorf("Gauss-point data missing or with no points per element")
	}
	if len(g.Points)%g.PerElement != 0 {
		return 0, fmt.Errorf("%d Gauss points do not fill elements of %d points", len(g.Points), g.PerElement)
	}
	return len(g.Points) / g.PerElement, nil
}
