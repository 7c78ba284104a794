package carve

import (
	"fmt"
	"math"
	"sort"

	"github.com/tidwall/rtree"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/plane"
)

// CrackLabel is the boundary label of crack faces created by removing
// broken material (DEVELOPERS.md, shared contracts).
const CrackLabel = geom.LabelCrack

// Options sets how Domain builds the new geometry.
type Options struct {
	// Simplify: crack-face polylines are simplified (Douglas & Peucker
	// 1973, Cartographica 10) so that every dropped vertex x lies within
	// Simplify·h(x) of the simplified line, h the new size field (≥ 0;
	// 0 keeps every vertex that is not collinear), and on its outer side:
	// the simplified line may cut off intact material but never brings
	// removed material back.
	Simplify float64
	// MinCorner is the smallest corner angle (degrees, inside the
	// material) simplification may create where the unsimplified boundary
	// had a larger one: the mesher cannot make angles larger than the
	// corners it is given (Shewchuk 2002, Comput. Geom. 22). In [0, 90).
	MinCorner float64
	// MatchTol is the distance, relative to the original domain's size, within
	// which a mesh boundary edge (both ends and its midside node) is taken to
	// lie on a piece of the original domain (> 0).
	MatchTol float64
}

// DefaultOptions returns Simplify = 0.5 (half the local size: the
// zigzag of a crack face cut from a triangulation is below one element),
// MinCorner = 40° (above the mesher's default angle bound of 28° with a
// margin) and MatchTol = 1e-8.
func DefaultOptions() Options {
	return Options{Simplify: 0.5, MinCorner: 40, MatchTol: 1e-8}
}

// Validate checks the options.
func (o *Options) Validate() error {
	if !(o.Simplify >= 0) || math.IsInf(o.Simplify, 0) {
		return fmt.Errorf("remesh: carve option Simplify = %g must be finite and ≥ 0", o.Simplify)
	}
	if !(o.MinCorner >= 0 && o.MinCorner < 90) {
		return fmt.Errorf("remesh: carve option MinCorner = %g° must be in [0, 90)", o.MinCorner)
	}
	if !(o.MatchTol > 0) || o.MatchTol >= 1e-2 {
		return fmt.Errorf("remesh: carve option MatchTol = %g must be in (0, 0.01)", o.MatchTol)
	}
	return nil
}

// Result is the new geometry Domain builds.
type Result struct {
	// Domain is the material that is left, ready for MeshDomain.
	Domain *geom.Domain
	// Removed marks the old elements outside the new geometry: the broken
	// ones and the unbroken ones dropped with slivers (see Domain).
	Removed []bool
	// Slivers counts the unbroken elements dropped.
	Slivers int
	// Area is the area of the kept old triangles (straight-sided).
	Area float64
	// Dropped names the named points that fell with removed material.
	Dropped []string
	// Vertices and Kept give, per loop of Domain (outer first), the old
	// boundary nodes before simplification and whether each survived as a
	// vertex of the new geometry (for checks and plots).
	Vertices [][][2]float64
	Kept     [][]bool
}

// BrokenElements marks the broken elements (fem.ElementBroken: all their
// Gauss points broken); they leave the geometry at the next remesh
// (DESIGN.md §3).
func BrokenElements(gp *fem.GaussPoints) ([]bool, error) {
	ne, err := gp.Elements()
	if err != nil {
		return nil, fmt.Errorf("broken elements: %w", err)
	}
	out := make([]bool, ne)
	st := make([]material.State, gp.PerElement)
	for e := range out {
		for i := range st {
			st[i] = gp.At(e, i).State
		}
		out[e] = fem.ElementBroken(st)
	}
	return out, nil
}

