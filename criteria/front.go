package criteria

import (
	"container/heap"
	"fmt"
	"math"
	"sort"

	"tearline/solver/fem"
	"tearline/solver/plane"
)

// FrontOptions selects the porosity levels and the initial tips of
// LocateFront.
type FrontOptions struct {
	// Fc is the critical porosity f_c of the GTN model; it sets the defaults
	// of FFront (2·f_c, common practice for the edge of the localisation
	// band) and FTip.
	Fc float64
	// FFront is the contour level f_front; 0 means 2·Fc.
	FFront float64
	// FTip is the level that marks cracked material for the crack tip;
	// 0 means FFront.
	FTip float64
	// Tips are the initial crack tips; one Growth is returned for each.
	Tips []Tip
	// CrackLabel names the boundary label of crack faces made by removing
	// broken material; their nodes ahead of an initial tip count as cracked.
	// "" means "crack". A mesh without the label is fine.
	CrackLabel string
	// MaxGap is the longest stretch of uncracked material a crack path may
	// bridge (a damage zone that starts a little ahead of the blunted tip);
	// 0 means twice the longest element edge at the initial tip.
	MaxGap float64
}

// FrontLevel is the porosity on the damage front of a material whose
// coalescence starts at fc: 2·fc, the edge of the localisation band
// (common practice). The trigger watches the same contour.
func FrontLevel(fc float64) float64 { return 2 * fc }

func (o *FrontOptions) levels() (front, tip float64) {
	front, tip = o.FFront, o.FTip
	if front == 0 {
		front = FrontLevel(o.Fc)
	}
	if tip == 0 {
		tip = front
	}
	return front, tip
}

// Validate checks the options on their own.
func (o *FrontOptions) Validate() error {
	if o.Fc < 0 || math.IsNaN(o.Fc) {
		return fmt.Errorf("damage front: critical porosity Fc = %g must be ≥ 0", o.Fc)
	}
	front, tip := o.levels()
	if !(front > 0 && front < 1) {
		return fmt.Errorf("damage front: front level f_front = %g must lie in (0, 1) (set FFront, or Fc for the default 2·Fc)", front)
	}
	if !(tip > 0 && tip < 1) {
		return fmt.Errorf("damage front: tip level f_tip = %g must lie in (0, 1)", tip)
	}
	if o.MaxGap < 0 || math.IsNaN(o.MaxGap) || math.IsInf(o.MaxGap, 0) {
		return fmt.Errorf("damage front: MaxGap = %g must be finite and ≥ 0", o.MaxGap)
	}
	if len(o.Tips) == 0 {
		return fmt.Errorf("damage front: no initial crack tip given")
	}
	for i, s := range o.Tips {
		if d := math.Hypot(s.Dir[0], s.Dir[1]); !(d > 0) || math.IsInf(d, 0) {
			return fmt.Errorf("damage front: initial tip %d has crack direction %v; need a finite non-zero vector", i, s.Dir)
		}
		if math.IsNaN(s.X[0]+s.X[1]) || math.IsInf(s.X[0]+s.X[1], 0) {
			return fmt.Errorf("damage front: initial tip %d position %v must be finite", i, s.X)
		}
	}
	return nil
}

// Growth is how far one crack tip has grown: the located tip (its Dir
// along the last part of the path, see pathDirection) and the path to it.
type Growth struct {
	Tip            // current tip (reference configuration)
	Seed   int     // index of the initial tip in FrontOptions.Tips
	DA     float64 // crack extension Δa along the path from the initial tip
	DAProj float64 // Δa projected on the initial crack direction
	// DAFront is Δa to the damage front interpolated inside the elements:
	// Path's length to the start A of its last leg plus the distance from
	// A to the point of the contour f = f_tip seen head-on from A (see
	// frontExtension). It moves continuously as porosity grows between
	// nodes; 0 when not Grown.
	DAFront float64
	// Path is the crack path from the initial tip to X (a polyline with
	// the mesh zigzag removed), whose length is DA.
	Path [][2]float64
	// Grown is false when no cracked material is connected to the initial
	// tip: X is then the initial tip and Δa = 0.
	Grown bool
}

