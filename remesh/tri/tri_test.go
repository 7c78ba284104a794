package tri

import (
	"math"
	"strings"
	"testing"

	"tearline/solver/plane"
)

// loop returns segments joining points first…first+n-1 in a closed loop.
func loop(first, n int) [][2]int {
	s := make([][2]int, n)
	for i := 0; i < n; i++ {
		s[i] = [2]int{first + i, first + (i+1)%n}
	}
	return s
}

// polyArea is the shoelace area of a closed polygon (Meister 1769 / Gauss;
// the closed form for the area of a simple polygon).
func polyArea(p [][2]float64) float64 {
	a := 0.0
	for i := range p {
		q, r := p[i], p[(i+1)%len(p)]
		a += q[0]*r[1] - r[0]*q[1]
	}
	return a / 2
}

func meshArea(m *Mesh) float64 {
	a := 0.0
	for _, t := range m.Triangles {
		p, q, r := m.Points[t[0]], m.Points[t[1]], m.Points[t[2]]
		a += 0.5 * ((q[0]-p[0])*(r[1]-p[1]) - (r[0]-p[0])*(q[1]-p[1]))
	}
	return a
}

// checkConformity verifies that the sub-segments of m tile every input
// segment exactly (no gap, no overlap) with the input segment's mark, and that
// every sub-segment lies on an input segment.
func checkConformity(t *testing.T, in *Input, m *Mesh) {
	t.Helper()
	used := make([]bool, len(m.Segments))
	for k, s := range in.Segments {
		a, b := in.Points[s[0]], in.Points[s[1]]
		d := sub(b, a)
		L := math.Sqrt(dot(d, d))
		var cover float64
		for j, sg := range m.Segments {
			p, q := m.Points[sg[0]], m.Points[sg[1]]
			onLine := func(x [2]float64) (float64, bool) {
				w := sub(x, a)
				off := (d[0]*w[1] - d[1]*w[0]) / L
				u := dot(w, d) / (L * L)
				return u, math.Abs(off) <= 1e-12*L && u >= -1e-12 && u <= 1+1e-12
			}
			u0, ok0 := onLine(p)
			u1, ok1 := onLine(q)
			if !ok0 || !ok1 || used[j] {
				continue
			}
			used[j] = true
			if want := markOf(in, k); m.SegmentMarks[j] != want {
				t.Errorf("sub-segment %d on segment %d has mark %d, want %d", j, k, m.SegmentMarks[j], want)
			}
			cover += math.Abs(u1 - u0)
		}
		if math.Abs(cover-1) > 1e-10 {
			t.Errorf("segment %d: sub-segments cover %.15g of its length, want 1", k, cover)
		}
	}
	for j, u := range used {
		if !u {
			t.Errorf("sub-segment %d (%v) lies on no input segment", j, m.Segments[j])
		}
	}
}

func markOf(in *Input, k int) int {
	if in.SegmentMarks == nil {
		return 0
	}
	return in.SegmentMarks[k]
}

func square(x0, y0, x1, y1 float64) [][2]float64 {
	return [][2]float64{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}
}

// polygonInput builds an input from an outer loop and hole loops.
func polygonInput(outer [][2]float64, holes ...[][2]float64) (*Input, float64) {
	in := &Input{}
	area := 0.0
	add := func(p [][2]float64) {
		first := len(in.Points)
		in.Points = append(in.Points, p...)
		in.Segments = append(in.Segments, loop(first, len(p))...)
		area += polyArea(p)
	}
	add(outer)
	for _, h := range holes {
		add(h)
		c := [2]float64{}
		for _, q := range h {
			c[0] += q[0] / float64(len(h))
			c[1] += q[1] / float64(len(h))
		}
		in.Holes = append(in.Holes, c)
	}
	for k := range in.Segments {
		in.SegmentMarks = append(in.SegmentMarks, 10+k%3)
	}
	// hole loops given clockwise or counter-clockwise: subtract their |area|
	area = math.Abs(polyArea(outer))
	for _, h := range holes {
		area -= math.Abs(polyArea(h))
	}
	return in, area
}

func notchedSquare(width, tipRadius float64, nArc int) [][2]float64 {
	// unit square with a slot from the left edge to the centre: straight
	// faces at y = ±width/2, ending in a semicircle of radius tipRadius
	// (tipRadius = width/2) or a flat end (tipRadius = 0).
	p := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}, {0, 0.5 + width/2}}
	if tipRadius == 0 {
		p = append(p, [2]float64{0.5, 0.5 + width/2}, [2]float64{0.5, 0.5 - width/2})
	} else {
		for k := 0; k <= nArc; k++ {
			a := math.Pi/2 - math.Pi*float64(k)/float64(nArc)
			p = append(p, [2]float64{0.5 + tipRadius*math.Cos(a), 0.5 + tipRadius*math.Sin(a)})
		}
	}
	return append(p, [2]float64{0, 0.5 - width/2})
}

