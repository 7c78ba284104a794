package fem

import "tearline/solver/plane"

// ShapeP2 returns the 6-node (quadratic) triangle's shape functions at the
// area coordinates l: vertices 0, 1, 2, then the midside nodes of edges 0–1,
// 1–2 and 2–0 (standard serendipity-free quadratic Lagrange triangle).
func ShapeP2(l [3]float64) [6]float64 {
	return [6]float64{
		l[0] * (2*l[0] - 1),
		l[1] * (2*l[1] - 1),
		l[2] * (2*l[2] - 1),
		4 * l[0] * l[1],
		4 * l[1] * l[2],
		4 * l[2] * l[0],
	}
}

// ShapeP2Deriv returns ∂N/∂L1 and ∂N/∂L2 of the quadratic shape functions
// with L3 = 1 − L1 − L2 eliminated (the natural coordinates ξ = L1, η = L2).
func ShapeP2Deriv(l [3]float64) (dxi, deta [6]float64) {
	dxi = [6]float64{4*l[0] - 1, 0, -(4*l[2] - 1), 4 * l[1], -4 * l[1], 4 * (l[2] - l[0])}
	deta = [6]float64{0, 4*l[1] - 1, -(4*l[2] - 1), 4 * l[0], 4 * (l[2] - l[1]), -4 * l[0]}
	return dxi, deta
}

// ShapeP1 returns the linear triangle's shape functions (the area
// coordinates themselves), used for the fields carried by corner nodes.
func ShapeP1(l [3]float64) [3]float64 { return l }

// Barycentric returns the area coordinates of p in the straight-sided
// triangle a, b, c (any orientation; degenerate triangles give Inf/NaN,
// callers check the area first). It is plane.Barycentric, the one
// evaluation that element location shares.
func Barycentric(p, a, b, c [2]float64) [3]float64 { return plane.Barycentric(p, a, b, c) }
