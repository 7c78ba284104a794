// Package geom describes the 2D domains that tearline meshes: an outer
// loop and holes, each a closed chain of labelled pieces (straight segments
// and circular arcs), with named points (load points, crack tips) attached.
//
// A Domain is validated (closure, orientation, zero-length pieces, arc
// radii, self-intersection, holes inside the outer loop, named points inside
// the domain), its area is exact (arcs included), and Discretise turns it
// into a planar straight-line graph for the triangulator, with marks that
// map every boundary segment back to its piece and a split rule that keeps
// new boundary points on the arcs.
//
// Conventions: the domain lies to the left of every piece, so the outer
// loop runs counter-clockwise and holes run clockwise (Orient normalises a
// domain given the other way round and says what it changed).
//
// The built-in specimens (SSY, CT, NotchedBar, DENT) and the general
// Polygon build Domains from a few parameters:
//
//	d, err := geom.DefaultCT().Domain()
//	if err != nil { … }
//	pslg, err := d.Discretise(func(x, y float64) float64 { return 1 })
package geom

import (
	"fmt"
	"math"
	"sort"
	"tearline/solver/plane"
)

// Kind is the kind of a boundary piece.
type Kind int

const (
	// Line is a straight segment from A to B.
	Line Kind = iota
	// Arc is a circular arc from A to B about Centre with the given Radius,
	// clockwise when CW is set, counter-clockwise otherwise. Its sweep lies
	// in (0, 2π): a full circle is given as two arcs.
	Arc
)

func (k Kind) String() string {
	switch k {
	case Line:
		return "line"
	case Arc:
		return "arc"
	}
	return fmt.Sprintf("kind(%d)", int(k))
}

// Piece is one labelled piece of a boundary loop.
type Piece struct {
	Kind   Kind
	A, B   [2]float64 // start and end point
	Centre [2]float64 // arcs only
	Radius float64    // arcs only
	CW     bool       // arcs only: clockwise from A to B
	Label  string     // boundary label, e.g. "crack", "symmetry"
}

// Loop is a closed chain of pieces: each piece starts where the previous one
// ends and the last ends where the first starts.
type Loop []Piece

// Point is a named point attached to a domain.
type Point struct {
	X [2]float64
	// Tip marks a crack tip: the size field is fine around it and Dir is
	// the direction of crack growth (a unit vector).
	Tip bool
	Dir [2]float64
	// Ref marks a reference point that is not part of the mesh, such as a
	// pin centre inside a pin hole. Other points must lie in the closed
	// domain and become mesh vertices.
	Ref bool
}

// Domain is a 2D region: an outer loop, holes and named points.
type Domain struct {
	Outer Loop
	Holes []Loop
	// Points maps names ("tip", "load", …) to points.
	Points map[string]Point
	// Axisymmetric marks (r, z) coordinates with the axis at r = 0.
	Axisymmetric bool
	// Thickness is the out-of-plane thickness of a plane specimen (0 when
	// not given); it is carried for the force scale and not used here.
	Thickness float64
}

// Loops returns the outer loop followed by the holes.
func (d *Domain) Loops() []Loop {
	return append([]Loop{d.Outer}, d.Holes...)
}

// NumPieces returns the number of pieces of all loops.
func (d *Domain) NumPieces() int {
	n := len(d.Outer)
	for _, h := range d.Holes {
		n += len(h)
	}
	return n
}

// Piece returns the piece with global index i (outer loop first, then the
// holes in order) and its loop and local index.
func (d *Domain) Piece(i int) (p *Piece, loop, local int) {
	if i < 0 {
		return nil, -1, -1
	}
	if i < len(d.Outer) {
		return &d.Outer[i], 0, i
	}
	i -= len(d.Outer)
	for k := range d.Holes {
		if i < len(d.Holes[k]) {
			return &d.Holes[k][i], k + 1, i
		}
		i -= len(d.Holes[k])
	}
	return nil, -1, -1
}

