package tri

import (
	"fmt"
	"math"

	"tearline/solver/plane"
)

// refiner carries out Delaunay refinement (Ruppert 1995, J. Algorithms 18;
// Shewchuk 2002, Comput. Geom. 22) on a carved CDT.
type refiner struct {
	m      *tmesh
	size   func(x, y float64) float64
	split  func(mark int, a, b [2]float64) [2]float64
	sin2   float64 // sin² of the minimum angle
	maxPts int
	inSegs [][2]int // input segments (for the small-angle rule)
	// smallCorner marks input vertices where two input segments meet at
	// less than 60°.
	smallCorner []bool
	// minLen: sub-segments shorter than this are not split, and triangles
	// with a shorter edge are not split for their angles.
	minLen float64
	// keep flags the input segments that are never split (Options.Keep).
	keep []bool

	segQ    []segItem
	segHead int
	triQ    []triItem
	triHead int
	enc     []int32
	added   int
	err     error

	// counts of the ways boundary sub-segments were split on a curve
	nCurvedOut, nCurvedIn, nInward int
}

type segItem struct{ s, a, b int32 }
type triItem struct{ t, a, b, c int32 }

func newRefiner(m *tmesh, in *Input, opt *Options) *refiner {
	r := &refiner{m: m, maxPts: DefaultMaxPoints, inSegs: in.Segments}
	theta := float64(DefaultMinAngle)
	if opt != nil {
		r.size, r.split, r.keep = opt.Size, opt.Split, opt.Keep
		if opt.MinAngle > 0 {
			theta = opt.MinAngle
		}
		if opt.MaxPoints > 0 {
			r.maxPts = opt.MaxPoints
		}
	}
	s := math.Sin(theta * math.Pi / 180)
	r.sin2 = s * s
	r.minLen = minSplitLen * m.diam
	r.smallCorner = make([]bool, len(in.Points))
	inc := make([][]int32, len(in.Points)) // other ends of the segments at each input vertex
	for _, sg := range in.Segments {
		inc[sg[0]] = append(inc[sg[0]], int32(sg[1]))
		inc[sg[1]] = append(inc[sg[1]], int32(sg[0]))
	}
	for w, others := range inc {
		for i := range others {
			for j := i + 1; j < len(others); j++ {
				d1, d2 := sub(m.xy[others[i]], m.xy[w]), sub(m.xy[others[j]], m.xy[w])
				if dot(d1, d2) > 0.5*math.Sqrt(dot(d1, d1)*dot(d2, d2)) {
					r.smallCorner[w] = true
				}
			}
		}
	}
	return r
}

// minSplitLen is the length, relative to the input's diameter, below which
// refinement stops splitting: a safety floor against the cascades that small
// input angles can cause in floating point.
const minSplitLen = 1e-8

func (r *refiner) run() error {
	m := r.m
	for s := range m.sa {
		if m.sa[s] < 0 {
			continue
		}
		e := m.findEdge(m.sa[s], m.sb[s])
		if r.segEncroached(e) {
			r.pushSeg(int32(s))
		}
	}
	ntri := int32(len(m.tv) / 3)
	for t := int32(0); t < ntri; t++ {
		if m.alive(t) && r.bad(t) {
			r.pushTri(t)
		}
	}
	if r.err != nil {
		return r.err
	}
	iter, iterLimit := 0, 64*r.maxPts+1<<20
	for {
		if iter++; iter > iterLimit {
			return fmt.Errorf("tri: refinement made no progress after %d steps", iterLimit)
		}
		if r.added > r.maxPts {
			return fmt.Errorf("tri: refinement needs more than %d inserted points (MaxPoints); the size field or the input features may be too small", r.maxPts)
		}
		if r.segHead < len(r.segQ) {
			it := r.segQ[r.segHead]
			r.segHead++
			if m.sa[it.s] != it.a || m.sb[it.s] != it.b {
				continue
			}
			if err := r.splitSeg(it.s); err != nil {
				return err
			}
			continue
		}
		r.segQ, r.segHead = r.segQ[:0], 0
		if r.triHead >= len(r.triQ) {
			break
		}
		it := r.triQ[r.triHead]
		r.triHead++
		if r.triHead > 4096 && 2*r.triHead > len(r.triQ) {
			n := copy(r.triQ, r.triQ[r.triHead:])
			r.triQ, r.triHead = r.triQ[:n], 0
		}
		t := it.t
		if !m.alive(t) || m.tv[3*t] != it.a || m.tv[3*t+1] != it.b || m.tv[3*t+2] != it.c {
			continue
		}
		r.splitTri(t)
		if r.err != nil {
			return r.err
		}
	}
	return r.err
}

