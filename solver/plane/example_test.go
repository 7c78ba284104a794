package plane_test

import (
	"fmt"

	"tearline/solver/plane"
)

// The unit square split along its diagonal into two triangles: a point
// inside one, a point on the shared diagonal (both contain it; it lies
// equally deep in both, so the lower number wins) and a point outside.
func ExampleLocator() {
	tri := [][3][2]float64{
		{{0, 0}, {1, 0}, {1, 1}},
		{{0, 0}, {1, 1}, {0, 1}},
	}
	lc := plane.NewLocator(func(i int) [3][2]float64 { return tri[i] }, len(tri))
	for _, x := range [][2]float64{{0.25, 0.75}, {0.5, 0.5}, {2, 0.5}} {
		if e, l, ok := lc.Find(x); ok {
			fmt.Printf("%v: triangle %d, area coordinates %.2f\n", x, e, l)
			continue
		}
		e, d2, _, _ := lc.Nearest(x)
		fmt.Printf("%v: outside, nearest triangle %d at distance² %g\n", x, e, d2)
	}
	// Output:
	// [0.25 0.75]: triangle 1, area coordinates [0.25 0.25 0.50]
	// [0.5 0.5]: triangle 0, area coordinates [0.50 0.00 0.50]
	// [2 0.5]: outside, nearest triangle 0 at distance² 1
}

func ExamplePoints() {
	wake := plane.NewPoints([][2]float64{{0, 0}, {1, 0}, {2, 0}})
	fmt.Println(wake.Dist([2]float64{1, 2}, 10)) // (1, 0) is nearest
	fmt.Println(wake.Dist([2]float64{1, 2}, 1))  // nothing within the cut-off
	// Output:
	// 2
	// 1
}

// Douglas–Peucker on a polyline with a small wiggle and a corner: the
// wiggle goes, the corner stays.
func ExampleSimplify() {
	p := [][2]float64{{0, 0}, {1, 0.01}, {2, 0}, {2, 1}, {2, 2}}
	fmt.Println(plane.Simplify(p, 0.1))
	// Output:
	// [[0 0] [2 0] [2 2]]
}
