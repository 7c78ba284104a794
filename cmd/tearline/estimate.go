package main

import (
	"math"

	"tearline/remesh/geom"
	"tearline/solver/fem"
)

// Estimates that `tearline check` gives before anything is solved, and the
// limit that keeps a case from asking for a mesh no machine can solve.

// defaultMaxTriangles is mesh.max_triangles: the largest first mesh a case
// may ask for. With the memory model of solveMemoryMB (about 80 kB per
// triangle of the mixed, regularised element, more as the factors fill in)
// it keeps the solve of the first mesh within some 5 GB, what a 2-core,
// 8 GB machine can hold beside its system.
const defaultMaxTriangles = 60000

// meshEdge is the mean edge of a refined triangle, over h. Refinement
// splits a triangle until its longest edge is ≤ h (tri.Triangulate), and a
// split leaves edges of at least about h/2, so the edges of the mesh lie
// in [h/2, h], about 2h/3 on average (the middle third of the range;
// DEVELOPERS.md records the ratio measured on testdata/).
const meshEdge = 2.0 / 3

// triangleArea is the area of a mesh triangle over h²: that of the
// equilateral triangle, √3/4·e² (elementary geometry), of edge e =
// meshEdge·h. A mesh that follows a size field h(x) has about
// ∫ dA / (triangleArea·h²) triangles.
var triangleArea = math.Sqrt(3) / 4 * meshEdge * meshEdge

// estimateTriangles integrates 1/(triangleArea·h²) over the domain d on a
// quadtree whose cells are no larger than the smallest h within them; h
// grows by at most grading per unit distance (size.Field), which bounds h
// inside a cell from its centre value. It stops early, returning the sum
// so far, once the sum passes stopAbove: a case asking for a mesh far too
// fine is refused in milliseconds, not after meshing it.
func estimateTriangles(d *geom.Domain, h func(x, y float64) float64, grading, stopAbove float64) float64 {
	lo, hi := domainBox(d)
	side := math.Max(hi[0]-lo[0], hi[1]-lo[1])
	if !(side > 0) {
		return 0
	}
	type cell struct{ x, y, s float64 } // lower-left corner and side
	stack := []cell{{lo[0], lo[1], side}}
	sum := 0.0
	for len(stack) > 0 && sum <= stopAbove {
		c := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		cx, cy := c.x+c.s/2, c.y+c.s/2
		hc := h(cx, cy)
		// the smallest h the cell can hold: its centre value less the
		// growth over half its diagonal
		if hc-grading*c.s*math.Sqrt2/2 < c.s {
			half := c.s / 2
			stack = append(stack, cell{c.x, c.y, half}, cell{c.x + half, c.y, half},
				cell{c.x, c.y + half, half}, cell{c.x + half, c.y + half, half})
			continue
		}
		if d.Contains([2]float64{cx, cy}) {
			sum += c.s * c.s / (triangleArea * hc * hc)
		}
	}
	return sum
}

// domainBox is a box that holds the domain: the end points of every piece
// and the full circle of every arc (a box a little too large only adds
// cells outside the domain, which count nothing).
func domainBox(d *geom.Domain) (lo, hi [2]float64) {
	lo = [2]float64{math.Inf(1), math.Inf(1)}
	hi = [2]float64{math.Inf(-1), math.Inf(-1)}
	grow := func(p [2]float64, r float64) {
		for k := 0; k < 2; k++ {
			lo[k] = math.Min(lo[k], p[k]-r)
			hi[k] = math.Max(hi[k], p[k]+r)
		}
	}
	for _, l := range d.Loops() {
		for _, p := range l {
			grow(p.A, 0)
			grow(p.B, 0)
			if p.Kind == geom.Arc {
				grow(p.Centre, p.Radius)
			}
		}
	}
	return lo, hi
}

// The peak memory of a run, from the symbolic analysis of the first
// tangent: a base for the runtime, the mesh, the Gauss-point state and the
// output, plus a cost per non-zero of the LU factors — the 8-byte value,
// the frontal matrices it is assembled in, and the heap's growth to about
// twice its live size before the collector runs (GOGC = 100). Both were
// fitted to the peak resident memory of 3-step runs of every case of
// testdata/ (DEVELOPERS.md, figures), which they match within ±10%.
const (
	memoryBaseMB       = 68
	memoryPerFactorNNZ = 27.8 // bytes
)