// Front is the result of LocateFront.
type Front struct {
	Level float64        // the contour level f_front
	Lines [][][2]float64 // the contour f = f_front as polylines, the longest first; a closed line repeats its first point at the end
	Nodal []float64      // recovered porosity at every node
	Tips  []Growth       // one per initial tip
}

// subTri are the four linear sub-triangles of a 6-node triangle (local
// node indices, counter-clockwise).
var subTri = [4][3]int{{0, 3, 5}, {3, 1, 4}, {5, 4, 2}, {3, 4, 5}}

// RecoverNodal returns the porosity at every node of m recovered from the
// Gauss points: in each element a linear least-squares fit of the Gauss-
// point values (local smoothing, Hinton & Campbell 1974, IJNME 8) evaluated
// at its six nodes, then the area-weighted mean over the elements around
// each node (common practice). A linear fit overshoots less than a
// quadratic extrapolation from the Gauss points would.
func RecoverNodal(m *fem.Mesh, gp *fem.GaussPoints) ([]float64, error) {
	if err := checkGauss(m, gp, "porosity recovery"); err != nil {
		return nil, err
	}
	rule := fem.ElementRule()
	sum := make([]float64, len(m.X))
	wsum := make([]float64, len(m.X))
	// Normal equations of the fit f ≈ c₀ + c₁L₁ + c₂L₂ depend only on the rule.
	var A [3][3]float64
	for i := 0; i < rule.Len(); i++ {
		b := [3]float64{1, rule.L[i][0], rule.L[i][1]}
		for r := 0; r < 3; r++ {
			for c := 0; c < 3; c++ {
				A[r][c] += b[r] * b[c]
			}
		}
	}
	inv, det, ok := plane.Inverse3(A)
	if !ok || math.Abs(det) < 1e-14 {
		return nil, fmt.Errorf("porosity recovery: the element rule's points are collinear")
	}
	nodeL := [6][2]float64{{1, 0}, {0, 1}, {0, 0}, {0.5, 0.5}, {0, 0.5}, {0.5, 0}}
	for e, t := range m.Tri {
		var rhs [3]float64
		for i := 0; i < rule.Len(); i++ {
			f := gp.At(e, i).State.F
			if math.IsNaN(f) || math.IsInf(f, 0) {
				return nil, fmt.Errorf("porosity recovery: triangle %d Gauss point %d has porosity %g", e, i, f)
			}
			rhs[0] += f
			rhs[1] += f * rule.L[i][0]
			rhs[2] += f * rule.L[i][1]
		}
		var c [3]float64
		for r := 0; r < 3; r++ {
			c[r] = inv[r][0]*rhs[0] + inv[r][1]*rhs[1] + inv[r][2]*rhs[2]
		}
		a, b, cc := m.X[t[0]], m.X[t[1]], m.X[t[2]]
		area := math.Abs(0.5 * ((b[0]-a[0])*(cc[1]-a[1]) - (cc[0]-a[0])*(b[1]-a[1])))
		for k, n := range t {
			sum[n] += area * (c[0] + c[1]*nodeL[k][0] + c[2]*nodeL[k][1])
			wsum[n] += area
		}
	}
	for n := range sum {
		if wsum[n] > 0 {
			sum[n] /= wsum[n]
		}
	}
	return sum, nil
}

