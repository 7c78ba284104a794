package fem

import (
	"fmt"
	"math"
)

// Structured returns a structured mesh of 6-node triangles on the image of
// the unit square under place: an nx × ny grid of cells in the parameter
// square (s, t) ∈ [0, 1]², each cut into two triangles along alternating
// diagonals, every node (midside nodes included, so curved edges such as
// arcs are followed) mapped by place. place must preserve orientation.
// The boundary edges carry the labels "left" (s = 0), "right" (s = 1),
// "bottom" (t = 0) and "top" (t = 1); the named points "origin", "s1",
// "t1" and "s1t1" are the images of the parameter-square corners.
//
// It is a verification tool (patch tests, Lamé, Kirsch) and a stand-in for
// the adaptive mesher in tests of other packages.
func Structured(nx, ny int, place func(s, t float64) [2]float64) (*Mesh, error) {
	if nx < 1 || ny < 1 {
		return nil, fmt.Errorf("fem: Structured grid %d × %d must have at least one cell each way", nx, ny)
	}
	if place == nil {
		place = func(s, t float64) [2]float64 { return [2]float64{s, t} }
	}
	m := &Mesh{Labels: []string{"left", "right", "bottom", "top"}, Points: map[string]int{}}
	id := func(i, j int) int { return j*(nx+1) + i }
	par := make([][2]float64, 0)
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			par = append(par, [2]float64{float64(i) / float64(nx), float64(j) / float64(ny)})
		}
	}
	m.NumCorners = len(par)
	type edge struct{ a, b int }
	mid := make(map[edge]int)
	edgeUse := make(map[edge]int)
	midOf := func(a, b int) int {
		k := edge{min(a, b), max(a, b)}
		edgeUse[k]++
		if n, ok := mid[k]; ok {
			return n
		}
		n := len(par)
		par = append(par, [2]float64{0.5 * (par[a][0] + par[b][0]), 0.5 * (par[a][1] + par[b][1])})
		mid[k] = n
		return n
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			var tris [2][3]int
			if (i+j)%2 == 0 {
				tris = [2][3]int{{a, b, c}, {a, c, d}}
			} else {
				tris = [2][3]int{{a, b, d}, {b, c, d}}
			}
			for _, v := range tris {
				m.Tri = append(m.Tri, [6]int{v[0], v[1], v[2], midOf(v[0], v[1]), midOf(v[1], v[2]), midOf(v[2], v[0])})
			}
		}
	}
	m.X = make([][2]float64, len(par))
	for n, q := range par {
		m.X[n] = place(q[0], q[1])
	}
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			if edgeUse[edge{min(a, b), max(a, b)}] != 1 {
				continue
			}
			pa, pb := par[a], par[b]
			l := -1
			switch {
			case pa[0] == 0 && pb[0] == 0:
				l = 0
			case pa[0] == 1 && pb[0] == 1:
				l = 1
			case pa[1] == 0 && pb[1] == 0:
				l = 2
			case pa[1] == 1 && pb[1] == 1:
				l = 3
			}
			m.Boundary = append(m.Boundary, Edge{A: a, B: b, Mid: t[3+k], Label: l, Tri: e})
		}
	}
	m.Points["origin"], m.Points["s1"], m.Points["t1"], m.Points["s1t1"] = id(0, 0), id(nx, 0), id(0, ny), id(nx, ny)
	if err := m.Check(); err != nil {
		return nil, err
	}
	return m, nil
}

// Rectangle maps the unit square onto [x0, x1] × [y0, y1].
func Rectangle(x0, y0, x1, y1 float64) func(s, t float64) [2]float64 {
	return func(s, t float64) [2]float64 { return [2]float64{x0 + s*(x1-x0), y0 + t*(y1-y0)} }
}

// AnnularSector maps the unit square onto the sector a ≤ r ≤ b,
// φ0 ≤ φ ≤ φ1 (s along r, t along φ): "left" is the inner arc, "right"
// the outer arc, "bottom" the ray φ0 and "top" the ray φ1. With grade > 0
// the radial spacing is geometric (the ratio of the last to the first
// ring is grade); grade = 1 or 0 gives uniform rings.
func AnnularSector(a, b, phi0, phi1, grade float64) func(s, t float64) [2]float64 {
	return func(s, t float64) [2]float64 {
		q := s
		if grade > 0 && grade != 1 && s > 0 && s < 1 {
			// geometric spacing: r(s) = a + (b−a)(g^s − 1)/(g − 1)
			q = (math.Pow(grade, s) - 1) / (grade - 1)
		}
		r := a + (b-a)*q
		phi := phi0 + (phi1-phi0)*t
		return [2]float64{r * math.Cos(phi), r * math.Sin(phi)}
	}
}
