// Package transfer maps the mechanical state of an adaptive run from an old
// mesh onto a new one: nodal fields by interpolation with the old shape
// functions, Gauss-point state by least-squares recovery, and elements the
// remesh left unchanged verbatim.
//
// # Location
//
// A Locator indexes the old triangles' bounding boxes in an R-tree
// (plane.Locator on github.com/tidwall/rtree). Locate finds the old triangle
// that contains a point by an exact point-in-triangle test on the corner
// nodes: the three orientation signs come from plane.Orient, a
// floating-point filter with an exact evaluation when the filter cannot
// decide (the adaptive predicates of Shewchuk 1997, Discrete Comput.
// Geom. 18). Among several triangles that contain the point (on a shared
// edge or vertex) the one in which it lies deepest wins, then the lowest
// index.
//
// Containment is decided on the straight-sided triangle of the corner nodes:
// a curved boundary element is replaced by its chord. In a curved element (a
// midside node off its edge's midpoint) the area coordinates then come from
// inverting the element's quadratic isoparametric map by Newton's method, so
// a point between the chord and the arc — a new boundary vertex on the arc —
// lies inside it and a linear field is reproduced there exactly. A point
// that no triangle contains gets the nearest triangle (by chord distance)
// with the area coordinates of the nearest point on it (clamped to the
// triangle, or to the curved element); it counts as inside when it is within
// Options.Tol × the triangle's longest edge. Only boundary edges are
// expected to be curved: the bulge of a curved interior edge into its
// neighbour's chord triangle is not searched.
//
// # Nodal fields
//
// Displacement (all nodes) is interpolated with the old element's quadratic
// shape functions, the linear corner fields (θ, P, ā, λ) with the linear ones
// at the new corner nodes. A new node that coincides exactly with a node of
// the old element found for it takes that node's value verbatim. Nodes on a
// crack face, where the two faces share reference coordinates, are located
// towards the interior of a new element that owns them, so each face takes
// its own side's values.
//
// # Gauss-point state
//
// The plastic strain Ep (4 components), p, f and, when the Fields carry
// them, the components of the Gauss-point data (GaussData: stress work W,
// deformation gradient F, first Piola–Kirchhoff stress P, elastic strain
// Eᵉ) are recovered one by one as continuous linear fields on the old corner
// nodes and evaluated at the new Gauss points. Two recoveries are offered:
//
//   - PatchRecovery (default): for every old corner node a linear polynomial
//     is fitted by least squares to the Gauss-point values of the old
//     triangles around it, and its value at the node is the nodal value
//     (superconvergent patch recovery, Zienkiewicz & Zhu 1992, IJNME 33). A
//     node on the boundary (outer boundary, holes, crack faces) takes the
//     mean of its interior neighbours' patch polynomials at its position,
//     as in that paper. It is local, needs no global solve and reproduces
//     linear fields exactly.
//     Broken points are left out of the fits (their f would smear the
//     porosity of the sound material next to them) unless the whole patch is
//     broken.
//   - L2Projection: the global L2 projection onto continuous P1 on the old
//     mesh, M c = b with the consistent mass matrix M, solved per component
//     by Jacobi-preconditioned conjugate gradients (M is symmetric positive
//     definite and well conditioned on shape-regular meshes). Every point,
//     broken or not, enters the right-hand side. It is the best P1 fit in
//     the L2 norm (smaller error on smooth fields) but not local: a sharp
//     peak rings over the whole mesh, and the bounds then clip far more
//     points than with PatchRecovery, which is therefore the default.
//
// Physical bounds are enforced afterwards: f is clamped to [F0, FBreak)
// (the largest float below FBreak at most), p to p ≥ 0; on request
// (Options.TraceFromPorosity) the trace of Ep is reset to
// ln((1−F0)/(1−f)), the value that growth-only GTN porosity evolution
// ḟ = (1−f) tr Ėᵖ implies (Gurson 1977; Tvergaard 1981) — not valid with
// nucleation, hence off by default. A new point whose nearest old Gauss point
// (within the old triangle that contains it) is broken stays broken and takes
// that point's state and Gauss-point data verbatim.
//
// # Unchanged elements
//
// A new triangle whose three corner coordinates equal those of an old
// triangle exactly, in any rotation of the vertex order, takes that
// triangle's Gauss-point states and data verbatim: a rotation of the
// vertices permutes the area coordinates, and the symmetric rule of
// fem.ElementRule maps onto itself under it, so every new point has an old
// point with identical area coordinates.
//
// # Record
//
// Map returns a Record: maximum porosity, ∫p dV and the stress work ∫W dV
// (area weight, or 2πr dA in axisymmetry) before and after, the counts of
// verbatim, projected, extrapolated and broken points, the clamps applied,
// and the wall time of every phase. Reaction forces before and after
// re-equilibration belong to the caller.
//
// # Example
//
//	to, rec, err := transfer.Map(oldMesh, &transfer.Fields{
//		U: u, Linear: [][]float64{theta, pres, abar, lambda},
//		State: states, Gauss: data,
//	}, newMesh, opt)
//
// Location alone:
//
//	lc, err := transfer.NewLocator(oldMesh, 1e-9)
//	e, l, inside := lc.Locate(p)
package transfer
