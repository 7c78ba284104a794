package criteria

import (
	"fmt"
	"math"

	"tearline/solver/fem"
	"tearline/solver/plane"
)

// CTODOptions selects the tip and the crack faces of CTOD.
type CTODOptions struct {
	// Tip is the current crack tip in the reference configuration (for
	// example the original tip node before growth, or Tip.X of
	// LocateFront); the vertex of the intercept lines is its deformed
	// position X + u.
	Tip [2]float64
	// Dir is the crack direction (the crack lies behind the tip along −Dir).
	Dir [2]float64
	// Symmetric is set for a half model with a mirror plane through the
	// tip along Dir: only the upper face exists and δ is twice its
	// intercept's distance from the plane.
	Symmetric bool
	// Label names the crack-face boundary label; "" means "crack".
	Label string
	// Locator, when not nil, is m.CornerLocator() built once by a caller
	// that measures the same mesh step after step; nil builds it.
	Locator *plane.Locator
}

// Opening is the result of CTOD: the opening δ, the vertex (deformed tip)
// and the intercepts on the upper and lower faces (the lower one mirrored
// in a half model).
type Opening struct {
	Delta                float64
	Vertex, Upper, Lower [2]float64
}

// CTOD returns the crack-tip opening displacement by the 90° intercept
// (Shih 1981, J. Mech. Phys. Solids 29; common practice): two lines from
// the deformed tip at ±45° to the crack line, pointing back along the
// crack, cut the deformed crack faces; δ is the distance between the two
// cuts. The faces are the boundary edges with the crack label, deformed by
// u and followed as quadratic curves through their three nodes; on each
// line the cut nearest the vertex (beyond a round-off distance) counts.
func CTOD(m *fem.Mesh, u [][2]float64, opt CTODOptions) (Opening, error) {
	var o Opening
	if m == nil || len(m.Tri) == 0 || len(m.X) == 0 {
		return o, fmt.Errorf("CTOD: empty mesh (no nodes or triangles)")
	}
	if len(u) != len(m.X) {
		return o, fmt.Errorf("CTOD: %d nodal displacements for %d nodes", len(u), len(m.X))
	}
	if d := math.Hypot(opt.Dir[0], opt.Dir[1]); !(d > 0) || math.IsInf(d, 0) {
		return o, fmt.Errorf("CTOD: crack direction %v must be a finite non-zero vector", opt.Dir)
	}
	label := opt.Label
	if label == "" {
		label = "crack"
	}
	li := m.Label(label)
	if li < 0 {
		return o, fmt.Errorf("CTOD: the mesh has no boundary label %q for the crack faces (labels: %v)", label, m.Labels)
	}
	loc := opt.Locator
	if loc == nil {
		loc = m.CornerLocator()
	}
	ut, err := displacementAt(m, loc, u, opt.Tip)
	if err != nil {
		return o, fmt.Errorf("CTOD: %w", err)
	}
	v := [2]float64{opt.Tip[0] + ut[0], opt.Tip[1] + ut[1]}
	o.Vertex = v
	t, n := frame(opt.Dir)
	const c = math.Sqrt2 / 2
	up := [2]float64{c * (n[0] - t[0]), c * (n[1] - t[1])}
	lo := [2]float64{c * (-n[0] - t[0]), c * (-n[1] - t[1])}
	var scale float64
	var edges [][3][2]float64
	for _, ed := range m.Boundary {
		if ed.Label != li {
			continue
		}
		var p [3][2]float64
		for k, nd := range [3]int{ed.A, ed.Mid, ed.B} {
			if nd < 0 || nd >= len(m.X) {
				return o, fmt.Errorf("CTOD: crack-face edge node %d outside [0, %d)", nd, len(m.X))
			}
			p[k] = [2]float64{m.X[nd][0] + u[nd][0], m.X[nd][1] + u[nd][1]}
		}
		scale = math.Max(scale, plane.Dist(p[0], p[2]))
		edges = append(edges, p)
	}
	if len(edges) == 0 {
		return o, fmt.Errorf("CTOD: no boundary edge carries the crack label %q", label)
	}
	tol := 1e-9 * scale
	cut := func(d [2]float64) ([2]float64, bool) {
		best, found := math.Inf(1), false
		var bp [2]float64
		for _, p := range edges {
			for _, pt := range cutQuadratic(p, v, d) {
				tau := (pt[0]-v[0])*d[0] + (pt[1]-v[1])*d[1]
				if tau > tol && tau < best {
					best, bp, found = tau, pt, true
				}
			}
		}
		return bp, found
	}
	pu, ok := cut(up)
	if !ok {
		return o, fmt.Errorf("CTOD: the +45° line from the deformed tip %v cuts no crack-face edge labelled %q", v, label)
	}
	o.Upper = pu
	if opt.Symmetric {
		h := (pu[0]-v[0])*n[0] + (pu[1]-v[1])*n[1]
		o.Lower = [2]float64{pu[0] - 2*h*n[0], pu[1] - 2*h*n[1]}
		o.Delta = 2 * h
		return o, nil
	}
	pl, ok := cut(lo)
	if !ok {
		return o, fmt.Errorf("CTOD: the −45° line from the deformed tip %v cuts no crack-face edge labelled %q (for a half model set Symmetric)", v, label)
	}
	o.Lower = pl
	o.Delta = plane.Dist(pu, pl)
	return o, nil
}

