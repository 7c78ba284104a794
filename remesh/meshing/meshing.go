package meshing

import (
	"fmt"
	"math"

	"tearline/remesh/geom"
	"tearline/remesh/tri"
	"tearline/solver/fem"
)

// Options control Mesh.
type Options struct {
	// MinAngle is the minimum-angle bound in degrees (0 = the
	// triangulator's default, tri.DefaultMinAngle); at most tri.MaxMinAngle.
	MinAngle float64
	// MaxPoints limits the number of vertices the triangulator may insert
	// (0 = tri.DefaultMaxPoints).
	MaxPoints int
}

// Validate checks the options.
func (o Options) Validate() error {
	if !(o.MinAngle >= 0 && o.MinAngle <= tri.MaxMinAngle) {
		return fmt.Errorf("mesh: minimum angle %g° must lie in [0, %d] (0 = default %d°)", o.MinAngle, tri.MaxMinAngle, tri.DefaultMinAngle)
	}
	if o.MaxPoints < 0 {
		return fmt.Errorf("mesh: max points %d must be ≥ 0 (0 = default %d)", o.MaxPoints, tri.DefaultMaxPoints)
	}
	return nil
}

// Mesh meshes the domain to the size function and returns the 6-node
// mesh with its quality report (measured on the corner-node triangles).
//
// The mesh follows the fem.Mesh contract: corner nodes first, counter-
// clockwise vertices, midside nodes of edges 0–1, 1–2, 2–0; midside nodes of
// boundary edges on arcs lie on the arc (so do the corner nodes there);
// every boundary edge carries the label of the piece it lies on, oriented
// with the domain on its left; every named point that is not a reference
// point is a corner node, in Points under its name.
func Mesh(d *geom.Domain, size func(x, y float64) float64, opt Options) (*fem.Mesh, tri.Report, error) {
	if d == nil {
		return nil, tri.Report{}, fmt.Errorf("mesh: no domain")
	}
	if err := opt.Validate(); err != nil {
		return nil, tri.Report{}, err
	}
	g, err := d.Discretise(size)
	if err != nil {
		return nil, tri.Report{}, err
	}
	in := &tri.Input{Points: g.Points, Segments: g.Segments, SegmentMarks: g.SegmentMarks, Holes: g.Holes}
	tm, err := tri.Triangulate(in, &tri.Options{Size: size, MinAngle: opt.MinAngle, MaxPoints: opt.MaxPoints, Split: d.Split})
	if err != nil {
		return nil, tri.Report{}, fmt.Errorf("mesh: %w", err)
	}
	snapToArcs(d, tm)
	m, err := quadratic(d, g, tm)
	if err != nil {
		return nil, tri.Report{}, err
	}
	return m, tri.Quality(tm, size), nil
}

// quadratic converts the linear triangulation to the 6-node fem.Mesh.
func quadratic(d *geom.Domain, g *geom.PSLG, tm *tri.Mesh) (*fem.Mesh, error) {
	if len(tm.Triangles) == 0 {
		return nil, fmt.Errorf("mesh: the triangulation has no triangles")
	}
	renum, nc := cornerNumbers(tm)
	// Guard against degenerate output: no edge may be shorter than the
	// geometric tolerance (the input has no feature that small).
	if err := checkEdgeLengths(tm, geom.RelTol*d.Scale()); err != nil {
		return nil, err
	}
	ne := 3*len(tm.Triangles)/2 + len(tm.Segments)
	m := &fem.Mesh{
		X:          make([][2]float64, nc, nc+ne),
		NumCorners: nc,
		Tri:        make([][6]int, len(tm.Triangles)),
		Labels:     d.Labels(),
		Points:     map[string]int{},
	}
	for i, p := range tm.Points {
		if renum[i] >= 0 {
			m.X[renum[i]] = p
		}
	}
	ed := newEdgeTable(tm)
	emark := ed.marks(tm)
	// Midside nodes, in edge order; on the arc for edges on arc pieces.
	for id := range ed.a {
		m.X = append(m.X, midside(d, tm.Points[ed.a[id]], tm.Points[ed.b[id]], emark[id]))
	}
	for e, t := range tm.Triangles {
		m.Tri[e] = [6]int{renum[t[0]], renum[t[1]], renum[t[2]], nc + int(ed.triEdge[e][0]), nc + int(ed.triEdge[e][1]), nc + int(ed.triEdge[e][2])}
	}
	if err := addBoundary(m, d, tm, ed, emark, renum); err != nil {
		return nil, err
	}
	for name, i := range g.Named {
		if i >= len(renum) || renum[i] < 0 {
			return nil, fmt.Errorf("mesh: named point %q is not a vertex of the mesh", name)
		}
		m.Points[name] = renum[i]
	}
	if err := m.Check(); err != nil {
		return nil, err
	}
	return m, nil
}