// Domain builds the geometry of the material that is left when the elements
// marked in broken are removed from m:
//
//   - The kept triangles are cleaned first. Material held only at a vertex
//     is dropped: where the kept triangles around a node form several fans
//     (touching only at the node), every fan but the largest by area is
//     removed, repeatedly, so that the boundary is a set of simple loops.
//     Then only the largest edge-connected part (by area) is kept; the
//     other parts are slivers or pieces broken off, which would float free.
//   - The boundary of the kept triangles is traced into closed loops, the
//     material on the left (outer loop counter-clockwise, holes clockwise).
//     An edge that was on m's boundary keeps its label; an edge newly
//     exposed is labelled CrackLabel.
//   - Runs of boundary edges that lie on one piece of the original domain
//     orig (same label, ends and midside node within MatchTol) become one
//     piece of that kind: a line, or a sub-arc of the original arc with its
//     centre and radius, so that arcs are never lost to their chords.
//     Other runs are polylines: crack faces are simplified within
//     Simplify·size(x) (Douglas–Peucker), other labels lose only collinear
//     vertices. Vertices where the label or the original piece changes and
//     named points on the boundary are kept. Simplification never makes the
//     boundary cross itself, nor leaves a vertex or named point on the wrong
//     side or closer to a shortcut than the mesher accepts: a shortcut that
//     would is split again (in the spirit of Saalfeld 1999, Cartogr. Geogr.
//     Inf. Sci. 26).
//   - Named points are carried over (from orig when given, for their kinds,
//     else from m.Points): reference points as they are; points whose node
//     is still in the material keep their place; a point whose name is that
//     of a current tip moves to the tip (snapped to the nearest boundary
//     vertex when the tip lies outside the material or within the
//     simplification tolerance of its boundary); others are dropped and
//     listed in Result.Dropped.
//
// orig may be nil (every run is then a polyline); size is the new size
// field (it may be nil when Simplify is 0).
func Domain(m *fem.Mesh, broken []bool, orig *geom.Domain, tips []criteria.Tip, size func(x, y float64) float64, opt Options) (*Result, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	if m == nil {
		return nil, fmt.Errorf("remesh: carve: no mesh given")
	}
	if err := m.Check(); err != nil {
		return nil, fmt.Errorf("remesh: carve: %w", err)
	}
	if len(broken) != len(m.Tri) {
		return nil, fmt.Errorf("remesh: carve: %d broken flags for %d elements", len(broken), len(m.Tri))
	}
	if size == nil && opt.Simplify > 0 {
		return nil, fmt.Errorf("remesh: carve: a size function is needed to simplify crack faces (Simplify = %g)", opt.Simplify)
	}
	for i, t := range tips {
		if _, ok := t.UnitDir(); !ok {
			return nil, fmt.Errorf("remesh: carve: tip %d %q direction (%g, %g) must be finite and non-zero", i, t.Name, t.Dir[0], t.Dir[1])
		}
	}
	c := &carver{m: m, opt: opt, orig: orig, size: size}
	c.removed = append([]bool(nil), broken...)
	c.nbr = c.m.EdgeNeighbours()
	c.dropPinches()
	c.keepLargestPart()
	out := &Result{Removed: c.removed}
	for e := range c.removed {
		if c.removed[e] && !broken[e] {
			out.Slivers++
		}
		if !c.removed[e] {
			out.Area += triArea(m, e)
		}
	}
	if out.Area == 0 {
		return nil, fmt.Errorf("remesh: carve: no material is left (%d of %d elements removed)", len(m.Tri), len(m.Tri))
	}
	if err := c.trace(); err != nil {
		return nil, err
	}
	c.matchPieces()
	pts, dropped, err := c.namedPoints(tips)
	if err != nil {
		return nil, err
	}
	out.Dropped = dropped
	if err := c.simplify(); err != nil {
		return nil, err
	}
	d, err := c.domain(pts)
	if err != nil {
		return nil, err
	}
	out.Domain = d
	for _, l := range c.loops {
		v := make([][2]float64, len(l.v))
		for i, n := range l.v {
			v[i] = m.X[n]
		}
		out.Vertices = append(out.Vertices, v)
		out.Kept = append(out.Kept, append([]bool(nil), l.keep...))
	}
	return out, nil
}

// carver holds the working state of Domain.
type carver struct {
	m       *fem.Mesh
	opt     Options
	orig    *geom.Domain
	size    func(x, y float64) float64
	removed []bool
	nbr     [][3]int // triangle across each edge, −1 none
	// boundary edge data, by directed corner pair
	label map[[2]int]string // old boundary label of an undirected edge (min, max)
	mid   map[[2]int]int
	loops []cLoop
	fixed map[int]bool // boundary nodes that must stay vertices
	// interior named points that simplification must not cross
	guards [][2]float64
	// kept indexes the triangles that are not removed (see containing)
	kept *plane.Locator
}

// cLoop is one boundary loop: nodes v, label lab[k] and original piece
// pc[k] (global index, −1 none) of edge v[k] → v[k+1], keep flags.
type cLoop struct {
	v    []int
	lab  []string
	pc   []int
	keep []bool
	area float64
}

func triArea(m *fem.Mesh, e int) float64 {
	t := m.Tri[e]
	a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
	return 0.5 * ((b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1]))
}

func ukey(a, b int) [2]int {
	if a > b {
		a, b = b, a
	}
	return [2]int{a, b}
}

