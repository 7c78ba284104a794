// Package tri builds constrained Delaunay triangulations of planar
// straight-line graphs and refines them to a size field with a minimum-angle
// bound.
//
// Triangulate takes points, constrained segments (boundary loops, holes and
// interior constraints such as crack faces), each carrying an integer mark,
// and hole points. It returns a counter-clockwise triangle mesh of the domain
// enclosed by the segments:
//
//	in := &tri.Input{
//		Points:       [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}},
//		Segments:     [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 0}},
//		SegmentMarks: []int{1, 2, 3, 4},
//	}
//	m, err := tri.Triangulate(in, &tri.Options{Size: func(x, y float64) float64 { return 0.1 }})
//
// The method: incremental Delaunay insertion with Lawson flips; segments are
// recovered by edge flips (Sloan 1993, Comput. Struct. 47); triangles outside
// the segment loops and inside holes are removed; then Delaunay refinement
// (Ruppert 1995, J. Algorithms 18; Shewchuk 2002, Comput. Geom. 22) splits
// encroached sub-segments first (at concentric power-of-two shells around
// input vertices, so refinement terminates near small input angles), then
// triangles that are too large or have a too small angle at their
// circumcentre. Orientation and in-circle tests are exact (solver/plane,
// after Shewchuk 1997, Discrete Comput. Geom. 18).
//
// The size of a triangle is its longest edge. Refinement splits every
// triangle whose size exceeds h at its centroid, so every triangle of the
// result has size ≤ h(centroid); Quality reports the ratio size/h(centroid).
//
// Near input angles below 60° the angle bound cannot be had: triangles whose
// shortest edge joins the two sides of such an angle are not split for their
// angles (Shewchuk 2002, §4). As a floor against floating-point cascades,
// sub-segments shorter than 1e-8 × the input's diameter are not split, and
// triangles with an edge that short are not split for their angles.
//
// CDT returns the triangulation without refinement; Check verifies a mesh's
// structure (positive orientation, no duplicate triangle, every edge shared by
// at most two triangles in opposite directions, boundary edges are
// sub-segments; a global overlap would still need an area check). The result is deterministic: the same input gives the same
// mesh.
package tri

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"tearline/solver/plane"
)

// Input is a planar straight-line graph to triangulate.
type Input struct {
	// Points are the input vertices.
	Points [][2]float64
	// Segments are constrained edges (indices into Points): boundary loops
	// and interior constraints. Without segments the domain is the convex
	// hull of the points (its edges get mark 0).
	Segments [][2]int
	// SegmentMarks holds one mark per segment (a boundary-piece id); every
	// sub-segment created by splitting inherits it. Nil means all zero.
	SegmentMarks []int
	// Holes holds one point inside each hole: triangles reachable from it
	// without crossing a segment are removed. Everything outside the
	// outermost segment loops is removed as well.
	Holes [][2]float64
}

// Options control refinement. The zero value (or a nil *Options) refines to
// the default minimum angle without a size limit.
type Options struct {
	// Size is the target size h(x, y) (an edge length, > 0); nil = no limit.
	Size func(x, y float64) float64
	// MinAngle is the minimum-angle bound in degrees; 0 means 28. Values
	// above 34 are rejected. Termination is guaranteed up to about 20.7°
	// (Ruppert 1995) and 25.7° with the shell splitting (Shewchuk 2002); in
	// practice refinement ends up to 33°, while 34° may run into MaxPoints.
	MinAngle float64
	// MaxPoints limits the number of inserted points (0 = 10 000 000);
	// exceeding it is an error.
	MaxPoints int
	// Split, if not nil, gives the point at which a boundary sub-segment
	// a–b with the given mark is split, for example the point of a circular
	// arc halfway between a and b; it must accept any two points of the same
	// curve. The point is used if it projects onto the middle 20–80 % of the
	// chord a–b and lies off the chord by more than 1e-9·|ab| and at most
	// |ab|/2. Next to an input vertex where segments meet at less than 60°,
	// the point is moved along the curve (bisection with Split) to the
	// power-of-two shell distance from that vertex. The mesher splits on the
	// chord instead (midpoint or shell) for points on the chord, for points
	// it cannot use, for interior segments, and where a point inside the
	// domain does not lie in the triangle on the sub-segment (another vertex
	// closer to the chord than the curve: rare when chords keep a clearance
	// of several sagittas to other features).
	Split func(mark int, a, b [2]float64) [2]float64
	// Keep, if not nil, holds one flag per input segment: the segments
	// flagged are never split, so no vertex is inserted on them and what is
	// meshed on their other side (an existing mesh the triangulation must
	// conform to) stays valid. Ruppert's termination argument needs every
	// encroached segment split, so next to a kept segment the refiner does
	// what it still can: a circumcentre that only encroaches kept segments
	// is inserted, a triangle whose circumcentre lies beyond a kept segment
	// is left as it is. The angle bound may then fail next to kept segments;
	// Quality reports it.
	Keep []bool
}