// Labels returns the distinct piece labels in order of first appearance
// (outer loop first).
func (d *Domain) Labels() []string {
	var out []string
	seen := map[string]bool{}
	for _, l := range d.Loops() {
		for _, p := range l {
			if !seen[p.Label] {
				seen[p.Label] = true
				out = append(out, p.Label)
			}
		}
	}
	return out
}

// Tips returns the names of the crack-tip points, sorted.
func (d *Domain) Tips() []string {
	var out []string
	for n, p := range d.Points {
		if p.Tip {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	return out
}

// loopName names loop k for error messages.
func loopName(k int) string {
	if k == 0 {
		return "loop 0 (outer)"
	}
	return fmt.Sprintf("loop %d (hole %d)", k, k)
}

// angleOf returns the polar angle of p about c.
func angleOf(c, p [2]float64) float64 { return math.Atan2(p[1]-c[1], p[0]-c[0]) }

// Sweep returns the signed sweep angle of an arc (positive counter-clockwise),
// in (−2π, 2π); 0 for a line.
func (p *Piece) Sweep() float64 {
	if p.Kind != Arc {
		return 0
	}
	a0, a1 := angleOf(p.Centre, p.A), angleOf(p.Centre, p.B)
	if p.CW {
		s := a0 - a1
		for s <= 0 {
			s += 2 * math.Pi
		}
		for s > 2*math.Pi {
			s -= 2 * math.Pi
		}
		return -s
	}
	s := a1 - a0
	for s <= 0 {
		s += 2 * math.Pi
	}
	for s > 2*math.Pi {
		s -= 2 * math.Pi
	}
	return s
}

// Length returns the length of the piece.
func (p *Piece) Length() float64 {
	if p.Kind == Arc {
		return math.Abs(p.Sweep()) * p.Radius
	}
	return math.Hypot(p.B[0]-p.A[0], p.B[1]-p.A[1])
}

// At returns the point at fraction t ∈ [0, 1] of the piece's length;
// At(0) = A and At(1) = B exactly.
func (p *Piece) At(t float64) [2]float64 {
	if t <= 0 {
		return p.A
	}
	if t >= 1 {
		return p.B
	}
	if p.Kind == Arc {
		a := angleOf(p.Centre, p.A) + t*p.Sweep()
		return [2]float64{p.Centre[0] + p.Radius*math.Cos(a), p.Centre[1] + p.Radius*math.Sin(a)}
	}
	return [2]float64{p.A[0] + t*(p.B[0]-p.A[0]), p.A[1] + t*(p.B[1]-p.A[1])}
}

// Reverse returns the piece run the other way.
func (p Piece) Reverse() Piece {
	p.A, p.B = p.B, p.A
	p.CW = !p.CW
	return p
}

// Split returns the point of the piece halfway between its points a and b:
// the midpoint for a line, the point at the mean angle for an arc (placed
// exactly on the arc). a and b are assumed to lie on the piece with less
// than half a turn between them.
func (p *Piece) Split(a, b [2]float64) [2]float64 {
	if p.Kind != Arc {
		return [2]float64{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}
	}
	aa, ab := angleOf(p.Centre, a), angleOf(p.Centre, b)
	d := ab - aa
	for d > math.Pi {
		d -= 2 * math.Pi
	}
	for d <= -math.Pi {
		d += 2 * math.Pi
	}
	m := aa + 0.5*d
	return [2]float64{p.Centre[0] + p.Radius*math.Cos(m), p.Centre[1] + p.Radius*math.Sin(m)}
}

// segmentArea returns the signed area between an arc and its chord:
// positive when the arc runs counter-clockwise (it bulges to the right of
// its chord), R²/2 (θ − sin θ) for sweep θ.
func (p *Piece) segmentArea() float64 {
	if p.Kind != Arc {
		return 0
	}
	s := p.Sweep()
	th := math.Abs(s)
	a := 0.5 * p.Radius * p.Radius * (th - math.Sin(th))
	if s < 0 {
		return -a
	}
	return a
}

// SignedArea returns the signed area enclosed by the loop: positive when it
// runs counter-clockwise. Arcs count exactly (chord polygon plus circular
// segments).
func (l Loop) SignedArea() float64 {
	var s, seg float64
	if len(l) == 0 {
		return 0
	}
	o := l[0].A // shift for round-off
	for i := range l {
		a, b := l[i].A, l[i].B
		s += (a[0]-o[0])*(b[1]-o[1]) - (b[0]-o[0])*(a[1]-o[1])
		seg += l[i].segmentArea()
	}
	return 0.5*s + seg
}

// Area returns the exact area of the domain: the outer loop's area less the
// holes', arcs included.
func (d *Domain) Area() float64 {
	a := math.Abs(d.Outer.SignedArea())
	for _, h := range d.Holes {
		a -= math.Abs(h.SignedArea())
	}
	return a
}

// Winding returns the winding number of the loop about p (p must not lie on
// the loop): the chord polygon's winding plus ±1 for every circular segment
// (between an arc and its chord) that contains p.
func (l Loop) Winding(p [2]float64) int {
	var tot float64
	for i := range l {
		q := &l[i]
		a := [2]float64{q.A[0] - p[0], q.A[1] - p[1]}
		b := [2]float64{q.B[0] - p[0], q.B[1] - p[1]}
		tot += math.Atan2(a[0]*b[1]-a[1]*b[0], a[0]*b[0]+a[1]*b[1])
		if q.Kind == Arc && inSegment(q, p) {
			if q.CW {
				tot -= 2 * math.Pi
			} else {
				tot += 2 * math.Pi
			}
		}
	}
	return int(math.Round(tot / (2 * math.Pi)))
}

// inSegment reports whether p lies inside the circular segment between the
// arc q and its chord.
func inSegment(q *Piece, p [2]float64) bool {
	if math.Hypot(p[0]-q.Centre[0], p[1]-q.Centre[1]) >= q.Radius {
		return false
	}
	m := q.At(0.5)
	side := func(x [2]float64) float64 {
		return (q.B[0]-q.A[0])*(x[1]-q.A[1]) - (q.B[1]-q.A[1])*(x[0]-q.A[0])
	}
	sp, sm := side(p), side(m)
	return sp*sm > 0
}

// Contains reports whether p lies in the open domain (inside the outer loop
// and outside every hole); p should not lie on the boundary.
func (d *Domain) Contains(p [2]float64) bool {
	if d.Outer.Winding(p) == 0 {
		return false
	}
	for _, h := range d.Holes {
		if h.Winding(p) != 0 {
			return false
		}
	}
	return true
}

// Orient reverses every loop that runs the wrong way (the outer loop must
// run counter-clockwise, holes clockwise) and returns a note for each loop
// it reversed.
func (d *Domain) Orient() []string {
	var notes []string
	rev := func(l Loop) Loop {
		out := make(Loop, len(l))
		for i := range l {
			out[len(l)-1-i] = l[i].Reverse()
		}
		return out
	}
	if d.Outer.SignedArea() < 0 {
		d.Outer = rev(d.Outer)
		notes = append(notes, "loop 0 (outer) ran clockwise: reversed to counter-clockwise")
	}
	for k := range d.Holes {
		if d.Holes[k].SignedArea() > 0 {
			d.Holes[k] = rev(d.Holes[k])
			notes = append(notes, fmt.Sprintf("%s ran counter-clockwise: reversed to clockwise", loopName(k+1)))
		}
	}
	return notes
}

// bbox returns the bounding box of all loops.
func (d *Domain) bbox() (lo, hi [2]float64) {
	lo = [2]float64{math.Inf(1), math.Inf(1)}
	hi = [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, l := range d.Loops() {
		for i := range l {
			b0, b1 := l[i].box()
			for k := 0; k < 2; k++ {
				lo[k] = math.Min(lo[k], b0[k])
				hi[k] = math.Max(hi[k], b1[k])
			}
		}
	}
	return lo, hi
}

// Scale returns the diagonal of the domain's bounding box (0 when empty).
func (d *Domain) Scale() float64 {
	lo, hi := d.bbox()
	s := math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	if math.IsNaN(s) || math.IsInf(s, 0) {
		return 0
	}
	return s
}

// box returns the bounding box of a piece (exact for arcs).
func (p *Piece) box() (lo, hi [2]float64) {
	lo = [2]float64{math.Min(p.A[0], p.B[0]), math.Min(p.A[1], p.B[1])}
	hi = [2]float64{math.Max(p.A[0], p.B[0]), math.Max(p.A[1], p.B[1])}
	if p.Kind != Arc {
		return lo, hi
	}
	for _, ang := range []float64{0, math.Pi / 2, math.Pi, -math.Pi / 2} {
		if p.onArcAngle(ang, 0) {
			x := [2]float64{p.Centre[0] + p.Radius*math.Cos(ang), p.Centre[1] + p.Radius*math.Sin(ang)}
			for j := 0; j < 2; j++ {
				lo[j] = math.Min(lo[j], x[j])
				hi[j] = math.Max(hi[j], x[j])
			}
		}
	}
	return lo, hi
}

// onArcAngle reports whether polar angle ang lies within the arc's sweep,
// widened by tol radians at both ends.
func (p *Piece) onArcAngle(ang, tol float64) bool {
	a0 := angleOf(p.Centre, p.A)
	s := p.Sweep()
	var d float64
	if s > 0 {
		d = ang - a0
	} else {
		d = a0 - ang
	}
	d = math.Mod(d, 2*math.Pi)
	if d < 0 {
		d += 2 * math.Pi
	}
	return d <= math.Abs(s)+tol || d >= 2*math.Pi-tol
}

// inArcInterior reports whether polar angle ang lies inside the arc's
// sweep, more than tol radians from both ends.
func (p *Piece) inArcInterior(ang, tol float64) bool {
	a0 := angleOf(p.Centre, p.A)
	s := p.Sweep()
	d := ang - a0
	if s < 0 {
		d = -d
	}
	d = math.Mod(d, 2*math.Pi)
	if d < 0 {
		d += 2 * math.Pi
	}
	return d > tol && d < math.Abs(s)-tol
}

// Distance returns the distance from x to the piece.
func (p *Piece) Distance(x [2]float64) float64 {
	if p.Kind == Arc {
		if p.onArcAngle(angleOf(p.Centre, x), 0) {
			return math.Abs(plane.Dist(x, p.Centre) - p.Radius)
		}
		return math.Min(plane.Dist(x, p.A), plane.Dist(x, p.B))
	}
	return plane.SegDist(x, p.A, p.B)
}

// param returns the fraction t ∈ [0, 1] of the piece's length at the point
// of the piece nearest to x.
func (p *Piece) param(x [2]float64) float64 {
	if p.Kind == Arc {
		a0 := angleOf(p.Centre, p.A)
		s := p.Sweep()
		d := angleOf(p.Centre, x) - a0
		if s < 0 {
			d = -d
		}
		d = math.Mod(d, 2*math.Pi)
		if d < 0 {
			d += 2 * math.Pi
		}
		t := d / math.Abs(s)
		if t > 1 {
			// beyond the end: nearer end wins
			if d-math.Abs(s) < 2*math.Pi-d {
				return 1
			}
			return 0
		}
		return t
	}
	dx, dy := p.B[0]-p.A[0], p.B[1]-p.A[1]
	l2 := dx*dx + dy*dy
	if l2 == 0 {
		return 0
	}
	return math.Max(0, math.Min(1, ((x[0]-p.A[0])*dx+(x[1]-p.A[1])*dy)/l2))
}
