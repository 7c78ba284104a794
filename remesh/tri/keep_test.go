package tri

import (
	"math"
	"testing"
)

// TestKeepSegments checks Options.Keep: kept segments come out whole (the
// sub-segments equal the input segments one to one, so no vertex lies on
// them), the mesh is valid and covers the polygon (shoelace area, closed
// form), refinement still reaches the size bound away from them, and with h
// no smaller than the kept edges the angle bound holds.
func TestKeepSegments(t *testing.T) {
	// boundary points of the unit square, n per side
	square := func(n int) [][2]float64 {
		var p [][2]float64
		for side := 0; side < 4; side++ {
			for i := 0; i < n; i++ {
				s := float64(i) / float64(n)
				p = append(p, [][2]float64{{s, 0}, {1, s}, {1 - s, 1}, {0, 1 - s}}[side])
			}
		}
		return p
	}
	lshape := [][2]float64{{0, 0}, {0.5, 0}, {1, 0}, {1, 0.5}, {0.5, 0.5}, {0.5, 1}, {0, 1}, {0, 0.5}}
	cases := []struct {
		name string
		pts  [][2]float64
		keep func(k int) bool
		h    float64
	}{
		{"square all kept, h = edge", square(8), func(int) bool { return true }, 0.125},
		{"square bottom kept", square(4), func(k int) bool { return k < 4 }, 0.2},
		{"L-shape all kept", lshape, func(int) bool { return true }, 0.4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := &Input{Points: c.pts, Segments: loop(0, len(c.pts))}
			keep := make([]bool, len(in.Segments))
			for k := range keep {
				keep[k] = c.keep(k)
			}
			h := func(x, y float64) float64 { return c.h }
			m, err := Triangulate(in, &Options{Size: h, Keep: keep})
			if err != nil {
				t.Fatal(err)
			}
			if err := Check(m); err != nil {
				t.Fatal(err)
			}
			checkConformity(t, in, m)
			whole := map[[2]int]bool{}
			for _, sg := range m.Segments {
				whole[sg] = true
			}
			for k, sg := range in.Segments {
				if keep[k] && !whole[sg] {
					t.Errorf("kept segment %d (%v) was split", k, sg)
				}
			}
			if a, want := meshArea(m), polyArea(c.pts); math.Abs(a-want) > 1e-12 {
				t.Errorf("area %g, want %g", a, want)
			}
			q := Quality(m, h)
			if q.SizeRatioMax > 1+1e-9 && q.SizeRatioMax > maxKeptEdge(c.pts)/c.h+1e-9 {
				t.Errorf("size ratio %g", q.SizeRatioMax)
			}
			// With h no smaller than the kept edges the usual bound holds
			// (the refiner's default, Shewchuk 2002).
			if q.MinAngleDeg < DefaultMinAngle {
				t.Errorf("minimum angle %.1f° below %d°", q.MinAngleDeg, DefaultMinAngle)
			}
		})
	}
}

// maxKeptEdge is the longest edge of the closed polygon p.
func maxKeptEdge(p [][2]float64) float64 {
	l := 0.0
	for i := range p {
		d := sub(p[(i+1)%len(p)], p[i])
		l = math.Max(l, math.Sqrt(dot(d, d)))
	}
	return l
}