// dropPinches removes every fan but the largest around nodes where kept
// triangles touch only at the node. Only nodes next to removed triangles
// or on the old boundary can be pinched.
func (c *carver) dropPinches() {
	m := c.m
	around := make([][]int, m.NumCorners) // all triangles around a corner node
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			around[t[k]] = append(around[t[k]], e)
		}
	}
	var work []int
	queued := make([]bool, m.NumCorners)
	push := func(n int) {
		if !queued[n] {
			queued[n] = true
			work = append(work, n)
		}
	}
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			if c.removed[e] || c.nbr[e][k] < 0 {
				push(t[k])
				push(t[(k+1)%3])
			}
		}
	}
	var kept []int
	for len(work) > 0 {
		n := work[len(work)-1]
		work = work[:len(work)-1]
		queued[n] = false
		kept = kept[:0]
		for _, e := range around[n] {
			if !c.removed[e] {
				kept = append(kept, e)
			}
		}
		if len(kept) < 2 {
			continue
		}
		fans := c.fans(n, kept)
		if len(fans) < 2 {
			continue
		}
		best, ba := -1, -1.0
		for i, f := range fans {
			a := 0.0
			for _, e := range f {
				a += triArea(m, e)
			}
			if a > ba {
				best, ba = i, a
			}
		}
		for i, f := range fans {
			if i == best {
				continue
			}
			for _, e := range f {
				c.removed[e] = true
				for k := 0; k < 3; k++ { // its nodes may now be pinched
					push(m.Tri[e][k])
				}
			}
		}
	}
}

// fans groups the kept triangles around node n into fans connected through
// edges incident to n.
func (c *carver) fans(n int, tris []int) [][]int {
	in := func(e int) int {
		for i, o := range tris {
			if o == e {
				return i
			}
		}
		return -1
	}
	fan := make([]int, len(tris))
	for i := range fan {
		fan[i] = -1
	}
	var out [][]int
	for s := range tris {
		if fan[s] >= 0 {
			continue
		}
		id := len(out)
		out = append(out, nil)
		stack := []int{s}
		fan[s] = id
		for len(stack) > 0 {
			i := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			e := tris[i]
			out[id] = append(out[id], e)
			t := c.m.Tri[e]
			for k := 0; k < 3; k++ {
				if t[k] != n && t[(k+1)%3] != n {
					continue // the edge opposite n
				}
				if o := c.nbr[e][k]; o >= 0 {
					if j := in(o); j >= 0 && fan[j] < 0 {
						fan[j] = id
						stack = append(stack, j)
					}
				}
			}
		}
	}
	return out
}

// keepLargestPart removes every edge-connected part of the kept triangles
// but the one of largest area.
func (c *carver) keepLargestPart() {
	comp := make([]int, len(c.m.Tri))
	for i := range comp {
		comp[i] = -1
	}
	var areas []float64
	var stack []int
	for s := range c.m.Tri {
		if c.removed[s] || comp[s] >= 0 {
			continue
		}
		id := len(areas)
		areas = append(areas, 0)
		stack = append(stack[:0], s)
		comp[s] = id
		for len(stack) > 0 {
			e := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			areas[id] += triArea(c.m, e)
			for _, o := range c.nbr[e] {
				if o >= 0 && !c.removed[o] && comp[o] < 0 {
					comp[o] = id
					stack = append(stack, o)
				}
			}
		}
	}
	best := 0
	for i, a := range areas {
		if a > areas[best] {
			best = i
		}
	}
	for e := range c.m.Tri {
		if !c.removed[e] && comp[e] != best {
			c.removed[e] = true
		}
	}
}

