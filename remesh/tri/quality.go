package tri

import (
	"math"

	"tearline/solver/plane"
)

// Report summarises the quality of a mesh.
type Report struct {
	Triangles, Nodes int
	// MinAngleDeg and MaxAngleDeg are the extreme triangle angles (degrees).
	MinAngleDeg, MaxAngleDeg float64
	// SizeRatioMax is the largest ratio of a triangle's size (its longest
	// edge) to h at its centroid; FractionAbove1p2 the fraction of triangles
	// whose ratio exceeds 1.2. Both are 0 without a size function.
	SizeRatioMax, FractionAbove1p2 float64
}

// Quality measures the mesh against the size function (which may be nil).
// Nodes counts the points used by triangles.
func Quality(m *Mesh, size func(x, y float64) float64) Report {
	rep := Report{Triangles: len(m.Triangles), MinAngleDeg: 180}
	used := make([]bool, len(m.Points))
	above := 0
	for _, t := range m.Triangles {
		p := [3][2]float64{m.Points[t[0]], m.Points[t[1]], m.Points[t[2]]}
		var l [3]float64 // l[k]: length of the edge opposite vertex k
		for k := 0; k < 3; k++ {
			used[t[k]] = true
			l[k] = plane.Dist(p[(k+1)%3], p[(k+2)%3])
		}
		for k := 0; k < 3; k++ {
			a, b, c := l[k], l[(k+1)%3], l[(k+2)%3]
			// law of cosines for the angle opposite edge a
			cosA := (b*b + c*c - a*a) / (2 * b * c)
			ang := math.Acos(math.Max(-1, math.Min(1, cosA))) * 180 / math.Pi
			rep.MinAngleDeg = math.Min(rep.MinAngleDeg, ang)
			rep.MaxAngleDeg = math.Max(rep.MaxAngleDeg, ang)
		}
		if size != nil {
			h := size((p[0][0]+p[1][0]+p[2][0])/3, (p[0][1]+p[1][1]+p[2][1])/3)
			ratio := math.Max(l[0], math.Max(l[1], l[2])) / h
			rep.SizeRatioMax = math.Max(rep.SizeRatioMax, ratio)
			if ratio > 1.2 {
				above++
			}
		}
	}
	for _, u := range used {
		if u {
			rep.Nodes++
		}
	}
	if len(m.Triangles) > 0 {
		rep.FractionAbove1p2 = float64(above) / float64(len(m.Triangles))
	} else {
		rep.MinAngleDeg = 0
	}
	return rep
}