// LocateFront finds the damage front and the crack tip(s).
//
// The porosity is recovered to the nodes (RecoverNodal) and treated as
// linear on the four sub-triangles of each 6-node triangle. The front is the
// contour f = f_front on them (marching triangles), joined into polylines.
//
// The crack tip of each initial tip is the point of {f ≥ f_tip} farthest
// along the crack path. Cracked nodes are those with f ≥ f_tip and the
// nodes of crack faces (CrackLabel) ahead of an initial tip. A shortest-path
// search (Dijkstra 1959, Numer. Math. 1) runs from all initial tips at once
// over the sub-triangle edges: edges between cracked nodes cost their
// length, edges that bridge uncracked material cost 20 times their length
// and may add up to at most MaxGap along a path. Each node goes to the tip
// that reaches it first, so several tips share cracked material by nearest
// path and each gets its own crack tip. Candidate tips are the cracked
// nodes ahead of the initial tip ((X − X₀)·d₀ ≥ 0, so damage on the flanks
// behind a blunting notch is not growth) and the points beyond them where
// f falls through f_tip along an edge. Their paths are freed of the mesh
// zigzag (Douglas & Peucker 1973, Cartographica 10, tolerance half the mean
// edge length along the path) and the longest few are pulled taut inside
// the cracked material (sampled straight-line visibility); the longest taut
// path wins. Δa is its length — the shortest route through the cracked
// material, so a turning path cuts its inside corner by up to half the band
// width — and DAProj = (X − X₀)·d₀ its projection on the initial direction.
// DAFront measures the same path to the contour f = f_tip instead of to the
// chosen point X (frontExtension).
//
// Cost: about 0.13 s for 10⁵ elements (BenchmarkLocateFront).
func LocateFront(m *fem.Mesh, gp *fem.GaussPoints, opt FrontOptions) (*Front, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	fn, err := RecoverNodal(m, gp)
	if err != nil {
		return nil, fmt.Errorf("damage front: %w", err)
	}
	level, ftip := opt.levels()
	fr := &Front{Level: level, Nodal: fn}
	fr.Lines = contour(m, fn, level)
	sortLines(fr.Lines)
	tipLines := fr.Lines
	if ftip != level {
		tipLines = contour(m, fn, ftip)
	}
	fr.Tips = locateTips(m, fn, ftip, opt, tipLines)
	return fr, nil
}

type edgeKey struct{ a, b int }

func mkKey(a, b int) edgeKey {
	if a > b {
		a, b = b, a
	}
	return edgeKey{a, b}
}

// contour returns the polylines of f = c on the sub-triangles of m.
func contour(m *fem.Mesh, f []float64, c float64) [][][2]float64 {
	type seg struct{ k [2]edgeKey }
	var segs []seg
	pts := map[edgeKey][2]float64{}
	for _, t := range m.Tri {
		for _, st := range subTri {
			n := [3]int{t[st[0]], t[st[1]], t[st[2]]}
			var cut []edgeKey
			for j := 0; j < 3; j++ {
				a, b := n[j], n[(j+1)%3]
				if (f[a] >= c) == (f[b] >= c) {
					continue
				}
				k := mkKey(a, b)
				if _, ok := pts[k]; !ok {
					s := (c - f[k.a]) / (f[k.b] - f[k.a])
					xa, xb := m.X[k.a], m.X[k.b]
					pts[k] = [2]float64{xa[0] + s*(xb[0]-xa[0]), xa[1] + s*(xb[1]-xa[1])}
				}
				cut = append(cut, k)
			}
			if len(cut) == 2 {
				segs = append(segs, seg{[2]edgeKey{cut[0], cut[1]}})
			}
		}
	}
	// Join segments that share a cut edge.
	at := map[edgeKey][]int{}
	for i, s := range segs {
		at[s.k[0]] = append(at[s.k[0]], i)
		at[s.k[1]] = append(at[s.k[1]], i)
	}
	used := make([]bool, len(segs))
	next := func(k edgeKey) (int, bool) {
		for _, i := range at[k] {
			if !used[i] {
				return i, true
			}
		}
		return 0, false
	}
	// walk extends from key k until no unused segment continues.
	walk := func(k edgeKey) []edgeKey {
		var ks []edgeKey
		for {
			i, ok := next(k)
			if !ok {
				return ks
			}
			used[i] = true
			if segs[i].k[0] == k {
				k = segs[i].k[1]
			} else {
				k = segs[i].k[0]
			}
			ks = append(ks, k)
		}
	}
	var lines [][][2]float64
	for i := range segs {
		if used[i] {
			continue
		}
		used[i] = true
		fwd := walk(segs[i].k[1])
		bwd := walk(segs[i].k[0])
		keys := make([]edgeKey, 0, len(fwd)+len(bwd)+2)
		for j := len(bwd) - 1; j >= 0; j-- {
			keys = append(keys, bwd[j])
		}
		keys = append(keys, segs[i].k[0], segs[i].k[1])
		keys = append(keys, fwd...)
		line := make([][2]float64, len(keys))
		for j, k := range keys {
			line[j] = pts[k]
		}
		lines = append(lines, line)
	}
	return lines
}

// bridgeCost is the cost factor of an edge through uncracked material.
const bridgeCost = 20

type pqItem struct {
	n    int
	cost float64
}
type pq []pqItem

