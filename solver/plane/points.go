package plane

import (
	"math"

	"github.com/tidwall/rtree"
)

// Points answers nearest-distance queries on a fixed set of points indexed
// in an R-tree. Queries are safe for concurrent use.
type Points struct {
	tree rtree.RTreeG[struct{}]
}

// NewPoints indexes the points pts (they are copied).
func NewPoints(pts [][2]float64) *Points {
	s := &Points{}
	for _, p := range pts {
		s.tree.Insert(p, p, struct{}{})
	}
	return s
}

// Len returns the number of points.
func (s *Points) Len() int { return s.tree.Len() }

// Dist returns the distance from x to the nearest point, or a value ≥ cutoff
// when none lies closer than cutoff (+Inf when there are no points). The
// distance is the square root of the least (qx−x)² + (qy−y)², capped at
// cutoff².
func (s *Points) Dist(x [2]float64, cutoff float64) float64 {
	if s.tree.Len() == 0 {
		return math.Inf(1)
	}
	best := cutoff * cutoff
	// The R-tree returns items by increasing distance (a box's distance is
	// a lower bound for its points' in floating point too), so the first
	// is the nearest.
	s.tree.Nearby(
		rtree.BoxDist[float64, struct{}](x, x, func(q, _ [2]float64, _ struct{}) float64 {
			return (q[0]-x[0])*(q[0]-x[0]) + (q[1]-x[1])*(q[1]-x[1])
		}),
		func(_, _ [2]float64, _ struct{}, d float64) bool {
			if d < best {
				best = d
			}
			return false
		})
	return math.Sqrt(best)
}
