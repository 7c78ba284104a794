package tri

import (
	"fmt"

	"tearline/solver/plane"
)

// tmesh is the working triangulation: flat int32 arrays for topology.
//
// Triangle t has vertices tv[3t:3t+3] in counter-clockwise order. Edge i of t
// lies opposite vertex i and runs from vertex i+1 to vertex i+2 (mod 3). An
// edge reference is e = 3t+i; tn[e] is the reference of the same edge seen
// from the neighbouring triangle (or -1 on the boundary of the
// triangulation), and ts[e] the index of the constrained sub-segment lying on
// the edge (or -1).
type tmesh struct {
	xy   [][2]float64
	vseg []int32 // per vertex: vInput, vFree, or the input segment it was inserted on
	vt   []int32 // per vertex: one incident triangle, or -1

	tv   []int32
	tn   []int32
	ts   []int32
	free []int32 // dead triangle slots (tv[3t] == -1)

	// constrained sub-segments
	sa, sb []int32 // end points
	smark  []int   // boundary-piece mark
	sorig  []int32 // input segment index

	diam float64 // diameter of the input's bounding box

	rng   uint64
	stamp []uint32 // per triangle, for traversals
	epoch uint32

	starBuf []int32
	stack   []int32
}

const (
	vInput = -2 // input vertex
	vFree  = -1 // vertex inserted away from segments
)

func (m *tmesh) addVertex(p [2]float64, seg int32) int32 {
	m.xy = append(m.xy, p)
	m.vseg = append(m.vseg, seg)
	m.vt = append(m.vt, -1)
	return int32(len(m.xy) - 1)
}

func (m *tmesh) newTri() int32 {
	if n := len(m.free); n > 0 {
		t := m.free[n-1]
		m.free = m.free[:n-1]
		return t
	}
	t := int32(len(m.tv) / 3)
	m.tv = append(m.tv, -1, -1, -1)
	m.tn = append(m.tn, -1, -1, -1)
	m.ts = append(m.ts, -1, -1, -1)
	m.stamp = append(m.stamp, 0)
	return t
}

func (m *tmesh) killTri(t int32) {
	for k := int32(0); k < 3; k++ {
		e := 3*t + k
		if n := m.tn[e]; n >= 0 {
			m.tn[n] = -1
		}
		m.tv[e], m.tn[e], m.ts[e] = -1, -1, -1
	}
	m.free = append(m.free, t)
}

func (m *tmesh) alive(t int32) bool { return m.tv[3*t] >= 0 }

func (m *tmesh) setTri(t, a, b, c int32) {
	m.tv[3*t], m.tv[3*t+1], m.tv[3*t+2] = a, b, c
	m.vt[a], m.vt[b], m.vt[c] = t, t, t
}

// link makes edge references e and f neighbours and sets their sub-segment.
func (m *tmesh) link(e, f, seg int32) {
	m.tn[e] = f
	m.ts[e] = seg
	if f >= 0 {
		m.tn[f] = e
		m.ts[f] = seg
	}
}

func next3(i int32) int32 { return (i + 1) % 3 }
func prev3(i int32) int32 { return (i + 2) % 3 }

func (m *tmesh) rand3() int32 {
	// xorshift64 (Marsaglia 2003, J. Stat. Softw. 8)
	m.rng ^= m.rng << 13
	m.rng ^= m.rng >> 7
	m.rng ^= m.rng << 17
	return int32(m.rng % 3)
}

// flip replaces the diagonal of the quadrilateral formed by triangle t and
// its neighbour across edge i. With t = [p0 p1 p2] (edge i = p1→p2) and the
// neighbour's apex q0, afterwards t = [p0 p1 q0] and u = [p0 q0 p2].
func (m *tmesh) flip(t, i int32) (u int32) {
	e := 3*t + i
	n := m.tn[e]
	u, j := n/3, n%3
	p0, p1, p2 := m.tv[e], m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
	q0 := m.tv[n]
	ea, eb := 3*t+next3(i), 3*t+prev3(i)
	ec, ed := 3*u+next3(j), 3*u+prev3(j)
	A, sA := m.tn[ea], m.ts[ea]
	B, sB := m.tn[eb], m.ts[eb]
	C, sC := m.tn[ec], m.ts[ec]
	D, sD := m.tn[ed], m.ts[ed]
	m.setTri(t, p0, p1, q0)
	m.setTri(u, p0, q0, p2)
	m.link(3*t, C, sC)
	m.link(3*t+1, 3*u+2, -1)
	m.link(3*t+2, B, sB)
	m.link(3*u, D, sD)
	m.link(3*u+1, A, sA)
	return u
}

