package meshing

import (
	"fmt"
	"math"
	"sort"

	"tearline/remesh/geom"
	"tearline/remesh/tri"
	"tearline/solver/fem"
)

// Local remeshing rebuilds only a patch of an existing mesh. The old
// triangles outside the patch are kept verbatim: the same corner and
// midside coordinates, bit for bit, the same node order (so their Gauss
// points coincide and the transfer copies their states). The patch is
// meshed by constrained Delaunay refinement (Ruppert 1995; Shewchuk 2002)
// with the edges it shares with kept triangles as kept segments
// (tri.Options.Keep): no vertex is inserted on them, so the corner and
// midside nodes on the patch boundary are the kept elements' nodes and the
// mesh conforms (no hanging nodes).

// PatchRule chooses the old triangles a local remesh rebuilds.
type PatchRule struct {
	// TipRadius is the radius, in units of h at the tip, of a disc around
	// each tip whose triangles are always rebuilt (0 = none). The default
	// rebuilds none: the carve puts each tip on an old vertex, the size
	// rule below already rebuilds where the fine zone has moved, and
	// rebuilding the process zone would smooth the very peaks a local
	// remesh is meant to keep. A tip that is not an old vertex (it has
	// moved) gets a disc of at least one h, so that it becomes a vertex.
	TipRadius float64
	// Coarse and Fine bound the ratio of a kept triangle's longest edge to
	// h at its centroid (0 = 1.5 and 0.25). The refiner leaves edges of
	// 0.4–1 h, so a ratio above Coarse means the fine zone has moved there
	// (the old mesh is too coarse) and one below Fine a wake the field
	// wants coarsened; triangles in between are as good as a new mesh
	// would make them and are kept. Fine is not applied to triangles
	// touching the boundary: next to small features (a blunted tip's arc,
	// short pieces) the refiner leaves triangles far below h, and a new
	// mesh would do the same.
	Coarse, Fine float64
	// Rings is how many times the patch may grow by a ring of triangles
	// when it cannot be meshed with its boundary kept (0 = 3).
	Rings int
	// AcceptAngle is the smallest angle in degrees accepted in a patch
	// triangle that touches a kept segment (0 = 15): the angle bound is
	// not guaranteed there (tri.Options.Keep); everywhere else the refiner
	// works as in a whole-mesh remesh.
	AcceptAngle float64
}

func (r PatchRule) withDefaults() PatchRule {
	def := func(v *float64, d float64) {
		if *v == 0 {
			*v = d
		}
	}
	def(&r.Coarse, 1.5)
	def(&r.Fine, 0.25)
	def(&r.AcceptAngle, 15)
	if r.Rings == 0 {
		r.Rings = 3
	}
	return r
}

// Patch marks the old triangles to rebuild: the removed ones and those
// sharing a corner with one (the carve simplifies the new faces through
// them), those with a corner within TipRadius·h(tip) of a tip, and those
// whose longest edge lies outside [Fine, Coarse]·h(centroid) (see
// PatchRule for the reasons).
func Patch(old *fem.Mesh, removed []bool, tips [][2]float64, size func(x, y float64) float64, rule PatchRule) []bool {
	rule = rule.withDefaults()
	patch := make([]bool, len(old.Tri))
	touch := make([]bool, old.NumCorners)
	for e, t := range old.Tri {
		if removed != nil && removed[e] {
			patch[e] = true
			touch[t[0]], touch[t[1]], touch[t[2]] = true, true, true
		}
	}
	onBoundary := make([]bool, old.NumCorners)
	for _, ed := range old.Boundary {
		onBoundary[ed.A], onBoundary[ed.B] = true, true
	}
	corner := make(map[[2]float64]bool, old.NumCorners)
	for v := 0; v < old.NumCorners; v++ {
		corner[old.X[v]] = true
	}
	radius := make([]float64, len(tips))
	for i, p := range tips {
		f := rule.TipRadius
		if !corner[p] {
			f = math.Max(f, 1) // a moved tip must become a vertex
		}
		radius[i] = f * size(p[0], p[1])
	}
	for e, t := range old.Tri {
		if patch[e] || touch[t[0]] || touch[t[1]] || touch[t[2]] {
			patch[e] = true
			continue
		}
		a, b, c := old.X[t[0]], old.X[t[1]], old.X[t[2]]
		for i, p := range tips {
			for _, x := range [3][2]float64{a, b, c} {
				if math.Hypot(x[0]-p[0], x[1]-p[1]) <= radius[i] {
					patch[e] = true
				}
			}
		}
		l := math.Max(math.Hypot(b[0]-a[0], b[1]-a[1]), math.Max(math.Hypot(c[0]-b[0], c[1]-b[1]), math.Hypot(a[0]-c[0], a[1]-c[1])))
		h := size((a[0]+b[0]+c[0])/3, (a[1]+b[1]+c[1])/3)
		fine := l < rule.Fine*h && !onBoundary[t[0]] && !onBoundary[t[1]] && !onBoundary[t[2]]
		if l > rule.Coarse*h || fine {
			patch[e] = true
		}
	}
	return patch
}

