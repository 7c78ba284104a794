package remesh_test

import (
	"fmt"
	"log"

	"tearline/remesh"
	"tearline/remesh/geom"
)

func ExampleMeshDomain() {
	d, err := geom.DefaultSSY().Domain() // half boundary-layer disk, R = 50 mm
	if err != nil {
		log.Fatal(err)
	}
	h, err := remesh.NewSizeField(d, remesh.SizeOptions{HFine: 0.02, HFar: 5, FineRadius: 0.2})
	if err != nil {
		log.Fatal(err)
	}
	m, rep, err := remesh.MeshDomain(d, h.At, remesh.MeshOptions{})
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
