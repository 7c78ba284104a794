package geom

import (
	"fmt"
	"math"
	"sort"
	"tearline/solver/plane"
)

// RelTol is the geometric tolerance relative to the domain's size (the
// diagonal of its bounding box) used to decide that two points coincide.
const RelTol = 1e-9

// MinCornerDeg is the smallest angle in degrees allowed between two pieces
// at a vertex, measured inside the domain. Smaller angles (cusps) cannot be
// meshed with bounded element angles.
const MinCornerDeg = 0.1

func finite2(p [2]float64) bool {
	return !math.IsNaN(p[0]) && !math.IsNaN(p[1]) && !math.IsInf(p[0], 0) && !math.IsInf(p[1], 0)
}

func pieceName(loop, i int, p *Piece) string {
	return fmt.Sprintf("%s piece %d (%s %q)", loopName(loop), i, p.Kind, p.Label)
}

// Validate checks the domain and returns the first problem found, naming the
// loop and piece, what is wrong and what is allowed. It checks: at least an
// outer loop; finite coordinates; non-empty labels; no zero-length pieces;
// arc radii consistent with the end points and sweeps in (0, 2π); closed
// loops; no cusps (corners below MinCornerDeg); outer loop
// counter-clockwise and holes clockwise (see Orient); no piece crossing,
// touching or overlapping another; every hole inside the outer loop and
// outside the other holes; named points with names, finite coordinates,
// unit directions at tips, and (unless Ref) inside the closed domain.
func (d *Domain) Validate() error {
	if len(d.Outer) == 0 {
		return fmt.Errorf("geometry: the outer loop has no pieces; a domain needs a closed outer loop of lines and arcs")
	}
	for k, l := range d.Loops() {
		if len(l) == 0 {
			return fmt.Errorf("geometry: %s has no pieces; every loop needs at least one piece", loopName(k))
		}
		for i := range l {
			p := &l[i]
			if !finite2(p.A) || !finite2(p.B) || (p.Kind == Arc && (!finite2(p.Centre) || math.IsNaN(p.Radius) || math.IsInf(p.Radius, 0))) {
				return fmt.Errorf("geometry: %s has a coordinate that is not a finite number", pieceName(k, i, p))
			}
		}
	}
	scale := d.Scale()
	if !(scale > 0) {
		return fmt.Errorf("geometry: the domain has zero extent; its pieces must span a region")
	}
	tol := RelTol * scale
	for k, l := range d.Loops() {
		for i := range l {
			if err := checkPiece(k, i, &l[i], tol); err != nil {
				return err
			}
		}
		for i := range l {
			j := (i + 1) % len(l)
			if dd := plane.Dist(l[i].B, l[j].A); dd > tol {
				return fmt.Errorf("geometry: %s ends at (%g, %g) but piece %d starts at (%g, %g), %g away: a loop must be closed, each piece starting where the previous one ends (tolerance %g)",
					pieceName(k, i, &l[i]), l[i].B[0], l[i].B[1], j, l[j].A[0], l[j].A[1], dd, tol)
			}
		}
		if len(l) >= 2 || l[0].Kind == Arc {
			for i := range l {
				j := (i + 1) % len(l)
				if ang := cornerAngle(&l[i], &l[j]); ang < MinCornerDeg*math.Pi/180 {
					return fmt.Errorf("geometry: %s meets piece %d at (%g, %g) at an angle of %.3g° inside the domain; corners must be at least %g° (a cusp cannot be meshed)",
						pieceName(k, i, &l[i]), j, l[i].B[0], l[i].B[1], ang*180/math.Pi, MinCornerDeg)
				}
			}
		}
	}
	if err := d.checkIntersections(tol); err != nil {
		return err
	}
	a0 := d.Outer.SignedArea()
	switch {
	case math.Abs(a0) <= tol*tol:
		return fmt.Errorf("geometry: loop 0 (outer) encloses no area")
	case a0 < 0:
		return fmt.Errorf("geometry: loop 0 (outer) runs clockwise (signed area %g); the outer loop must run counter-clockwise with the domain on its left (Orient reverses it)", a0)
	}
	for k, h := range d.Holes {
		a := h.SignedArea()
		switch {
		case math.Abs(a) <= tol*tol:
			return fmt.Errorf("geometry: %s encloses no area", loopName(k+1))
		case a > 0:
			return fmt.Errorf("geometry: %s runs counter-clockwise (signed area %g); holes must run clockwise with the domain on their left (Orient reverses it)", loopName(k+1), a)
		}
	}
	for k, h := range d.Holes {
		x := h[0].At(0.5)
		if d.Outer.Winding(x) != 1 {
			return fmt.Errorf("geometry: %s lies outside loop 0 (outer); holes must lie inside the outer loop", loopName(k+1))
		}
		for j, o := range d.Holes {
			if j != k && o.Winding(x) != 0 {
				return fmt.Errorf("geometry: %s lies inside %s; holes must not be nested", loopName(k+1), loopName(j+1))
			}
		}
	}
	names := make([]string, 0, len(d.Points))
	for n := range d.Points {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		p := d.Points[n]
		if n == "" {
			return fmt.Errorf("geometry: a named point has an empty name")
		}
		if !finite2(p.X) {
			return fmt.Errorf("geometry: point %q has a coordinate that is not a finite number", n)
		}
		if p.Tip {
			if l := math.Hypot(p.Dir[0], p.Dir[1]); math.Abs(l-1) > 1e-9 {
				return fmt.Errorf("geometry: crack tip %q has direction (%g, %g) of length %g; it must be a unit vector", n, p.Dir[0], p.Dir[1], l)
			}
		}
		if p.Ref {
			if p.Tip {
				return fmt.Errorf("geometry: point %q is both a crack tip and a reference point outside the mesh; a tip must lie in the domain", n)
			}
			continue
		}
		if d.boundaryDistance(p.X) > tol {
			if !d.Contains(p.X) {
				return fmt.Errorf("geometry: point %q at (%g, %g) lies outside the domain; named points must lie in the domain or on its boundary (mark a point such as a pin centre as a reference point)", n, p.X[0], p.X[1])
			}
		}
	}
	return nil
}

