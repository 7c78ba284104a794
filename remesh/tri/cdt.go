package tri

import (
	"errors"
	"fmt"
	"math"

	"tearline/solver/plane"
)

// coincidentTol is the relative distance (to the diameter of the input's
// bounding box) below which two input points are reported as nearly
// coincident.
const coincidentTol = 1e-10

// build creates the Delaunay triangulation of the input points inside a large
// enclosing triangle whose vertices are n, n+1, n+2 (removed later), by
// incremental insertion with Lawson flips (Lawson 1977, in Mathematical
// Software III; Guibas & Stolfi 1985, ACM Trans. Graph. 4).
func (m *tmesh) build(pts [][2]float64) error {
	n := len(pts)
	lo := [2]float64{math.Inf(1), math.Inf(1)}
	hi := [2]float64{math.Inf(-1), math.Inf(-1)}
	for i, p := range pts {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return fmt.Errorf("tri: point %d = (%g, %g) is not finite", i, p[0], p[1])
		}
		lo[0], lo[1] = math.Min(lo[0], p[0]), math.Min(lo[1], p[1])
		hi[0], hi[1] = math.Max(hi[0], p[0]), math.Max(hi[1], p[1])
	}
	diam := math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	if !(diam > 0) {
		return errors.New("tri: input points span no area (need at least three points not all coincident)")
	}
	if diam > 1e150 {
		return fmt.Errorf("tri: input extent %g is too large (at most 1e150)", diam)
	}
	m.diam = diam
	m.xy = make([][2]float64, 0, 2*n+16)
	for _, p := range pts {
		m.addVertex(p, vInput)
	}
	cx, cy := 0.5*(lo[0]+hi[0]), 0.5*(lo[1]+hi[1])
	M := 16 * diam
	s0 := m.addVertex([2]float64{cx - 2*M, cy - M}, vFree)
	s1 := m.addVertex([2]float64{cx + 2*M, cy - M}, vFree)
	s2 := m.addVertex([2]float64{cx, cy + 2*M}, vFree)
	t := m.newTri()
	m.setTri(t, s0, s1, s2)
	tol := coincidentTol * diam
	for i := int32(0); i < int32(n); i++ {
		kind, ref := m.locate(m.xy[i], t, false)
		switch kind {
		case locIn:
			m.splitTri(ref, i)
		case locEdge:
			m.splitEdge(ref/3, ref%3, i)
		case locVert:
			return fmt.Errorf("tri: points %d and %d coincide at (%g, %g)", ref, i, m.xy[i][0], m.xy[i][1])
		default:
			return fmt.Errorf("tri: point %d lies outside the enclosing triangle (internal error)", i)
		}
		t = m.vt[i]
		// The nearest earlier point is a Delaunay neighbour of the new one.
		for _, s := range m.star(i) {
			for k := 0; k < 3; k++ {
				j := m.tv[3*s+int32(k)]
				if j == i || j >= int32(n) {
					continue
				}
				if d := plane.Dist(m.xy[i], m.xy[j]); d < tol {
					return fmt.Errorf("tri: points %d and %d are nearly coincident (distance %g, below %g × the input diameter %g)", j, i, d, coincidentTol, diam)
				}
			}
		}
	}
	return nil
}

// newSeg records a constrained sub-segment a→b on edge reference e.
func (m *tmesh) newSeg(e, a, b int32, mark int, orig int32) {
	s := int32(len(m.sa))
	m.sa = append(m.sa, a)
	m.sb = append(m.sb, b)
	m.smark = append(m.smark, mark)
	m.sorig = append(m.sorig, orig)
	m.ts[e] = s
	if n := m.tn[e]; n >= 0 {
		m.ts[n] = s
	}
}

// insertSegment makes a–b (input segment k) a chain of constrained edges:
// vertices lying exactly on it split it; the triangulation edges it crosses
// are removed by Sloan's flipping scheme (Sloan 1993, Comput. Struct. 47) and
// the Delaunay property is then restored around the new edges.
func (m *tmesh) insertSegment(a, b int32, mark int, k int32) error {
	for a != b {
		if e := m.findEdge(a, b); e >= 0 {
			if s := m.ts[e]; s >= 0 {
				return fmt.Errorf("tri: segment %d (points %d–%d) overlaps segment %d", k, a, b, m.sorig[s])
			}
			m.newSeg(e, a, b, mark, k)
			return nil
		}
		cross, on, seg, err := m.crossings(a, b)
		if err != nil {
			return fmt.Errorf("tri: segment %d (points %d–%d): %w", k, a, b, err)
		}
		if seg >= 0 {
			return fmt.Errorf("tri: segment %d (points %d–%d) crosses segment %d (points %d–%d)", k, a, b, m.sorig[seg], m.sa[seg], m.sb[seg])
		}
		if on >= 0 {
			// A vertex lies on the segment: constrain a–on, then go on from it.
			if err := m.insertSegment(a, on, mark, k); err != nil {
				return err
			}
			a = on
			continue
		}
		return m.removeCrossings(a, b, cross, mark, k)
	}
	return nil
}

