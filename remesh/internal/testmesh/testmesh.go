// Package testmesh builds the small meshes and Gauss-point layouts that the
// tests of the adaptive cycle's parts share.
package testmesh

import (
	"tearline/solver/fem"
	"tearline/solver/material"
)

// Rectangle builds a structured 6-node triangulation of the rectangle
// [x0, x1] × [y0, y1] with nx × ny cells, each cut along its diagonal into
// two counter-clockwise triangles; boundary labels "bottom", "right",
// "top", "left"; corner nodes first. Named points: "origin" at (x0, y0).
func Rectangle(x0, y0, x1, y1 float64, nx, ny int) *fem.Mesh {
	m := &fem.Mesh{Labels: []string{"bottom", "right", "top", "left"}, Points: map[string]int{}}
	id := func(i, j int) int { return j*(nx+1) + i }
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			m.X = append(m.X, [2]float64{x0 + (x1-x0)*float64(i)/float64(nx), y0 + (y1-y0)*float64(j)/float64(ny)})
		}
	}
	m.NumCorners = len(m.X)
	mid := map[[2]int]int{}
	midOf := func(a, b int) int {
		k := [2]int{min(a, b), max(a, b)}
		if n, ok := mid[k]; ok {
			return n
		}
		pa, pb := m.X[a], m.X[b]
		m.X = append(m.X, [2]float64{0.5 * (pa[0] + pb[0]), 0.5 * (pa[1] + pb[1])})
		mid[k] = len(m.X) - 1
		return len(m.X) - 1
	}
	add := func(a, b, c int) {
		m.Tri = append(m.Tri, [6]int{a, b, c, midOf(a, b), midOf(b, c), midOf(c, a)})
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			add(a, b, c)
			add(a, c, d)
		}
	}
	// boundary edges: find each triangle edge on the rectangle's sides
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			pa, pb := m.X[a], m.X[b]
			lab := -1
			switch {
			case pa[1] == y0 && pb[1] == y0:
				lab = 0
			case pa[0] == x1 && pb[0] == x1:
				lab = 1
			case pa[1] == y1 && pb[1] == y1:
				lab = 2
			case pa[0] == x0 && pb[0] == x0:
				lab = 3
			}
			if lab >= 0 {
				m.Boundary = append(m.Boundary, fem.Edge{A: a, B: b, Mid: t[3+k], Label: lab, Tri: e})
			}
		}
	}
	m.Points["origin"] = id(0, 0)
	return m
}

// GaussPoints lays out ElementRule points on m with the virgin state f = f0.
func GaussPoints(m *fem.Mesh, f0 float64) *fem.GaussPoints {
	r := fem.ElementRule()
	gp := &fem.GaussPoints{PerElement: r.Len()}
	for _, t := range m.Tri {
		for i := 0; i < r.Len(); i++ {
			gp.Points = append(gp.Points, fem.GaussPoint{X: r.Point(i, m.X[t[0]], m.X[t[1]], m.X[t[2]]), State: material.State{F: f0}})
		}
	}
	return gp
}