// Grow adds to the patch every triangle that shares a corner with it.
func Grow(old *fem.Mesh, patch []bool) {
	touch := make([]bool, old.NumCorners)
	for e, t := range old.Tri {
		if patch[e] {
			touch[t[0]], touch[t[1]], touch[t[2]] = true, true, true
		}
	}
	for e, t := range old.Tri {
		if touch[t[0]] || touch[t[1]] || touch[t[2]] {
			patch[e] = true
		}
	}
}

// unpinch adds to the patch every triangle around a corner node where the
// patch triangles form two or more separate fans: the patch would touch
// itself at that node, and a triangulation of such a domain is not a
// manifold around it (the triangulator walks the triangles around a
// vertex as one fan). It also adds every kept triangle with two or three
// patch neighbours: such a triangle pokes into the patch with a corner
// whose outside angle the patch must fill with thin triangles. It repeats
// until neither occurs.
func unpinch(old *fem.Mesh, patch []bool, nbr [][3]int) {
	for changed := true; changed; {
		changed = false
		fans := make([]int, old.NumCorners)
		for e, t := range old.Tri {
			for k := 0; k < 3; k++ {
				// the fan of patch triangles around t[k] ends at e
				// where the triangle across edge k is not in the patch
				if n := nbr[e][k]; patch[e] && (n < 0 || !patch[n]) {
					fans[t[k]]++
				}
			}
		}
		for e, t := range old.Tri {
			if patch[e] {
				continue
			}
			inPatch := 0
			for _, n := range nbr[e] {
				if n >= 0 && patch[n] {
					inPatch++
				}
			}
			if inPatch >= 2 || fans[t[0]] > 1 || fans[t[1]] > 1 || fans[t[2]] > 1 {
				patch[e] = true
				changed = true
			}
		}
	}
}

// LocalReport says what a local remesh did.
type LocalReport struct {
	tri.Report
	// Kept counts the old triangles kept verbatim; Rings the rings the
	// patch grew by.
	Kept, Rings int
	// Retries holds why each smaller patch failed.
	Retries []string
}

// MeshLocal meshes domain d (the old mesh's material after carving) to the
// size function, rebuilding only the patch of old triangles (and the
// removed ones) and keeping the others verbatim. When the patch cannot be
// meshed with its boundary kept it grows by a ring and tries again, up to
// rule.Rings times; the error then says why, and the caller meshes the
// whole domain instead.
func MeshLocal(old *fem.Mesh, d *geom.Domain, patch []bool, size func(x, y float64) float64, opt Options, rule PatchRule) (*fem.Mesh, LocalReport, error) {
	rule = rule.withDefaults()
	if err := opt.Validate(); err != nil {
		return nil, LocalReport{}, err
	}
	if len(patch) != len(old.Tri) {
		return nil, LocalReport{}, fmt.Errorf("local mesh: %d patch flags for %d triangles", len(patch), len(old.Tri))
	}
	patch = append([]bool(nil), patch...)
	nbr := old.EdgeNeighbours()
	var err error
	var retries []string
	for ring := 0; ring <= rule.Rings; ring++ {
		if ring > 0 {
			Grow(old, patch)
		}
		unpinch(old, patch, nbr)
		var m *fem.Mesh
		var rep LocalReport
		if m, rep, err = meshPatch(old, d, patch, size, opt, rule); err == nil {
			rep.Rings, rep.Retries = ring, retries
			return m, rep, nil
		}
		retries = append(retries, err.Error())
	}
	return nil, LocalReport{}, fmt.Errorf("local mesh: after %d rings: %w", rule.Rings, err)
}