// crossings walks from vertex a towards vertex b and returns the edges
// crossing the open segment a–b as vertex pairs x→y (x right of a→b, y
// left), stopping at the first vertex lying on it (on) or at the first
// sub-segment crossing it (seg).
func (m *tmesh) crossings(a, b int32) (cross [][2]int32, on, seg int32, err error) {
	pa, pb := m.xy[a], m.xy[b]
	on, seg = -1, -1
	// Find the triangle at a whose wedge holds the direction to b.
	var e int32 = -1
	for _, t := range m.star(a) {
		s := m.slot(t, a)
		x, y := m.tv[3*t+next3(s)], m.tv[3*t+prev3(s)]
		ox := plane.Orient(pa, m.xy[x], pb)
		oy := plane.Orient(pa, m.xy[y], pb)
		if ox == 0 && dot(sub(m.xy[x], pa), sub(pb, pa)) > 0 {
			return nil, x, -1, nil
		}
		if oy == 0 && dot(sub(m.xy[y], pa), sub(pb, pa)) > 0 {
			return nil, y, -1, nil
		}
		if ox > 0 && oy < 0 {
			e = 3*t + s
			break
		}
	}
	if e < 0 {
		return nil, -1, -1, fmt.Errorf("no triangle at point %d faces point %d (internal error)", a, b)
	}
	for {
		if s := m.ts[e]; s >= 0 {
			return cross, -1, s, nil
		}
		t := e / 3
		x, y := m.tv[3*t+next3(e%3)], m.tv[3*t+prev3(e%3)]
		cross = append(cross, [2]int32{x, y})
		n := m.tn[e]
		if n < 0 {
			return nil, -1, -1, fmt.Errorf("the segment leaves the triangulation (internal error)")
		}
		u, j := n/3, n%3
		z := m.tv[n]
		if z == b {
			return cross, -1, -1, nil
		}
		oz := plane.Orient(pa, pb, m.xy[z])
		if oz == 0 {
			return cross, z, -1, nil
		}
		if oz > 0 {
			e = 3*u + next3(j) // x→z
		} else {
			e = 3*u + prev3(j) // z→y
		}
	}
}

// removeCrossings flips the edges in cross (all crossing a–b) until a–b is an
// edge, marks it constrained and restores the Delaunay property around the
// new edges (Sloan 1993).
func (m *tmesh) removeCrossings(a, b int32, cross [][2]int32, mark int, k int32) error {
	made, err := m.recoverEdge(a, b, cross)
	if err != nil {
		return fmt.Errorf("tri: segment %d: %w", k, err)
	}
	e := m.findEdge(a, b)
	if e < 0 {
		return fmt.Errorf("tri: segment %d: edge not recovered (internal error)", k)
	}
	if s := m.ts[e]; s >= 0 {
		return fmt.Errorf("tri: segment %d (points %d–%d) overlaps segment %d", k, a, b, m.sorig[s])
	}
	m.newSeg(e, a, b, mark, k)
	m.legalizeEdges(made)
	return nil
}

// recoverEdge flips the edges in cross (all crossing a–b, none constrained)
// until a–b is an edge (Sloan 1993); it returns the new edges that do not
// cross a–b, to be made Delaunay again.
func (m *tmesh) recoverEdge(a, b int32, cross [][2]int32) ([][2]int32, error) {
	pa, pb := m.xy[a], m.xy[b]
	var made [][2]int32
	guard := 0
	limit := 16*len(cross)*len(cross) + 64
	for len(cross) > 0 {
		if guard++; guard > limit {
			return nil, fmt.Errorf("edge recovery did not converge (internal error)")
		}
		xy := cross[0]
		cross = cross[1:]
		e := m.findEdge(xy[0], xy[1])
		if e < 0 {
			return nil, fmt.Errorf("lost edge during recovery (internal error)")
		}
		t, i := e/3, e%3
		n := m.tn[e]
		p0, p1, p2 := m.tv[e], m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
		q0 := m.tv[n]
		if !(plane.Orient(m.xy[p0], m.xy[p1], m.xy[q0]) > 0 && plane.Orient(m.xy[p0], m.xy[q0], m.xy[p2]) > 0) {
			cross = append(cross, xy) // not convex yet: try later
			continue
		}
		m.flip(t, i)
		if p0 != a && p0 != b && q0 != a && q0 != b &&
			(plane.Orient(pa, pb, m.xy[p0]) > 0) != (plane.Orient(pa, pb, m.xy[q0]) > 0) {
			cross = append(cross, [2]int32{p0, q0})
		} else {
			made = append(made, [2]int32{p0, q0})
		}
	}
	return made, nil
}