// boundaryDistance returns the distance from x to the nearest piece.
func (d *Domain) boundaryDistance(x [2]float64) float64 {
	best := math.Inf(1)
	for _, l := range d.Loops() {
		for i := range l {
			best = math.Min(best, l[i].Distance(x))
		}
	}
	return best
}

func checkPiece(k, i int, p *Piece, tol float64) error {
	if p.Label == "" {
		return fmt.Errorf("geometry: %s has no label; every boundary piece needs a label", pieceName(k, i, p))
	}
	switch p.Kind {
	case Line:
		if l := p.Length(); l <= tol {
			return fmt.Errorf("geometry: %s from (%g, %g) to (%g, %g) has zero length (%g); pieces must be longer than %g", pieceName(k, i, p), p.A[0], p.A[1], p.B[0], p.B[1], l, tol)
		}
	case Arc:
		if !(p.Radius > tol) {
			return fmt.Errorf("geometry: %s has radius %g; an arc's radius must be > %g", pieceName(k, i, p), p.Radius, tol)
		}
		ra, rb := plane.Dist(p.A, p.Centre), plane.Dist(p.B, p.Centre)
		if math.Abs(ra-p.Radius) > 1e-9*p.Radius+tol || math.Abs(rb-p.Radius) > 1e-9*p.Radius+tol {
			return fmt.Errorf("geometry: %s has inconsistent radius: radius %g, but its start is %g and its end %g from the centre (%g, %g); both ends must lie on the circle",
				pieceName(k, i, p), p.Radius, ra, rb, p.Centre[0], p.Centre[1])
		}
		if plane.Dist(p.A, p.B) <= tol {
			return fmt.Errorf("geometry: %s starts and ends at the same point (%g, %g); an arc must sweep less than a full turn (give a circle as two arcs)", pieceName(k, i, p), p.A[0], p.A[1])
		}
	default:
		return fmt.Errorf("geometry: %s has unknown kind %d; allowed are Line and Arc", pieceName(k, i, p), int(p.Kind))
	}
	return nil
}

