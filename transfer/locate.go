package transfer

import (
	"fmt"
	"math"
	"runtime"
	"sync"

	"tearline/solver/fem"
	"tearline/solver/plane"
)

// Locator finds the old triangle that contains a point. It indexes the
// triangles' corner nodes in a plane.Locator (an R-tree of their bounding
// boxes); a mesh change after NewLocator is not seen. Containment is tested
// on the chords (corner nodes); area coordinates in curved triangles come
// from the inverse isoparametric map (see the package documentation).
// Queries are safe for concurrent use.
type Locator struct {
	mesh  *fem.Mesh
	index *plane.Locator
	tol   float64
	size  []float64 // longest edge of every triangle
	// node maps the coordinates of every old node to its index, or to −1
	// when several nodes share them (crack faces).
	node map[[2]uint64]int
	// curved flags the triangles whose midside nodes are off their edges'
	// midpoints: their local coordinates come from the isoparametric map.
	curved []bool
}

// Hit is the result of locating one point.
type Hit struct {
	// Elem is the old triangle, or -1 when the point is not finite or the
	// old mesh has no triangles.
	Elem int
	// L holds the area coordinates of the point in Elem (of the nearest
	// point of Elem when the point lies outside it); in a curved triangle
	// those of its isoparametric map.
	L [3]float64
	// Inside reports that Elem contains the point (within the tolerance).
	Inside bool
	// Node is the old node of Elem at exactly the point's position, or -1
	// (set by LocateNodes only).
	Node int
}

// NewLocator indexes the triangles of m. Points outside every triangle by
// at most tol × the nearest triangle's longest edge count as inside; tol
// must lie in [0, 0.1).
func NewLocator(m *fem.Mesh, tol float64) (*Locator, error) {
	if m == nil {
		return nil, fmt.Errorf("transfer: locator: nil mesh")
	}
	if !(tol >= 0 && tol < 0.1) {
		return nil, fmt.Errorf("transfer: locator: tolerance %g outside [0, 0.1)", tol)
	}
	if err := m.Check(); err != nil {
		return nil, fmt.Errorf("transfer: locator: old mesh: %w", err)
	}
	lc := &Locator{mesh: m, tol: tol, size: make([]float64, len(m.Tri)), curved: make([]bool, len(m.Tri)),
		node: make(map[[2]uint64]int, len(m.X))}
	for n, p := range m.X {
		k := pointKey(p)
		if _, dup := lc.node[k]; dup {
			lc.node[k] = -1
		} else {
			lc.node[k] = n
		}
	}
	lc.index = m.CornerLocator()
	for e, t := range m.Tri {
		a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
		lc.size[e] = math.Sqrt(math.Max(plane.DistSq(a, b), math.Max(plane.DistSq(b, c), plane.DistSq(c, a))))
		for k := 0; k < 3; k++ {
			p, q, mid := m.X[t[k]], m.X[t[(k+1)%3]], m.X[t[3+k]]
			if math.Hypot(mid[0]-0.5*(p[0]+q[0]), mid[1]-0.5*(p[1]+q[1])) > 1e-12*lc.size[e] {
				lc.curved[e] = true
			}
		}
	}
	return lc, nil
}

// Mesh returns the indexed mesh.
func (lc *Locator) Mesh() *fem.Mesh { return lc.mesh }

// Locate returns the old triangle that contains p with p's area
// coordinates in it. When several triangles contain p (p on a shared edge or
// vertex) the one in which p lies deepest wins, ties going to the lowest
// index. When none does, it returns the nearest triangle with the clamped
// area coordinates of the nearest point on it, and inside reports whether
// that point is within the tolerance. elem is -1 for a non-finite p or an
// empty mesh.
func (lc *Locator) Locate(p [2]float64) (elem int, l [3]float64, inside bool) {
	h := lc.locate(p, nil)
	return h.Elem, h.L, h.Inside
}

// LocateAll locates every point with a bounded pool of workers (≤ 0 means
// GOMAXPROCS) and returns the hits in the order of pts.
func (lc *Locator) LocateAll(pts [][2]float64, workers int) []Hit {
	hits := make([]Hit, len(pts))
	parallel(len(pts), workers, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			hits[i] = lc.locate(pts[i], nil)
		}
	})
	return hits
}

// LocateNodes locates every node of the new mesh m. A node is located
// towards the interior of the first new triangle that owns it, so that a
// node on a crack face (where both faces share reference coordinates) lands
// in the old triangle on its own side. Hit.Node is set when the node
// coincides exactly with a node of the old triangle found, or else with the
// only old node at its position (a midside node on a curved edge lies off
// the chords). Nodes that no triangle uses get Elem = -1.
func (lc *Locator) LocateNodes(m *fem.Mesh, workers int) []Hit {
	owner := make([]int32, len(m.X))
	for i := range owner {
		owner[i] = -1
	}
	for e, t := range m.Tri {
		for _, n := range t {
			if n >= 0 && n < len(owner) && owner[n] < 0 {
				owner[n] = int32(e)
			}
		}
	}
	hits := make([]Hit, len(m.X))
	parallel(len(m.X), workers, func(lo, hi int) {
		for n := lo; n < hi; n++ {
			if owner[n] < 0 {
				hits[n] = Hit{Elem: -1, Node: -1}
				continue
			}
			t := m.Tri[owner[n]]
			a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
			p := m.X[n]
			// A point a millionth of the way from the node to the new
			// triangle's centroid decides between old triangles that
			// contain the node equally well.
			const s = 1e-6
			toward := [2]float64{
				p[0] + s*((a[0]+b[0]+c[0])/3-p[0]),
				p[1] + s*((a[1]+b[1]+c[1])/3-p[1]),
			}
			h := lc.locate(p, &toward)
			h.Node = -1
			if h.Elem >= 0 {
				for _, on := range lc.mesh.Tri[h.Elem] {
					if lc.mesh.X[on] == p {
						h.Node = on
						break
					}
				}
				if on, ok := lc.node[pointKey(p)]; h.Node < 0 && ok && on >= 0 {
					h.Node = on
				}
			}
			hits[n] = h
		}
	})
	return hits
}