func (r *refiner) pushSeg(s int32) {
	r.segQ = append(r.segQ, segItem{s, r.m.sa[s], r.m.sb[s]})
}

func (r *refiner) pushTri(t int32) {
	m := r.m
	r.triQ = append(r.triQ, triItem{t, m.tv[3*t], m.tv[3*t+1], m.tv[3*t+2]})
}

// encroaches reports whether p lies strictly inside the diametral circle of
// a–b (Ruppert 1995).
func encroaches(p, a, b [2]float64) bool {
	return dot(sub(a, p), sub(b, p)) < 0
}

// segEncroached reports whether the apex of a triangle on edge e encroaches it.
func (r *refiner) segEncroached(e int32) bool {
	m := r.m
	if e < 0 {
		return false
	}
	t, i := e/3, e%3
	a, b := m.xy[m.tv[3*t+next3(i)]], m.xy[m.tv[3*t+prev3(i)]]
	if encroaches(m.xy[m.tv[e]], a, b) {
		return true
	}
	if n := m.tn[e]; n >= 0 && encroaches(m.xy[m.tv[n]], a, b) {
		return true
	}
	return false
}

// bad reports whether triangle t must be split: its size (longest edge)
// exceeds h at its centroid, or its smallest angle is below the bound (unless
// it sits in the corner of a small input angle).
func (r *refiner) bad(t int32) bool {
	m := r.m
	va, vb, vc := m.tv[3*t], m.tv[3*t+1], m.tv[3*t+2]
	a, b, c := m.xy[va], m.xy[vb], m.xy[vc]
	ab, bc, ca := sub(b, a), sub(c, b), sub(a, c)
	lab, lbc, lca := dot(ab, ab), dot(bc, bc), dot(ca, ca)
	lmax := math.Max(lab, math.Max(lbc, lca))
	lkept := 0.0
	if r.keep != nil {
		lmax, lkept = r.freeLongest(t, [3]float64{lbc, lca, lab})
	}
	if r.size != nil {
		cx, cy := (a[0]+b[0]+c[0])/3, (a[1]+b[1]+c[1])/3
		h := r.size(cx, cy)
		if !(h > 0) || math.IsInf(h, 0) {
			if r.err == nil {
				r.err = fmt.Errorf("tri: size function gave h(%g, %g) = %g; it must be finite and > 0", cx, cy, h)
			}
			return false
		}
		if lmax > h*h && lmax > lkept {
			return true
		}
	}
	// sin of the smallest angle = 2·area / (product of the two longer edges)
	area2 := ab[0]*(-ca[1]) - ab[1]*(-ca[0])
	var l1, l2 float64 // two longer edges (squared)
	var u, v int32     // ends of the shortest edge
	switch {
	case lab <= lbc && lab <= lca:
		l1, l2, u, v = lbc, lca, va, vb
	case lbc <= lca:
		l1, l2, u, v = lab, lca, vb, vc
	default:
		l1, l2, u, v = lab, lbc, vc, va
	}
	if area2*area2 >= r.sin2*l1*l2 {
		return false
	}
	if lmin := math.Min(lab, math.Min(lbc, lca)); lmin < r.minLen*r.minLen {
		return false
	}
	return !r.smallAngleCorner(u, v)
}