func (p pq) Len() int            { return len(p) }
func (p pq) Less(i, j int) bool  { return p[i].cost < p[j].cost }
func (p pq) Swap(i, j int)       { p[i], p[j] = p[j], p[i] }
func (p *pq) Push(x interface{}) { *p = append(*p, x.(pqItem)) }
func (p *pq) Pop() interface{} {
	old := *p
	it := old[len(old)-1]
	*p = old[:len(old)-1]
	return it
}

// locateTips runs the multi-source shortest-path search and picks the tips;
// lines are the contour f = f_tip, which set each tip's DAFront.
func locateTips(m *fem.Mesh, f []float64, ftip float64, opt FrontOptions, lines [][][2]float64) []Growth {
	g := newSubEdgeGraph(m)
	used := usedNodes(m)
	// Lengths below tol (relative to the mesh size) are round-off: a node of
	// a blunt tip's surface a hair ahead of the apex is not growth.
	tol := 1e-9 * boundingDiagonal(m, used)
	cracked := crackedNodes(m, f, ftip, used, tol, opt)
	paths := searchCrackPaths(m, g, used, cracked, opt)
	tips := make([]Growth, len(opt.Tips))
	for s, sd := range opt.Tips {
		tips[s] = Growth{Tip: sd, Seed: s, Path: [][2]float64{sd.X}}
	}
	cands := tipCandidates(m, g, f, ftip, cracked, paths.owner, paths.glen, opt.Tips)
	vis := visibility(m, f, ftip, cracked)
	for s, cs := range cands {
		if len(cs) == 0 {
			continue
		}
		best := longestTautPath(m, paths.parent, cs, s, opt.Tips[s], vis)
		best.DAProj = along(opt.Tips[s], best.X)
		if best.DA > tol {
			best.Dir = pathDirection(best.Path, best.DA, opt.Tips[s].Dir)
			best.DAFront = frontExtension(lines, best.Path, paths.maxGap[s])
			tips[s] = best
		}
	}
	return tips
}

// forEachSubEdge calls fn(a, b) for every edge a→b of the sub-triangles of
// every element of m, element by element (an edge shared by two
// sub-triangles comes once from each).
func forEachSubEdge(m *fem.Mesh, fn func(a, b int)) {
	for _, t := range m.Tri {
		for _, st := range subTri {
			for j := 0; j < 3; j++ {
				fn(t[st[j]], t[st[(j+1)%3]])
			}
		}
	}
}

// subEdgeGraph is the node adjacency along the sub-triangle edges of a
// mesh in compressed rows: the neighbours of node n are
// list[start[n]:start[n+1]]. An edge shared by two elements appears twice,
// which is harmless to a shortest-path search.
type subEdgeGraph struct{ start, list []int }

// newSubEdgeGraph returns the sub-triangle edge adjacency of m.
func newSubEdgeGraph(m *fem.Mesh) subEdgeGraph {
	nn := len(m.X)
	start := make([]int, nn+1)
	forEachSubEdge(m, func(a, b int) {
		start[a+1]++
		start[b+1]++
	})
	for i := 0; i < nn; i++ {
		start[i+1] += start[i]
	}
	list := make([]int, start[nn])
	fill := append([]int(nil), start[:nn]...)
	forEachSubEdge(m, func(a, b int) {
		list[fill[a]] = b
		fill[a]++
		list[fill[b]] = a
		fill[b]++
	})
	return subEdgeGraph{start, list}
}

// adj returns the neighbours of node n.
func (g subEdgeGraph) adj(n int) []int { return g.list[g.start[n]:g.start[n+1]] }

// usedNodes marks the nodes of m that belong to some element.
func usedNodes(m *fem.Mesh) []bool {
	used := make([]bool, len(m.X))
	for _, t := range m.Tri {
		for _, n := range t {
			used[n] = true
		}
	}
	return used
}

// boundingDiagonal returns the diagonal of the bounding box of the used
// nodes of m: the mesh size that round-off is measured against.
func boundingDiagonal(m *fem.Mesh, used []bool) float64 {
	lo := [2]float64{math.Inf(1), math.Inf(1)}
	hi := [2]float64{math.Inf(-1), math.Inf(-1)}
	for n, x := range m.X {
		if used[n] {
			lo = [2]float64{math.Min(lo[0], x[0]), math.Min(lo[1], x[1])}
			hi = [2]float64{math.Max(hi[0], x[0]), math.Max(hi[1], x[1])}
		}
	}
	return plane.Dist(lo, hi)
}