// trace finds the boundary loops of the kept triangles.
func (c *carver) trace() error {
	m := c.m
	c.label = map[[2]int]string{}
	c.mid = map[[2]int]int{}
	for _, ed := range m.Boundary {
		k := ukey(ed.A, ed.B)
		c.label[k] = m.Labels[ed.Label]
		c.mid[k] = ed.Mid
	}
	next := map[int]int{}
	for e, t := range m.Tri {
		if c.removed[e] {
			continue
		}
		for k := 0; k < 3; k++ {
			if o := c.nbr[e][k]; o >= 0 && !c.removed[o] {
				continue
			}
			a, b := t[k], t[(k+1)%3]
			key := ukey(a, b)
			if _, dup := next[a]; dup {
				return fmt.Errorf("remesh: carve: node %d at (%g, %g) starts two boundary edges after cleaning (non-manifold material)", a, m.X[a][0], m.X[a][1])
			}
			next[a] = b
			if _, ok := c.mid[key]; !ok {
				c.mid[key] = t[3+k]
			}
		}
	}
	// trace in a deterministic order
	starts := make([]int, 0, len(next))
	for a := range next {
		starts = append(starts, a)
	}
	sort.Ints(starts)
	done := map[int]bool{}
	for _, s := range starts {
		if done[s] {
			continue
		}
		var l cLoop
		for a := s; !done[a]; {
			done[a] = true
			b, ok := next[a]
			if !ok {
				return fmt.Errorf("remesh: carve: boundary breaks off at node %d (%g, %g)", a, m.X[a][0], m.X[a][1])
			}
			l.v = append(l.v, a)
			lab, old := c.label[ukey(a, b)]
			if !old {
				lab = CrackLabel
			}
			l.lab = append(l.lab, lab)
			a = b
			if a != s && done[a] {
				return fmt.Errorf("remesh: carve: boundary loop through node %d does not close", a)
			}
		}
		l.area = polyArea(m, l.v)
		c.loops = append(c.loops, l)
	}
	// outer loop first: the one of largest positive area
	sort.SliceStable(c.loops, func(i, j int) bool { return c.loops[i].area > c.loops[j].area })
	if len(c.loops) == 0 || !(c.loops[0].area > 0) {
		return fmt.Errorf("remesh: carve: the material has no counter-clockwise outer boundary")
	}
	for i := 1; i < len(c.loops); i++ {
		if c.loops[i].area > 0 {
			return fmt.Errorf("remesh: carve: %d outer boundaries after keeping one part (internal error)", i+1)
		}
	}
	return nil
}

func polyArea(m *fem.Mesh, v []int) float64 {
	s := 0.0
	o := m.X[v[0]]
	for i := range v {
		a, b := m.X[v[i]], m.X[v[(i+1)%len(v)]]
		s += (a[0]-o[0])*(b[1]-o[1]) - (b[0]-o[0])*(a[1]-o[1])
	}
	return 0.5 * s
}

// matchPieces finds, for every old-boundary edge, the original piece it
// lies on (same label; both ends and the midside node within tolerance).
func (c *carver) matchPieces() {
	var tol float64
	np := 0
	if c.orig != nil {
		tol = c.opt.MatchTol * c.orig.Scale()
		np = c.orig.NumPieces()
	}
	for li := range c.loops {
		l := &c.loops[li]
		l.pc = make([]int, len(l.v))
		for k := range l.v {
			l.pc[k] = -1
			a, b := l.v[k], l.v[(k+1)%len(l.v)]
			if _, old := c.label[ukey(a, b)]; !old {
				continue
			}
			mid := c.mid[ukey(a, b)]
			for i := 0; i < np; i++ {
				p, _, _ := c.orig.Piece(i)
				if p.Label != l.lab[k] {
					continue
				}
				if p.Distance(c.m.X[a]) <= tol && p.Distance(c.m.X[b]) <= tol && p.Distance(c.m.X[mid]) <= tol {
					l.pc[k] = i
					break
				}
			}
		}
	}
}

// namedPoints carries the named points over and fixes the boundary nodes
// they sit on.
func (c *carver) namedPoints(tips []criteria.Tip) (map[string]geom.Point, []string, error) {
	m := c.m
	c.fixed = map[int]bool{}
	onBoundary := map[int]bool{}
	for _, l := range c.loops {
		for _, n := range l.v {
			onBoundary[n] = true
		}
	}
	inMaterial := make([]bool, len(m.X))
	for e, t := range m.Tri {
		if !c.removed[e] {
			for _, n := range t {
				inMaterial[n] = true
			}
		}
	}
	tipOf := map[string]criteria.Tip{}
	for _, t := range tips {
		if t.Name != "" {
			tipOf[t.Name] = t
		}
	}
	type src struct {
		p    geom.Point
		node int
	}
	all := map[string]src{}
	if c.orig != nil {
		for n, p := range c.orig.Points {
			all[n] = src{p, -1}
		}
	}
	for n, node := range m.Points {
		s, ok := all[n]
		if !ok {
			s = src{geom.Point{X: m.X[node]}, node}
		}
		s.node = node
		if !s.p.Ref {
			s.p.X = m.X[node]
		}
		all[n] = s
	}
	for n := range tipOf { // tips not yet in the domain are added
		if _, ok := all[n]; !ok {
			all[n] = src{geom.Point{Tip: true}, -1}
		}
	}
	names := make([]string, 0, len(all))
	for n := range all {
		names = append(names, n)
	}
	sort.Strings(names)
	out := map[string]geom.Point{}
	var dropped []string
	for _, n := range names {
		s := all[n]
		p := s.p
		if t, ok := tipOf[n]; ok {
			d, _ := t.UnitDir()
			p.Tip, p.Ref, p.Dir = true, false, d
			node, at, err := c.placeTip(t.X, inMaterial)
			if err != nil {
				return nil, nil, fmt.Errorf("remesh: carve: tip %q: %w", n, err)
			}
			p.X = at
			if node >= 0 {
				c.fixed[node] = true
			} else {
				c.guards = append(c.guards, at)
			}
			out[n] = p
			continue
		}
		if p.Ref {
			out[n] = p
			continue
		}
		if s.node < 0 {
			// a point of orig without a mesh node: keep it when it lies in
			// the kept material
			if !c.containing(p.X) {
				dropped = append(dropped, n)
				continue
			}
			c.guards = append(c.guards, p.X)
			out[n] = p
			continue
		}
		if !inMaterial[s.node] {
			dropped = append(dropped, n)
			continue
		}
		if onBoundary[s.node] {
			c.fixed[s.node] = true
		} else {
			c.guards = append(c.guards, p.X)
		}
		out[n] = p
	}
	return out, dropped, nil
}

