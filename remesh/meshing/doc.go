// Package meshing turns a polygonal domain with arcs and labelled
// boundaries into the 6-node triangle mesh the finite-element problem
// uses: a constrained Delaunay refinement to a size field (remesh/tri),
// midside nodes placed on arcs, boundary labels and named points kept.
//
// Meshing a built-in specimen:
//
//	d, _ := geom.DefaultCT().Domain()
//	h, _ := size.NewField(d, size.Options{HFine: 0.05, HFar: 2})
//	m, rep, err := meshing.Mesh(d, h.At, meshing.Options{})
package meshing
