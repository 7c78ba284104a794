package criteria

import (
	"math"

	"tearline/solver/fem"
)

// locator finds the triangle that contains a reference point through a
// uniform grid of buckets over the triangles' bounding boxes.
type locator struct {
	m          *fem.Mesh
	x0, y0, cs float64
	nx, ny     int
	start, tri []int32 // triangles of cell c: tri[start[c]:start[c+1]]
}

func newLocator(m *fem.Mesh) *locator {
	lo := [2]float64{math.Inf(1), math.Inf(1)}
	hi := [2]float64{math.Inf(-1), math.Inf(-1)}
	for _, t := range m.Tri {
		for _, n := range t[:3] {
			for d := 0; d < 2; d++ {
				lo[d] = math.Min(lo[d], m.X[n][d])
				hi[d] = math.Max(hi[d], m.X[n][d])
			}
		}
	}
	w, h := hi[0]-lo[0], hi[1]-lo[1]
	cs := math.Sqrt(w * h / float64(len(m.Tri)) * 2)
	if !(cs > 0) {
		cs = math.Max(w, h) + 1
	}
	l := &locator{m: m, x0: lo[0], y0: lo[1], cs: cs}
	l.nx = int(w/cs) + 1
	l.ny = int(h/cs) + 1
	// Buckets in compressed rows: count, then fill.
	l.start = make([]int32, l.nx*l.ny+1)
	for pass := 0; pass < 2; pass++ {
		var fill []int32
		if pass == 1 {
			for c := 0; c < l.nx*l.ny; c++ {
				l.start[c+1] += l.start[c]
			}
			l.tri = make([]int32, l.start[l.nx*l.ny])
			fill = append([]int32(nil), l.start[:l.nx*l.ny]...)
		}
		for e, t := range m.Tri {
			blo := [2]float64{math.Inf(1), math.Inf(1)}
			bhi := [2]float64{math.Inf(-1), math.Inf(-1)}
			for _, n := range t[:3] {
				for d := 0; d < 2; d++ {
					blo[d] = math.Min(blo[d], m.X[n][d])
					bhi[d] = math.Max(bhi[d], m.X[n][d])
				}
			}
			i0, j0 := l.cell(blo)
			i1, j1 := l.cell(bhi)
			for j := j0; j <= j1; j++ {
				for i := i0; i <= i1; i++ {
					c := j*l.nx + i
					if pass == 0 {
						l.start[c+1]++
					} else {
						l.tri[fill[c]] = int32(e)
						fill[c]++
					}
				}
			}
		}
	}
	return l
}

func (l *locator) cell(p [2]float64) (int, int) {
	i := int((p[0] - l.x0) / l.cs)
	j := int((p[1] - l.y0) / l.cs)
	return max(0, min(l.nx-1, i)), max(0, min(l.ny-1, j))
}

// find returns the triangle containing p and p's area coordinates in it
// (straight-sided), or −1 when p lies outside the mesh.
func (l *locator) find(p [2]float64) (int, [3]float64) {
	if p[0] < l.x0-l.cs || p[1] < l.y0-l.cs || p[0] > l.x0+float64(l.nx+1)*l.cs || p[1] > l.y0+float64(l.ny+1)*l.cs {
		return -1, [3]float64{}
	}
	i, j := l.cell(p)
	c := j*l.nx + i
	for _, e := range l.tri[l.start[c]:l.start[c+1]] {
		t := l.m.Tri[e]
		b := fem.Barycentric(p, l.m.X[t[0]], l.m.X[t[1]], l.m.X[t[2]])
		if b[0] >= -1e-12 && b[1] >= -1e-12 && b[2] >= -1e-12 {
			return int(e), b
		}
	}
	return -1, [3]float64{}
}

// subLinear interpolates nodal values v of a 6-node triangle linearly on
// the sub-triangle that contains the area coordinates l.
func subLinear(v [6]float64, l [3]float64) float64 {
	switch {
	case l[0] >= 0.5:
		return v[0]*(2*l[0]-1) + v[3]*2*l[1] + v[5]*2*l[2]
	case l[1] >= 0.5:
		return v[1]*(2*l[1]-1) + v[3]*2*l[0] + v[4]*2*l[2]
	case l[2] >= 0.5:
		return v[2]*(2*l[2]-1) + v[4]*2*l[1] + v[5]*2*l[0]
	}
	return v[3]*(1-2*l[2]) + v[4]*(1-2*l[0]) + v[5]*(1-2*l[1])
}