func TestTriangulateDomains(t *testing.T) {
	uniform := func(h float64) func(x, y float64) float64 {
		return func(x, y float64) float64 { return h }
	}
	graded := func(cx, cy, h0, g, hmax float64) func(x, y float64) float64 {
		return func(x, y float64) float64 {
			return math.Min(hmax, h0+g*math.Hypot(x-cx, y-cy))
		}
	}
	lshape := [][2]float64{{0, 0}, {2, 0}, {2, 1}, {1, 1}, {1, 2}, {0, 2}}
	collinear := [][2]float64{}
	for i := 0; i <= 10; i++ { // bottom edge as a run of 11 collinear points
		collinear = append(collinear, [2]float64{float64(i) / 10, 0})
	}
	collinear = append(collinear, [2]float64{1, 1}, [2]float64{0, 1})
	near := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0.5 + 1e-7, 1}, {0.5, 1}, {0, 1}}
	type tc struct {
		name     string
		outer    [][2]float64
		holes    [][][2]float64
		size     func(x, y float64) float64
		minAngle float64 // 0: default
		wantMin  float64 // minimum angle required of the result
	}
	cases := []tc{
		{name: "unit square, uniform h", outer: square(0, 0, 1, 1), size: uniform(0.05), wantMin: DefaultMinAngle},
		{name: "unit square, no size", outer: square(0, 0, 1, 1), wantMin: DefaultMinAngle},
		{name: "L-shape, graded at re-entrant corner", outer: lshape, size: graded(1, 1, 0.005, 0.3, 0.3), wantMin: DefaultMinAngle},
		{name: "square with square hole", outer: square(0, 0, 3, 3), holes: [][][2]float64{square(1, 1, 2, 2)}, size: uniform(0.1), wantMin: DefaultMinAngle},
		{name: "square with two holes, 33 degrees", outer: square(0, 0, 4, 2), holes: [][][2]float64{square(0.5, 0.5, 1.5, 1.5), square(2.5, 0.5, 3.5, 1.2)}, size: uniform(0.2), minAngle: 33, wantMin: 33},
		{name: "thin sliver 10 x 0.01", outer: square(0, 0, 10, 0.01), wantMin: DefaultMinAngle},
		{name: "slit as a thin flat-ended notch", outer: notchedSquare(1e-3, 0, 0), size: graded(0.5, 0.5, 2e-4, 0.3, 0.1), wantMin: DefaultMinAngle},
		{name: "tiny-radius notch polygonised", outer: notchedSquare(2e-4, 1e-4, 16), size: graded(0.5, 0.5, 2e-5, 0.3, 0.1), wantMin: DefaultMinAngle},
		{name: "collinear run on the boundary", outer: collinear, size: uniform(0.07), wantMin: DefaultMinAngle},
		{name: "nearly coincident vertices (1e-7 apart)", outer: near, wantMin: DefaultMinAngle},
		{name: "20 degrees minimum", outer: lshape, size: uniform(0.1), minAngle: 20, wantMin: 20},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in, area := polygonInput(c.outer, c.holes...)
			m, err := Triangulate(in, &Options{Size: c.size, MinAngle: c.minAngle})
			if err != nil {
				t.Fatal(err)
			}
			if err := Check(m); err != nil {
				t.Fatal(err)
			}
			// area: the shoelace closed form of the polygon (minus holes)
			if got := meshArea(m); math.Abs(got-area) > 1e-10*area {
				t.Errorf("mesh area %.15g, polygon area %.15g", got, area)
			}
			checkConformity(t, in, m)
			checkLocallyDelaunay(t, m)
			rep := Quality(m, c.size)
			// V15 (DESIGN.md; Ruppert 1995, Shewchuk 2002): minimum angle ≥ 20°,
			// here the requested bound, since no input angle is below 90°.
			if rep.MinAngleDeg < c.wantMin-1e-9 {
				t.Errorf("minimum angle %.3f°, want ≥ %g°", rep.MinAngleDeg, c.wantMin)
			}
			// V15: size ≤ 1.5·h(centroid); the refinement rule gives ≤ 1.
			if rep.SizeRatioMax > 1+1e-12 {
				t.Errorf("size ratio %.4f > 1", rep.SizeRatioMax)
			}
			t.Logf("%+v", rep)
		})
	}
}