// meshPatch is one attempt of MeshLocal with a fixed patch.
func meshPatch(old *fem.Mesh, d *geom.Domain, patch []bool, size func(x, y float64) float64, opt Options, rule PatchRule) (*fem.Mesh, LocalReport, error) {
	pb, err := newPatchBuilder(old, d, patch)
	if err != nil {
		return nil, LocalReport{}, err
	}
	if err := pb.boundary(); err != nil {
		return nil, LocalReport{}, err
	}
	if err := pb.holes(size); err != nil {
		return nil, LocalReport{}, err
	}
	tm, err := tri.Triangulate(&pb.in, &tri.Options{Size: pb.floored(size), MinAngle: opt.MinAngle, MaxPoints: opt.MaxPoints, Split: d.Split, Keep: pb.keep})
	if err != nil {
		return nil, LocalReport{}, fmt.Errorf("local mesh: %w", err)
	}
	if a := pb.worstKeptAngle(tm); a < rule.AcceptAngle {
		return nil, LocalReport{}, fmt.Errorf("local mesh: a triangle on the patch boundary has an angle of %.3g°, below %g°", a, rule.AcceptAngle)
	}
	m, err := pb.merge(tm)
	if err != nil {
		return nil, LocalReport{}, err
	}
	return m, LocalReport{Report: tri.Quality(tm, size), Kept: pb.nKept}, nil
}

// patchBuilder assembles the triangulator's input for a patch and merges
// its result with the kept triangles.
type patchBuilder struct {
	old   *fem.Mesh
	d     *geom.Domain
	keepT []bool // kept old triangles
	nKept int
	tol   float64
	in    tri.Input
	keep  []bool // per input segment: an interface edge
	index map[[2]float64]int
	// keptEdges maps the corner pair (lower first) of every edge of a
	// kept triangle to its midside node; count says how many kept
	// triangles hold it.
	keptMid   map[[2]int]int
	keptCount map[[2]int]int
	// rim holds the kept corner nodes on the patch boundary or the
	// domain boundary: where the domain's pieces are cut.
	rim [][2]float64
	// oldOf is the old corner node of each new corner node (−1: new).
	oldOf []int
}

func newPatchBuilder(old *fem.Mesh, d *geom.Domain, patch []bool) (*patchBuilder, error) {
	pb := &patchBuilder{old: old, d: d, keepT: make([]bool, len(old.Tri)), tol: geom.RelTol * d.Scale(),
		index: map[[2]float64]int{}, keptMid: map[[2]int]int{}, keptCount: map[[2]int]int{}}
	for e, t := range old.Tri {
		if patch[e] {
			continue
		}
		pb.keepT[e] = true
		pb.nKept++
		a, b, c := old.X[t[0]], old.X[t[1]], old.X[t[2]]
		if x := [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}; !d.Contains(x) {
			return nil, fmt.Errorf("local mesh: kept triangle %d has its centroid (%g, %g) outside the new domain", e, x[0], x[1])
		}
		for k := 0; k < 3; k++ {
			key := edgeKey(t[k], t[(k+1)%3])
			pb.keptMid[key] = t[3+k]
			pb.keptCount[key]++
		}
	}
	if pb.nKept == 0 {
		return nil, fmt.Errorf("local mesh: the patch covers the whole mesh")
	}
	return pb, nil
}

func edgeKey(a, b int) [2]int { return [2]int{min(a, b), max(a, b)} }

