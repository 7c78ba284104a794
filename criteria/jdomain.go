package criteria

import (
	"fmt"
	"math"

	"tearline/solver/fem"
)

// Ring is one integration domain of the domain integral: the weight q is 1
// inside radius In, 0 outside radius Out and linear in the radius between
// (its nodal values are interpolated with the element's shape functions).
type Ring struct {
	In, Out float64
}

// JOptions selects the crack tip, the crack direction and the domains of
// DomainJ.
type JOptions struct {
	// Tip is the crack-tip position and Dir the crack direction (the local
	// X₁ axis of the J integral; need not be unit length), both in the
	// reference configuration.
	Tip, Dir [2]float64
	// Rings are the integration domains, one J value each.
	Rings []Ring
	// Symmetric doubles J for a half model with mirror symmetry about the
	// crack line.
	Symmetric bool
	// Axisymmetric selects the axisymmetric domain integral: coordinates
	// (r, z), a circular crack front of radius Tip[0] > 0, J per unit length
	// of the front.
	Axisymmetric bool
	// Cross, when non-nil, lists the boundary labels a domain may cross
	// (traction-free crack faces, symmetry planes). Any other boundary edge
	// with a node where q ≠ 0 is then an error, since the domain integral
	// assumes q = 0 on loaded outer boundaries. nil skips the check.
	Cross []string
}

// Validate checks the options on their own (not against a mesh).
func (o *JOptions) Validate() error {
	if o.Axisymmetric && !(o.Tip[0] > 0) {
		return fmt.Errorf("domain J: axisymmetric crack front at radius r = %g; need r > 0 (a tip on or across the axis has no front)", o.Tip[0])
	}
	if d := math.Hypot(o.Dir[0], o.Dir[1]); !(d > 0) || math.IsInf(d, 0) {
		return fmt.Errorf("domain J: crack direction %v must be a finite non-zero vector", o.Dir)
	}
	if math.IsNaN(o.Tip[0]) || math.IsNaN(o.Tip[1]) || math.IsInf(o.Tip[0], 0) || math.IsInf(o.Tip[1], 0) {
		return fmt.Errorf("domain J: crack tip %v must be finite", o.Tip)
	}
	if len(o.Rings) == 0 {
		return fmt.Errorf("domain J: no rings given (need at least one inner/outer radius pair)")
	}
	for k, r := range o.Rings {
		if !(r.In >= 0) || !(r.Out > r.In) || math.IsInf(r.Out, 0) {
			return fmt.Errorf("domain J: ring %d has radii in = %g, out = %g; need 0 ≤ in < out < ∞", k, r.In, r.Out)
		}
	}
	return nil
}

// q returns the domain weight at distance r.
func (r Ring) q(d float64) float64 {
	switch {
	case d <= r.In:
		return 1
	case d >= r.Out:
		return 0
	}
	return (r.Out - d) / (r.Out - r.In)
}

// checkGauss verifies that the Gauss-point data fits the mesh and the
// element rule.
func checkGauss(m *fem.Mesh, gp *fem.GaussPoints, what string) error {
	if m == nil || len(m.Tri) == 0 || len(m.X) == 0 {
		return fmt.Errorf("%s: empty mesh (no nodes or triangles)", what)
	}
	if gp == nil {
		return fmt.Errorf("%s: no Gauss-point data", what)
	}
	if n := fem.ElementRule().Len(); gp.PerElement != n {
		return fmt.Errorf("%s: Gauss-point data has %d points per element, the element rule has %d", what, gp.PerElement, n)
	}
	if want := len(m.Tri) * gp.PerElement; len(gp.Points) != want {
		return fmt.Errorf("%s: Gauss-point data has %d points, the mesh needs %d (%d triangles × %d)", what, len(gp.Points), want, len(m.Tri), gp.PerElement)
	}
	nn := len(m.X)
	for e, t := range m.Tri {
		for k, n := range t {
			if n < 0 || n >= nn {
				return fmt.Errorf("%s: triangle %d node %d index %d outside [0, %d)", what, e, k, n, nn)
			}
		}
	}
	return nil
}