// freeLongest splits triangle t's squared edge lengths l (edge k opposite
// vertex k) into the longest free one and the longest on a kept segment. A
// kept edge longer than h cannot be split, so the triangle is measured
// against that edge instead of h: splitting it for h would only crowd
// vertices against the kept edge.
func (r *refiner) freeLongest(t int32, l [3]float64) (free, kept float64) {
	for k := int32(0); k < 3; k++ {
		if s := r.m.ts[3*t+k]; s >= 0 && r.keep[r.m.sorig[s]] {
			kept = math.Max(kept, l[k])
		} else {
			free = math.Max(free, l[k])
		}
	}
	return free, kept
}

// smallAngleCorner reports whether edge u–v joins two vertices on two
// different input segments that meet at an input vertex at an angle below
// 60°: such skinny triangles cannot be improved and are left alone (the rule
// of Shewchuk 2002, §4, for small input angles).
func (r *refiner) smallAngleCorner(u, v int32) bool {
	m := r.m
	su, sv := m.vseg[u], m.vseg[v]
	if su < 0 || sv < 0 || su == sv || len(r.inSegs) == 0 {
		return false
	}
	s1, s2 := r.inSegs[su], r.inSegs[sv]
	var w, o1, o2 int
	switch {
	case s1[0] == s2[0]:
		w, o1, o2 = s1[0], s1[1], s2[1]
	case s1[0] == s2[1]:
		w, o1, o2 = s1[0], s1[1], s2[0]
	case s1[1] == s2[0]:
		w, o1, o2 = s1[1], s1[0], s2[1]
	case s1[1] == s2[1]:
		w, o1, o2 = s1[1], s1[0], s2[0]
	default:
		return false
	}
	d1, d2 := sub(m.xy[o1], m.xy[w]), sub(m.xy[o2], m.xy[w])
	cosw := dot(d1, d2) / math.Sqrt(dot(d1, d1)*dot(d2, d2))
	return cosw > 0.5
}

// afterInsert queues the sub-segments encroached and the bad triangles
// around the new vertex v.
func (r *refiner) afterInsert(v int32) {
	m := r.m
	r.added++
	for _, t := range m.star(v) {
		k := m.slot(t, v)
		x, y := m.tv[3*t+next3(k)], m.tv[3*t+prev3(k)]
		if s := m.ts[3*t+k]; s >= 0 && encroaches(m.xy[v], m.xy[x], m.xy[y]) {
			r.pushSeg(s)
		}
		if s := m.ts[3*t+prev3(k)]; s >= 0 && encroaches(m.xy[y], m.xy[v], m.xy[x]) {
			r.pushSeg(s)
		}
		if s := m.ts[3*t+next3(k)]; s >= 0 && encroaches(m.xy[x], m.xy[y], m.xy[v]) {
			r.pushSeg(s)
		}
		if r.bad(t) {
			r.pushTri(t)
		}
	}
}

// splitPoint returns the point at which sub-segment a–b is split: at a
// power-of-two distance from its end if exactly one end is an input vertex
// (concentric shells, Ruppert 1995 §4; Shewchuk 2002 §4), else the midpoint.
func (r *refiner) splitPoint(a, b int32) [2]float64 {
	m := r.m
	pa, pb := m.xy[a], m.xy[b]
	ia, ib := m.vseg[a] == vInput, m.vseg[b] == vInput
	if ia != ib {
		w, o := pa, pb
		if ib {
			w, o = pb, pa
		}
		L := plane.Dist(pa, pb)
		d := math.Exp2(math.Ceil(math.Log2(L / 3)))
		if f := d / L; f > 0.3 && f < 0.7 {
			return [2]float64{w[0] + f*(o[0]-w[0]), w[1] + f*(o[1]-w[1])}
		}
	}
	return [2]float64{0.5 * (pa[0] + pb[0]), 0.5 * (pa[1] + pb[1])}
}

// unsplittable reports whether sub-segment s stays whole: it is shorter
// than minLen or lies on a kept input segment.
func (r *refiner) unsplittable(s int32) bool {
	m := r.m
	return plane.Dist(m.xy[m.sa[s]], m.xy[m.sb[s]]) < r.minLen || (r.keep != nil && r.keep[m.sorig[s]])
}