// containing reports whether a kept triangle contains x (closed, within
// round-off: area coordinates ≥ −10⁻¹²). The kept triangles are indexed on
// the first call; the removed set does not change after keepLargestPart.
func (c *carver) containing(x [2]float64) bool {
	if c.kept == nil {
		var idx []int
		for e := range c.m.Tri {
			if !c.removed[e] {
				idx = append(idx, e)
			}
		}
		c.kept = plane.NewLocator(func(i int) [3][2]float64 {
			t := c.m.Tri[idx[i]]
			return [3][2]float64{c.m.X[t[0]], c.m.X[t[1]], c.m.X[t[2]]}
		}, len(idx))
	}
	_, _, ok := c.kept.FindFirst(x, 1e-12)
	return ok
}

// placeTip returns where the tip point goes: a boundary node (≥ 0) when
// the tip lies outside the kept material or close to its boundary, else
// the tip position itself (node −1).
func (c *carver) placeTip(x [2]float64, inMaterial []bool) (int, [2]float64, error) {
	best, bn := math.Inf(1), -1
	bd := math.Inf(1) // distance to the boundary polyline
	for _, l := range c.loops {
		for k, n := range l.v {
			p := c.m.X[n]
			if d := math.Hypot(p[0]-x[0], p[1]-x[1]); d < best {
				best, bn = d, n
			}
			q := c.m.X[l.v[(k+1)%len(l.v)]]
			bd = math.Min(bd, plane.SegDist(x, p, q))
		}
	}
	if bn < 0 {
		return -1, x, fmt.Errorf("no boundary to place it on")
	}
	tol := 0.0
	if c.size != nil {
		tol = c.opt.Simplify * c.size(x[0], x[1])
	}
	if !c.containing(x) || bd <= tol+1e-9*best {
		return bn, c.m.X[bn], nil
	}
	return -1, x, nil
}

// span is a run of a loop between two kept vertices i and j (indices into
// the loop, j after i cyclically) that simplification replaces by the
// chord v[i]–v[j].
type span struct {
	loop, i, j int
}

// simplify decides which boundary nodes stay vertices.
func (c *carver) simplify() error {
	scale := 0.0
	for _, l := range c.loops {
		for _, n := range l.v {
			scale = math.Max(scale, math.Hypot(c.m.X[n][0], c.m.X[n][1]))
		}
	}
	collinear := 1e-12 * math.Max(scale, 1e-300)
	for li := range c.loops {
		l := &c.loops[li]
		n := len(l.v)
		l.keep = make([]bool, n)
		brk := false
		for k := range l.v {
			p := (k + n - 1) % n
			if c.fixed[l.v[k]] || l.lab[k] != l.lab[p] || l.pc[k] != l.pc[p] {
				l.keep[k] = true
				brk = true
			}
		}
		if !brk { // a loop of one kind: anchor at its lowest and farthest vertex
			k0 := 0
			for k := range l.v {
				if lessXY(c.m.X[l.v[k]], c.m.X[l.v[k0]]) {
					k0 = k
				}
			}
			k1, far := k0, -1.0
			for k := range l.v {
				a, b := c.m.X[l.v[k]], c.m.X[l.v[k0]]
				if d := math.Hypot(a[0]-b[0], a[1]-b[1]); d > far {
					k1, far = k, d
				}
			}
			l.keep[k0], l.keep[k1] = true, true
		}
		// the runs between kept vertices
		for _, sp := range c.spans(li) {
			k, j := sp.i, sp.j
			if l.pc[k] >= 0 {
				continue // on an original piece: its ends are enough
			}
			tolf := func(x [2]float64) float64 { return collinear }
			if l.lab[k] == CrackLabel && c.opt.Simplify > 0 {
				tolf = func(x [2]float64) float64 { return math.Max(collinear, c.opt.Simplify*c.size(x[0], x[1])) }
			}
			plane.DouglasPeucker(l.keep, k, j, c.oneSided(l, tolf, collinear), 1)
		}
	}
	// every loop keeps at least three vertices
	for li := range c.loops {
		c.atLeastThree(li)
	}
	// topology: split chords that cross the boundary or sweep over a
	// vertex or a named point, until none does
	for iter := 0; iter < 10000; iter++ {
		bad := c.badSpans()
		if len(bad) == 0 {
			bad = c.sharpSpans()
		}
		if len(bad) == 0 {
			return nil
		}
		for _, s := range bad {
			c.splitSpan(s)
		}
	}
	return fmt.Errorf("remesh: carve: crack-face simplification did not reach a valid boundary")
}