// legalizeEdges applies Lawson flips to the listed edges (and those they
// expose) until each non-constrained one is locally Delaunay.
func (m *tmesh) legalizeEdges(edges [][2]int32) {
	for len(edges) > 0 {
		xy := edges[len(edges)-1]
		edges = edges[:len(edges)-1]
		e := m.findEdge(xy[0], xy[1])
		if e < 0 || m.ts[e] >= 0 || m.tn[e] < 0 {
			continue
		}
		t, i := e/3, e%3
		p0, p1, p2 := m.tv[e], m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
		q0 := m.tv[m.tn[e]]
		if plane.InCircle(m.xy[p0], m.xy[p1], m.xy[p2], m.xy[q0]) > 0 {
			m.flip(t, i)
			edges = append(edges, [2]int32{p0, p1}, [2]int32{p1, q0}, [2]int32{q0, p2}, [2]int32{p2, p0})
		}
	}
}

func sub(a, b [2]float64) [2]float64 { return [2]float64{a[0] - b[0], a[1] - b[1]} }
func dot(a, b [2]float64) float64    { return a[0]*b[0] + a[1]*b[1] }

// carve removes the triangles outside the domain: those reachable from the
// enclosing triangle's vertices and from the hole points without crossing a
// constrained edge.
func (m *tmesh) carve(nIn int, holes [][2]float64) error {
	ntri := int32(len(m.tv) / 3)
	m.epoch++
	out := m.epoch
	st := m.stack[:0]
	for t := int32(0); t < ntri; t++ {
		if !m.alive(t) {
			continue
		}
		for k := int32(0); k < 3; k++ {
			if m.tv[3*t+k] >= int32(nIn) {
				m.stamp[t] = out
				st = append(st, t)
				break
			}
		}
	}
	var start int32 = -1
	for t := int32(0); t < ntri; t++ {
		if m.alive(t) {
			start = t
			break
		}
	}
	for h, p := range holes {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return fmt.Errorf("tri: hole %d = (%g, %g) is not finite", h, p[0], p[1])
		}
		kind, ref := m.locate(p, start, false)
		switch kind {
		case locIn:
		case locEdge:
			if m.ts[ref] >= 0 {
				return fmt.Errorf("tri: hole point %d (%g, %g) lies on a segment; put it strictly inside the hole", h, p[0], p[1])
			}
			ref /= 3
		case locVert:
			return fmt.Errorf("tri: hole point %d (%g, %g) coincides with point %d", h, p[0], p[1], ref)
		default:
			continue // outside everything: nothing to remove
		}
		if m.stamp[ref] != out {
			m.stamp[ref] = out
			st = append(st, ref)
		}
	}
	for len(st) > 0 {
		t := st[len(st)-1]
		st = st[:len(st)-1]
		for k := int32(0); k < 3; k++ {
			e := 3*t + k
			if m.ts[e] >= 0 {
				continue
			}
			if n := m.tn[e]; n >= 0 && m.stamp[n/3] != out {
				m.stamp[n/3] = out
				st = append(st, n/3)
			}
		}
	}
	m.stack = st
	alive := 0
	for t := int32(0); t < ntri; t++ {
		if !m.alive(t) {
			continue
		}
		if m.stamp[t] == out {
			m.killTri(t)
		} else {
			alive++
		}
	}
	if alive == 0 {
		return errors.New("tri: no triangles remain inside the segments (the segments must form closed loops around the domain)")
	}
	for i := range m.vt {
		m.vt[i] = -1
	}
	for t := int32(0); t < ntri; t++ {
		if m.alive(t) {
			m.vt[m.tv[3*t]], m.vt[m.tv[3*t+1]], m.vt[m.tv[3*t+2]] = t, t, t
		}
	}
	// Sub-segments with no triangle left (inside holes) are dropped.
	for s := range m.sa {
		if m.findEdge(m.sa[s], m.sb[s]) < 0 {
			m.sa[s], m.sb[s] = -1, -1
		}
	}
	return nil
}