// splitSeg splits sub-segment s (unless it is unsplittable).
func (r *refiner) splitSeg(s int32) error {
	m := r.m
	a, b := m.sa[s], m.sb[s]
	if r.unsplittable(s) {
		return nil
	}
	e := m.findEdge(a, b)
	if e < 0 {
		return fmt.Errorf("tri: sub-segment %d–%d lost (internal error)", a, b)
	}
	if r.split != nil {
		if p, ok := r.curvedPoint(s); ok && r.splitCurved(s, e, p) {
			return nil
		}
	}
	p := r.splitPoint(a, b)
	// The new vertex must leave both triangles on the edge positively oriented.
	for _, f := range [2]int32{e, m.tn[e]} {
		if f < 0 {
			continue
		}
		t, i := f/3, f%3
		p0, p1, p2 := m.xy[m.tv[f]], m.xy[m.tv[3*t+next3(i)]], m.xy[m.tv[3*t+prev3(i)]]
		if !(plane.Orient(p, p2, p0) > 0 && plane.Orient(p, p0, p1) > 0) {
			return fmt.Errorf("tri: splitting the sub-segment (%g, %g)–(%g, %g) of segment %d would invert a triangle (features too close for float64)", m.xy[a][0], m.xy[a][1], m.xy[b][0], m.xy[b][1], m.sorig[s])
		}
	}
	v := m.addVertex(p, m.sorig[s])
	m.splitEdge(e/3, e%3, v)
	r.afterInsert(v)
	return nil
}

// curvedPoint asks Options.Split for the split point of sub-segment s and
// reports whether it is usable: finite, projecting onto the middle 20–80 %
// of the chord, off the chord by more than 1e-9 and at most 1/2 of its
// length. Next to an input vertex with a small angle, the point is moved
// along the curve (by bisection with Split) to the power-of-two shell
// distance from that vertex, so that both sides of the angle are split on
// the same shells (Ruppert 1995 §4).
func (r *refiner) curvedPoint(s int32) ([2]float64, bool) {
	m := r.m
	a, b := m.sa[s], m.sb[s]
	x1, x2 := m.xy[a], m.xy[b]
	p := r.split(m.smark[s], x1, x2)
	if !r.curvedOK(p, x1, x2) {
		return p, false
	}
	ia, ib := m.vseg[a] == vInput && r.smallCorner[a], m.vseg[b] == vInput && r.smallCorner[b]
	if ia == ib || m.vseg[a] == vInput && m.vseg[b] == vInput {
		return p, true
	}
	w, o := x1, x2
	if ib {
		w, o = x2, x1
	}
	L := plane.Dist(x1, x2)
	d := math.Exp2(math.Ceil(math.Log2(L / 3)))
	if f := d / L; !(f > 0.3 && f < 0.7) {
		return p, true
	}
	lo, hi := w, o // points on the curve with |lo−w| < d ≤ |hi−w|
	for it := 0; it < 60 && plane.Dist(lo, hi) > 1e-14*L; it++ {
		q := r.split(m.smark[s], lo, hi)
		if !r.curvedOK(q, lo, hi) && plane.Dist(lo, hi) > 1e-6*L {
			return p, true // Split misbehaves on short pieces: keep its midpoint
		}
		if plane.Dist(q, w) < d {
			lo = q
		} else {
			hi = q
		}
	}
	q := [2]float64{0.5 * (lo[0] + hi[0]), 0.5 * (lo[1] + hi[1])}
	if !r.curvedOK(q, x1, x2) {
		return p, true
	}
	return q, true
}

// curvedOK reports whether p is an acceptable curved split point of a–b.
func (r *refiner) curvedOK(p, x1, x2 [2]float64) bool {
	if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
		return false
	}
	d := sub(x2, x1)
	L2 := dot(d, d)
	q := sub(p, x1)
	tpar := dot(q, d) / L2
	L := math.Sqrt(L2)
	off := (d[0]*q[1] - d[1]*q[0]) / L
	return tpar >= 0.2 && tpar <= 0.8 && math.Abs(off) <= 0.5*L && math.Abs(off) > 1e-9*L
}

