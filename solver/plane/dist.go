package plane

import "math"

// Dist returns the distance between a and b, by math.Hypot (no overflow or
// underflow of the squares).
func Dist(a, b [2]float64) float64 { return math.Hypot(a[0]-b[0], a[1]-b[1]) }

// DistSq returns the squared distance between a and b, dx² + dy². Its
// square root is not Dist bit for bit: compare squared distances with
// DistSq and distances with Dist.
func DistSq(a, b [2]float64) float64 {
	dx, dy := a[0]-b[0], a[1]-b[1]
	return dx*dx + dy*dy
}

// SegDist returns the distance from x to the segment a–b: to the foot of
// the perpendicular when it falls on the segment, else to the nearer end
// (a when the segment has zero length).
func SegDist(x, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	l2 := dx*dx + dy*dy
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, ((x[0]-a[0])*dx+(x[1]-a[1])*dy)/l2))
	}
	return math.Hypot(x[0]-a[0]-t*dx, x[1]-a[1]-t*dy)
}

// Barycentric returns the area coordinates of p in the triangle a, b, c:
// the ratios of the sub-triangles' signed areas to the whole (Möbius 1827),
// the third as one less the other two. They are negative outside the
// triangle and infinite or NaN for a degenerate one.
func Barycentric(p, a, b, c [2]float64) [3]float64 {
	det := (b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1])
	l1 := ((b[0]-p[0])*(c[1]-p[1]) - (c[0]-p[0])*(b[1]-p[1])) / det
	l2 := ((c[0]-p[0])*(a[1]-p[1]) - (a[0]-p[0])*(c[1]-p[1])) / det
	return [3]float64{l1, l2, 1 - l1 - l2}
}

// ClampBary removes round-off negatives from area coordinates and
// renormalises them to sum to one.
func ClampBary(l [3]float64) [3]float64 {
	if l[0] >= 0 && l[1] >= 0 && l[2] >= 0 {
		return l
	}
	s := 0.0
	for k := range l {
		l[k] = math.Max(l[k], 0)
		s += l[k]
	}
	for k := range l {
		l[k] /= s
	}
	return l
}

// InPolygon reports whether x lies strictly inside the closed polygon poly
// (even–odd rule, Shimrat 1962, Commun. ACM 5; points on its edges count as
// outside).
func InPolygon(x [2]float64, poly [][2]float64) bool {
	in := false
	n := len(poly)
	for i := 0; i < n; i++ {
		a, b := poly[i], poly[(i+1)%n]
		if SegDist(x, a, b) == 0 {
			return false
		}
		if (a[1] > x[1]) != (b[1] > x[1]) {
			if t := (x[1] - a[1]) / (b[1] - a[1]); a[0]+t*(b[0]-a[0]) > x[0] {
				in = !in
			}
		}
	}
	return in
}