// DomainJ returns J on each ring of opt by the equivalent domain integral
// (Li, Shih & Needleman 1985, Eng. Fract. Mech. 21; Moran & Shih 1987, Eng.
// Fract. Mech. 27) in its finite-strain form on the reference configuration
// (common practice):
//
//	J = ∫_A (P_iJ ∂u_i/∂X₁ − W δ_1J) ∂q/∂X_J dA,
//
// with X₁ along the crack direction, P the first Piola–Kirchhoff stress, W
// the stress-work density and ∂u/∂X = F − I at the Gauss points. The weight
// q takes its ring value at every node of an element and is interpolated
// with the quadratic shape functions, so its gradient follows the element's
// isoparametric map. Path independence over the rings is the check of the
// result; for plasticity under non-proportional loading (unloading wake,
// crack growth) the rings differ and that is physics, not error.
//
// In axisymmetry the virtual crack advance is the vector field q·d (d the
// crack direction in the (r, z) plane), whose divergence and gradient gain
// the hoop term q d_r/R; the 3D domain integral (Shih, Moran & Nakamura
// 1986, Int. J. Fract. 30) divided by the front length 2πr_tip gives
//
//	J = (1/r_tip) ∫_A [(P_iJ ∂u_i/∂X₁ − W δ_1J) ∂q/∂X_J + (P₃₃(F₃₃−1) − W) q d_r/R] R dA.
//
// The hoop term is what makes J vanish for a regular axisymmetric field
// (checked on the Lamé cylinder).
//
// Broken Gauss points (State.Broken) are skipped: their material has left
// the assembly and is removed at the next remesh, so J sees it as void both
// before and after (common practice).
func DomainJ(m *fem.Mesh, gp *fem.GaussPoints, opt JOptions) ([]float64, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	if err := checkGauss(m, gp, "domain J"); err != nil {
		return nil, err
	}
	var cross []bool
	if opt.Cross != nil {
		cross = make([]bool, len(m.Labels))
		for _, name := range opt.Cross {
			li := m.Label(name)
			if li < 0 {
				return nil, fmt.Errorf("domain J: label %q of Cross is not a boundary label of the mesh (labels: %v)", name, m.Labels)
			}
			cross[li] = true
		}
	}
	e1, _ := frame(opt.Dir)
	rule := fem.ElementRule()
	dist := make([]float64, len(m.X))
	for i, x := range m.X {
		dist[i] = math.Hypot(x[0]-opt.Tip[0], x[1]-opt.Tip[1])
	}
	out := make([]float64, len(opt.Rings))
	for k, ring := range opt.Rings {
		if cross != nil {
			for _, ed := range m.Boundary {
				if ed.Label >= 0 && ed.Label < len(cross) && cross[ed.Label] {
					continue
				}
				for _, n := range [3]int{ed.A, ed.Mid, ed.B} {
					if n >= 0 && n < len(m.X) && ring.q(dist[n]) > 0 {
						name := "?"
						if ed.Label >= 0 && ed.Label < len(m.Labels) {
							name = m.Labels[ed.Label]
						}
						return nil, fmt.Errorf("domain J: ring %d (in %g, out %g) reaches boundary %q at node %d %v, which is not in Cross %v; shrink the ring or list the label", k, ring.In, ring.Out, name, n, m.X[n], opt.Cross)
					}
				}
			}
		}
		var J float64
		active := 0
		for e, t := range m.Tri {
			var q [6]float64
			lo, hi := math.Inf(1), math.Inf(-1)
			for a, n := range t {
				q[a] = ring.q(dist[n])
				lo, hi = math.Min(lo, q[a]), math.Max(hi, q[a])
			}
			if lo == hi && (hi == 0 || !opt.Axisymmetric) {
				continue // ∇q = 0 here (and q = 0 or no hoop term)
			}
			active++
			for i := 0; i < rule.Len(); i++ {
				dxi, deta := fem.ShapeP2Deriv(rule.L[i])
				var xXi, xEta, yXi, yEta, qXi, qEta float64
				for a, n := range t {
					x := m.X[n]
					xXi += x[0] * dxi[a]
					xEta += x[0] * deta[a]
					yXi += x[1] * dxi[a]
					yEta += x[1] * deta[a]
					qXi += q[a] * dxi[a]
					qEta += q[a] * deta[a]
				}
				det := xXi*yEta - xEta*yXi
				if !(det > 0) {
					return nil, fmt.Errorf("domain J: triangle %d has a non-positive Jacobian %g at Gauss point %d", e, det, i)
				}
				qx := (yEta*qXi - yXi*qEta) / det
				qy := (-xEta*qXi + xXi*qEta) / det
				g := gp.At(e, i)
				if g.State.Broken {
					continue // broken material is void for J (it leaves assembly)
				}
				// ∂u_i/∂X₁ along the crack direction, from H = F − I.
				g1 := (g.F[0]-1)*e1[0] + g.F[1]*e1[1]
				g2 := g.F[2]*e1[0] + (g.F[3]-1)*e1[1]
				v := g.P[0]*g1*qx + g.P[1]*g1*qy + g.P[2]*g2*qx + g.P[3]*g2*qy -
					g.W*(e1[0]*qx+e1[1]*qy)
				if opt.Axisymmetric {
					R := g.X[0]
					if !(R > 0) {
						return nil, fmt.Errorf("domain J: triangle %d Gauss point %d at r = %g: axisymmetric points need r > 0", e, i, R)
					}
					var qg float64
					N := fem.ShapeP2(rule.L[i])
					for a := range q {
						qg += N[a] * q[a]
					}
					v = (v + (g.P[4]*(g.F[4]-1)-g.W)*qg*e1[0]/R) * R / opt.Tip[0]
				}
				J += v * g.DA
			}
		}
		if active == 0 {
			return nil, fmt.Errorf("domain J: ring %d (in %g, out %g) around %v holds no element with a gradient of q: the ring is thinner than the elements or outside the mesh", k, ring.In, ring.Out, opt.Tip)
		}
		if math.IsNaN(J) || math.IsInf(J, 0) {
			return nil, fmt.Errorf("domain J: ring %d (in %g, out %g) gives J = %g (non-finite stress or strain in the domain)", k, ring.In, ring.Out, J)
		}
		if opt.Symmetric {
			J *= 2
		}
		out[k] = J
	}
	return out, nil
}