// cutQuadratic returns the points where the quadratic curve through p[0]
// (s = 0), p[1] (s = ½), p[2] (s = 1) meets the line through v along d.
func cutQuadratic(p [3][2]float64, v, d [2]float64) [][2]float64 {
	cross := func(a [2]float64) float64 { return a[0]*d[1] - a[1]*d[0] }
	// c(s) = p0 + s(−3p0 + 4p1 − p2) + s²(2p0 − 4p1 + 2p2)
	b1 := [2]float64{-3*p[0][0] + 4*p[1][0] - p[2][0], -3*p[0][1] + 4*p[1][1] - p[2][1]}
	b2 := [2]float64{2*p[0][0] - 4*p[1][0] + 2*p[2][0], 2*p[0][1] - 4*p[1][1] + 2*p[2][1]}
	alpha := cross([2]float64{p[0][0] - v[0], p[0][1] - v[1]})
	beta := cross(b1)
	gamma := cross(b2)
	var roots []float64
	scale := math.Abs(beta) + math.Abs(gamma) + math.Abs(alpha)
	switch {
	case scale == 0:
		return nil
	case math.Abs(gamma) <= 1e-12*scale:
		if beta != 0 {
			roots = append(roots, -alpha/beta)
		}
	default:
		disc := beta*beta - 4*gamma*alpha
		if disc < 0 {
			return nil
		}
		sq := math.Sqrt(disc)
		// numerically stable pair
		qq := -0.5 * (beta + math.Copysign(sq, beta))
		roots = append(roots, qq/gamma)
		if qq != 0 {
			roots = append(roots, alpha/qq)
		}
	}
	var pts [][2]float64
	for _, s := range roots {
		if s < -1e-12 || s > 1+1e-12 {
			continue
		}
		pts = append(pts, [2]float64{p[0][0] + s*b1[0] + s*s*b2[0], p[0][1] + s*b1[1] + s*s*b2[1]})
	}
	return pts
}

// displacementAt interpolates the nodal displacement at the reference point
// x with the quadratic shape functions of the triangle that contains it
// (straight-sided location; the nearest triangle within a small tolerance
// for points on the boundary).
func displacementAt(m *fem.Mesh, loc *plane.Locator, u [][2]float64, x [2]float64) ([2]float64, error) {
	e, l, ok := loc.FindFirst(x, 0)
	if !ok {
		// just outside, by round-off on a curved or carved boundary:
		// within 1e-6 of a triangle's height
		if e, l, ok = loc.FindFirst(x, 1e-6); !ok {
			return [2]float64{}, fmt.Errorf("point %v lies outside the mesh", x)
		}
	}
	N := fem.ShapeP2(l)
	var r [2]float64
	for a, n := range m.Tri[e] {
		r[0] += N[a] * u[n][0]
		r[1] += N[a] * u[n][1]
	}
	return r, nil
}