func lessXY(a, b [2]float64) bool { return a[0] < b[0] || (a[0] == b[0] && a[1] < b[1]) }

// interior returns the loop indices strictly between i and j.
func (l *cLoop) interior(i, j int) []int {
	n := len(l.v)
	var out []int
	for k := (i + 1) % n; k != j; k = (k + 1) % n {
		out = append(out, k)
	}
	return out
}

// oneSided returns the excess of the chords of loop l for
// plane.DouglasPeucker (limit 1): the distance of a dropped vertex x from
// the chord over tol(x) (Douglas & Peucker 1973, Cartographica 10). The
// test is one-sided: a vertex on the material side of the chord (its left,
// as the loops run) must lie within strict of it, because a chord past it
// would bring removed material back into the domain — broken elements
// whose displacement is no longer resisted and may be inverted, and whose
// state would be copied into the new elements there. A chord may cut off
// intact material within tol(x); its state is lost like that of removed
// elements, and re-equilibration relaxes the force it held.
func (c *carver) oneSided(l *cLoop, tol func([2]float64) float64, strict float64) func(i, j, k int) float64 {
	return func(i, j, k int) float64 {
		a, b, x := c.m.X[l.v[i]], c.m.X[l.v[j]], c.m.X[l.v[k]]
		t := tol(x)
		if (b[0]-a[0])*(x[1]-a[1])-(b[1]-a[1])*(x[0]-a[0]) > 0 {
			t = math.Min(t, strict)
		}
		return plane.SegDist(x, a, b) / t
	}
}

// atLeastThree makes sure loop li keeps three vertices or more.
func (c *carver) atLeastThree(li int) {
	l := &c.loops[li]
	for {
		nk := 0
		for _, k := range l.keep {
			if k {
				nk++
			}
		}
		if nk >= 3 || nk == len(l.v) {
			return
		}
		// keep the interior vertex farthest from its chord
		best, bs := -1.0, span{}
		for _, s := range c.spans(li) {
			if _, d := c.farthest(s); d > best {
				best, bs = d, s
			}
		}
		c.splitSpan(bs)
	}
}

// spans returns the chords of loop li between consecutive kept vertices.
func (c *carver) spans(li int) []span {
	l := &c.loops[li]
	var out []span
	n := len(l.v)
	for k := 0; k < n; k++ {
		if !l.keep[k] {
			continue
		}
		j := (k + 1) % n
		for !l.keep[j] {
			j = (j + 1) % n
		}
		out = append(out, span{li, k, j})
	}
	return out
}

// splitSpan keeps the interior vertex of s farthest from its chord.
func (c *carver) splitSpan(s span) {
	if k, _ := c.farthest(s); k >= 0 {
		c.loops[s.loop].keep[k] = true
	}
}

// farthest returns the interior vertex of s farthest from its chord and
// its distance (−1, −1 when s has no interior vertex).
func (c *carver) farthest(s span) (int, float64) {
	l := &c.loops[s.loop]
	a, b := c.m.X[l.v[s.i]], c.m.X[l.v[s.j]]
	best, bk := -1.0, -1
	for _, k := range l.interior(s.i, s.j) {
		if d := plane.SegDist(c.m.X[l.v[k]], a, b); d > best {
			best, bk = d, k
		}
	}
	return bk, best
}