// point returns the input index of x, adding it once.
func (pb *patchBuilder) point(x [2]float64) int {
	if i, ok := pb.index[x]; ok {
		return i
	}
	pb.index[x] = len(pb.in.Points)
	pb.in.Points = append(pb.in.Points, x)
	return len(pb.in.Points) - 1
}

func (pb *patchBuilder) segment(a, b [2]float64, mark int, keep bool) {
	pb.in.Segments = append(pb.in.Segments, [2]int{pb.point(a), pb.point(b)})
	pb.in.SegmentMarks = append(pb.in.SegmentMarks, mark)
	pb.keep = append(pb.keep, keep)
}

// boundary adds the patch boundary: the interface edges (held by one
// kept triangle and one patch triangle) as kept segments, and the parts of
// the domain's pieces that kept boundary edges do not cover, split at the
// ends of those edges and at named points.
func (pb *patchBuilder) boundary() error {
	old := pb.old
	patchHolds := map[[2]int]bool{}
	for e, t := range old.Tri {
		if !pb.keepT[e] {
			for k := 0; k < 3; k++ {
				patchHolds[edgeKey(t[k], t[(k+1)%3])] = true
			}
		}
	}
	for e, t := range old.Tri {
		if !pb.keepT[e] {
			continue
		}
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			if pb.keptCount[edgeKey(a, b)] == 1 && patchHolds[edgeKey(a, b)] {
				pb.segment(old.X[b], old.X[a], 0, true) // patch on its left
				pb.rim = append(pb.rim, old.X[a], old.X[b])
			}
		}
	}
	covered, err := pb.keptBoundary()
	if err != nil {
		return err
	}
	for i := 0; i < pb.d.NumPieces(); i++ {
		p, _, _ := pb.d.Piece(i)
		pb.openParts(p, i+1, covered)
	}
	return nil
}

// keptBoundary returns the kept boundary edges (their end coordinates,
// lower key first) after checking that each lies on a piece of the domain.
func (pb *patchBuilder) keptBoundary() (map[[2][2]float64]bool, error) {
	covered := map[[2][2]float64]bool{}
	for _, ed := range pb.old.Boundary {
		if !pb.keepT[ed.Tri] {
			continue
		}
		a, b := pb.old.X[ed.A], pb.old.X[ed.B]
		if pb.pieceOf(a, b) == nil {
			return nil, fmt.Errorf("local mesh: kept boundary edge (%g, %g)–(%g, %g) is not on the new domain's boundary", a[0], a[1], b[0], b[1])
		}
		covered[xyKey(a, b)] = true
		pb.rim = append(pb.rim, a, b)
	}
	return covered, nil
}

func xyKey(a, b [2]float64) [2][2]float64 {
	if lessXY(b, a) {
		a, b = b, a
	}
	return [2][2]float64{a, b}
}

func lessXY(a, b [2]float64) bool { return a[0] < b[0] || (a[0] == b[0] && a[1] < b[1]) }

// pieceOf returns the piece both a and b lie on, or nil.
func (pb *patchBuilder) pieceOf(a, b [2]float64) *geom.Piece {
	for i := 0; i < pb.d.NumPieces(); i++ {
		p, _, _ := pb.d.Piece(i)
		if p.Distance(a) <= pb.tol && p.Distance(b) <= pb.tol {
			return p
		}
	}
	return nil
}

