package transfer

import (
	"math"
	"math/rand/v2"

	"tearline/solver/fem"
)

// The test meshes are built here: structured triangulations of squares and
// annular sectors, perturbed ones, and a square with a slit. A real mesher
// lands in remesh/tri.

// buildP2 turns corner coordinates and triangles into a 6-node mesh: each
// triangle is made counter-clockwise, midside nodes are numbered after the
// corners (one per edge, shared) and placed by mid (the chord midpoint when
// nil).
func buildP2(x [][2]float64, tris [][3]int, mid func(a, b [2]float64) [2]float64) *fem.Mesh {
	m := &fem.Mesh{X: append([][2]float64(nil), x...), NumCorners: len(x)}
	edges := map[[2]int]int{}
	for _, t := range tris {
		a, b, c := x[t[0]], x[t[1]], x[t[2]]
		if (b[0]-a[0])*(c[1]-a[1])-(c[0]-a[0])*(b[1]-a[1]) < 0 {
			t[1], t[2] = t[2], t[1]
		}
		var tri [6]int
		copy(tri[:3], t[:])
		for k := 0; k < 3; k++ {
			i, j := t[k], t[(k+1)%3]
			key := [2]int{min(i, j), max(i, j)}
			n, ok := edges[key]
			if !ok {
				n = len(m.X)
				p := [2]float64{0.5 * (x[i][0] + x[j][0]), 0.5 * (x[i][1] + x[j][1])}
				if mid != nil {
					p = mid(x[i], x[j])
				}
				m.X = append(m.X, p)
				edges[key] = n
			}
			tri[3+k] = n
		}
		m.Tri = append(m.Tri, tri)
	}
	return m
}

// gridCorners returns the (nx+1)×(ny+1) grid of [x0,x1]×[y0,y1], interior
// nodes moved by up to perturb × the cell size (seeded, reproducible).
func gridCorners(nx, ny int, x0, x1, y0, y1, perturb float64, seed uint64) [][2]float64 {
	rng := rand.New(rand.NewPCG(seed, 1))
	hx, hy := (x1-x0)/float64(nx), (y1-y0)/float64(ny)
	var x [][2]float64
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			p := [2]float64{x0 + float64(i)*hx, y0 + float64(j)*hy}
			if i == nx {
				p[0] = x1
			}
			if j == ny {
				p[1] = y1
			}
			if i > 0 && i < nx && j > 0 && j < ny {
				p[0] += perturb * hx * (2*rng.Float64() - 1)
				p[1] += perturb * hy * (2*rng.Float64() - 1)
			}
			x = append(x, p)
		}
	}
	return x
}

// gridTris splits every cell of an nx×ny grid into two triangles; flip(i, j)
// chooses the other diagonal.
func gridTris(nx, ny int, flip func(i, j int) bool) [][3]int {
	var tris [][3]int
	id := func(i, j int) int { return j*(nx+1) + i }
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			if flip != nil && flip(i, j) {
				tris = append(tris, [3]int{a, b, d}, [3]int{b, c, d})
			} else {
				tris = append(tris, [3]int{a, b, c}, [3]int{a, c, d})
			}
		}
	}
	return tris
}

// squareMesh is an nx×ny triangulation of the unit square.
func squareMesh(nx, ny int, perturb float64, seed uint64) *fem.Mesh {
	return buildP2(gridCorners(nx, ny, 0, 1, 0, 1, perturb, seed), gridTris(nx, ny, func(i, j int) bool { return (i+j)%2 == 1 }), nil)
}

// sectorMesh is an nr×nt triangulation of the annular sector r in [r0, 1],
// angle in [0, π/2]; vertices lie on the arc r = 1, and so do the midside
// nodes of the outer edges when curved (else at the chords' midpoints).
func sectorMesh(nr, nt int, r0 float64, curved bool) *fem.Mesh {
	var x [][2]float64
	for j := 0; j <= nt; j++ {
		th := 0.5 * math.Pi * float64(j) / float64(nt)
		for i := 0; i <= nr; i++ {
			r := r0 + (1-r0)*float64(i)/float64(nr)
			x = append(x, [2]float64{r * math.Cos(th), r * math.Sin(th)})
		}
	}
	onArc := func(a, b [2]float64) [2]float64 {
		p := [2]float64{0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])}
		if ra, rb := math.Hypot(a[0], a[1]), math.Hypot(b[0], b[1]); curved && math.Abs(ra-1) < 1e-12 && math.Abs(rb-1) < 1e-12 {
			r := math.Hypot(p[0], p[1])
			p = [2]float64{p[0] / r, p[1] / r}
		}
		return p
	}
	return buildP2(x, gridTris(nr, nt, nil), onArc)
}

// slitMesh is an n×n triangulation (n even) of the unit square with a slit
// (a crack of zero width) along y = ½ from x = 0 to x = ½: the slit's nodes
// except the tip are duplicated, the copies used by the triangles above it.
// It returns the mesh and, per corner node, +1 above / −1 below the slit
// (0 elsewhere).
func slitMesh(n int) (*fem.Mesh, []int) {
	x := gridCorners(n, n, 0, 1, 0, 1, 0, 0)
	side := make([]int, len(x))
	dup := map[int]int{}
	for i := 0; i < n/2; i++ {
		k := (n/2)*(n+1) + i
		dup[k] = len(x)
		x = append(x, x[k])
		side[k] = -1
		side = append(side, 1)
	}
	tris := gridTris(n, n, nil)
	for t := range tris {
		cy := (x[tris[t][0]][1] + x[tris[t][1]][1] + x[tris[t][2]][1]) / 3
		if cy > 0.5 {
			for k, v := range tris[t] {
				if d, ok := dup[v]; ok {
					tris[t][k] = d
				}
			}
		}
	}
	return buildP2(x, tris, nil), side
}

// linear is a linear polynomial a + b x + c y.
type linear [3]float64

func (l linear) at(p [2]float64) float64 { return l[0] + l[1]*p[0] + l[2]*p[1] }
