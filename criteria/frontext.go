package criteria

import (
	"math"

	"tearline/solver/plane"
)

// frontExtension returns the crack extension of a tip measured to the
// damage front, the contour f = f_tip interpolated inside the elements:
// s_A + |p − A|, where A is the start of the path's last leg, s_A the path
// length to A, and p the point of the front seen head-on from A — a point
// where the distance from A is stationary along the contour (the contour
// perpendicular to the line of sight: a vertex where the distance stops
// growing, a line's end where it still grows, or the foot of the
// perpendicular from A on a segment). Of those on contour lines that pass
// within near of the path's end X (the reach the path search bridges, so
// only this tip's front counts) and seen from A within 30° of the last leg
// A→X, the farthest wins; with none, Δa is the path length. A front with
// corners inside that cone is measured to its farthest corner. The cone is
// this package's choice: wide enough for a last leg that ends on the side
// of a round front (the tip search's choice wanders there), narrow enough
// that a long flat front is not measured to its far ends, where the
// distance from A also stops growing.
//
// Why this point: it depends on A and the contour only, not on where along
// the front the path search stopped. A flat front is measured by its
// distance (the foot of the perpendicular), a round one by its farthest
// point (a vertex, within the chord error), both whatever point of the
// front X is; a crossing of the path's extension with the contour, or the
// farthest contour point along the last leg, would carry the leg's aim
// error, R(1 − cos φ) on a round front of radius R aimed off by φ. The
// contour points are linear interpolants of the nodal porosity along
// sub-triangle edges, so the measure moves continuously as porosity grows
// inside an element.
func frontExtension(lines [][][2]float64, path [][2]float64, near float64) float64 {
	n := len(path)
	if n < 2 {
		return 0
	}
	a, x := path[n-2], path[n-1]
	sA := polyLength(path[:n-1])
	best := math.Inf(-1)
	for _, l := range lines {
		if lineDist(x, l) <= near {
			best = math.Max(best, headOn(l, a, x))
		}
	}
	if math.IsInf(best, -1) {
		return sA + plane.Dist(a, x)
	}
	return sA + best
}

// headOn returns the largest distance from a of the points of polyline
// line, within 30° of the direction a→x, where the distance from a is
// stationary along the line (see frontExtension); −Inf when there are
// none. A closed line repeats its first point at the end.
func headOn(line [][2]float64, a, x [2]float64) float64 {
	cosCone := math.Sqrt(3) / 2 // cos 30°
	ux := [2]float64{x[0] - a[0], x[1] - a[1]}
	lx := math.Hypot(ux[0], ux[1])
	best := math.Inf(-1)
	take := func(p [2]float64) {
		d := plane.Dist(p, a)
		if (p[0]-a[0])*ux[0]+(p[1]-a[1])*ux[1] >= cosCone*d*lx {
			best = math.Max(best, d)
		}
	}
	// consecutive repeats (a contour through a node) have no direction
	l := make([][2]float64, 0, len(line))
	for i, p := range line {
		if i == 0 || p != line[i-1] {
			l = append(l, p)
		}
	}
	m := len(l)
	closed := m > 2 && l[0] == l[m-1]
	// rate of change of the distance from a moving from p towards q, sign only
	rate := func(p, q [2]float64) float64 { return (p[0]-a[0])*(q[0]-p[0]) + (p[1]-a[1])*(q[1]-p[1]) }
	for i, p := range l {
		if closed && i == m-1 {
			break // the repeated first point
		}
		prev, next := i-1, i+1
		if closed && i == 0 {
			prev = m - 2
		}
		// stops growing arriving from prev, does not grow leaving to next
		up := prev < 0 || rate(l[prev], p) >= 0
		down := next >= m || rate(p, l[next]) <= 0
		if up && down && (prev >= 0 || next < m) {
			take(p)
		}
		if next < m {
			if f, ok := foot(a, p, l[next]); ok {
				take(f)
			}
		}
	}
	return best
}

// foot returns the foot of the perpendicular from a on the segment p–q
// when it lies on the segment (ends included, so that round-off at a
// vertex loses no foot).
func foot(a, p, q [2]float64) ([2]float64, bool) {
	t := [2]float64{q[0] - p[0], q[1] - p[1]}
	tt := t[0]*t[0] + t[1]*t[1]
	if !(tt > 0) {
		return p, false
	}
	s := ((a[0]-p[0])*t[0] + (a[1]-p[1])*t[1]) / tt
	if !(s >= 0 && s <= 1) {
		return p, false
	}
	return [2]float64{p[0] + s*t[0], p[1] + s*t[1]}, true
}

// lineDist returns the distance from x to the polyline l (a single point
// counts as a line of zero length).
func lineDist(x [2]float64, l [][2]float64) float64 {
	if len(l) == 1 {
		return plane.Dist(x, l[0])
	}
	d := math.Inf(1)
	for i := 1; i < len(l); i++ {
		d = math.Min(d, plane.SegDist(x, l[i-1], l[i]))
	}
	return d
}