// openParts adds the parts of piece p (mark mk) that no kept boundary edge
// covers. The piece is cut at every kept corner node and named point on
// it; arcs are cut further into chords of at most geom.MaxArcChordDeg.
func (pb *patchBuilder) openParts(p *geom.Piece, mk int, covered map[[2][2]float64]bool) {
	cuts := [][2]float64{p.A, p.B}
	for _, x := range pb.rim {
		if p.Distance(x) <= pb.tol {
			cuts = append(cuts, x)
		}
	}
	for _, np := range pb.d.Points {
		if !np.Ref && p.Distance(np.X) <= pb.tol {
			cuts = append(cuts, np.X)
		}
	}
	at := func(x [2]float64) float64 { return along(p, x) }
	sort.Slice(cuts, func(i, j int) bool { return at(cuts[i]) < at(cuts[j]) })
	for i := 0; i+1 < len(cuts); i++ {
		a, b := cuts[i], cuts[i+1]
		if a == b || covered[xyKey(a, b)] {
			continue
		}
		part := *p
		part.A, part.B = a, b
		n := 1
		if p.Kind == geom.Arc {
			n = max(1, int(math.Ceil(math.Abs(part.Sweep())*180/math.Pi/geom.MaxArcChordDeg)))
		}
		for k := 0; k < n; k++ {
			x, y := a, b
			if k > 0 {
				x = part.At(float64(k) / float64(n))
			}
			if k+1 < n {
				y = part.At(float64(k+1) / float64(n))
			}
			pb.segment(x, y, mk, false)
		}
	}
}

// along is the position of x along piece p from p.A: the distance along
// the chord direction for a line, the swept angle for an arc.
func along(p *geom.Piece, x [2]float64) float64 {
	if p.Kind != geom.Arc {
		return (x[0]-p.A[0])*(p.B[0]-p.A[0]) + (x[1]-p.A[1])*(p.B[1]-p.A[1])
	}
	t := math.Atan2(x[1]-p.Centre[1], x[0]-p.Centre[0]) - math.Atan2(p.A[1]-p.Centre[1], p.A[0]-p.Centre[0])
	if p.CW {
		t = -t
	}
	if t < 0 {
		t += 2 * math.Pi
	}
	if x == p.B && t == 0 {
		t = 2 * math.Pi // a full circle ends where it starts
	}
	return t
}

// holes adds the hole points: the domain's own (geom.PSLG.Holes), and the
// centroid of every kept triangle on the patch boundary, so that islands
// of kept triangles inside the patch are not meshed over. Named points
// inside the patch that are not on its boundary become free input points.
func (pb *patchBuilder) holes(size func(x, y float64) float64) error {
	g, err := pb.d.Discretise(size)
	if err != nil {
		return err
	}
	pb.in.Holes = append(pb.in.Holes, g.Holes...)
	old := pb.old
	onRim := map[[2]float64]bool{}
	for _, x := range pb.rim {
		onRim[x] = true
	}
	for e, t := range old.Tri {
		if pb.keepT[e] && (onRim[old.X[t[0]]] || onRim[old.X[t[1]]] || onRim[old.X[t[2]]]) {
			a, b, c := old.X[t[0]], old.X[t[1]], old.X[t[2]]
			pb.in.Holes = append(pb.in.Holes, [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3})
		}
	}
	names := make([]string, 0, len(pb.d.Points))
	for name := range pb.d.Points {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		if np := pb.d.Points[name]; !np.Ref {
			pb.point(np.X)
		}
	}
	return nil
}

// floored is the size function inside the patch: h, but no smaller than
// the length of a kept edge less the distance to its midpoint. A kept edge
// cannot be split, so the triangles next to it must be about its size and
// may grade down from there at unit slope, about as fast as Delaunay
// refinement grades on its own (Ruppert 1995, §3).
func (pb *patchBuilder) floored(h func(x, y float64) float64) func(x, y float64) float64 {
	type edge struct {
		mid [2]float64
		l   float64
	}
	var kept []edge
	for k, sg := range pb.in.Segments {
		if pb.keep[k] {
			a, b := pb.in.Points[sg[0]], pb.in.Points[sg[1]]
			kept = append(kept, edge{[2]float64{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}, math.Hypot(b[0]-a[0], b[1]-a[1])})
		}
	}
	return func(x, y float64) float64 {
		v := h(x, y)
		for _, e := range kept {
			if e.l > v {
				v = math.Max(v, e.l-math.Hypot(x-e.mid[0], y-e.mid[1]))
			}
		}
		return v
	}
}