// cornerNumbers numbers the vertices used by triangles in the
// triangulator's order: renum[v] is the corner node of vertex v, −1 for an
// unused one; nc is the number of corner nodes.
func cornerNumbers(tm *tri.Mesh) (renum []int, nc int) {
	renum = make([]int, len(tm.Points))
	for i := range renum {
		renum[i] = -1
	}
	for _, t := range tm.Triangles {
		for _, v := range t {
			renum[v] = 0
		}
	}
	for i := range renum {
		if renum[i] == 0 {
			renum[i] = nc
			nc++
		}
	}
	return renum, nc
}

// checkEdgeLengths rejects a triangulation with an edge of length tiny or
// less.
func checkEdgeLengths(tm *tri.Mesh, tiny float64) error {
	for e, t := range tm.Triangles {
		for k := 0; k < 3; k++ {
			a, b := tm.Points[t[k]], tm.Points[t[(k+1)%3]]
			if l := math.Hypot(a[0]-b[0], a[1]-b[1]); l <= tiny {
				return fmt.Errorf("mesh: the triangulation has a degenerate triangle %d with an edge of length %g at (%g, %g), below the geometric tolerance %g; a small input angle near there may be the cause", e, l, a[0], a[1], tiny)
			}
		}
	}
	return nil
}

// edgeTable holds the edges of a triangulation, numbered in first-seen
// order: edge id runs from vertex a[id] to b[id] as in its first triangle
// tri[id], and belongs to count[id] triangles (at most 255 counted).
// triEdge[e][k] is the id of edge k (vertices k, k+1) of triangle e.
type edgeTable struct {
	a, b, tri []int32
	count     []uint8
	triEdge   [][3]int32
	// Each edge is bucketed under its lower vertex v (CSR by vertex, with
	// entries start[v] to fill[v]): hiOf is its other vertex, idOf its id;
	// so each edge is found by a short scan.
	start, fill, hiOf, idOf []int32
}

// newEdgeTable returns the edges of tm.
func newEdgeTable(tm *tri.Mesh) *edgeTable {
	nv := len(tm.Points)
	ed := &edgeTable{
		start:   make([]int32, nv+1),
		fill:    make([]int32, nv),
		hiOf:    make([]int32, 3*len(tm.Triangles)),
		idOf:    make([]int32, 3*len(tm.Triangles)),
		triEdge: make([][3]int32, len(tm.Triangles)),
	}
	for _, t := range tm.Triangles {
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			ed.start[min(a, b)+1]++
		}
	}
	for i := 0; i < nv; i++ {
		ed.start[i+1] += ed.start[i]
	}
	copy(ed.fill, ed.start[:nv])
	for e, t := range tm.Triangles {
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			id := ed.find(a, b)
			if id < 0 {
				id = int32(len(ed.a))
				lo := min(a, b)
				ed.hiOf[ed.fill[lo]] = int32(max(a, b))
				ed.idOf[ed.fill[lo]] = id
				ed.fill[lo]++
				ed.a = append(ed.a, int32(a))
				ed.b = append(ed.b, int32(b))
				ed.tri = append(ed.tri, int32(e))
				ed.count = append(ed.count, 0)
			}
			if ed.count[id] < 255 {
				ed.count[id]++
			}
			ed.triEdge[e][k] = id
		}
	}
	return ed
}

// find returns the id of edge a–b, or −1.
func (ed *edgeTable) find(a, b int) int32 {
	lo, hi := min(a, b), int32(max(a, b))
	for j := ed.start[lo]; j < ed.fill[lo]; j++ {
		if ed.hiOf[j] == hi {
			return ed.idOf[j]
		}
	}
	return -1
}

// marks returns the segment mark of every edge: 0 for an edge on no
// segment, −1 for one on a segment with mark 0.
func (ed *edgeTable) marks(tm *tri.Mesh) []int32 {
	emark := make([]int32, len(ed.a))
	for i, sg := range tm.Segments {
		if id := ed.find(sg[0], sg[1]); id >= 0 {
			emark[id] = int32(tm.SegmentMarks[i])
			if emark[id] == 0 {
				emark[id] = -1 // a segment with mark 0
			}
		}
	}
	return emark
}

// midside returns the midside node of edge pa–pb with segment mark mk: on
// the arc for an edge on an arc piece with both ends on the arc, else the
// straight midpoint.
func midside(d *geom.Domain, pa, pb [2]float64, mk int32) [2]float64 {
	x := [2]float64{0.5 * (pa[0] + pb[0]), 0.5 * (pa[1] + pb[1])}
	if mk > 0 {
		if p := d.PieceOfMark(int(mk)); p != nil && p.Kind == geom.Arc && onCircle(p, pa) && onCircle(p, pb) {
			// On the arc; an edge whose ends the triangulator left
			// off the arc keeps its straight midpoint (a valid element).
			x = p.Split(pa, pb)
		}
	}
	return x
}

