package plane

import (
	"math"

	"github.com/tidwall/rtree"
)

// Locator finds the triangle that contains a point among a fixed set of
// triangles. It indexes the triangles' bounding boxes in an R-tree
// (github.com/tidwall/rtree); a change of the corners after NewLocator is
// not seen. Queries are safe for concurrent use.
//
// Three rules pick a triangle when several qualify (a point on a shared
// edge or vertex), each with its own callers:
//
//   - Find and FindToward decide containment exactly (Orient on the
//     corners) and take the triangle in which the point lies deepest;
//   - FindFirst takes the lowest-numbered triangle whose area coordinates
//     are all ≥ −tol;
//   - Nearest takes the triangle at the least distance.
//
// Every rule breaks remaining ties by the lowest triangle number, so the
// answer does not depend on the shape of the tree.
type Locator struct {
	tree rtree.RTreeG[int]
	tri  [][3][2]float64
	// extent is the largest side of any triangle's bounding box; FindFirst
	// widens its search box by a multiple of it.
	extent float64
}

// NewLocator indexes the n triangles whose corners (counter-clockwise) are
// corners(i), i = 0 … n−1.
func NewLocator(corners func(i int) [3][2]float64, n int) *Locator {
	l := &Locator{tri: make([][3][2]float64, n)}
	for i := range l.tri {
		v := corners(i)
		l.tri[i] = v
		a, b, c := v[0], v[1], v[2]
		lo := [2]float64{math.Min(a[0], math.Min(b[0], c[0])), math.Min(a[1], math.Min(b[1], c[1]))}
		hi := [2]float64{math.Max(a[0], math.Max(b[0], c[0])), math.Max(a[1], math.Max(b[1], c[1]))}
		l.tree.Insert(lo, hi, i)
		l.extent = math.Max(l.extent, math.Max(hi[0]-lo[0], hi[1]-lo[1]))
	}
	return l
}

// Len returns the number of triangles.
func (l *Locator) Len() int { return len(l.tri) }

// Corners returns the corners of triangle i.
func (l *Locator) Corners(i int) [3][2]float64 { return l.tri[i] }

// Contains reports whether the closed triangle i contains x, by exact
// orientation signs.
func (l *Locator) Contains(i int, x [2]float64) bool {
	v := &l.tri[i]
	return Orient(v[0], v[1], x) >= 0 && Orient(v[1], v[2], x) >= 0 && Orient(v[2], v[0], x) >= 0
}

// Bary returns the area coordinates of x in triangle i (Barycentric).
func (l *Locator) Bary(i int, x [2]float64) [3]float64 {
	v := &l.tri[i]
	return Barycentric(x, v[0], v[1], v[2])
}

// Find returns a triangle that contains x and x's area coordinates in it
// (clamped: negatives are round-off, x lies in the closed triangle). Among
// several, x lies deepest (largest smallest area coordinate) in the one
// returned. ok is false when no triangle contains x or x is not finite.
func (l *Locator) Find(x [2]float64) (tri int, bary [3]float64, ok bool) {
	return l.find(x, nil)
}

// FindToward is Find with a tie-break point: among the triangles that
// contain x, the one in which toward lies deepest wins, then the one in
// which x does. A point a little way into the element that x belongs to
// decides between the elements on either side of a crack face through x.
func (l *Locator) FindToward(x, toward [2]float64) (tri int, bary [3]float64, ok bool) {
	return l.find(x, &toward)
}

func (l *Locator) find(x [2]float64, toward *[2]float64) (int, [3]float64, bool) {
	if !finite(x[0]) || !finite(x[1]) {
		return -1, [3]float64{}, false
	}
	best, bestDepth, bestTie := -1, math.Inf(-1), math.Inf(-1)
	var bestL [3]float64
	l.tree.Search(x, x, func(_, _ [2]float64, i int) bool {
		if !l.Contains(i, x) {
			return true
		}
		b := l.Bary(i, x)
		depth := math.Min(b[0], math.Min(b[1], b[2]))
		tie := 0.0
		if toward != nil {
			bt := l.Bary(i, *toward)
			tie = math.Min(bt[0], math.Min(bt[1], bt[2]))
			depth, tie = tie, depth
		}
		if depth > bestDepth || (depth == bestDepth && (tie > bestTie || (tie == bestTie && i < best))) {
			best, bestDepth, bestTie, bestL = i, depth, tie, b
		}
		return true
	})
	if best < 0 {
		return -1, [3]float64{}, false
	}
	return best, ClampBary(bestL), true
}