// legalize restores the (constrained) Delaunay property after inserting a
// vertex: every triangle on the stack has the new vertex at slot 0 and its
// edge 0 is checked (Lawson's flip algorithm).
func (m *tmesh) legalize() {
	for len(m.stack) > 0 {
		t := m.stack[len(m.stack)-1]
		m.stack = m.stack[:len(m.stack)-1]
		e := 3 * t
		if m.ts[e] >= 0 {
			continue
		}
		n := m.tn[e]
		if n < 0 {
			continue
		}
		q := m.tv[n]
		if plane.InCircle(m.xy[m.tv[e]], m.xy[m.tv[e+1]], m.xy[m.tv[e+2]], m.xy[q]) > 0 {
			u := m.flip(t, 0)
			m.stack = append(m.stack, t, u)
		}
	}
}

// splitTri inserts vertex p inside triangle t.
func (m *tmesh) splitTri(t, p int32) {
	a, b, c := m.tv[3*t], m.tv[3*t+1], m.tv[3*t+2]
	N0, s0 := m.tn[3*t], m.ts[3*t]
	N1, s1 := m.tn[3*t+1], m.ts[3*t+1]
	N2, s2 := m.tn[3*t+2], m.ts[3*t+2]
	t1 := m.newTri()
	t2 := m.newTri()
	m.setTri(t, p, b, c)
	m.setTri(t1, p, c, a)
	m.setTri(t2, p, a, b)
	m.link(3*t, N0, s0)
	m.link(3*t1, N1, s1)
	m.link(3*t2, N2, s2)
	m.link(3*t+1, 3*t1+2, -1)
	m.link(3*t+2, 3*t2+1, -1)
	m.link(3*t1+1, 3*t2+2, -1)
	m.stack = append(m.stack[:0], t, t1, t2)
	m.legalize()
}

// splitEdge inserts vertex p on edge i of triangle t. If the edge carries a
// sub-segment, it is split into two; the half containing the segment's first
// end point keeps its index.
func (m *tmesh) splitEdge(t, i, p int32) {
	e := 3*t + i
	n := m.tn[e]
	seg := m.ts[e]
	h1, h2 := int32(-1), int32(-1)
	if seg >= 0 {
		h1, h2 = m.splitSub(seg, m.tv[3*t+next3(i)], p)
	}
	t2 := m.halve(t, i, p)
	m.stack = append(m.stack[:0], t, t2)
	if n < 0 {
		m.link(3*t+2, -1, h2)
		m.link(3*t2+1, -1, h1)
	} else {
		// the neighbour u = [q0 p2 p1] becomes [p p1 q0] and [p q0 p2]
		u := n / 3
		u2 := m.halve(u, n%3, p)
		m.link(3*t+2, 3*u2+1, h2)
		m.link(3*t2+1, 3*u+2, h1)
		m.stack = append(m.stack, u, u2)
	}
	m.legalize()
}

// halve splits triangle t = [p0 p1 p2] at vertex v on its edge i (p1→p2)
// into t = [v p2 p0] and a new triangle [v p0 p1], which it returns. The
// outer edges p2→p0 and p0→p1 keep their neighbours and sub-segments, the
// two triangles share the edge v–p0, and the halves of edge i (edge 2 of
// t, v→p2, and edge 1 of the new triangle, p1→v) are left to the caller.
func (m *tmesh) halve(t, i, v int32) int32 {
	p0, p1, p2 := m.tv[3*t+i], m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
	A, sA := m.tn[3*t+next3(i)], m.ts[3*t+next3(i)]
	B, sB := m.tn[3*t+prev3(i)], m.ts[3*t+prev3(i)]
	t2 := m.newTri()
	m.setTri(t, v, p2, p0)
	m.setTri(t2, v, p0, p1)
	m.link(3*t, A, sA)
	m.link(3*t2, B, sB)
	m.link(3*t+1, 3*t2+2, -1)
	return t2
}