// badSpans returns the simplified chords that cross another boundary
// segment or whose swept region (between the chord and the vertices it
// replaces) holds a kept vertex or a named point.
func (c *carver) badSpans() []span {
	type seg struct {
		a, b int // node ids
		s    span
	}
	var segs []seg
	var tr rtree.RTreeG[int]
	for li := range c.loops {
		for _, s := range c.spans(li) {
			l := &c.loops[li]
			segs = append(segs, seg{l.v[s.i], l.v[s.j], s})
			pa, pb := c.m.X[l.v[s.i]], c.m.X[l.v[s.j]]
			tr.Insert([2]float64{math.Min(pa[0], pb[0]), math.Min(pa[1], pb[1])},
				[2]float64{math.Max(pa[0], pb[0]), math.Max(pa[1], pb[1])}, len(segs)-1)
		}
	}
	var pts rtree.RTreeG[int] // kept vertices (node id) and guards (−1 − index)
	for li := range c.loops {
		l := &c.loops[li]
		for k, n := range l.v {
			if l.keep[k] {
				pts.Insert(c.m.X[n], c.m.X[n], n)
			}
		}
	}
	for i, g := range c.guards {
		pts.Insert(g, g, -1-i)
	}
	var bad []span
	for si, sg := range segs {
		l := &c.loops[sg.s.loop]
		inner := l.interior(sg.s.i, sg.s.j)
		if len(inner) == 0 {
			continue // an original edge
		}
		pa, pb := c.m.X[sg.a], c.m.X[sg.b]
		lo := [2]float64{math.Min(pa[0], pb[0]), math.Min(pa[1], pb[1])}
		hi := [2]float64{math.Max(pa[0], pb[0]), math.Max(pa[1], pb[1])}
		isBad := false
		tr.Search(lo, hi, func(_, _ [2]float64, oi int) bool {
			if oi == si {
				return true
			}
			o := segs[oi]
			if segmentsClash(pa, pb, c.m.X[o.a], c.m.X[o.b], sg.a, sg.b, o.a, o.b) {
				isBad = true
				return false
			}
			return true
		})
		if !isBad && c.size != nil {
			// no other vertex nearer the chord than the mesher accepts
			// (geom.MinFeature·h, with a safety factor 4)
			g := 4 * geom.MinFeature * math.Max(c.size(pa[0], pa[1]), c.size(pb[0], pb[1]))
			pts.Search([2]float64{lo[0] - g, lo[1] - g}, [2]float64{hi[0] + g, hi[1] + g}, func(x, _ [2]float64, id int) bool {
				if id == sg.a || id == sg.b {
					return true
				}
				if plane.SegDist(x, pa, pb) < 4*geom.MinFeature*c.size(x[0], x[1]) {
					isBad = true
					return false
				}
				return true
			})
		}
		if !isBad {
			// swept polygon: the chord's vertices i, interior…, j
			poly := make([][2]float64, 0, len(inner)+2)
			poly = append(poly, pa)
			plo, phi := lo, hi
			for _, k := range inner {
				x := c.m.X[l.v[k]]
				poly = append(poly, x)
				plo = [2]float64{math.Min(plo[0], x[0]), math.Min(plo[1], x[1])}
				phi = [2]float64{math.Max(phi[0], x[0]), math.Max(phi[1], x[1])}
			}
			poly = append(poly, pb)
			pts.Search(plo, phi, func(x, _ [2]float64, id int) bool {
				if id == sg.a || id == sg.b {
					return true
				}
				if plane.InPolygon(x, poly) {
					isBad = true
					return false
				}
				return true
			})
		}
		if isBad {
			bad = append(bad, sg.s)
		}
	}
	return bad
}

// sharpSpans returns the simplified chords next to a kept vertex whose
// corner angle inside the material fell below MinCorner and below the
// angle the unsimplified boundary makes there.
func (c *carver) sharpSpans() []span {
	var bad []span
	lim := c.opt.MinCorner
	for li := range c.loops {
		l := &c.loops[li]
		sp := c.spans(li)
		n := len(l.v)
		for q := range sp {
			in, out := sp[(q+len(sp)-1)%len(sp)], sp[q]
			k := out.i
			x := c.m.X[l.v[k]]
			// directions leaving the vertex backwards and forwards
			u := c.spanDir(in, false)
			v := c.spanDir(out, true)
			now := cornerDeg(u, v)
			p0, n0 := c.m.X[l.v[(k+n-1)%n]], c.m.X[l.v[(k+1)%n]]
			was := cornerDeg([2]float64{p0[0] - x[0], p0[1] - x[1]}, [2]float64{n0[0] - x[0], n0[1] - x[1]})
			if now >= lim || now >= was-0.5 {
				continue
			}
			for _, s := range []span{in, out} {
				if len(l.interior(s.i, s.j)) > 0 {
					bad = append(bad, s)
				}
			}
		}
	}
	return bad
}

