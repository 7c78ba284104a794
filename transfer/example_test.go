package transfer_test

import (
	"fmt"

	"tearline/solver/fem"
	"tearline/transfer"
)

// Two triangles forming the unit square, straight-sided.
func unitSquare() *fem.Mesh {
	return &fem.Mesh{
		X: [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1},
			{0.5, 0}, {1, 0.5}, {0.5, 0.5}, {0.5, 1}, {0, 0.5}},
		NumCorners: 4,
		Tri:        [][6]int{{0, 1, 2, 4, 5, 6}, {0, 2, 3, 6, 7, 8}},
	}
}

func ExampleLocator_Locate() {
	lc, err := transfer.NewLocator(unitSquare(), 1e-9)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range [][2]float64{{0.75, 0.25}, {0.25, 0.5}, {1.5, 0.5}} {
		e, l, inside := lc.Locate(p)
		fmt.Printf("%v: triangle %d, area coordinates %.3f, inside %v\n", p, e, l, inside)
	}
	// Output:
	// [0.75 0.25]: triangle 0, area coordinates [0.250 0.500 0.250], inside true
	// [0.25 0.5]: triangle 1, area coordinates [0.500 0.250 0.250], inside true
	// [1.5 0.5]: triangle 0, area coordinates [0.000 0.500 0.500], inside false
}