// tangent returns the unit tangent of the piece at its start (end=false) or end.
func (p *Piece) tangent(end bool) [2]float64 {
	if p.Kind == Arc {
		x := p.A
		if end {
			x = p.B
		}
		r := [2]float64{(x[0] - p.Centre[0]) / p.Radius, (x[1] - p.Centre[1]) / p.Radius}
		if p.CW {
			return [2]float64{r[1], -r[0]}
		}
		return [2]float64{-r[1], r[0]}
	}
	l := p.Length()
	return [2]float64{(p.B[0] - p.A[0]) / l, (p.B[1] - p.A[1]) / l}
}

// cornerAngle returns the angle inside the domain (on the left) between
// piece p ending at a vertex and piece q starting there, in [0, 2π).
func cornerAngle(p, q *Piece) float64 {
	tin := p.tangent(true)
	tout := q.tangent(false)
	back := [2]float64{-tin[0], -tin[1]}
	// angle from tout counter-clockwise to back
	a := math.Atan2(tout[0]*back[1]-tout[1]*back[0], tout[0]*back[0]+tout[1]*back[1])
	if a < 0 {
		a += 2 * math.Pi
	}
	return a
}

type pieceRef struct {
	loop, i int
	p       *Piece
	lo, hi  [2]float64
}

// checkIntersections reports the first pair of pieces that cross, touch or
// overlap (pieces sharing an end point may meet only there).
func (d *Domain) checkIntersections(tol float64) error {
	var all []pieceRef
	loops := d.Loops()
	for k := range loops {
		for i := range loops[k] {
			p := &loops[k][i]
			lo, hi := p.box()
			all = append(all, pieceRef{k, i, p, [2]float64{lo[0] - tol, lo[1] - tol}, [2]float64{hi[0] + tol, hi[1] + tol}})
		}
	}
	sort.Slice(all, func(a, b int) bool { return all[a].lo[0] < all[b].lo[0] })
	for a := range all {
		for b := a + 1; b < len(all) && all[b].lo[0] <= all[a].hi[0]; b++ {
			pa, pb := all[a], all[b]
			if pb.lo[1] > pa.hi[1] || pb.hi[1] < pa.lo[1] {
				continue
			}
			pts, overlap := intersect(pa.p, pb.p, tol)
			if overlap {
				return fmt.Errorf("geometry: %s overlaps %s; pieces must not run along each other", pieceName(pa.loop, pa.i, pa.p), pieceName(pb.loop, pb.i, pb.p))
			}
			var shared [][2]float64
			for _, x := range [][2]float64{pa.p.A, pa.p.B} {
				for _, y := range [][2]float64{pb.p.A, pb.p.B} {
					if plane.Dist(x, y) <= tol {
						shared = append(shared, x)
					}
				}
			}
		pts:
			for _, x := range pts {
				for _, s := range shared {
					if plane.Dist(x, s) <= 10*tol {
						continue pts
					}
				}
				return fmt.Errorf("geometry: %s crosses or touches %s at (%g, %g); loops must not intersect themselves or each other",
					pieceName(pa.loop, pa.i, pa.p), pieceName(pb.loop, pb.i, pb.p), x[0], x[1])
			}
		}
	}
	return nil
}

func cross(a, b [2]float64) float64 { return a[0]*b[1] - a[1]*b[0] }
func dot(a, b [2]float64) float64   { return a[0]*b[0] + a[1]*b[1] }
func sub(a, b [2]float64) [2]float64 {
	return [2]float64{a[0] - b[0], a[1] - b[1]}
}

// intersect returns the points common to two pieces, and whether they
// overlap along a stretch longer than tol.
func intersect(p, q *Piece, tol float64) ([][2]float64, bool) {
	switch {
	case p.Kind == Line && q.Kind == Line:
		return segSeg(p.A, p.B, q.A, q.B, tol)
	case p.Kind == Line && q.Kind == Arc:
		return segArc(p.A, p.B, q, tol), false
	case p.Kind == Arc && q.Kind == Line:
		return segArc(q.A, q.B, p, tol), false
	default:
		return arcArc(p, q, tol)
	}
}

