package geom_test

import (
	"fmt"
	"log"

	"tearline/remesh/geom"
)

func ExampleCT_Domain() {
	d, err := geom.DefaultCT().Domain() // half C(T), W = 50 mm, a₀/W = 0.55
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("labels:", d.Labels())
	tip := d.Points["tip"].X
	fmt.Printf("tips: %v at (%.4g, %.4g)\n", d.Tips(), tip[0], tip[1])
	fmt.Printf("area: %.4f mm²\n", d.Area())
	// Output:
	// labels: [symmetry free notch crack pin]
	// tips: [tip] at (27.5, 0)
	// area: 1726.0315 mm²
}

func ExamplePolygon_Domain() {
	// A 2 × 1 plate with a round hole of radius 0.25, given as data; the
	// hole is given counter-clockwise and is reversed.
	p := geom.Polygon{Loops: []geom.LoopSpec{
		{Start: [2]float64{0, 0}, Pieces: []geom.PieceSpec{
			{To: [2]float64{2, 0}, Label: "bottom"},
			{To: [2]float64{2, 1}, Label: "free"},
			{To: [2]float64{0, 1}, Label: "top"},
			{To: [2]float64{0, 0}, Label: "free"},
		}},
		{Start: [2]float64{1.25, 0.5}, Pieces: []geom.PieceSpec{
			{To: [2]float64{0.75, 0.5}, Arc: true, Centre: [2]float64{1, 0.5}, Label: "hole"},
			{To: [2]float64{1.25, 0.5}, Arc: true, Centre: [2]float64{1, 0.5}, Label: "hole"},
		}},
	}}
	d, notes, err := p.Domain()
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(notes)
	fmt.Printf("area: %.6f\n", d.Area()) // 2 − π/16
	// Output:
	// [loop 1 (hole 1) ran counter-clockwise: reversed to clockwise]
	// area: 1.803650
}
