package plane

import (
	"math"

	"github.com/tidwall/rtree"
)

// Points answers nearest-distance queries on a fixed set of points indexed
// in an R-tree. Queries are safe for concurrent use.
type Points struct {
	tree rtree.RTreeG[struct{}]
	// lo, hi bound the points; step is a first search radius for a query
	// inside them, about the spacing of n points spread over that box.
	lo, hi [2]float64
	step   float64
}

// NewPoints indexes the points pts (they are copied).
func NewPoints(pts [][2]float64) *Points {
	s := &Points{}
	for _, p := range pts {
		s.tree.Insert(p, p, struct{}{})
	}
	if len(pts) > 0 {
		s.lo, s.hi = s.tree.Bounds()
		s.step = math.Max(s.hi[0]-s.lo[0], s.hi[1]-s.lo[1]) / math.Sqrt(float64(len(pts)))
	}
	return s
}

// Len returns the number of points.
func (s *Points) Len() int { return s.tree.Len() }

// Dist returns the distance from x to the nearest point, or a value ≥ cutoff
// when none lies closer than cutoff (+Inf when there are no points). It is
// the square root of the least (qx−x)² + (qy−y)² over the points q, capped
// at cutoff².
//
// The search runs over boxes around x of growing half-width r: once a box
// holds a point at distance d ≤ r, no point outside it is nearer, and when
// its nearest point lies farther than r, the box of half-width d holds the
// answer. A best-first walk of the tree (rtree's Nearby) gives the same
// answer but queues every item of each leaf it opens, which costs more
// than these box searches on the small, thinned sets of the size field.
func (s *Points) Dist(x [2]float64, cutoff float64) float64 {
	if s.tree.Len() == 0 {
		return math.Inf(1)
	}
	best := cutoff * cutoff
	// Start at the distance to the bounding box, or at the spacing inside it.
	gx := math.Max(0, math.Max(s.lo[0]-x[0], x[0]-s.hi[0]))
	gy := math.Max(0, math.Max(s.lo[1]-x[1], x[1]-s.hi[1]))
	r := math.Max(math.Hypot(gx, gy), s.step)
	for {
		if !(r < cutoff) {
			// Every point nearer than the cut-off lies in this box.
			return math.Sqrt(math.Min(best, s.nearestIn(x, cutoff, best)))
		}
		if d := s.nearestIn(x, r, math.Inf(1)); d <= r*r {
			return math.Sqrt(math.Min(best, d))
		} else if d < math.Inf(1) {
			return math.Sqrt(math.Min(best, s.nearestIn(x, math.Sqrt(d), d)))
		}
		r *= 4
	}
}

// nearestIn returns the least squared distance from x, below bound, of the
// points in the box of half-width r around x (widened by a relative 10⁻⁹,
// so that the rounded box holds every point whose rounded squared distance
// is below r²), or bound when there is none.
func (s *Points) nearestIn(x [2]float64, r, bound float64) float64 {
	w := r * (1 + 1e-9)
	best := bound
	s.tree.Search([2]float64{x[0] - w, x[1] - w}, [2]float64{x[0] + w, x[1] + w}, func(q, _ [2]float64, _ struct{}) bool {
		if d := (q[0]-x[0])*(q[0]-x[0]) + (q[1]-x[1])*(q[1]-x[1]); d < best {
			best = d
		}
		return true
	})
	return best
}
