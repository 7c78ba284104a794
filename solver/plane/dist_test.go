package plane

import (
	"math"
	"testing"
)

// TestDistances checks Dist, DistSq and SegDist against closed forms
// (Pythagoras; the foot of the perpendicular on a segment).
func TestDistances(t *testing.T) {
	for _, c := range []struct {
		name      string
		x, a, b   [2]float64
		dist, dsq float64 // |x − a|, |x − a|²
		seg       float64 // distance from x to a–b
	}{
		{"3-4-5 triangle, foot inside", [2]float64{3, 4}, [2]float64{0, 0}, [2]float64{6, 0}, 5, 25, 4},
		{"beyond the end b", [2]float64{9, 4}, [2]float64{0, 0}, [2]float64{6, 0}, math.Sqrt(97), 97, 5},
		{"before the end a", [2]float64{-3, -4}, [2]float64{0, 0}, [2]float64{0, 6}, 5, 25, 5},
		{"on the segment", [2]float64{0.25, 0.25}, [2]float64{0, 0}, [2]float64{1, 1}, math.Sqrt(0.125), 0.125, 0},
		{"zero-length segment", [2]float64{1, 1}, [2]float64{4, 5}, [2]float64{4, 5}, 5, 25, 5},
		{"no overflow of the squares (Hypot)", [2]float64{3e200, 4e200}, [2]float64{0, 0}, [2]float64{0, 0}, 5e200, math.Inf(1), 5e200},
	} {
		if got := Dist(c.x, c.a); math.Abs(got-c.dist) > 1e-15*c.dist {
			t.Errorf("%s: Dist = %g, want %g", c.name, got, c.dist)
		}
		if got := DistSq(c.x, c.a); got != c.dsq && math.Abs(got-c.dsq) > 1e-15*c.dsq {
			t.Errorf("%s: DistSq = %g, want %g", c.name, got, c.dsq)
		}
		if got := SegDist(c.x, c.a, c.b); math.Abs(got-c.seg) > 1e-15*math.Max(1, c.seg) {
			t.Errorf("%s: SegDist = %g, want %g", c.name, got, c.seg)
		}
	}
}

// TestBarycentric checks the area coordinates against closed forms: the
// vertices (unit vectors), the centroid (1/3 each), a point outside (one
// negative coordinate) and the reproduction x = Σ lᵢ vᵢ.
func TestBarycentric(t *testing.T) {
	a, b, c := [2]float64{1, 1}, [2]float64{4, 2}, [2]float64{2, 5}
	for _, tc := range []struct {
		name string
		p    [2]float64
		want [3]float64
	}{
		{"vertex a", a, [3]float64{1, 0, 0}},
		{"vertex b", b, [3]float64{0, 1, 0}},
		{"vertex c", c, [3]float64{0, 0, 1}},
		{"centroid", [2]float64{7.0 / 3, 8.0 / 3}, [3]float64{1.0 / 3, 1.0 / 3, 1.0 / 3}},
		{"mirror of a across b–c", [2]float64{5, 6}, [3]float64{-1, 1, 1}},
	} {
		l := Barycentric(tc.p, a, b, c)
		for k := range l {
			if math.Abs(l[k]-tc.want[k]) > 1e-14 {
				t.Errorf("%s: Barycentric = %v, want %v", tc.name, l, tc.want)
				break
			}
		}
		x := [2]float64{l[0]*a[0] + l[1]*b[0] + l[2]*c[0], l[0]*a[1] + l[1]*b[1] + l[2]*c[1]}
		if Dist(x, tc.p) > 1e-14 {
			t.Errorf("%s: Σ lᵢ vᵢ = %v, want %v", tc.name, x, tc.p)
		}
	}
	if got := ClampBary([3]float64{-1e-17, 0.5, 0.5 + 1e-17}); got[0] != 0 || math.Abs(got[1]+got[2]-1) > 1e-16 {
		t.Errorf("ClampBary left %v", got)
	}
}

// TestInPolygon checks the even–odd rule on an L-shaped (non-convex)
// polygon: inside the arms, in the notch, on edges and vertices (outside by
// definition), and the ray through a vertex (closed form by inspection).
func TestInPolygon(t *testing.T) {
	poly := [][2]float64{{0, 0}, {2, 0}, {2, 1}, {1, 1}, {1, 2}, {0, 2}}
	for _, c := range []struct {
		name string
		x    [2]float64
		want bool
	}{
		{"lower arm", [2]float64{1.5, 0.5}, true},
		{"upper arm", [2]float64{0.5, 1.5}, true},
		{"corner square", [2]float64{0.5, 0.5}, true},
		{"notch", [2]float64{1.5, 1.5}, false},
		{"on an edge", [2]float64{1, 1.5}, false},
		{"on a vertex", [2]float64{2, 1}, false},
		{"ray through the vertex (1, 1)", [2]float64{0.5, 1}, true},
		{"far away", [2]float64{-5, 0.5}, false},
	} {
		if got := InPolygon(c.x, poly); got != c.want {
			t.Errorf("%s: InPolygon(%v) = %v, want %v", c.name, c.x, got, c.want)
		}
	}
}