// along returns how far x lies ahead of the initial tip s along its crack
// direction: (x − X₀)·d₀.
func along(s Tip, x [2]float64) float64 {
	d, _ := frame(s.Dir)
	return (x[0]-s.X[0])*d[0] + (x[1]-s.X[1])*d[1]
}

// crackedNodes marks the cracked nodes: used nodes with f ≥ f_tip, and the
// nodes of crack faces (opt.CrackLabel) more than tol ahead of some
// initial tip.
func crackedNodes(m *fem.Mesh, f []float64, ftip float64, used []bool, tol float64, opt FrontOptions) []bool {
	nn := len(m.X)
	cracked := make([]bool, nn)
	for n := range f {
		cracked[n] = used[n] && f[n] >= ftip
	}
	label := opt.CrackLabel
	if label == "" {
		label = "crack"
	}
	li := m.Label(label)
	if li < 0 {
		return cracked
	}
	for _, ed := range m.Boundary {
		if ed.Label != li {
			continue
		}
		for _, n := range [3]int{ed.A, ed.Mid, ed.B} {
			if n < 0 || n >= nn {
				continue
			}
			for _, s := range opt.Tips {
				if along(s, m.X[n]) > tol {
					cracked[n] = true
				}
			}
		}
	}
	return cracked
}

// crackPaths is the outcome of the shortest-path search from all initial
// tips at once, node by node.
type crackPaths struct {
	cost   []float64 // path cost: length, times bridgeCost through uncracked material
	glen   []float64 // path length
	gap    []float64 // path length through uncracked material
	owner  []int     // the initial tip whose search reached the node first; -1 for none
	parent []int     // the previous node on the path; -1 at a seed and for none
	seed   []int     // the node nearest each initial tip
	maxGap []float64 // the longest gap each initial tip's paths may bridge
}

// searchCrackPaths runs the shortest-path search (Dijkstra 1959, Numer.
// Math. 1) over the sub-triangle edges from the nodes nearest the initial
// tips; see LocateFront for the costs.
func searchCrackPaths(m *fem.Mesh, g subEdgeGraph, used, cracked []bool, opt FrontOptions) *crackPaths {
	nn := len(m.X)
	p := &crackPaths{
		cost:   make([]float64, nn),
		glen:   make([]float64, nn),
		gap:    make([]float64, nn),
		owner:  make([]int, nn),
		parent: make([]int, nn),
		seed:   make([]int, len(opt.Tips)),
		maxGap: make([]float64, len(opt.Tips)),
	}
	for i := range p.cost {
		p.cost[i] = math.Inf(1)
		p.owner[i] = -1
		p.parent[i] = -1
	}
	h := &pq{}
	for s, sd := range opt.Tips {
		best, bd := nearestNode(m, used, sd.X)
		p.seed[s] = best
		p.maxGap[s] = opt.MaxGap
		if p.maxGap[s] == 0 {
			for _, b := range g.adj(best) {
				// a sub-edge is half an element edge: 2 element edges = 4 sub-edges.
				p.maxGap[s] = math.Max(p.maxGap[s], 4*plane.Dist(m.X[best], m.X[b]))
			}
		}
		if bd < p.cost[best] {
			p.cost[best] = bd
			p.glen[best] = 0
			p.owner[best] = s
			heap.Push(h, pqItem{best, bd})
		}
	}
	p.relax(m, g, cracked, h)
	return p
}

// nearestNode returns the used node of m nearest x and its distance.
func nearestNode(m *fem.Mesh, used []bool, x [2]float64) (int, float64) {
	best, bd := -1, math.Inf(1)
	for n := 0; n < len(m.X); n++ {
		if used[n] {
			if d := plane.Dist(m.X[n], x); d < bd {
				best, bd = n, d
			}
		}
	}
	return best, bd
}