// addBoundary adds the boundary edges (those of one triangle) to m with
// the label of their piece; an edge of more than two triangles, or a
// boundary edge on no piece, is an error.
func addBoundary(m *fem.Mesh, d *geom.Domain, tm *tri.Mesh, ed *edgeTable, emark []int32, renum []int) error {
	labelOf := map[string]int{}
	for i, l := range m.Labels {
		labelOf[l] = i
	}
	nc := m.NumCorners
	for id := range ed.a {
		pa, pb := tm.Points[ed.a[id]], tm.Points[ed.b[id]]
		if ed.count[id] > 2 {
			return fmt.Errorf("mesh: edge (%g, %g)–(%g, %g) belongs to %d triangles", pa[0], pa[1], pb[0], pb[1], ed.count[id])
		}
		if ed.count[id] != 1 {
			continue
		}
		mk := int(emark[id])
		if mk == 0 {
			return fmt.Errorf("mesh: boundary edge (%g, %g)–(%g, %g) lies on no boundary piece", pa[0], pa[1], pb[0], pb[1])
		}
		p := d.PieceOfMark(mk)
		if p == nil {
			return fmt.Errorf("mesh: boundary edge (%g, %g)–(%g, %g) has mark %d of no piece", pa[0], pa[1], pb[0], pb[1], mk)
		}
		// a→b is the triangle's own counter-clockwise edge: domain on its left.
		m.Boundary = append(m.Boundary, fem.Edge{A: renum[ed.a[id]], B: renum[ed.b[id]], Mid: nc + id, Label: labelOf[p.Label], Tri: int(ed.tri[id])})
	}
	return nil
}

// onCircle reports whether x lies on the arc's circle (to 1e-9 relative).
func onCircle(p *geom.Piece, x [2]float64) bool {
	return math.Abs(math.Hypot(x[0]-p.Centre[0], x[1]-p.Centre[1])-p.Radius) <= 1e-9*p.Radius
}

// snapToArcs moves boundary vertices that the triangulator placed on the
// chord of an arc (where it could not use the split rule, in narrow gaps)
// radially onto the arc, each only if every triangle around it stays
// counter-clockwise with at least half its former smallest angle.
func snapToArcs(d *geom.Domain, tm *tri.Mesh) {
	var moves []int
	for i, sg := range tm.Segments {
		p := d.PieceOfMark(tm.SegmentMarks[i])
		if p == nil || p.Kind != geom.Arc {
			continue
		}
		for _, v := range sg {
			if !onCircle(p, tm.Points[v]) {
				moves = append(moves, i, v)
			}
		}
	}
	if len(moves) == 0 {
		return
	}
	// triangles around each vertex (CSR)
	nv := len(tm.Points)
	start := make([]int32, nv+1)
	for _, t := range tm.Triangles {
		for _, v := range t {
			start[v+1]++
		}
	}
	for i := 0; i < nv; i++ {
		start[i+1] += start[i]
	}
	fill := append([]int32(nil), start[:nv]...)
	around := make([]int32, 3*len(tm.Triangles))
	for e, t := range tm.Triangles {
		for _, v := range t {
			around[fill[v]] = int32(e)
			fill[v]++
		}
	}
	minAngle := func(t [3]int) (float64, bool) {
		a, b, c := tm.Points[t[0]], tm.Points[t[1]], tm.Points[t[2]]
		if (b[0]-a[0])*(c[1]-a[1])-(c[0]-a[0])*(b[1]-a[1]) <= 0 {
			return 0, false
		}
		l := [3]float64{math.Hypot(b[0]-c[0], b[1]-c[1]), math.Hypot(c[0]-a[0], c[1]-a[1]), math.Hypot(a[0]-b[0], a[1]-b[1])}
		mn := math.Pi
		for k := 0; k < 3; k++ {
			x, y, z := l[k], l[(k+1)%3], l[(k+2)%3]
			mn = math.Min(mn, math.Acos(math.Max(-1, math.Min(1, (y*y+z*z-x*x)/(2*y*z)))))
		}
		return mn, true
	}
	for k := 0; k < len(moves); k += 2 {
		p := d.PieceOfMark(tm.SegmentMarks[moves[k]])
		v := moves[k+1]
		x := tm.Points[v]
		if onCircle(p, x) {
			continue // moved already
		}
		r := math.Hypot(x[0]-p.Centre[0], x[1]-p.Centre[1])
		if r == 0 {
			continue
		}
		q := [2]float64{p.Centre[0] + p.Radius*(x[0]-p.Centre[0])/r, p.Centre[1] + p.Radius*(x[1]-p.Centre[1])/r}
		old := math.Pi
		for _, e := range around[start[v]:start[v+1]] {
			a, _ := minAngle(tm.Triangles[e])
			old = math.Min(old, a)
		}
		tm.Points[v] = q
		ok := true
		for _, e := range around[start[v]:start[v+1]] {
			if a, pos := minAngle(tm.Triangles[e]); !pos || a < 0.5*old {
				ok = false
				break
			}
		}
		if !ok {
			tm.Points[v] = x
		}
	}
}