// solveMemoryMB estimates the peak memory of a run, in MB, from the
// non-zeros of the first tangent's LU factors.
func solveMemoryMB(nnzLU int) float64 {
	return memoryBaseMB + float64(nnzLU)*memoryPerFactorNNZ/(1<<20)
}

// supportGap names the rigid motions the supports of bcs leave free on
// mesh m, or "" when they hold them all. A plane body must have its two
// translations and its rotation held; an axisymmetric body its axial
// translation (the axis holds the radial motion). Every held displacement
// component counts — supports, symmetry planes, prescribed displacements,
// pins — and the motions are free when the held components do not span
// them: the rows (1, 0, −y) for x held at (x, y) and (0, 1, x) for y held
// have rank below 3 (a rigid motion u = (t_x − ωy, t_y + ωx), elementary
// mechanics).
func supportGap(m *fem.Mesh, bcs fem.BCs, axisymmetric bool) string {
	held := heldComponents(m, bcs)
	if axisymmetric {
		if len(held[1]) == 0 {
			return "the axial (z) translation"
		}
		return ""
	}
	if len(held[0]) == 0 && len(held[1]) == 0 {
		return "both translations and the rotation"
	}
	if len(held[0]) == 0 {
		return "the x translation"
	}
	if len(held[1]) == 0 {
		return "the y translation"
	}
	if rigidRank(m, held) < 3 {
		return "the rotation"
	}
	return ""
}

// heldComponents lists, per component, the nodes whose displacement the
// boundary conditions hold or prescribe.
func heldComponents(m *fem.Mesh, bcs fem.BCs) [2][]int {
	var held [2][]int
	hold := func(label string, comp int) {
		for _, e := range m.Boundary {
			if m.Labels[e.Label] == label {
				held[comp] = append(held[comp], e.A, e.Mid, e.B)
			}
		}
	}
	for _, d := range bcs.Displacements {
		for k := 0; k < 2; k++ {
			if !d.Fix[k] {
				continue
			}
			if n, ok := m.Points[d.Point]; ok && d.Point != "" {
				held[k] = append(held[k], n)
			} else {
				hold(d.Label, k)
			}
		}
	}
	for _, s := range bcs.Symmetries {
		hold(s.Label, s.Comp)
	}
	for _, p := range bcs.Pins {
		hold(p.Label, p.Comp)
	}
	return held
}

// rigidRank is the rank of the rows (1, 0, −y) and (0, 1, x) of the held
// components, by Gram–Schmidt with positions taken about the first held
// node and scaled by the mesh's extent (so that the tolerance is
// relative).
func rigidRank(m *fem.Mesh, held [2][]int) int {
	var o [2]float64
	if len(held[0]) > 0 {
		o = m.X[held[0][0]]
	} else {
		o = m.X[held[1][0]]
	}
	scale := 0.0
	for _, x := range m.X {
		scale = math.Max(scale, math.Hypot(x[0]-o[0], x[1]-o[1]))
	}
	if scale == 0 {
		scale = 1
	}
	var basis [][3]float64
	for comp, nodes := range held {
		for _, n := range nodes {
			x, y := (m.X[n][0]-o[0])/scale, (m.X[n][1]-o[1])/scale
			r := [3]float64{1, 0, -y}
			if comp == 1 {
				r = [3]float64{0, 1, x}
			}
			if addIndependent(&basis, r) && len(basis) == 3 {
				return 3
			}
		}
	}
	return len(basis)
}

// addIndependent adds r to the orthonormal basis when it is independent of
// it (residual above a relative tolerance) and reports whether it did.
func addIndependent(basis *[][3]float64, r [3]float64) bool {
	norm := math.Sqrt(r[0]*r[0] + r[1]*r[1] + r[2]*r[2])
	for _, b := range *basis {
		dot := r[0]*b[0] + r[1]*b[1] + r[2]*b[2]
		for k := range r {
			r[k] -= dot * b[k]
		}
	}
	rest := math.Sqrt(r[0]*r[0] + r[1]*r[1] + r[2]*r[2])
	if !(rest > 1e-9*norm) {
		return false
	}
	*basis = append(*basis, [3]float64{r[0] / rest, r[1] / rest, r[2] / rest})
	return true
}