// relax runs the search from the seeds in h until h is empty. A seed node
// counts as cracked for the edges that leave it.
func (p *crackPaths) relax(m *fem.Mesh, g subEdgeGraph, cracked []bool, h *pq) {
	isCracked := func(n int) bool {
		return cracked[n] || (p.owner[n] >= 0 && n == p.seed[p.owner[n]])
	}
	for h.Len() > 0 {
		it := heap.Pop(h).(pqItem)
		a := it.n
		if it.cost > p.cost[a] {
			continue
		}
		for _, b := range g.adj(a) {
			l := plane.Dist(m.X[a], m.X[b])
			c, gp := l, p.gap[a]
			if !(isCracked(a) && cracked[b]) {
				c *= bridgeCost
				gp += l
			}
			if gp > p.maxGap[p.owner[a]] {
				continue
			}
			if p.cost[a]+c < p.cost[b] {
				p.cost[b] = p.cost[a] + c
				p.glen[b] = p.glen[a] + l
				p.gap[b] = gp
				p.owner[b] = p.owner[a]
				p.parent[b] = a
				heap.Push(h, pqItem{b, p.cost[b]})
			}
		}
	}
}

// tipCandidate is a candidate crack tip: the point x reached through node
// with a graph path of length len.
type tipCandidate struct {
	node int
	x    [2]float64
	len  float64
}

// tipCandidates returns the candidate tips of each initial tip: its cracked
// nodes ahead of it, and the points beyond them where f falls through f_tip
// along an edge (linear on the sub-triangles). glen is the graph path
// length of each node and owner its initial tip.
func tipCandidates(m *fem.Mesh, g subEdgeGraph, f []float64, ftip float64, cracked []bool, owner []int, glen []float64, tips []Tip) [][]tipCandidate {
	cands := make([][]tipCandidate, len(tips))
	for a := 0; a < len(m.X); a++ {
		s := owner[a]
		if s < 0 || !cracked[a] || !(along(tips[s], m.X[a]) >= 0) {
			continue
		}
		cands[s] = append(cands[s], tipCandidate{a, m.X[a], glen[a]})
		if f[a] < ftip {
			continue // cracked by the crack-face label only
		}
		for _, b := range g.adj(a) {
			if f[b] >= ftip || cracked[b] {
				continue
			}
			sf := (f[a] - ftip) / (f[a] - f[b])
			xa, xb := m.X[a], m.X[b]
			x := [2]float64{xa[0] + sf*(xb[0]-xa[0]), xa[1] + sf*(xb[1]-xa[1])}
			cands[s] = append(cands[s], tipCandidate{a, x, glen[a] + plane.Dist(x, xa)})
		}
	}
	return cands
}

// longestTautPath picks the crack tip of the initial tip sd (index s) among
// its candidates cs, which it sorts. The graph length over-estimates the
// path by the mesh zigzag, so it only pre-selects: the candidates within
// 15% of the longest are ranked by the length of their simplified path,
// and the 48 longest of those are pulled taut inside the cracked material
// (vis); the longest taut path wins. DAProj and Dir are left to the caller.
func longestTautPath(m *fem.Mesh, parent []int, cs []tipCandidate, s int, sd Tip, vis func(p, q [2]float64) bool) Growth {
	sort.Slice(cs, func(i, j int) bool { return cs[i].len > cs[j].len })
	type ranked struct {
		c    tipCandidate
		path [][2]float64
		len  float64
	}
	var rs []ranked
	for i, c := range cs {
		if i >= 400 || c.len < 0.85*cs[0].len {
			break
		}
		path := tipPath(m, parent, c.node, c.x, sd.X)
		rs = append(rs, ranked{c, path, polyLength(path)})
	}
	sort.Slice(rs, func(i, j int) bool { return rs[i].len > rs[j].len })
	var best Growth
	for i, r := range rs {
		if i >= 48 {
			break
		}
		path := pullTaut(r.path, vis)
		if l := polyLength(path); l > best.DA || i == 0 {
			best = Growth{Tip: Tip{Name: sd.Name, X: r.c.x}, Seed: s, DA: l, Path: path, Grown: true}
		}
	}
	return best
}