func TestTriangulateErrors(t *testing.T) {
	sq := square(0, 0, 1, 1)
	cases := []struct {
		name string
		in   *Input
		opt  *Options
		want string // substring of the error
	}{
		{"coincident points", &Input{Points: append(sq, [2]float64{1, 0}), Segments: loop(0, 4)}, nil, "points 1 and 4 coincide"},
		{"nearly coincident points", &Input{Points: append(sq, [2]float64{1, 1e-12}), Segments: loop(0, 4)}, nil, "points 1 and 4 are nearly coincident"},
		{"crossing segments", &Input{Points: append(sq, [2]float64{0.5, -1}, [2]float64{0.5, 2}), Segments: append(loop(0, 4), [2]int{4, 5})}, nil, "segment 4 (points 4–5) crosses segment 0"},
		{"overlapping segments", &Input{Points: append(sq, [2]float64{0.5, 0}), Segments: [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 0}, {4, 1}}}, nil, "overlaps segment 0"},
		{"open boundary", &Input{Points: sq, Segments: [][2]int{{0, 1}, {1, 2}, {2, 3}}}, nil, "no triangles remain"},
		{"segment index out of range", &Input{Points: sq, Segments: [][2]int{{0, 7}}}, nil, "segment 0 refers to point 7"},
		{"zero-length segment", &Input{Points: sq, Segments: [][2]int{{2, 2}}}, nil, "segment 0 has both ends at point 2"},
		{"marks mismatch", &Input{Points: sq, Segments: loop(0, 4), SegmentMarks: []int{1}}, nil, "1 segment marks for 4 segments"},
		{"non-finite point", &Input{Points: append(sq, [2]float64{math.NaN(), 0})}, nil, "point 4"},
		{"too few points", &Input{Points: sq[:2]}, nil, "need at least 3"},
		{"collinear points, no segments", &Input{Points: [][2]float64{{0, 0}, {1, 0}, {2, 0}}}, nil, "collinear"},
		{"min angle too large", &Input{Points: sq, Segments: loop(0, 4)}, &Options{MinAngle: 40}, "minimum angle 40°"},
		{"size not positive", &Input{Points: sq, Segments: loop(0, 4)}, &Options{Size: func(x, y float64) float64 { return 0 }}, "size function gave"},
		{"too many points", &Input{Points: sq, Segments: loop(0, 4)}, &Options{Size: func(x, y float64) float64 { return 1e-3 }, MaxPoints: 1000}, "MaxPoints"},
		{"hole on a segment", &Input{Points: sq, Segments: loop(0, 4), Holes: [][2]float64{{0.5, 0}}}, nil, "hole point 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Triangulate(c.in, c.opt)
			if err == nil {
				t.Fatalf("no error, want one containing %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q, want it to contain %q", err, c.want)
			}
		})
	}
}

// TestDeterministic: the same input gives the same mesh (the adaptive cycle
// relies on it for resuming from a checkpoint to the same results).
func TestDeterministic(t *testing.T) {
	in, _ := polygonInput(notchedSquare(2e-3, 1e-3, 12), square(0.7, 0.7, 0.8, 0.8))
	size := func(x, y float64) float64 { return 5e-4 + 0.2*math.Hypot(x-0.5, y-0.5) }
	a, err := Triangulate(in, &Options{Size: size})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Triangulate(in, &Options{Size: size})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Points) != len(b.Points) || len(a.Triangles) != len(b.Triangles) || len(a.Segments) != len(b.Segments) {
		t.Fatalf("sizes differ: %d/%d points, %d/%d triangles", len(a.Points), len(b.Points), len(a.Triangles), len(b.Triangles))
	}
	for i := range a.Points {
		if a.Points[i] != b.Points[i] {
			t.Fatalf("point %d differs", i)
		}
	}
	for i := range a.Triangles {
		if a.Triangles[i] != b.Triangles[i] {
			t.Fatalf("triangle %d differs", i)
		}
	}
}

// checkLocallyDelaunay verifies that every edge shared by two triangles and
// not a sub-segment is locally Delaunay (the opposite vertex is not inside
// the circumcircle), which makes the mesh a constrained Delaunay
// triangulation (Lee & Lin 1986, Discrete Comput. Geom. 1; Chew 1989,
// Algorithmica 4).
func checkLocallyDelaunay(t *testing.T, m *Mesh) {
	t.Helper()
	type edge struct{ a, b int }
	opp := map[edge]int{}
	for _, tr := range m.Triangles {
		for k := 0; k < 3; k++ {
			opp[edge{tr[(k+1)%3], tr[(k+2)%3]}] = tr[k]
		}
	}
	seg := map[edge]bool{}
	for _, s := range m.Segments {
		seg[edge{s[0], s[1]}], seg[edge{s[1], s[0]}] = true, true
	}
	bad := 0
	for e, c := range opp {
		d, ok := opp[edge{e.b, e.a}]
		if !ok || seg[e] {
			continue
		}
		if plane.InCircle(m.Points[e.a], m.Points[e.b], m.Points[c], m.Points[d]) > 0 {
			bad++
		}
	}
	if bad > 0 {
		t.Errorf("%d edges are not locally Delaunay", bad)
	}
}
