package geom

import (
	"fmt"
	"math"
	"sort"
	"tearline/solver/plane"

	"github.com/tidwall/rtree"
)

// MinFeature is the smallest feature allowed relative to the local mesh
// size: a piece shorter than MinFeature·h, or a gap between a vertex and a
// piece narrower than that, is an error (it would force a refinement many
// orders of magnitude below the requested size).
const MinFeature = 1e-3

// MaxArcChordDeg is the largest angle in degrees that one boundary chord of
// an arc may subtend, however coarse the size field.
const MaxArcChordDeg = 22.5

// maxBoundaryPoints bounds the boundary discretisation.
const maxBoundaryPoints = 20_000_000

// PSLG is a planar straight-line graph: the input of a constrained Delaunay
// triangulation. Its first four fields have the names and types of the
// triangulator's input (remesh/tri.Input).
type PSLG struct {
	Points   [][2]float64
	Segments [][2]int
	// SegmentMarks holds, for each segment, the global index + 1 of the
	// piece it lies on (see Domain.Piece and Domain.PieceOfMark).
	SegmentMarks []int
	// Holes holds one point inside each hole.
	Holes [][2]float64
	// Named maps every named point that is not a reference point to its
	// index in Points.
	Named map[string]int
}

// PieceOfMark returns the piece a segment mark refers to, or nil.
func (d *Domain) PieceOfMark(mark int) *Piece {
	p, _, _ := d.Piece(mark - 1)
	return p
}

// Split is the triangulator's split rule: the point that halves the
// boundary segment a–b with the given mark, on the arc for arc pieces.
func (d *Domain) Split(mark int, a, b [2]float64) [2]float64 {
	p := d.PieceOfMark(mark)
	if p == nil {
		return [2]float64{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}
	}
	return p.Split(a, b)
}

// Discretise validates the domain and splits its pieces into segments of
// about the local size h (arcs into chords on the arc, each at most
// MaxArcChordDeg), inserting every named point that is not a reference point
// as a vertex (on the piece it lies on, or free inside the domain). h must
// be positive and finite wherever it is evaluated.
func (d *Domain) Discretise(h func(x, y float64) float64) (*PSLG, error) {
	if h == nil {
		return nil, fmt.Errorf("geometry: no size function given")
	}
	if err := d.Validate(); err != nil {
		return nil, err
	}
	tol := RelTol * d.Scale()
	size := func(x [2]float64) (float64, error) {
		v := h(x[0], x[1])
		if !(v > 0) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("geometry: the mesh size at (%g, %g) is %g; it must be positive and finite", x[0], x[1], v)
		}
		return v, nil
	}
	if err := d.checkFeatures(size, tol); err != nil {
		return nil, err
	}
	np := d.NumPieces()
	minN := make([]int, np)
	for try := 0; ; try++ {
		out, crossing, err := d.discretise(size, tol, minN, try < 8)
		if err != nil {
			return nil, err
		}
		if crossing == nil {
			return out, nil
		}
		if try >= 16 {
			return nil, fmt.Errorf("geometry: the boundary chords of %s and %s still cross after refining the arcs; the arcs come too close to other pieces", crossing[0], crossing[1])
		}
	}
}