// tipPath returns the simplified crack path from the initial tip sx through
// the shortest-path chain ending at node to the tip point x.
func tipPath(m *fem.Mesh, parent []int, node int, x, sx [2]float64) [][2]float64 {
	chain := [][2]float64{}
	if x != m.X[node] {
		chain = append(chain, x)
	}
	for n := node; n >= 0; n = parent[n] {
		chain = append(chain, m.X[n])
	}
	// Start at the initial tip itself rather than its nearest node.
	if chain[len(chain)-1] != sx {
		chain = append(chain, sx)
	}
	for i, j := 0, len(chain)-1; i < j; i, j = i+1, j-1 {
		chain[i], chain[j] = chain[j], chain[i]
	}
	tol := 0.0
	if len(chain) > 1 {
		tol = 0.5 * polyLength(chain) / float64(len(chain)-1)
	}
	return plane.Simplify(chain, tol)
}

func polyLength(p [][2]float64) float64 {
	l := 0.0
	for i := 1; i < len(p); i++ {
		l += plane.Dist(p[i-1], p[i])
	}
	return l
}

// visibility returns a test whether the straight segment p–q runs through
// cracked material only: sample points every quarter of the shortest
// sub-edge must have f ≥ f_tip (linear on the sub-triangles), lie in an
// element with a cracked node on a crack face, or lie outside the mesh
// (the void of removed broken material).
func visibility(m *fem.Mesh, f []float64, ftip float64, cracked []bool) func(p, q [2]float64) bool {
	loc := m.CornerLocator()
	hmin := math.Inf(1)
	forEachSubEdge(m, func(a, b int) {
		if d := plane.Dist(m.X[a], m.X[b]); d > 0 {
			hmin = math.Min(hmin, d)
		}
	})
	step := hmin / 4
	return func(p, q [2]float64) bool {
		n := int(math.Ceil(plane.Dist(p, q) / step))
		for k := 1; k < n; k++ {
			s := float64(k) / float64(n)
			x := [2]float64{p[0] + s*(q[0]-p[0]), p[1] + s*(q[1]-p[1])}
			// the lowest-numbered triangle within round-off (1e-12 in area
			// coordinates), so a point on a shared edge takes one side
			e, l, ok := loc.FindFirst(x, 1e-12)
			if !ok {
				continue
			}
			t := m.Tri[e]
			var v [6]float64
			for a, nd := range t {
				v[a] = f[nd]
				if cracked[nd] && f[nd] < ftip {
					v[a] = ftip // crack-face node
				}
			}
			if subLinear(v, l) < ftip {
				return false
			}
		}
		return true
	}
}

// subLinear interpolates nodal values v of a 6-node triangle linearly on
// the sub-triangle that contains the area coordinates l.
func subLinear(v [6]float64, l [3]float64) float64 {
	switch {
	case l[0] >= 0.5:
		return v[0]*(2*l[0]-1) + v[3]*2*l[1] + v[5]*2*l[2]
	case l[1] >= 0.5:
		return v[1]*(2*l[1]-1) + v[3]*2*l[0] + v[4]*2*l[2]
	case l[2] >= 0.5:
		return v[2]*(2*l[2]-1) + v[4]*2*l[1] + v[5]*2*l[0]
	}
	return v[3]*(1-2*l[2]) + v[4]*(1-2*l[0]) + v[5]*(1-2*l[1])
}

// pullTaut shortens a polyline greedily: from each kept point it jumps to
// the farthest later point it sees in a straight line (string pulling, as
// in shortest paths in polygons, Lee & Preparata 1984, Networks 14). The
// farthest visible point is found by bisection, which assumes that along a
// path through a band what is seen from a point is a stretch of the path
// that starts at it (true for a convex stretch of band, close enough for a
// path that turns over many elements).
func pullTaut(p [][2]float64, visible func(a, b [2]float64) bool) [][2]float64 {
	if len(p) < 3 {
		return p
	}
	out := [][2]float64{p[0]}
	i := 0
	for i < len(p)-1 {
		j := i + 1 // always visible: a path edge
		if visible(p[i], p[len(p)-1]) {
			j = len(p) - 1
		} else {
			lo, hi := i+1, len(p)-1 // lo visible, hi not
			for hi-lo > 1 {
				mid := (lo + hi) / 2
				if visible(p[i], p[mid]) {
					lo = mid
				} else {
					hi = mid
				}
			}
			j = lo
		}
		out = append(out, p[j])
		i = j
	}
	return out
}

// sortLines orders polylines by their number of points, longest first, so
// that the main front comes first.
func sortLines(lines [][][2]float64) {
	sort.SliceStable(lines, func(i, j int) bool { return len(lines[i]) > len(lines[j]) })
}