// locate is Locate with an optional tie-break point: among several
// triangles that contain p, the one containing toward (deepest) wins.
func (lc *Locator) locate(p [2]float64, toward *[2]float64) Hit {
	miss := Hit{Elem: -1, Node: -1}
	if !finite(p[0]) || !finite(p[1]) || len(lc.mesh.Tri) == 0 {
		return miss
	}
	var (
		e  int
		l  [3]float64
		ok bool
	)
	if toward != nil {
		e, l, ok = lc.index.FindToward(p, *toward)
	} else {
		e, l, ok = lc.index.Find(p)
	}
	if ok {
		h := Hit{Elem: e, L: l, Inside: true, Node: -1}
		if lc.curved[e] {
			h.L, h.Inside = lc.isoparametric(e, p, h.L, true)
		}
		return h
	}
	near, nearD2, nearL, ok := lc.index.Nearest(p)
	if !ok {
		return miss
	}
	h := Hit{Elem: near, L: nearL, Inside: math.Sqrt(nearD2) <= lc.tol*lc.size[near], Node: -1}
	if lc.curved[near] {
		h.L, h.Inside = lc.isoparametric(near, p, h.L, h.Inside)
	}
	return h
}

// isoparametric returns the area coordinates of p under the quadratic map of
// the curved triangle e, by Newton's method from the chord's coordinates l0,
// and whether p lies in the curved triangle (within the tolerance). Outside
// it the coordinates are clamped onto the triangle; when Newton fails (a
// badly distorted element) l0 and inside0 are kept.
func (lc *Locator) isoparametric(e int, p [2]float64, l0 [3]float64, inside0 bool) ([3]float64, bool) {
	t := lc.mesh.Tri[e]
	var x [6][2]float64
	for k, n := range t {
		x[k] = lc.mesh.X[n]
	}
	xi, eta := l0[0], l0[1]
	tol := 1e-14 * lc.size[e]
	for it := 0; it < 25; it++ {
		l := [3]float64{xi, eta, 1 - xi - eta}
		N := fem.ShapeP2(l)
		dxi, deta := fem.ShapeP2Deriv(l)
		var r [2]float64
		var j00, j01, j10, j11 float64
		for k := range x {
			r[0] += N[k] * x[k][0]
			r[1] += N[k] * x[k][1]
			j00 += dxi[k] * x[k][0]
			j01 += deta[k] * x[k][0]
			j10 += dxi[k] * x[k][1]
			j11 += deta[k] * x[k][1]
		}
		r[0], r[1] = r[0]-p[0], r[1]-p[1]
		if math.Hypot(r[0], r[1]) <= tol {
			// Inside the curved triangle when no coordinate is negative
			// beyond the tolerance (relative to the element size, as for
			// straight-sided triangles).
			in := math.Min(l[0], math.Min(l[1], l[2])) >= -lc.tol
			return plane.ClampBary(l), in
		}
		det := j00*j11 - j01*j10
		if !(math.Abs(det) > 0) {
			break
		}
		xi -= (j11*r[0] - j01*r[1]) / det
		eta -= (-j10*r[0] + j00*r[1]) / det
		if !finite(xi) || !finite(eta) || math.Abs(xi) > 10 || math.Abs(eta) > 10 {
			break
		}
	}
	return l0, inside0
}

// pointKey is the bit pattern of a position (−0 read as +0).
func pointKey(p [2]float64) [2]uint64 {
	return [2]uint64{math.Float64bits(p[0] + 0), math.Float64bits(p[1] + 0)}
}

func finite(x float64) bool { return !math.IsInf(x, 0) && !math.IsNaN(x) }

// parallel runs body over [0, n) split into chunks, on at most workers
// goroutines (≤ 0 means GOMAXPROCS).
func parallel(n, workers int, body func(lo, hi int)) {
	parallelChunks(n, workers, 256, body)
}

// parallelChunks is parallel with chunks of at least minChunk items.
func parallelChunks(n, workers, minChunk int, body func(lo, hi int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	if workers > (n+minChunk-1)/minChunk {
		workers = (n + minChunk - 1) / minChunk
	}
	if workers <= 1 {
		body(0, n)
		return
	}
	chunk := (n + 4*workers - 1) / (4 * workers)
	next := make(chan int, workers)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for lo := range next {
				body(lo, min(lo+chunk, n))
			}
		}()
	}
	for lo := 0; lo < n; lo += chunk {
		next <- lo
	}
	close(next)
	wg.Wait()
}
