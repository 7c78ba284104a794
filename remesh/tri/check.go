package tri

import (
	"fmt"

	"tearline/solver/plane"
)

// Check verifies the structural invariants of a mesh: vertex indices in
// range, every triangle counter-clockwise with positive area (exact test), no
// duplicate triangles, every edge shared by at most two triangles with
// opposite directions, every edge on the boundary of the triangle set a
// sub-segment, and every sub-segment an edge of some triangle. It returns the
// first violation.
func Check(m *Mesh) error {
	type edge struct{ a, b int }
	np := len(m.Points)
	dir := make(map[edge]int, 3*len(m.Triangles)) // directed edge → triangle
	seen := make(map[[3]int]int, len(m.Triangles))
	for i, t := range m.Triangles {
		for k, v := range t {
			if v < 0 || v >= np {
				return fmt.Errorf("tri: triangle %d vertex %d index %d outside [0, %d)", i, k, v, np)
			}
		}
		if o := plane.Orient(m.Points[t[0]], m.Points[t[1]], m.Points[t[2]]); !(o > 0) {
			return fmt.Errorf("tri: triangle %d (%d %d %d) is not counter-clockwise (orientation %g)", i, t[0], t[1], t[2], o)
		}
		key := t
		for key[0] > key[1] || key[0] > key[2] { // rotate smallest first
			key = [3]int{key[1], key[2], key[0]}
		}
		if j, ok := seen[key]; ok {
			return fmt.Errorf("tri: triangles %d and %d are the same", j, i)
		}
		seen[key] = i
		for k := 0; k < 3; k++ {
			e := edge{t[k], t[(k+1)%3]}
			if j, ok := dir[e]; ok {
				return fmt.Errorf("tri: triangles %d and %d both have the directed edge %d→%d (overlap)", j, i, e.a, e.b)
			}
			dir[e] = i
		}
	}
	isSeg := make(map[edge]bool, len(m.Segments))
	for s, sg := range m.Segments {
		a, b := sg[0], sg[1]
		if a < 0 || a >= np || b < 0 || b >= np {
			return fmt.Errorf("tri: sub-segment %d (%d–%d) has an index outside [0, %d)", s, a, b, np)
		}
		_, f := dir[edge{a, b}]
		_, r := dir[edge{b, a}]
		if !f && !r {
			return fmt.Errorf("tri: sub-segment %d (%d–%d) is not an edge of the mesh", s, a, b)
		}
		isSeg[edge{a, b}], isSeg[edge{b, a}] = true, true
	}
	for e, t := range dir {
		if _, ok := dir[edge{e.b, e.a}]; !ok && !isSeg[e] {
			return fmt.Errorf("tri: boundary edge %d→%d of triangle %d is not a sub-segment", e.a, e.b, t)
		}
	}
	return nil
}