// splitSub splits sub-segment s, which joins p1 and some p2 (in either
// direction), at the new vertex v: s keeps the half at its first end point,
// a new sub-segment with the same mark takes the other. It returns the
// halves on p1–v and on v–p2.
func (m *tmesh) splitSub(s, p1, v int32) (h1, h2 int32) {
	ns := int32(len(m.sa))
	m.sa = append(m.sa, v)
	m.sb = append(m.sb, m.sb[s])
	m.smark = append(m.smark, m.smark[s])
	m.sorig = append(m.sorig, m.sorig[s])
	m.sb[s] = v
	if m.sa[s] == p1 { // s ran p1→p2: s = p1→v, ns = v→p2
		return s, ns
	}
	return ns, s // s ran p2→p1: s = p2→v, ns = v→p1
}

// star returns the triangles around vertex v (in m.starBuf).
func (m *tmesh) star(v int32) []int32 {
	buf := m.starBuf[:0]
	t0 := m.vt[v]
	if t0 < 0 {
		m.starBuf = buf
		return buf
	}
	t := t0
	for {
		buf = append(buf, t)
		k := m.slot(t, v)
		n := m.tn[3*t+next3(k)] // edge (apex2 → v): next triangle counter-clockwise
		if n < 0 {
			break
		}
		t = n / 3
		if t == t0 {
			m.starBuf = buf
			return buf
		}
		if len(buf) > len(m.tv) { // corrupt topology: never loop forever
			panic("tri: vertex star does not close")
		}
	}
	// open star (boundary vertex): go clockwise from t0
	t = t0
	for {
		k := m.slot(t, v)
		n := m.tn[3*t+prev3(k)]
		if n < 0 {
			break
		}
		t = n / 3
		buf = append(buf, t)
		if len(buf) > len(m.tv) {
			panic("tri: vertex star does not close")
		}
	}
	m.starBuf = buf
	return buf
}

func (m *tmesh) slot(t, v int32) int32 {
	switch v {
	case m.tv[3*t]:
		return 0
	case m.tv[3*t+1]:
		return 1
	case m.tv[3*t+2]:
		return 2
	}
	panic(fmt.Sprintf("tri: vertex %d not in triangle %d", v, t))
}

// findEdge returns an edge reference of the edge a–b (in either direction),
// or -1 if a and b are not joined by an edge.
func (m *tmesh) findEdge(a, b int32) int32 {
	for _, t := range m.star(a) {
		k := m.slot(t, a)
		if m.tv[3*t+next3(k)] == b {
			return 3*t + prev3(k)
		}
		if m.tv[3*t+prev3(k)] == b {
			return 3*t + next3(k)
		}
	}
	return -1
}

// location kinds
const (
	locIn   = iota // inside triangle ref
	locEdge        // on edge ref (not a sub-segment when stopping at segments)
	locVert        // on vertex ref
	locSeg         // blocked by (or lying on) the sub-segment on edge ref
	locOut         // outside the triangulation across edge ref
)

// locate walks from triangle t towards p (a visibility walk with random
// edge order, which terminates on any triangulation; Devillers, Pion &
// Teillaud 2002, Int. J. Found. Comput. Sci. 13). With stopSeg the walk
// does not cross sub-segments.
func (m *tmesh) locate(p [2]float64, t int32, stopSeg bool) (kind int, ref int32) {
	limit := 4*len(m.tv) + 64
	for steps := 0; steps < limit; steps++ {
		off := m.rand3()
		zeros := 0
		var z [2]int32
		moved := false
		for kk := int32(0); kk < 3; kk++ {
			i := (off + kk) % 3
			e := 3*t + i
			o := plane.Orient(m.xy[m.tv[3*t+next3(i)]], m.xy[m.tv[3*t+prev3(i)]], p)
			if o < 0 {
				if stopSeg && m.ts[e] >= 0 {
					return locSeg, e
				}
				n := m.tn[e]
				if n < 0 {
					return locOut, e
				}
				t = n / 3
				moved = true
				break
			}
			if o == 0 {
				if zeros < 2 {
					z[zeros] = i
				}
				zeros++
			}
		}
		if moved {
			continue
		}
		switch zeros {
		case 0:
			return locIn, t
		case 1:
			e := 3*t + z[0]
			if stopSeg && m.ts[e] >= 0 {
				return locSeg, e
			}
			return locEdge, e
		default:
			return locVert, m.tv[3*t+(3-z[0]-z[1])]
		}
	}
	panic("tri: point location did not terminate")
}
