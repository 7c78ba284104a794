package plane

import (
	"math"
	"reflect"
	"testing"
)

// TestSimplify checks Douglas–Peucker on polylines whose result follows by
// hand from the rule of Douglas & Peucker 1973 (keep the farthest point
// while it lies beyond the tolerance).
func TestSimplify(t *testing.T) {
	for _, c := range []struct {
		name string
		p    [][2]float64
		tol  float64
		want [][2]float64
	}{
		{"two points", [][2]float64{{0, 0}, {1, 0}}, 0.1, [][2]float64{{0, 0}, {1, 0}}},
		{"collinear", [][2]float64{{0, 0}, {1, 0}, {2, 0}, {3, 0}}, 1e-12, [][2]float64{{0, 0}, {3, 0}}},
		{"zigzag within tolerance", [][2]float64{{0, 0}, {1, 0.05}, {2, -0.05}, {3, 0}}, 0.1, [][2]float64{{0, 0}, {3, 0}}},
		{"corner kept, noise dropped", [][2]float64{{0, 0}, {1, 0.01}, {2, 0}, {2, 1}, {2.01, 2}, {2, 3}}, 0.1,
			[][2]float64{{0, 0}, {2, 0}, {2, 3}}},
		{"ties go to the first point", [][2]float64{{0, 0}, {1, 1}, {2, 1}, {3, 0}}, 0.5, [][2]float64{{0, 0}, {1, 1}, {3, 0}}},
		{"closed ends: distance to the end point", [][2]float64{{0, 0}, {1, 0}, {0, 0.05}, {0, 0}}, 0.5, [][2]float64{{0, 0}, {1, 0}, {0, 0}}},
	} {
		if got := Simplify(c.p, c.tol); !reflect.DeepEqual(got, c.want) {
			t.Errorf("%s: Simplify = %v, want %v", c.name, got, c.want)
		}
	}
}

// TestDouglasPeuckerLoop checks the cyclic spans of a closed loop and a
// one-sided excess: on the unit square's boundary sampled with a dent
// inwards and a bump outwards, a chord may pass a vertex on its right (by
// up to the loose limit) but not one on its left (common practice for
// simplifying a boundary without growing the domain).
func TestDouglasPeuckerLoop(t *testing.T) {
	// counter-clockwise: the domain is on the left of every chord
	loop := [][2]float64{{0, 0}, {0.5, 0.02}, {1, 0}, {1, 1}, {0.5, 1.02}, {0, 1}}
	oneSided := func(i, j, k int) float64 {
		a, b, x := loop[i], loop[j], loop[k]
		t := 0.1
		if (b[0]-a[0])*(x[1]-a[1])-(b[1]-a[1])*(x[0]-a[0]) > 0 {
			t = 1e-9 // on the left, inside the domain
		}
		return SegDist(x, a, b) / t
	}
	for _, c := range []struct {
		name   string
		i, j   int
		excess func(i, j, k int) float64
		want   []bool
	}{
		{"span across the wrap-around; bump outwards dropped", 3, 0, oneSided, []bool{true, false, false, true, false, true}},
		{"dent to the left is kept", 0, 2, oneSided, []bool{true, true, true, false, false, false}},
		{"whole loop from one vertex, two-sided", 0, 0, func(i, j, k int) float64 { return SegDist(loop[k], loop[i], loop[j]) / 0.1 }, []bool{true, false, true, true, false, true}},
	} {
		keep := make([]bool, len(loop))
		keep[c.i], keep[c.j] = true, true
		DouglasPeucker(keep, c.i, c.j, c.excess, 1)
		if !reflect.DeepEqual(keep, c.want) {
			t.Errorf("%s: keep = %v, want %v", c.name, keep, c.want)
		}
	}
	keep := make([]bool, 3)
	DouglasPeucker(keep, 0, 2, func(i, j, k int) float64 { return math.NaN() }, 0)
	if keep[1] {
		t.Errorf("a NaN excess split a span")
	}
}
