package fem

import (
	"fmt"
	"tearline/solver/plane"
)

// Mesh is a 2D mesh of 6-node (quadratic) triangles in the reference
// configuration. It is the one mesh type shared by the mesher, the solver,
// the state transfer and the crack-growth criteria.
//
// Node numbering puts the corner nodes first: nodes 0 … NumCorners-1 are
// triangle vertices and carry the linear fields (θ, P, ā, λ); nodes
// NumCorners … len(X)-1 are midside nodes and carry displacement only.
// Coordinates are (x, y) in plane strain and (r, z) in axisymmetry.
type Mesh struct {
	// X holds the node coordinates, corner nodes first.
	X [][2]float64
	// NumCorners is the number of corner (vertex) nodes.
	NumCorners int
	// Tri holds each triangle's nodes: vertices 0, 1, 2 counter-clockwise,
	// then the midside nodes of edges 0–1, 1–2 and 2–0.
	Tri [][6]int
	// Boundary holds every boundary edge (outer boundary, holes, crack faces).
	Boundary []Edge
	// Labels names the boundary labels; Edge.Label indexes it.
	Labels []string
	// Points maps named points (load points, crack tips, …) to node indices.
	Points map[string]int
}

// Edge is a quadratic boundary edge: end nodes A and B (the triangle's
// interior lies to the left of A→B), midside node Mid, the label index and
// the triangle the edge belongs to.
type Edge struct {
	A, B, Mid int
	Label     int
	Tri       int
}

// EdgeNeighbours returns, per triangle, the triangle across each edge
// (vertices k and k+1), or −1 on the mesh boundary.
func (m *Mesh) EdgeNeighbours() [][3]int {
	nbr := make([][3]int, len(m.Tri))
	open := make(map[[2]int]int, 2*len(m.Tri))
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			nbr[e][k] = -1
			a, b := t[k], t[(k+1)%3]
			if a > b {
				a, b = b, a
			}
			key := [2]int{a, b}
			if o, ok := open[key]; ok {
				nbr[e][k] = o / 3
				nbr[o/3][o%3] = e
				delete(open, key)
			} else {
				open[key] = 3*e + k
			}
		}
	}
	return nbr
}

// Label returns the index of the named boundary label, or -1.
func (m *Mesh) Label(name string) int {
	for i, l := range m.Labels {
		if l == name {
			return i
		}
	}
	return -1
}

// Check verifies the structural invariants of the mesh: node indices in
// range, corner nodes first, positive triangle areas, boundary edges that
// refer to existing triangles and labels. It returns the first violation.
func (m *Mesh) Check() error {
	nn := len(m.X)
	if m.NumCorners < 0 || m.NumCorners > nn {
		return fmt.Errorf("mesh: NumCorners %d outside [0, %d]", m.NumCorners, nn)
	}
	for e, t := range m.Tri {
		for k, n := range t {
			if n < 0 || n >= nn {
				return fmt.Errorf("mesh: triangle %d node %d index %d outside [0, %d)", e, k, n, nn)
			}
			if (k < 3) != (n < m.NumCorners) {
				return fmt.Errorf("mesh: triangle %d local node %d (global %d) is on the wrong side of NumCorners %d", e, k, n, m.NumCorners)
			}
		}
		a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
		if area := 0.5 * ((b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1])); !(area > 0) {
			return fmt.Errorf("mesh: triangle %d has non-positive area %g (vertices must be counter-clockwise)", e, area)
		}
	}
	for i, ed := range m.Boundary {
		if ed.Tri < 0 || ed.Tri >= len(m.Tri) {
			return fmt.Errorf("mesh: boundary edge %d refers to triangle %d of %d", i, ed.Tri, len(m.Tri))
		}
		if ed.Label < 0 || ed.Label >= len(m.Labels) {
			return fmt.Errorf("mesh: boundary edge %d has label index %d of %d labels", i, ed.Label, len(m.Labels))
		}
	}
	for name, n := range m.Points {
		if n < 0 || n >= nn {
			return fmt.Errorf("mesh: point %q refers to node %d of %d", name, n, nn)
		}
	}
	return nil
}

// CornerLocator indexes the straight-sided triangles of the corner nodes
// in the one point locator of the program (plane.Locator, an R-tree); a
// change of the mesh after the call is not seen.
func (m *Mesh) CornerLocator() *plane.Locator {
	return plane.NewLocator(func(e int) [3][2]float64 {
		t := m.Tri[e]
		return [3][2]float64{m.X[t[0]], m.X[t[1]], m.X[t[2]]}
	}, len(m.Tri))
}
