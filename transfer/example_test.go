package transfer_test

import (
	"fmt"

	"tearline/solver/fem"
	"tearline/solver/material"
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

// The same square split along the other diagonal: a linear state is
// transferred exactly (∫p dA = 0.1 ∫x dA = 0.05), no triangle is unchanged,
// and every node — the centre is both diagonals' midpoint — sits on an old one.
func ExampleMap() {
	old := unitSquare()
	nw := &fem.Mesh{
		X: [][2]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1},
			{0.5, 0}, {1, 0.5}, {0.5, 0.5}, {0.5, 1}, {0, 0.5}},
		NumCorners: 4,
		Tri:        [][6]int{{0, 1, 3, 4, 6, 8}, {1, 2, 3, 5, 7, 6}},
	}
	nq := fem.ElementRule().Len()
	from := &transfer.Fields{
		U:      make([][2]float64, len(old.X)),
		Linear: [][]float64{{0, 1, 2, 1}}, // θ = x + y at the corners
		State:  make([]material.State, len(old.Tri)*nq),
	}
	for e, t := range old.Tri {
		for q := 0; q < nq; q++ {
			x := fem.ElementRule().Point(q, old.X[t[0]], old.X[t[1]], old.X[t[2]])
			from.State[e*nq+q] = material.State{P: 0.1 * x[0], F: 0.01}
		}
	}
	opt := transfer.DefaultOptions()
	opt.F0, opt.FBreak = 0.001, 0.2
	to, rec, err := transfer.Map(old, from, nw, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("projected %d, verbatim %d, nodes copied %d\n", rec.Projected, rec.Verbatim, rec.NodesCopied)
	fmt.Printf("∫p dA before %.4f after %.4f\n", rec.Before.IntP, rec.After.IntP)
	fmt.Printf("θ at the new corners %.3f\n", to.Linear[0])
	// Output:
	// projected 12, verbatim 0, nodes copied 9
	// ∫p dA before 0.0500 after 0.0500
	// θ at the new corners [0.000 1.000 2.000 1.000]
}