// worstKeptAngle is the smallest angle (degrees) of the triangles of tm
// with an edge on a kept segment (1e9 if there is none).
func (pb *patchBuilder) worstKeptAngle(tm *tri.Mesh) float64 {
	kept := map[[2][2]float64]bool{}
	for k, sg := range pb.in.Segments {
		if pb.keep[k] {
			kept[xyKey(pb.in.Points[sg[0]], pb.in.Points[sg[1]])] = true
		}
	}
	worst := 1e9
	for _, t := range tm.Triangles {
		p := [3][2]float64{tm.Points[t[0]], tm.Points[t[1]], tm.Points[t[2]]}
		if kept[xyKey(p[0], p[1])] || kept[xyKey(p[1], p[2])] || kept[xyKey(p[2], p[0])] {
			worst = math.Min(worst, minAngleDeg(p))
		}
	}
	return worst
}

// minAngleDeg is the smallest angle of triangle p in degrees (law of
// cosines).
func minAngleDeg(p [3][2]float64) float64 {
	var l [3]float64
	for k := 0; k < 3; k++ {
		a, b := p[(k+1)%3], p[(k+2)%3]
		l[k] = math.Hypot(b[0]-a[0], b[1]-a[1])
	}
	mn := math.Pi
	for k := 0; k < 3; k++ {
		x, y, z := l[k], l[(k+1)%3], l[(k+2)%3]
		mn = math.Min(mn, math.Acos(math.Max(-1, math.Min(1, (y*y+z*z-x*x)/(2*y*z)))))
	}
	return mn * 180 / math.Pi
}

// merge joins the kept triangles and the patch triangulation tm into one
// 6-node mesh: corner nodes first (the kept ones in their old order, then
// the patch's new ones), then midside nodes (likewise); the kept triangles
// first, in their old order and with their old vertex order.
func (pb *patchBuilder) merge(tm *tri.Mesh) (*fem.Mesh, error) {
	old := pb.old
	newOf := make([]int, len(old.X))
	for i := range newOf {
		newOf[i] = -1
	}
	m := &fem.Mesh{Labels: pb.d.Labels(), Points: map[string]int{}}
	number := func(v int) {
		if newOf[v] < 0 {
			newOf[v] = len(m.X)
			m.X = append(m.X, old.X[v])
		}
	}
	for e, t := range old.Tri {
		if pb.keepT[e] {
			number(t[0])
			number(t[1])
			number(t[2])
		}
	}
	corner := map[[2]float64]int{}
	for v := 0; v < old.NumCorners; v++ {
		if newOf[v] >= 0 {
			corner[old.X[v]] = newOf[v]
		}
	}
	renum, _ := cornerNumbers(tm)
	for i, r := range renum {
		if r < 0 {
			continue
		}
		if c, ok := corner[tm.Points[i]]; ok {
			renum[i] = c
			continue
		}
		renum[i] = len(m.X)
		m.X = append(m.X, tm.Points[i])
	}
	m.NumCorners = len(m.X)
	pb.oldOf = make([]int, m.NumCorners)
	for i := range pb.oldOf {
		pb.oldOf[i] = -1
	}
	for v := 0; v < old.NumCorners; v++ {
		if newOf[v] >= 0 {
			pb.oldOf[newOf[v]] = v
		}
	}
	for e, t := range old.Tri {
		if pb.keepT[e] {
			number(t[3])
			number(t[4])
			number(t[5])
			m.Tri = append(m.Tri, [6]int{newOf[t[0]], newOf[t[1]], newOf[t[2]], newOf[t[3]], newOf[t[4]], newOf[t[5]]})
		}
	}
	if err := pb.patchTriangles(m, tm, renum, newOf); err != nil {
		return nil, err
	}
	if err := pb.keptBoundaryEdges(m, newOf); err != nil {
		return nil, err
	}
	for name, np := range pb.d.Points {
		if np.Ref {
			continue
		}
		c, ok := corner[np.X]
		if !ok {
			c, ok = pb.newCorner(m, np.X)
		}
		if !ok {
			return nil, fmt.Errorf("local mesh: named point %q is not a vertex of the mesh", name)
		}
		m.Points[name] = c
	}
	if err := m.Check(); err != nil {
		return nil, fmt.Errorf("local mesh: %w", err)
	}
	return m, nil
}