// Mesh is a triangle mesh.
type Mesh struct {
	// Points are the vertices: the input points first (same indices as
	// Input.Points), then the inserted points. Input points outside the
	// domain are kept but belong to no triangle.
	Points [][2]float64
	// Triangles are counter-clockwise vertex triples.
	Triangles [][3]int
	// Segments are the constrained sub-segments (boundary and interior
	// constraints) in the direction of the input segment they lie on.
	Segments [][2]int
	// SegmentMarks holds the mark of each sub-segment.
	SegmentMarks []int
}

// DefaultMinAngle is the minimum angle (degrees) used when Options.MinAngle is 0.
const DefaultMinAngle = 28

// MaxMinAngle is the largest accepted Options.MinAngle (degrees).
const MaxMinAngle = 34

// DefaultMaxPoints is the insertion limit used when Options.MaxPoints is 0.
const DefaultMaxPoints = 10_000_000

// Validate reports whether the options are usable.
func (o *Options) Validate() error {
	if o == nil {
		return nil
	}
	if math.IsNaN(o.MinAngle) || o.MinAngle < 0 || o.MinAngle > MaxMinAngle {
		return fmt.Errorf("tri: minimum angle %g° outside [0, %d] (0 = default %d°)", o.MinAngle, MaxMinAngle, DefaultMinAngle)
	}
	if o.MaxPoints < 0 {
		return fmt.Errorf("tri: MaxPoints %d must be ≥ 0 (0 = default %d)", o.MaxPoints, DefaultMaxPoints)
	}
	return nil
}

// CDT returns the constrained Delaunay triangulation of the input without
// refinement (no points are inserted).
func CDT(in *Input) (*Mesh, error) {
	m, err := prepare(in)
	if err != nil {
		return nil, err
	}
	return m.output(len(in.Points)), nil
}

// Triangulate returns a refined constrained Delaunay triangulation of the
// domain: every triangle has all angles ≥ MinAngle (except near input angles
// smaller than about 60°, where that cannot be had) and size ≤ Size at its
// centroid, and the sub-segments cover the input segments.
func Triangulate(in *Input, opt *Options) (*Mesh, error) {
	out, _, err := triangulate(in, opt)
	return out, err
}

// triangulate is Triangulate, also returning the refiner (for its counts).
func triangulate(in *Input, opt *Options) (*Mesh, *refiner, error) {
	if err := opt.Validate(); err != nil {
		return nil, nil, err
	}
	if opt != nil && opt.Keep != nil && in != nil && len(opt.Keep) != len(in.Segments) {
		return nil, nil, fmt.Errorf("tri: %d keep flags for %d segments (give one per segment, or none)", len(opt.Keep), len(in.Segments))
	}
	m, err := prepare(in)
	if err != nil {
		return nil, nil, err
	}
	r := newRefiner(m, in, opt)
	if err := r.run(); err != nil {
		return nil, nil, err
	}
	return m.output(len(in.Points)), r, nil
}

