package meshing_test

import (
	"fmt"
	"log"

	"tearline/remesh/geom"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
)

func ExampleMesh() {
	d, err := geom.DefaultSSY().Domain() // half boundary-layer disk, R = 50 mm
	if err != nil {
		log.Fatal(err)
	}
	h, err := size.NewField(d, size.Options{HFine: 0.02, HFar: 5, FineRadius: 0.2})
	if err != nil {
		log.Fatal(err)
	}
	m, rep, err := meshing.Mesh(d, h.At, meshing.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("labels:", m.Labels)
	fmt.Println("tip node at:", m.X[m.Points["tip"]])
	fmt.Println("angles ≥ 20°:", rep.MinAngleDeg >= 20, "size ratio ≤ 1.5:", rep.SizeRatioMax <= 1.5)
	// Output:
	// labels: [symmetry remote crack]
	// tip node at: [0 0]
	// angles ≥ 20°: true size ratio ≤ 1.5: true
}