// newCorner finds the new corner node at x.
func (pb *patchBuilder) newCorner(m *fem.Mesh, x [2]float64) (int, bool) {
	for v := m.NumCorners - 1; v >= 0; v-- {
		if m.X[v] == x {
			return v, true
		}
	}
	return -1, false
}

// patchTriangles appends the patch triangles of tm to m with their
// midside nodes: the kept triangle's midside node on an interface edge
// (every kept segment must be an edge of tm), a new one elsewhere (on the
// arc for boundary edges on arcs), and their boundary edges.
func (pb *patchBuilder) patchTriangles(m *fem.Mesh, tm *tri.Mesh, renum, newOf []int) error {
	if len(tm.Triangles) == 0 {
		return fmt.Errorf("local mesh: the patch triangulation is empty")
	}
	ed := newEdgeTable(tm)
	emark := ed.marks(tm)
	mid := make([]int, len(ed.a))
	shared := make([]bool, len(ed.a))
	nShared := 0
	for id := range ed.a {
		ca, cb := renum[ed.a[id]], renum[ed.b[id]]
		if oa, ob := pb.oldOf[ca], pb.oldOf[cb]; oa >= 0 && ob >= 0 {
			if om, ok := pb.keptMid[edgeKey(oa, ob)]; ok && ed.count[id] == 1 {
				mid[id], shared[id] = newOf[om], true
				nShared++
				continue
			}
		}
		mid[id] = len(m.X)
		m.X = append(m.X, midside(pb.d, tm.Points[ed.a[id]], tm.Points[ed.b[id]], emark[id]))
	}
	nKeptSeg := 0
	for _, k := range pb.keep {
		if k {
			nKeptSeg++
		}
	}
	if nShared != nKeptSeg {
		return fmt.Errorf("local mesh: %d of %d patch boundary edges shared with kept triangles (a kept edge was split)", nShared, nKeptSeg)
	}
	base := len(m.Tri)
	for e, t := range tm.Triangles {
		m.Tri = append(m.Tri, [6]int{renum[t[0]], renum[t[1]], renum[t[2]], mid[ed.triEdge[e][0]], mid[ed.triEdge[e][1]], mid[ed.triEdge[e][2]]})
	}
	labelOf := map[string]int{}
	for i, l := range m.Labels {
		labelOf[l] = i
	}
	for id := range ed.a {
		if ed.count[id] != 1 || shared[id] {
			continue
		}
		pa, pb2 := tm.Points[ed.a[id]], tm.Points[ed.b[id]]
		p := pb.d.PieceOfMark(int(emark[id]))
		if p == nil {
			return fmt.Errorf("local mesh: boundary edge (%g, %g)–(%g, %g) lies on no boundary piece", pa[0], pa[1], pb2[0], pb2[1])
		}
		m.Boundary = append(m.Boundary, fem.Edge{A: renum[ed.a[id]], B: renum[ed.b[id]], Mid: mid[id], Label: labelOf[p.Label], Tri: base + int(ed.tri[id])})
	}
	return nil
}

// keptBoundaryEdges appends the kept triangles' boundary edges to m with
// their nodes renumbered and their labels found by name.
func (pb *patchBuilder) keptBoundaryEdges(m *fem.Mesh, newOf []int) error {
	labelOf := map[string]int{}
	for i, l := range m.Labels {
		labelOf[l] = i
	}
	newTri := make([]int, len(pb.old.Tri))
	n := 0
	for e := range pb.old.Tri {
		if pb.keepT[e] {
			newTri[e] = n
			n++
		}
	}
	for _, ed := range pb.old.Boundary {
		if !pb.keepT[ed.Tri] {
			continue
		}
		name := pb.old.Labels[ed.Label]
		l, ok := labelOf[name]
		if !ok {
			return fmt.Errorf("local mesh: kept boundary label %q is not a label of the new domain", name)
		}
		m.Boundary = append(m.Boundary, fem.Edge{A: newOf[ed.A], B: newOf[ed.B], Mid: newOf[ed.Mid], Label: l, Tri: newTri[ed.Tri]})
	}
	return nil
}
