package tri_test

import (
	"fmt"
	"math"

	"tearline/remesh/tri"
)

// A unit square with a square hole, refined to a size that grows away from
// the corner (0, 0).
func ExampleTriangulate() {
	in := &tri.Input{
		Points: [][2]float64{
			{0, 0}, {1, 0}, {1, 1}, {0, 1}, // outer loop, counter-clockwise
			{0.4, 0.4}, {0.6, 0.4}, {0.6, 0.6}, {0.4, 0.6}, // hole
		},
		Segments:     [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 0}, {4, 5}, {5, 6}, {6, 7}, {7, 4}},
		SegmentMarks: []int{1, 2, 3, 4, 5, 5, 5, 5}, // e.g. bottom, right, top, left, hole
		Holes:        [][2]float64{{0.5, 0.5}},
	}
	size := func(x, y float64) float64 { return 0.01 + 0.1*math.Hypot(x, y) }
	m, err := tri.Triangulate(in, &tri.Options{Size: size, MinAngle: 30})
	if err != nil {
		fmt.Println(err)
		return
	}
	area := 0.0
	for _, t := range m.Triangles {
		a, b, c := m.Points[t[0]], m.Points[t[1]], m.Points[t[2]]
		area += 0.5 * ((b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1]))
	}
	rep := tri.Quality(m, size)
	fmt.Printf("area %.12f (1 − 0.2²)\n", area)
	fmt.Println("valid:", tri.Check(m) == nil)
	fmt.Println("smallest angle ≥ 30°:", rep.MinAngleDeg >= 30)
	fmt.Println("every triangle's longest edge ≤ h(centroid):", rep.SizeRatioMax <= 1)
	// Output:
	// area 0.960000000000 (1 − 0.2²)
	// valid: true
	// smallest angle ≥ 30°: true
	// every triangle's longest edge ≤ h(centroid): true
}

// The constrained Delaunay triangulation without refinement: a polygon with
// n vertices becomes n − 2 triangles.
func ExampleCDT() {
	in := &tri.Input{
		Points:   [][2]float64{{0, 0}, {4, 0}, {4, 1}, {1, 1}, {1, 3}, {0, 3}},
		Segments: [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 4}, {4, 5}, {5, 0}},
	}
	m, err := tri.CDT(in)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(m.Triangles), "triangles,", len(m.Points), "points")
	// Output:
	// 4 triangles, 6 points
}