// splitCurved splits the boundary sub-segment s (on edge reference e) at the
// curved point p; it reports whether it could.
func (r *refiner) splitCurved(s, e int32, p [2]float64) bool {
	m := r.m
	if m.tn[e] >= 0 {
		return false // interior constraint: split on the chord
	}
	t, i := e/3, e%3
	c, p1, p2 := m.tv[e], m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
	x1, x2 := m.xy[p1], m.xy[p2]
	o := plane.Orient(x1, x2, p)
	var v int32
	switch {
	case o < 0: // outside the domain: add triangle [v p2 p1]
		r.nCurvedOut++
		v = m.addVertex(p, m.sorig[s])
		h1, h2 := m.splitSub(s, p1, v)
		n := m.newTri()
		m.setTri(n, v, p2, p1)
		m.link(3*n, e, -1)
		m.link(3*n+1, -1, h1)
		m.link(3*n+2, -1, h2)
		m.stack = append(m.stack[:0], n)
		m.legalize()
	case o > 0: // inside: t = [c p1 p2] becomes [v p2 c] and [v c p1]
		xc := m.xy[c]
		if !(plane.Orient(x2, xc, p) > 0 && plane.Orient(xc, x1, p) > 0) {
			return r.splitInward(s, e, p)
		}
		r.nCurvedIn++
		v = m.addVertex(p, m.sorig[s])
		h1, h2 := m.splitSub(s, p1, v)
		t2 := m.halve(t, i, v)
		m.link(3*t+2, -1, h2)
		m.link(3*t2+1, -1, h1)
		m.stack = append(m.stack[:0], t, t2)
		m.legalize()
	default:
		return false
	}
	r.afterInsert(v)
	return true
}

// crossesOpenTri reports whether segment u–w meets the interior of the
// counter-clockwise triangle a b c (no separating line among the triangle's
// edges and the segment's line; exact).
func crossesOpenTri(u, w, a, b, c [2]float64) bool {
	for _, e := range [3][2][2]float64{{a, b}, {b, c}, {c, a}} {
		if plane.Orient(e[0], e[1], u) <= 0 && plane.Orient(e[0], e[1], w) <= 0 {
			return false
		}
	}
	oa, ob, oc := plane.Orient(u, w, a), plane.Orient(u, w, b), plane.Orient(u, w, c)
	if (oa >= 0 && ob >= 0 && oc >= 0) || (oa <= 0 && ob <= 0 && oc <= 0) {
		return false
	}
	return true
}

