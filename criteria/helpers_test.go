package criteria

import (
	"math"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// meshBuilder assembles a 6-node mesh from corner nodes and corner
// triangles: midside nodes at chord midpoints, boundary edges found as
// edges used once and labelled by a callback.
type meshBuilder struct {
	corners [][2]float64
	tris    [][3]int
}

func (b *meshBuilder) build(label func(a, c [2]float64) string) *fem.Mesh {
	m := &fem.Mesh{NumCorners: len(b.corners), Points: map[string]int{}}
	m.X = append(m.X, b.corners...)
	mid := map[[2]int]int{}
	midOf := func(a, c int) int {
		k := [2]int{min(a, c), max(a, c)}
		if n, ok := mid[k]; ok {
			return n
		}
		xa, xc := m.X[a], m.X[c]
		m.X = append(m.X, [2]float64{(xa[0] + xc[0]) / 2, (xa[1] + xc[1]) / 2})
		mid[k] = len(m.X) - 1
		return mid[k]
	}
	count := map[[2]int]int{}
	for _, t := range b.tris {
		m.Tri = append(m.Tri, [6]int{t[0], t[1], t[2], midOf(t[0], t[1]), midOf(t[1], t[2]), midOf(t[2], t[0])})
		for j := 0; j < 3; j++ {
			a, c := t[j], t[(j+1)%3]
			count[[2]int{min(a, c), max(a, c)}]++
		}
	}
	labels := map[string]int{}
	for e, t := range b.tris {
		for j := 0; j < 3; j++ {
			a, c := t[j], t[(j+1)%3]
			if count[[2]int{min(a, c), max(a, c)}] != 1 {
				continue
			}
			name := label(m.X[a], m.X[c])
			li, ok := labels[name]
			if !ok {
				li = len(m.Labels)
				labels[name] = li
				m.Labels = append(m.Labels, name)
			}
			m.Boundary = append(m.Boundary, fem.Edge{A: a, B: c, Mid: midOf(a, c), Label: li, Tri: e})
		}
	}
	return m
}

// crackedDisk builds a polar structured mesh of a disk of radius R around
// tip with a crack from the tip to the rim along −dir: nr rings graded
// towards the tip (r_k = R (k/nr)^1.5), nth sectors from θ = −π to π with
// the nodes of the two faces duplicated. Labels "crack" and "outer".
func crackedDisk(R float64, nr, nth int, tip, dir [2]float64) *fem.Mesh {
	t, n := frame(dir)
	var b meshBuilder
	b.corners = append(b.corners, tip)
	id := func(k, j int) int { return 1 + (k-1)*(nth+1) + j }
	for k := 1; k <= nr; k++ {
		r := R * math.Pow(float64(k)/float64(nr), 1.5)
		for j := 0; j <= nth; j++ {
			th := -math.Pi + 2*math.Pi*float64(j)/float64(nth)
			x1, x2 := r*math.Cos(th), r*math.Sin(th)
			b.corners = append(b.corners, [2]float64{tip[0] + x1*t[0] + x2*n[0], tip[1] + x1*t[1] + x2*n[1]})
		}
	}
	for j := 0; j < nth; j++ {
		b.tris = append(b.tris, [3]int{0, id(1, j), id(1, j+1)})
	}
	for k := 1; k < nr; k++ {
		for j := 0; j < nth; j++ {
			b.tris = append(b.tris, [3]int{id(k, j), id(k+1, j), id(k+1, j+1)}, [3]int{id(k, j), id(k+1, j+1), id(k, j+1)})
		}
	}
	m := b.build(func(a, c [2]float64) string {
		ra, rc := math.Hypot(a[0]-tip[0], a[1]-tip[1]), math.Hypot(c[0]-tip[0], c[1]-tip[1])
		if math.Abs(ra-R) < 1e-9*R && math.Abs(rc-R) < 1e-9*R {
			return "outer"
		}
		return "crack"
	})
	m.Points["tip"] = 0
	return m
}

// gridMesh builds a structured mesh of the rectangle [x0,x1]×[y0,y1] with
// nx×ny squares each split into two triangles (alternating diagonals when
// cross is set); all boundary edges get the label "outer".
func gridMesh(x0, x1, y0, y1 float64, nx, ny int, cross bool) *fem.Mesh {
	var b meshBuilder
	id := func(i, j int) int { return j*(nx+1) + i }
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			b.corners = append(b.corners, [2]float64{x0 + (x1-x0)*float64(i)/float64(nx), y0 + (y1-y0)*float64(j)/float64(ny)})
		}
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, c, d, e := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			if cross && (i+j)%2 == 1 {
				b.tris = append(b.tris, [3]int{a, c, e}, [3]int{c, d, e})
			} else {
				b.tris = append(b.tris, [3]int{a, c, d}, [3]int{a, d, e})
			}
		}
	}
	return b.build(func(a, c [2]float64) string { return "outer" })
}

// gaussFrom fills the Gauss-point data of m from a function that gives
// F, P, W and the porosity at a reference point.
func gaussFrom(m *fem.Mesh, at func(x [2]float64) (F, P [5]float64, W, f float64)) *fem.GaussPoints {
	rule := fem.ElementRule()
	gp := &fem.GaussPoints{PerElement: rule.Len(), Points: make([]fem.GaussPoint, len(m.Tri)*rule.Len())}
	for e, t := range m.Tri {
		a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
		area := 0.5 * ((b[0]-a[0])*(c[1]-a[1]) - (c[0]-a[0])*(b[1]-a[1]))
		for i := 0; i < rule.Len(); i++ {
			x := rule.Point(i, a, b, c)
			g := gp.At(e, i)
			g.X = x
			g.DA = area * rule.W[i]
			var f float64
			g.F, g.P, g.W, f = at(x)
			g.State = material.State{F: f}
		}
	}
	return gp
}

// williamsGauss returns F = I + ∇u (∇u by central differences of the
// Williams displacement), P = the Williams stress and W = ½σ:ε, optionally
// with a rigid rotation by angle rot superposed (F → RF, P → RP).
func williamsGauss(k KField, rot float64) func(x [2]float64) (F, P [5]float64, W, f float64) {
	return func(x [2]float64) (F, P [5]float64, W, f float64) {
		r := math.Hypot(x[0]-k.Tip[0], x[1]-k.Tip[1])
		h := 1e-6 * r
		var H [2][2]float64
		for j := 0; j < 2; j++ {
			xp, xm := x, x
			xp[j] += h
			xm[j] -= h
			up, um := k.Displacement(xp), k.Displacement(xm)
			for i := 0; i < 2; i++ {
				H[i][j] = (up[i] - um[i]) / (2 * h)
			}
		}
		s := k.Stress(x)
		W = 0.5 * (s[0]*H[0][0] + s[1]*H[1][1] + s[3]*(H[0][1]+H[1][0]))
		Fm := [2][2]float64{{1 + H[0][0], H[0][1]}, {H[1][0], 1 + H[1][1]}}
		Pm := [2][2]float64{{s[0], s[3]}, {s[3], s[1]}}
		c, sn := math.Cos(rot), math.Sin(rot)
		R := [2][2]float64{{c, -sn}, {sn, c}}
		var RF, RP [2][2]float64
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				for l := 0; l < 2; l++ {
					RF[i][j] += R[i][l] * Fm[l][j]
					RP[i][j] += R[i][l] * Pm[l][j]
				}
			}
		}
		F = [5]float64{RF[0][0], RF[0][1], RF[1][0], RF[1][1], 1}
		P = [5]float64{RP[0][0], RP[0][1], RP[1][0], RP[1][1], s[2]}
		return F, P, W, 0
	}
}