// checkFeatures rejects pieces and gaps smaller than MinFeature·h.
func (d *Domain) checkFeatures(size func([2]float64) (float64, error), tol float64) error {
	loops := d.Loops()
	for k, l := range loops {
		for i := range l {
			p := &l[i]
			m := p.At(0.5)
			hm, err := size(m)
			if err != nil {
				return err
			}
			if L := p.Length(); L < MinFeature*hm {
				return fmt.Errorf("geometry: %s is %g long, smaller than %g × the mesh size %g there; enlarge or remove the feature, or refine the size field there",
					pieceName(k, i, p), L, MinFeature, hm)
			}
		}
	}
	type vtx struct {
		x    [2]float64
		name string
	}
	var vs []vtx
	for k, l := range loops {
		for i := range l {
			vs = append(vs, vtx{l[i].A, fmt.Sprintf("the vertex at the start of %s", pieceName(k, i, &l[i]))})
		}
	}
	for _, n := range d.freeNames() {
		vs = append(vs, vtx{d.Points[n].X, fmt.Sprintf("point %q", n)})
	}
	tr, refs := d.pieceTree()
	for _, v := range vs {
		hv, err := size(v.x)
		if err != nil {
			return err
		}
		lim := MinFeature * hv
		var ferr error
		tr.Search([2]float64{v.x[0] - lim, v.x[1] - lim}, [2]float64{v.x[0] + lim, v.x[1] + lim}, func(_, _ [2]float64, j int) bool {
			r := refs[j]
			p := r.p
			if plane.Dist(p.A, v.x) <= tol || plane.Dist(p.B, v.x) <= tol {
				return true
			}
			if dd := p.Distance(v.x); dd > tol && dd < lim {
				ferr = fmt.Errorf("geometry: %s at (%g, %g) is %g from %s, closer than %g × the mesh size %g there; widen the gap or merge the points",
					v.name, v.x[0], v.x[1], dd, pieceName(r.loop, r.i, p), MinFeature, hv)
				return false
			}
			return true
		})
		if ferr != nil {
			return ferr
		}
	}
	return nil
}

// pieceTree returns an R-tree of the pieces' bounding boxes (data: the
// global piece index into the returned references).
func (d *Domain) pieceTree() (*rtree.RTreeG[int], []pieceRef) {
	var tr rtree.RTreeG[int]
	var refs []pieceRef
	for k, l := range d.Loops() {
		for i := range l {
			p := &l[i]
			lo, hi := p.box()
			tr.Insert(lo, hi, len(refs))
			refs = append(refs, pieceRef{k, i, p, lo, hi})
		}
	}
	return &tr, refs
}

// divisions returns the interior fractions t ∈ (0, 1) that split piece p
// into about ∫ds/h segments of equal size-weighted length (at least n0).
func divisions(p *Piece, size func([2]float64) (float64, error), n0 int, ta, tb float64) ([]float64, error) {
	L := p.Length() * (tb - ta)
	m := 32
	var cum []float64
	var n int
	for {
		cum = make([]float64, m+1)
		for j := 0; j < m; j++ {
			hv, err := size(p.At(ta + (tb-ta)*(float64(j)+0.5)/float64(m)))
			if err != nil {
				return nil, err
			}
			cum[j+1] = cum[j] + L/float64(m)/hv
		}
		I := cum[m]
		n = int(math.Ceil(I * (1 - 1e-9)))
		if n < n0 {
			n = n0
		}
		if n < 1 {
			n = 1
		}
		if n > maxBoundaryPoints {
			return nil, fmt.Errorf("geometry: piece %q would need %d boundary points; the mesh size is too small for the domain", p.Label, n)
		}
		if 4*n <= m || m >= 1<<22 {
			break
		}
		m = 8 * n
	}
	ts := make([]float64, 0, n-1)
	I := cum[m]
	j := 0
	for k := 1; k < n; k++ {
		target := I * float64(k) / float64(n)
		for j < m && cum[j+1] < target {
			j++
		}
		if j >= m {
			j = m - 1
		}
		f := 0.0
		if w := cum[j+1] - cum[j]; w > 0 {
			f = (target - cum[j]) / w
		}
		ts = append(ts, ta+(tb-ta)*(float64(j)+f)/float64(m))
	}
	return ts, nil
}