// FindFirst returns the lowest-numbered triangle whose area coordinates at
// x (Barycentric, not clamped) are all ≥ −tol, and those coordinates; ok is
// false when there is none. tol ≥ 0 admits points just outside a triangle
// (by tol × its height), on either side of a shared edge alike.
func (l *Locator) FindFirst(x [2]float64, tol float64) (tri int, bary [3]float64, ok bool) {
	if !finite(x[0]) || !finite(x[1]) || !(tol >= 0) {
		return -1, [3]float64{}, false
	}
	// A triangle whose area coordinates are ≥ −tol holds x within
	// 2·tol × its box's extent of its bounding box (at most two
	// coordinates are negative); the rest of the margin covers round-off.
	m := (2*tol + 1e-9) * l.extent
	best := -1
	var bestL [3]float64
	l.tree.Search([2]float64{x[0] - m, x[1] - m}, [2]float64{x[0] + m, x[1] + m}, func(_, _ [2]float64, i int) bool {
		if best >= 0 && i > best {
			return true
		}
		if b := l.Bary(i, x); b[0] >= -tol && b[1] >= -tol && b[2] >= -tol {
			best, bestL = i, b
		}
		return true
	})
	return best, bestL, best >= 0
}

// Nearest returns the triangle nearest to x, the squared distance to it
// (0 when a triangle contains x) and the area coordinates of its point
// nearest to x (clamped into the triangle). Equal distances go to the
// lowest-numbered triangle. ok is false for an empty locator or a point
// that is not finite.
func (l *Locator) Nearest(x [2]float64) (tri int, distSq float64, bary [3]float64, ok bool) {
	if !finite(x[0]) || !finite(x[1]) || len(l.tri) == 0 {
		return -1, math.Inf(1), [3]float64{}, false
	}
	// The R-tree returns items by increasing distance (box distance as the
	// lower bound for nodes, the exact point–triangle distance for items).
	near, nearD2 := -1, math.Inf(1)
	var nearL [3]float64
	l.tree.Nearby(
		rtree.BoxDist[float64, int](x, x, func(_, _ [2]float64, i int) float64 {
			d2, _ := l.nearest(i, x)
			return d2
		}),
		func(_, _ [2]float64, i int, d2 float64) bool {
			if near >= 0 && d2 > nearD2 {
				return false
			}
			if near < 0 || i < near {
				_, b := l.nearest(i, x)
				near, nearD2, nearL = i, d2, b
			}
			return true
		})
	return near, nearD2, nearL, near >= 0
}

// nearest returns the squared distance from x to triangle i and the area
// coordinates of the nearest point of i (x itself when i contains it).
func (l *Locator) nearest(i int, x [2]float64) (float64, [3]float64) {
	if l.Contains(i, x) {
		return 0, ClampBary(l.Bary(i, x))
	}
	v := &l.tri[i]
	bestD2 := math.Inf(1)
	var bestL [3]float64
	for k := 0; k < 3; k++ {
		a, b := v[k], v[(k+1)%3]
		ab := [2]float64{b[0] - a[0], b[1] - a[1]}
		s := ((x[0]-a[0])*ab[0] + (x[1]-a[1])*ab[1]) / (ab[0]*ab[0] + ab[1]*ab[1])
		s = math.Max(0, math.Min(1, s))
		q := [2]float64{a[0] + s*ab[0], a[1] + s*ab[1]}
		if d2 := DistSq(x, q); d2 < bestD2 {
			bestD2 = d2
			bestL = [3]float64{}
			bestL[k], bestL[(k+1)%3] = 1-s, s
		}
	}
	return bestD2, bestL
}