// splitInward splits the boundary sub-segment s (edge reference e, on the
// triangle inside the domain) at p, which lies inside the domain but beyond
// that triangle: p is inserted, the edges p1–p and p–p2 are recovered by
// flips (Sloan 1993) and the triangle p1 p2 p, now outside the curve, is
// removed. If a vertex or a sub-segment lies in that triangle, nothing is
// changed and false is returned.
func (r *refiner) splitInward(s, e int32, p [2]float64) bool {
	m := r.m
	t, i := e/3, e%3
	p1, p2 := m.tv[3*t+next3(i)], m.tv[3*t+prev3(i)]
	x1, x2 := m.xy[p1], m.xy[p2]
	// Is the lens triangle x1 x2 p free of vertices and sub-segments?
	m.epoch++
	st := append(m.stack[:0], t)
	m.stamp[t] = m.epoch
	for len(st) > 0 {
		u := st[len(st)-1]
		st = st[:len(st)-1]
		if len(st) > 256 {
			m.stack = st
			return false
		}
		for k := int32(0); k < 3; k++ {
			q := m.xy[m.tv[3*u+k]]
			if plane.Orient(x1, x2, q) > 0 && plane.Orient(x2, p, q) >= 0 && plane.Orient(p, x1, q) >= 0 {
				m.stack = st
				return false // a vertex in the lens (or on its new sides)
			}
			f := 3*u + k
			a, b := m.xy[m.tv[3*u+next3(k)]], m.xy[m.tv[3*u+prev3(k)]]
			if f == e || !crossesOpenTri(a, b, x1, x2, p) {
				continue
			}
			if m.ts[f] >= 0 || m.tn[f] < 0 {
				m.stack = st
				return false // a sub-segment crosses the lens
			}
			if w := m.tn[f] / 3; m.stamp[w] != m.epoch {
				m.stamp[w] = m.epoch
				st = append(st, w)
			}
		}
	}
	m.stack = st
	m.ts[e] = -1 // the chord stops being a constraint
	kind, ref := m.locate(p, t, true)
	if kind != locIn && kind != locEdge {
		m.ts[e] = s
		return false
	}
	v := m.addVertex(p, m.sorig[s])
	if kind == locIn {
		m.splitTri(ref, v)
	} else {
		m.splitEdge(ref/3, ref%3, v)
	}
	var made [][2]int32
	for _, ab := range [2][2]int32{{p1, v}, {v, p2}} {
		if m.findEdge(ab[0], ab[1]) >= 0 {
			continue
		}
		cross, on, seg, err := m.crossings(ab[0], ab[1])
		if err == nil && (on >= 0 || seg >= 0) {
			err = fmt.Errorf("blocked by point %d or sub-segment %d", on, seg)
		}
		if err == nil {
			var mk [][2]int32
			mk, err = m.recoverEdge(ab[0], ab[1], cross)
			made = append(made, mk...)
		}
		if err != nil {
			r.err = fmt.Errorf("tri: splitting the curved sub-segment (%g, %g)–(%g, %g) of segment %d: %v (internal error)", x1[0], x1[1], x2[0], x2[1], m.sorig[s], err)
			return false
		}
	}
	// Remove the lens triangle and constrain the two new boundary edges.
	e1 := m.findEdge(p1, v)
	lens := int32(-1)
	if e1 >= 0 && m.tv[e1] == p2 {
		lens = e1 / 3
	} else if e1 >= 0 && m.tn[e1] >= 0 && m.tv[m.tn[e1]] == p2 {
		lens = m.tn[e1] / 3
	}
	if lens < 0 {
		r.err = fmt.Errorf("tri: splitting the curved sub-segment (%g, %g)–(%g, %g) of segment %d: no lens triangle (internal error)", x1[0], x1[1], x2[0], x2[1], m.sorig[s])
		return false
	}
	var nb [3]int32 // neighbours of the lens triangle
	for k := int32(0); k < 3; k++ {
		nb[k] = m.tn[3*lens+k]
	}
	m.killTri(lens)
	for _, n := range nb {
		if n >= 0 {
			w := n / 3
			for k := int32(0); k < 3; k++ {
				m.vt[m.tv[3*w+k]] = w
			}
		}
	}
	h1, h2 := m.splitSub(s, p1, v)
	for _, hs := range [2][3]int32{{p1, v, h1}, {v, p2, h2}} {
		f := m.findEdge(hs[0], hs[1])
		if f < 0 || m.tn[f] >= 0 {
			r.err = fmt.Errorf("tri: splitting the curved sub-segment of segment %d: new boundary edge missing (internal error)", m.sorig[s])
			return false
		}
		m.ts[f] = hs[2]
	}
	m.legalizeEdges(made)
	r.afterInsert(v)
	r.nInward++
	return true
}

// onlyKept reports whether every sub-segment in r.enc lies on a kept input
// segment (a circumcentre that encroaches only those is inserted).
func (r *refiner) onlyKept() bool {
	if r.keep == nil {
		return false
	}
	for _, s := range r.enc {
		if !r.keep[r.m.sorig[s]] {
			return false
		}
	}
	return true
}

// offCentre is the off-centre of triangle t (Üngör 2009, Comput. Geom. 42):
// the point on the perpendicular bisector of its shortest edge, towards
// the circumcentre c, at which that edge and the point make a triangle
// whose apex angle is twice the angle bound, or c if that is nearer. It
// lies inside t's circumcircle, so inserting it removes t, and it is much
// nearer than c for a flat triangle, whose circumcentre lies far off.
func (r *refiner) offCentre(t int32, c [2]float64) [2]float64 {
	m := r.m
	var p, q [2]float64
	best := math.Inf(1)
	for k := int32(0); k < 3; k++ {
		a, b := m.xy[m.tv[3*t+k]], m.xy[m.tv[3*t+next3(k)]]
		if l := plane.Dist(a, b); l < best {
			best, p, q = l, a, b
		}
	}
	mid := [2]float64{0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])}
	d := plane.Dist(mid, c)
	// tan θ = sin θ / cos θ with sin² θ = r.sin2
	height := 0.5 * best * math.Sqrt((1-r.sin2)/r.sin2)
	if d <= height {
		return c
	}
	f := height / d
	return [2]float64{mid[0] + f*(c[0]-mid[0]), mid[1] + f*(c[1]-mid[1])}
}