// prepare validates the input and builds the carved CDT.
func prepare(in *Input) (*tmesh, error) {
	if in == nil {
		return nil, errors.New("tri: nil input")
	}
	n := len(in.Points)
	if n < 3 {
		return nil, fmt.Errorf("tri: %d points given, need at least 3", n)
	}
	if n > math.MaxInt32/8 {
		return nil, fmt.Errorf("tri: %d points exceed the limit %d", n, math.MaxInt32/8)
	}
	if in.SegmentMarks != nil && len(in.SegmentMarks) != len(in.Segments) {
		return nil, fmt.Errorf("tri: %d segment marks for %d segments (give one per segment, or none)", len(in.SegmentMarks), len(in.Segments))
	}
	for k, s := range in.Segments {
		for _, v := range s {
			if v < 0 || v >= n {
				return nil, fmt.Errorf("tri: segment %d refers to point %d, outside [0, %d)", k, v, n)
			}
		}
		if s[0] == s[1] {
			return nil, fmt.Errorf("tri: segment %d has both ends at point %d (zero length)", k, s[0])
		}
	}
	m := &tmesh{rng: 0x9e3779b97f4a7c15}
	if err := m.build(in.Points); err != nil {
		return nil, err
	}
	segs, marks := in.Segments, in.SegmentMarks
	if len(segs) == 0 {
		segs = hull(in.Points)
		marks = nil
		if len(segs) < 3 {
			return nil, errors.New("tri: no segments given and all points are collinear (no convex hull to triangulate)")
		}
	}
	for k, s := range segs {
		mk := 0
		if marks != nil {
			mk = marks[k]
		}
		if err := m.insertSegment(int32(s[0]), int32(s[1]), mk, int32(k)); err != nil {
			return nil, err
		}
	}
	if err := m.carve(n, in.Holes); err != nil {
		return nil, err
	}
	return m, nil
}

// hull returns the convex-hull edges of the points, counter-clockwise
// (Andrew's monotone chain, Andrew 1979, Inf. Process. Lett. 9), omitting
// collinear points (the segment insertion splits at them).
func hull(p [][2]float64) [][2]int {
	idx := make([]int, len(p))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(i, j int) bool {
		a, b := p[idx[i]], p[idx[j]]
		return a[0] < b[0] || (a[0] == b[0] && a[1] < b[1])
	})
	h := make([]int, 0, 2*len(p))
	for pass := 0; pass < 2; pass++ {
		start := len(h)
		for _, i := range idx {
			for len(h) >= start+2 && plane.Orient(p[h[len(h)-2]], p[h[len(h)-1]], p[i]) <= 0 {
				h = h[:len(h)-1]
			}
			h = append(h, i)
		}
		h = h[:len(h)-1]
		for l, r := 0, len(idx)-1; l < r; l, r = l+1, r-1 {
			idx[l], idx[r] = idx[r], idx[l]
		}
	}
	segs := make([][2]int, len(h))
	for k := range h {
		segs[k] = [2]int{h[k], h[(k+1)%len(h)]}
	}
	return segs
}

// output converts the working triangulation to a Mesh, dropping the three
// enclosing vertices (indices nIn … nIn+2).
func (m *tmesh) output(nIn int) *Mesh {
	re := func(v int32) int {
		if int(v) < nIn {
			return int(v)
		}
		return int(v) - 3
	}
	out := &Mesh{Points: make([][2]float64, 0, len(m.xy)-3)}
	out.Points = append(out.Points, m.xy[:nIn]...)
	out.Points = append(out.Points, m.xy[nIn+3:]...)
	ntri := len(m.tv) / 3
	out.Triangles = make([][3]int, 0, ntri-len(m.free))
	for t := 0; t < ntri; t++ {
		if m.tv[3*t] < 0 {
			continue
		}
		out.Triangles = append(out.Triangles, [3]int{re(m.tv[3*t]), re(m.tv[3*t+1]), re(m.tv[3*t+2])})
	}
	out.Segments = make([][2]int, len(m.sa))
	out.SegmentMarks = make([]int, len(m.sa))
	out.Segments = out.Segments[:0]
	out.SegmentMarks = out.SegmentMarks[:0]
	for s := range m.sa {
		if m.sa[s] < 0 {
			continue
		}
		out.Segments = append(out.Segments, [2]int{re(m.sa[s]), re(m.sb[s])})
		out.SegmentMarks = append(out.SegmentMarks, m.smark[s])
	}
	return out
}
