package plane

import "math"

// DouglasPeucker marks in keep the points of a polyline or closed loop of
// len(keep) points that its chords need, between the kept points i and j
// (Douglas & Peucker 1973, Cartographica 10). The points strictly between
// them run i+1, i+2, … modulo len(keep) up to j (the whole loop but i when
// j = i). The span is split at the interior point k of largest
// excess(i, j, k), the first one on ties, while that exceeds limit, and
// both halves are treated alike. NaN excesses never split.
//
// excess measures how badly the chord from point i to point j replaces
// point k: a distance against an absolute limit, or a distance over a
// local tolerance against the limit 1, or anything one-sided. The caller
// keeps its own arithmetic; which points are kept does not depend on the
// order in which spans are treated.
func DouglasPeucker(keep []bool, i, j int, excess func(i, j, k int) float64, limit float64) {
	n := len(keep)
	work := [][2]int{{i, j}}
	for len(work) > 0 {
		s := work[len(work)-1]
		work = work[:len(work)-1]
		worst, wk := math.Inf(-1), -1
		for k := (s[0] + 1) % n; k != s[1]; k = (k + 1) % n {
			if e := excess(s[0], s[1], k); e > worst {
				worst, wk = e, k
			}
		}
		if wk < 0 || !(worst > limit) {
			continue
		}
		keep[wk] = true
		work = append(work, [2]int{s[0], wk}, [2]int{wk, s[1]})
	}
}

// Simplify removes the points of an open polyline that lie within tol of
// the line through the ends of the chord that replaces them (Douglas &
// Peucker 1973, Cartographica 10); the ends stay. The distance is measured
// to the chord's line, or to its first end when both ends coincide.
func Simplify(p [][2]float64, tol float64) [][2]float64 {
	if len(p) < 3 {
		return p
	}
	keep := make([]bool, len(p))
	keep[0], keep[len(p)-1] = true, true
	DouglasPeucker(keep, 0, len(p)-1, func(i, j, k int) float64 {
		a, b := p[i], p[j]
		dx, dy := b[0]-a[0], b[1]-a[1]
		if l := math.Hypot(dx, dy); l != 0 {
			return math.Abs((p[k][0]-a[0])*dy-(p[k][1]-a[1])*dx) / l
		}
		return Dist(p[k], a)
	}, tol)
	out := make([][2]float64, 0, len(p))
	for i, k := range keep {
		if k {
			out = append(out, p[i])
		}
	}
	return out
}