// discretise builds the PSLG with at least minN[g] segments on piece g. It
// returns the names of two pieces whose chords cross (after doubling minN
// for the arcs among them) instead of a PSLG when that happens.
func (d *Domain) discretise(size func([2]float64) (float64, error), tol float64, minN []int, clearance bool) (*PSLG, []string, error) {
	b := boundaryBuilder{d: d, size: size, tol: tol, out: &PSLG{Named: map[string]int{}}, names: d.freeNames(), placed: map[string]bool{}}
	g := 0
	loopStart := make([]int, 0, 1+len(d.Holes))
	for _, l := range d.Loops() {
		loopStart = append(loopStart, len(b.out.Points))
		first := len(b.out.Points)
		for i := range l {
			if err := b.addPiece(&l[i], g, minN[g]); err != nil {
				return nil, nil, err
			}
			g++
		}
		// close the loop
		b.out.Segments[len(b.out.Segments)-1][1] = first
	}
	b.addFreePoints()
	out := b.out
	if nm, err := d.growArcs(out, b.owners, tol, minN, clearance); nm != nil || err != nil {
		return nil, nm, err
	}
	if err := d.addHoles(out, loopStart); err != nil {
		return nil, nil, err
	}
	return out, nil, nil
}

// freeNames returns the sorted names of the named points that are not
// reference points: those that become vertices.
func (d *Domain) freeNames() []string {
	names := make([]string, 0, len(d.Points))
	for n, p := range d.Points {
		if !p.Ref {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}

// boundaryBuilder builds the boundary of a PSLG piece by piece.
type boundaryBuilder struct {
	d      *Domain
	size   func([2]float64) (float64, error)
	tol    float64
	out    *PSLG
	names  []string        // the named points that become vertices, sorted
	placed map[string]bool // named points placed on the boundary
	owners []int           // global piece of each segment
}

// namedParam is a named point on a piece at parameter t.
type namedParam struct {
	t    float64
	name string
}

// addPiece appends piece p (global index g) from its start point on, as at
// least minN segments, with its named points as vertices.
func (b *boundaryBuilder) addPiece(p *Piece, g, minN int) error {
	out := b.out
	psize := b.size
	if p.Kind == Arc {
		// chords subtend at most MaxArcChordDeg
		hmax := p.Radius * MaxArcChordDeg * math.Pi / 180
		psize = func(x [2]float64) (float64, error) {
			v, err := b.size(x)
			return math.Min(v, hmax), err
		}
	}
	start := len(out.Points)
	out.Points = append(out.Points, p.A)
	onp := b.namedOn(p, start)
	ts, err := stretchDivisions(p, psize, onp, minN)
	if err != nil {
		return err
	}
	for _, t := range ts {
		x := p.At(t)
		for _, q := range onp {
			if q.t == t {
				// Put the named point exactly where it was given.
				x = b.d.Points[q.name].X
				out.Named[q.name] = len(out.Points)
				b.placed[q.name] = true
			}
		}
		out.Points = append(out.Points, x)
	}
	for j := start; j < len(out.Points); j++ {
		out.Segments = append(out.Segments, [2]int{j, j + 1})
		out.SegmentMarks = append(out.SegmentMarks, g+1)
		b.owners = append(b.owners, g)
	}
	if len(out.Points) > maxBoundaryPoints {
		return fmt.Errorf("geometry: the boundary would need more than %d points; the mesh size is too small for the domain", maxBoundaryPoints)
	}
	return nil
}

// namedOn places the unplaced named points at the start of p on its start
// vertex (index start) and returns those inside p, ordered along it. A
// point at the end of p is left to the next piece's start.
func (b *boundaryBuilder) namedOn(p *Piece, start int) []namedParam {
	var onp []namedParam
	for _, n := range b.names {
		x := b.d.Points[n].X
		if b.placed[n] {
			continue
		}
		if plane.Dist(x, p.A) <= b.tol {
			b.out.Named[n] = start
			b.placed[n] = true
			continue
		}
		if plane.Dist(x, p.B) <= b.tol {
			continue // placed as the next piece's start
		}
		if p.Distance(x) <= b.tol {
			onp = append(onp, namedParam{p.param(x), n})
		}
	}
	sort.Slice(onp, func(i, j int) bool { return onp[i].t < onp[j].t })
	return onp
}

// stretchDivisions returns the interior parameters of the vertices of
// piece p: the stretches between its named points onp are divided
// separately (each with its share of minN segments at least), and the
// named points' own parameters are among the results.
func stretchDivisions(p *Piece, psize func([2]float64) (float64, error), onp []namedParam, minN int) ([]float64, error) {
	var ts []float64
	ta := 0.0
	for k := 0; k <= len(onp); k++ {
		tb := 1.0
		if k < len(onp) {
			tb = onp[k].t
		}
		n0 := int(math.Ceil(float64(minN) * (tb - ta)))
		sub, err := divisions(p, psize, n0, ta, tb)
		if err != nil {
			return nil, err
		}
		ts = append(ts, sub...)
		if k < len(onp) {
			ts = append(ts, tb)
		}
		ta = tb
	}
	return ts, nil
}

// addFreePoints adds the named points not on the boundary as free
// vertices.
func (b *boundaryBuilder) addFreePoints() {
	out := b.out
	for _, n := range b.names {
		if !b.placed[n] {
			if _, ok := out.Named[n]; !ok {
				out.Named[n] = len(out.Points)
				out.Points = append(out.Points, b.d.Points[n].X)
			}
		}
	}
}

// growArcs checks the chords of out (owners: the global piece of each
// segment). Chords must not cross (an arc's chord may cut a piece near the
// arc), and, if clearance, an arc's chords must be much closer to the arc
// than any other piece is, so that the triangulator can put every split
// point on the arc. Where they fail, it doubles minN of the arcs involved
// and returns the names of the two crossing pieces (two empty names for a
// crowded arc); nil when the chords pass.
func (d *Domain) growArcs(out *PSLG, owners []int, tol float64, minN []int, clearance bool) ([]string, error) {
	segCount := make([]int, len(minN))
	for _, g := range owners {
		segCount[g]++
	}
	grow := func(g int) bool {
		if p, _, _ := d.Piece(g); p.Kind == Arc {
			minN[g] = 2 * segCount[g]
			return true
		}
		return false
	}
	if a, b, found := crossingSegments(out, tol); found {
		ga, gb := owners[a], owners[b]
		pa, la, ia := d.Piece(ga)
		pb, lb, ib := d.Piece(gb)
		nm := []string{pieceName(la, ia, pa), pieceName(lb, ib, pb)}
		ok1, ok2 := grow(ga), grow(gb)
		if !ok1 && !ok2 {
			return nil, fmt.Errorf("geometry: boundary segments of %s and %s cross", nm[0], nm[1])
		}
		return nm, nil
	}
	if clearance {
		if gs := d.crowdedArcs(out, owners); len(gs) > 0 {
			for _, g := range gs {
				grow(g)
			}
			return []string{"", ""}, nil
		}
	}
	return nil, nil
}

// addHoles adds one point inside each hole's chord polygon; loopStart
// holds the index of the first point of each loop.
func (d *Domain) addHoles(out *PSLG, loopStart []int) error {
	for k := range d.Holes {
		s0 := loopStart[k+1]
		s1 := len(out.Points)
		if k+2 < len(loopStart) {
			s1 = loopStart[k+2]
		}
		poly := out.Points[s0:s1]
		x, ok := insidePoint(poly)
		if !ok {
			return fmt.Errorf("geometry: found no point inside %s", loopName(k+1))
		}
		out.Holes = append(out.Holes, x)
	}
	return nil
}

// crowdedArcs returns the arc pieces that have a chord whose sagitta
// exceeds a tenth of the distance from its arc midpoint to another piece.
func (d *Domain) crowdedArcs(g *PSLG, owners []int) []int {
	tr, refs := d.pieceTree()
	bad := map[int]bool{}
	var out []int
	for s, seg := range g.Segments {
		gi := owners[s]
		if bad[gi] {
			continue
		}
		p := refs[gi].p
		if p.Kind != Arc {
			continue
		}
		a, b := g.Points[seg[0]], g.Points[seg[1]]
		half := 0.5 * plane.Dist(a, b)
		sag := p.Radius - math.Sqrt(math.Max(0, p.Radius*p.Radius-half*half))
		if !(sag > 0) {
			continue
		}
		m := p.Split(a, b)
		reach := 10 * sag
		tr.Search([2]float64{m[0] - reach, m[1] - reach}, [2]float64{m[0] + reach, m[1] + reach}, func(_, _ [2]float64, j int) bool {
			if j != gi && refs[j].p.Distance(m) < reach {
				bad[gi] = true
				out = append(out, gi)
				return false
			}
			return true
		})
	}
	return out
}

// polyWinding returns the winding number of the closed polygon about x.
func polyWinding(poly [][2]float64, x [2]float64) int {
	var tot float64
	for i := range poly {
		a := sub(poly[i], x)
		b := sub(poly[(i+1)%len(poly)], x)
		tot += math.Atan2(cross(a, b), dot(a, b))
	}
	return int(math.Round(tot / (2 * math.Pi)))
}

// insidePoint returns a point strictly inside a clockwise polygon: a point
// a little to the right of one of its edges, checked by winding number and
// kept clear of every edge.
func insidePoint(poly [][2]float64) ([2]float64, bool) {
	n := len(poly)
	for i := 0; i < n; i++ {
		a, b := poly[i], poly[(i+1)%n]
		e := sub(b, a)
		L := math.Hypot(e[0], e[1])
		if L == 0 {
			continue
		}
		nr := [2]float64{e[1] / L, -e[0] / L}
		m := [2]float64{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}
		for eps := 0.25 * L; eps > 1e-6*L; eps *= 0.5 {
			x := [2]float64{m[0] + eps*nr[0], m[1] + eps*nr[1]}
			if polyWinding(poly, x) == 0 {
				continue
			}
			clear := true
			for j := 0; j < n && clear; j++ {
				s := Piece{Kind: Line, A: poly[j], B: poly[(j+1)%n]}
				if s.Distance(x) < 0.25*eps {
					clear = false
				}
			}
			if clear {
				return x, true
			}
		}
	}
	return [2]float64{}, false
}

// crossingSegments reports two segments of the PSLG that cross or touch
// other than at a shared end point.
func crossingSegments(g *PSLG, tol float64) (int, int, bool) {
	type box struct {
		i      int
		lo, hi [2]float64
	}
	bs := make([]box, len(g.Segments))
	for i, s := range g.Segments {
		a, b := g.Points[s[0]], g.Points[s[1]]
		bs[i] = box{i, [2]float64{math.Min(a[0], b[0]) - tol, math.Min(a[1], b[1]) - tol}, [2]float64{math.Max(a[0], b[0]) + tol, math.Max(a[1], b[1]) + tol}}
	}
	sort.Slice(bs, func(a, b int) bool { return bs[a].lo[0] < bs[b].lo[0] })
	for a := range bs {
		for b := a + 1; b < len(bs) && bs[b].lo[0] <= bs[a].hi[0]; b++ {
			if bs[b].lo[1] > bs[a].hi[1] || bs[b].hi[1] < bs[a].lo[1] {
				continue
			}
			sa, sb := g.Segments[bs[a].i], g.Segments[bs[b].i]
			shared := sa[0] == sb[0] || sa[0] == sb[1] || sa[1] == sb[0] || sa[1] == sb[1]
			pts, overlap := segSeg(g.Points[sa[0]], g.Points[sa[1]], g.Points[sb[0]], g.Points[sb[1]], tol)
			if overlap {
				return bs[a].i, bs[b].i, true
			}
			for _, x := range pts {
				if shared {
					near := false
					for _, v := range []int{sa[0], sa[1]} {
						if v == sb[0] || v == sb[1] {
							if plane.Dist(x, g.Points[v]) <= 10*tol {
								near = true
							}
						}
					}
					if near {
						continue
					}
				}
				return bs[a].i, bs[b].i, true
			}
		}
	}
	return 0, 0, false
}
