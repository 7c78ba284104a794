// Package plane holds the plane geometry that the mesher (remesh/tri), the
// carver and size fields (remesh), the state transfer (transfer) and the
// fracture measures (criteria) share: robust orientation and in-circle
// tests, distances, area coordinates, point in polygon, Douglas–Peucker
// simplification, 3×3 inverses, and an R-tree index of triangles and of
// points. It imports only the standard library and
// github.com/tidwall/rtree.
//
// # Why one package
//
// These routines used to live in three or four copies, one per caller, and
// the copies had drifted apart: the mesher's orientation test lacked the
// underflow guard of the transfer's (Shewchuk's error bound is relative and
// fails when the products underflow), a helper named dist2 returned the
// distance in one package and its square in another, and the same point
// could be looked up by a grid, a linear scan, an R-tree and a k-d tree
// with different rules for points on shared edges. Here each routine exists
// once, with one meaning per name, and the rules that differ are kept as
// named variants because callers depend on them bit for bit.
//
// # Predicates
//
// Orient and InCircle return values whose signs are exact (Shewchuk 1997,
// "Adaptive precision floating-point arithmetic and fast robust geometric
// predicates", Discrete Comput. Geom. 18): a floating-point filter decides
// the sign when the determinant exceeds its forward error bound; otherwise
// it is evaluated exactly — by an error-free split of the products when the
// coordinate differences are exact, by floating-point expansions when no
// product underflows, and by rational arithmetic (math/big) when one might.
// Only the signs are meaningful.
//
// # Distances
//
// Dist is math.Hypot of the differences; DistSq is dx² + dy². The two are
// not interchangeable bit for bit (the square root of DistSq can differ from
// Dist in the last place), so each caller keeps the one it used. SegDist is
// the distance to a segment, InPolygon the even–odd test.
//
// # Location
//
// A Locator indexes triangles given by their corners; a Points indexes a
// point set. The small API follows github.com/tidwall/rtree:
//
//	lc := plane.NewLocator(func(i int) [3][2]float64 {
//		t := m.Tri[i]
//		return [3][2]float64{m.X[t[0]], m.X[t[1]], m.X[t[2]]}
//	}, len(m.Tri))
//	if e, l, ok := lc.Find(x); ok {
//		// x lies in triangle e with area coordinates l
//	}
//	e, d2, l, _ := lc.Nearest(x) // nearest triangle, squared distance
//
//	wake := plane.NewPoints(pts)
//	d := wake.Dist(x, cutoff) // distance to the nearest point, or ≥ cutoff
//
// Find decides containment exactly and prefers the triangle in which the
// point lies deepest; FindFirst takes the lowest-numbered triangle within a
// tolerance in area coordinates; both break ties by the lowest number, so
// a point on a shared edge lands in the same triangle whatever the tree's
// shape.
package plane