// spanDir returns the direction of span s leaving its start (start true)
// or leaving its end backwards: along the chord, or along the tangent of
// the original arc the span lies on.
func (c *carver) spanDir(s span, start bool) [2]float64 {
	l := &c.loops[s.loop]
	a, b := c.m.X[l.v[s.i]], c.m.X[l.v[s.j]]
	if pc := l.pc[s.i]; pc >= 0 {
		if p, _, _ := c.orig.Piece(pc); p.Kind == geom.Arc {
			x := b
			if start {
				x = a
			}
			t := [2]float64{-(x[1] - p.Centre[1]), x[0] - p.Centre[0]} // counter-clockwise tangent
			if p.CW {
				t = [2]float64{-t[0], -t[1]}
			}
			if start {
				return t
			}
			return [2]float64{-t[0], -t[1]}
		}
	}
	if start {
		return [2]float64{b[0] - a[0], b[1] - a[1]}
	}
	return [2]float64{a[0] - b[0], a[1] - b[1]}
}

// cornerDeg returns the corner angle in degrees inside the material at a
// boundary vertex, given the directions back along the incoming edge (u)
// and forward along the outgoing one (v): the material lies on the left of
// the boundary, so the angle runs counter-clockwise from v to u.
func cornerDeg(u, v [2]float64) float64 {
	a := math.Atan2(v[0]*u[1]-v[1]*u[0], v[0]*u[0]+v[1]*u[1]) * 180 / math.Pi
	if a < 0 {
		a += 360
	}
	return a
}

// segmentsClash reports whether segments p1–p2 (nodes a1, a2) and q1–q2
// (nodes b1, b2) meet anywhere but at a shared end node.
func segmentsClash(p1, p2, q1, q2 [2]float64, a1, a2, b1, b2 int) bool {
	shared := 0
	if a1 == b1 || a1 == b2 {
		shared++
	}
	if a2 == b1 || a2 == b2 {
		shared++
	}
	o1, o2 := turnSign(p1, p2, q1), turnSign(p1, p2, q2)
	o3, o4 := turnSign(q1, q2, p1), turnSign(q1, q2, p2)
	if shared == 2 {
		return true // two chords between the same nodes: a collapsed loop
	}
	if shared == 1 {
		// touching at the shared node is fine; overlapping along a line is not
		if o1 == 0 && o2 == 0 {
			return overlap1D(p1, p2, q1, q2)
		}
		return false
	}
	if o1 == 0 && o2 == 0 {
		return overlap1D(p1, p2, q1, q2)
	}
	if o1*o2 <= 0 && o3*o4 <= 0 {
		return true
	}
	return false
}

// overlap1D reports whether collinear segments overlap along a stretch.
func overlap1D(p1, p2, q1, q2 [2]float64) bool {
	ax := 0
	if math.Abs(p2[1]-p1[1]) > math.Abs(p2[0]-p1[0]) {
		ax = 1
	}
	plo, phi := math.Min(p1[ax], p2[ax]), math.Max(p1[ax], p2[ax])
	qlo, qhi := math.Min(q1[ax], q2[ax]), math.Max(q1[ax], q2[ax])
	return math.Min(phi, qhi) > math.Max(plo, qlo)
}

// turnSign returns the sign of the orientation determinant of a, b, c
// evaluated in plain floating point. It is not the exact plane.Orient: near
// collinear points can get another sign, and the chords that simplify
// keeps depend on these signs, so switching would change carved domains.
func turnSign(a, b, c [2]float64) int {
	d := (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
	switch {
	case d > 0:
		return 1
	case d < 0:
		return -1
	}
	return 0
}

// domain assembles the geom.Domain.
func (c *carver) domain(pts map[string]geom.Point) (*geom.Domain, error) {
	d := &geom.Domain{Points: pts}
	if c.orig != nil {
		d.Axisymmetric, d.Thickness = c.orig.Axisymmetric, c.orig.Thickness
	}
	for li := range c.loops {
		l := &c.loops[li]
		var loop geom.Loop
		for _, s := range c.spans(li) {
			a, b := c.m.X[l.v[s.i]], c.m.X[l.v[s.j]]
			p := geom.Piece{Kind: geom.Line, A: a, B: b, Label: l.lab[s.i]}
			if pc := l.pc[s.i]; pc >= 0 {
				op, _, _ := c.orig.Piece(pc)
				if op.Kind == geom.Arc {
					p.Kind, p.Centre, p.Radius, p.CW = geom.Arc, op.Centre, op.Radius, op.CW
				}
			}
			loop = append(loop, p)
		}
		if li == 0 {
			d.Outer = loop
		} else {
			d.Holes = append(d.Holes, loop)
		}
	}
	if err := d.Validate(); err != nil {
		return nil, fmt.Errorf("remesh: carve: the new geometry is invalid: %w", err)
	}
	return d, nil
}