// circumcentre of triangle t, computed relative to its first vertex.
func (m *tmesh) circumcentre(t int32) [2]float64 {
	a, b, c := m.xy[m.tv[3*t]], m.xy[m.tv[3*t+1]], m.xy[m.tv[3*t+2]]
	bx, by := b[0]-a[0], b[1]-a[1]
	cx, cy := c[0]-a[0], c[1]-a[1]
	d := 2 * (bx*cy - by*cx)
	b2, c2 := bx*bx+by*by, cx*cx+cy*cy
	return [2]float64{a[0] + (cy*b2-by*c2)/d, a[1] + (bx*c2-cx*b2)/d}
}

// splitTri inserts the circumcentre of triangle t, unless it encroaches a
// sub-segment or lies beyond one; those sub-segments are split instead and
// t is queued again (Ruppert 1995).
func (r *refiner) splitTri(t int32) {
	m := r.m
	c := m.circumcentre(t)
	if math.IsNaN(c[0]) || math.IsNaN(c[1]) || math.IsInf(c[0], 0) || math.IsInf(c[1], 0) {
		return
	}
	kind, ref := m.locate(c, t, true)
	switch kind {
	case locSeg:
		s := m.ts[ref]
		if !r.unsplittable(s) {
			r.pushSeg(s)
			r.pushTri(t)
			return
		}
		if r.keep == nil || !r.keep[m.sorig[s]] {
			return
		}
		// Beyond a kept segment: try the off-centre instead.
		c = r.offCentre(t, c)
		if kind, ref = m.locate(c, t, true); kind != locIn && kind != locEdge {
			return
		}
	case locVert, locOut:
		return
	}
	// The vertex's cavity (triangles whose circumcircle holds c, not crossing
	// sub-segments): any sub-segment on its boundary that c encroaches is
	// split instead.
	m.epoch++
	st := m.stack[:0]
	start := ref
	if kind == locEdge {
		start = ref / 3
		if n := m.tn[ref]; n >= 0 {
			m.stamp[n/3] = m.epoch
			st = append(st, n/3)
		}
	}
	m.stamp[start] = m.epoch
	st = append(st, start)
	r.enc = r.enc[:0]
	for len(st) > 0 {
		u := st[len(st)-1]
		st = st[:len(st)-1]
		for k := int32(0); k < 3; k++ {
			e := 3*u + k
			if s := m.ts[e]; s >= 0 {
				if encroaches(c, m.xy[m.sa[s]], m.xy[m.sb[s]]) {
					r.enc = append(r.enc, s)
				}
				continue
			}
			n := m.tn[e]
			if n < 0 || m.stamp[n/3] == m.epoch {
				continue
			}
			w := n / 3
			if plane.InCircle(m.xy[m.tv[3*w]], m.xy[m.tv[3*w+1]], m.xy[m.tv[3*w+2]], c) > 0 {
				m.stamp[w] = m.epoch
				st = append(st, w)
			}
		}
	}
	m.stack = st
	if len(r.enc) > 0 {
		pushed := false
		for _, s := range r.enc {
			if !r.unsplittable(s) {
				r.pushSeg(s)
				pushed = true
			}
		}
		if pushed {
			r.pushTri(t)
			return
		}
		if !r.onlyKept() {
			return
		}
	}
	v := m.addVertex(c, vFree)
	if kind == locIn {
		m.splitTri(ref, v)
	} else {
		m.splitEdge(ref/3, ref%3, v)
	}
	r.afterInsert(v)
}