func segSeg(a1, b1, a2, b2 [2]float64, tol float64) ([][2]float64, bool) {
	d1, d2 := sub(b1, a1), sub(b2, a2)
	l1, l2 := math.Hypot(d1[0], d1[1]), math.Hypot(d2[0], d2[1])
	den := cross(d1, d2)
	w := sub(a2, a1)
	if math.Abs(den) <= 1e-12*l1*l2 {
		if math.Abs(cross(d1, w))/l1 > tol {
			return nil, false
		}
		t0 := dot(w, d1) / (l1 * l1)
		t1 := dot(sub(b2, a1), d1) / (l1 * l1)
		lo, hi := math.Max(0, math.Min(t0, t1)), math.Min(1, math.Max(t0, t1))
		if (hi-lo)*l1 > tol {
			return nil, true
		}
		if hi-lo >= -tol/l1 {
			return [][2]float64{{a1[0] + lo*d1[0], a1[1] + lo*d1[1]}}, false
		}
		return nil, false
	}
	t := cross(w, d2) / den
	u := cross(w, d1) / den
	et, eu := tol/l1, tol/l2
	if t >= -et && t <= 1+et && u >= -eu && u <= 1+eu {
		return [][2]float64{{a1[0] + t*d1[0], a1[1] + t*d1[1]}}, false
	}
	return nil, false
}

func segArc(a, b [2]float64, q *Piece, tol float64) [][2]float64 {
	d := sub(b, a)
	f := sub(a, q.Centre)
	A := dot(d, d)
	B := 2 * dot(f, d)
	C := dot(f, f) - q.Radius*q.Radius
	disc := B*B - 4*A*C
	l := math.Sqrt(A)
	if disc < 0 {
		if math.Abs(cross(d, sub(q.Centre, a)))/l-q.Radius > tol {
			return nil
		}
		disc = 0
	}
	sq := math.Sqrt(disc)
	var out [][2]float64
	et := tol / l
	for _, t := range []float64{(-B - sq) / (2 * A), (-B + sq) / (2 * A)} {
		if t < -et || t > 1+et {
			continue
		}
		x := [2]float64{a[0] + t*d[0], a[1] + t*d[1]}
		if q.onArcAngle(angleOf(q.Centre, x), tol/q.Radius) {
			out = append(out, x)
		}
	}
	return out
}

func arcArc(p, q *Piece, tol float64) ([][2]float64, bool) {
	dc := plane.Dist(p.Centre, q.Centre)
	if dc <= tol && math.Abs(p.Radius-q.Radius) <= tol {
		// Same circle: overlap when either arc's interior reaches into the other.
		in := func(a, b *Piece) bool {
			for _, t := range []float64{0.5, 0.25, 0.75} {
				if a.inArcInterior(angleOf(a.Centre, b.At(t)), tol/a.Radius) {
					return true
				}
			}
			for _, x := range [][2]float64{b.A, b.B} {
				if a.inArcInterior(angleOf(a.Centre, x), tol/a.Radius) {
					return true
				}
			}
			return false
		}
		if in(p, q) || in(q, p) {
			return nil, true
		}
		var out [][2]float64
		for _, x := range [][2]float64{q.A, q.B} {
			if p.Distance(x) <= tol {
				out = append(out, x)
			}
		}
		return out, false
	}
	if dc > p.Radius+q.Radius+tol || dc < math.Abs(p.Radius-q.Radius)-tol || dc == 0 {
		return nil, false
	}
	a := (p.Radius*p.Radius - q.Radius*q.Radius + dc*dc) / (2 * dc)
	h2 := p.Radius*p.Radius - a*a
	h := 0.0
	if h2 > 0 {
		h = math.Sqrt(h2)
	}
	ex := [2]float64{(q.Centre[0] - p.Centre[0]) / dc, (q.Centre[1] - p.Centre[1]) / dc}
	m := [2]float64{p.Centre[0] + a*ex[0], p.Centre[1] + a*ex[1]}
	var out [][2]float64
	for _, s := range []float64{-1, 1} {
		x := [2]float64{m[0] - s*h*ex[1], m[1] + s*h*ex[0]}
		if p.onArcAngle(angleOf(p.Centre, x), tol/p.Radius) && q.onArcAngle(angleOf(q.Centre, x), tol/q.Radius) {
			out = append(out, x)
		}
		if h == 0 {
			break
		}
	}
	return out, false
}
