package plane

import (
	"math"
	"math/rand/v2"
	"testing"
)

// gridTriangles returns an nx×ny grid over the unit square, each cell split
// into two counter-clockwise triangles, interior nodes moved at random by up
// to jitter cell widths.
func gridTriangles(nx, ny int, jitter float64, seed uint64) [][3][2]float64 {
	rng := rand.New(rand.NewPCG(seed, seed))
	x := make([][2]float64, (nx+1)*(ny+1))
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			p := [2]float64{float64(i) / float64(nx), float64(j) / float64(ny)}
			if i > 0 && i < nx && j > 0 && j < ny {
				p[0] += jitter * (rng.Float64() - 0.5) / float64(nx)
				p[1] += jitter * (rng.Float64() - 0.5) / float64(ny)
			}
			x[j*(nx+1)+i] = p
		}
	}
	var tri [][3][2]float64
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, b := x[j*(nx+1)+i], x[j*(nx+1)+i+1]
			c, d := x[(j+1)*(nx+1)+i+1], x[(j+1)*(nx+1)+i]
			tri = append(tri, [3][2]float64{a, b, c}, [3][2]float64{a, c, d})
		}
	}
	return tri
}

// The references below scan every triangle in order: the rules of the
// Locator's documentation applied by brute force. Containment is by Orient,
// which TestOrientAgainstRational checks against rational arithmetic.

func bruteContains(v [3][2]float64, x [2]float64) bool {
	return Orient(v[0], v[1], x) >= 0 && Orient(v[1], v[2], x) >= 0 && Orient(v[2], v[0], x) >= 0
}

func bruteFind(tri [][3][2]float64, x [2]float64, toward *[2]float64) (int, [3]float64) {
	best, bd, bt := -1, math.Inf(-1), math.Inf(-1)
	var bl [3]float64
	for i, v := range tri {
		if !bruteContains(v, x) {
			continue
		}
		l := Barycentric(x, v[0], v[1], v[2])
		d, tie := math.Min(l[0], math.Min(l[1], l[2])), 0.0
		if toward != nil {
			lt := Barycentric(*toward, v[0], v[1], v[2])
			d, tie = math.Min(lt[0], math.Min(lt[1], lt[2])), d
		}
		if d > bd || (d == bd && tie > bt) {
			best, bd, bt, bl = i, d, tie, l
		}
	}
	return best, bl
}

func bruteFirst(tri [][3][2]float64, x [2]float64, tol float64) int {
	for i, v := range tri {
		if l := Barycentric(x, v[0], v[1], v[2]); l[0] >= -tol && l[1] >= -tol && l[2] >= -tol {
			return i
		}
	}
	return -1
}

func bruteNearest(tri [][3][2]float64, x [2]float64) (int, float64) {
	best, bd := -1, math.Inf(1)
	for i, v := range tri {
		d := 0.0
		if !bruteContains(v, x) {
			d = math.Inf(1)
			for k := 0; k < 3; k++ {
				d = math.Min(d, SegDist(x, v[k], v[(k+1)%3]))
			}
		}
		if d < bd {
			best, bd = i, d
		}
	}
	return best, bd
}

// TestLocator checks Find, FindToward, FindFirst and Nearest against brute
// force on points inside, on shared edges and vertices (ties), just outside
// and far outside a perturbed grid.
func TestLocator(t *testing.T) {
	tri := gridTriangles(7, 6, 0.4, 3)
	lc := NewLocator(func(i int) [3][2]float64 { return tri[i] }, len(tri))
	if lc.Len() != len(tri) {
		t.Fatalf("Len = %d, want %d", lc.Len(), len(tri))
	}
	rng := rand.New(rand.NewPCG(8, 9))
	var pts [][2]float64
	for _, v := range tri {
		pts = append(pts, v[0], [2]float64{(v[0][0] + v[1][0]) / 2, (v[0][1] + v[1][1]) / 2})
	}
	for k := 0; k < 400; k++ {
		pts = append(pts, [2]float64{1.4*rng.Float64() - 0.2, 1.4*rng.Float64() - 0.2})
	}
	pts = append(pts, [2]float64{0.5, -1e-13}, [2]float64{1 + 1e-13, 0.5}, [2]float64{-3, 7})
	for _, x := range pts {
		e, l, ok := lc.Find(x)
		we, wl := bruteFind(tri, x, nil)
		if e != we || ok != (we >= 0) || (ok && l != ClampBary(wl)) {
			t.Fatalf("Find(%v) = %d %v %v, brute force %d %v", x, e, l, ok, we, wl)
		}
		toward := [2]float64{x[0] + 1e-6*(0.5-x[0]), x[1] + 1e-6*(0.3-x[1])}
		e, _, _ = lc.FindToward(x, toward)
		if we, _ := bruteFind(tri, x, &toward); e != we {
			t.Fatalf("FindToward(%v) = %d, brute force %d", x, e, we)
		}
		for _, tol := range []float64{0, 1e-12, 1e-3} {
			e, l, ok := lc.FindFirst(x, tol)
			if we := bruteFirst(tri, x, tol); e != we || ok != (we >= 0) {
				t.Fatalf("FindFirst(%v, %g) = %d, brute force %d", x, tol, e, we)
			}
			if ok && l != lc.Bary(e, x) {
				t.Fatalf("FindFirst(%v, %g): coordinates %v, Bary %v", x, tol, l, lc.Bary(e, x))
			}
		}
		e, d2, l, ok := lc.Nearest(x)
		we, wd := bruteNearest(tri, x)
		v := lc.Corners(e)
		q := [2]float64{l[0]*v[0][0] + l[1]*v[1][0] + l[2]*v[2][0], l[0]*v[0][1] + l[1]*v[1][1] + l[2]*v[2][1]}
		if !ok || math.Abs(math.Sqrt(d2)-wd) > 1e-15 || math.Abs(Dist(q, x)-wd) > 1e-12 {
			t.Fatalf("Nearest(%v) = %d at %g (point %v), brute force %d at %g", x, e, math.Sqrt(d2), q, we, wd)
		}
		if wd == 0 && e != we && lc.Contains(we, x) && we < e {
			t.Fatalf("Nearest(%v) = %d, a lower-numbered triangle %d contains it", x, e, we)
		}
	}
	for _, x := range [][2]float64{{math.NaN(), 0}, {math.Inf(1), 0}} {
		if e, _, ok := lc.Find(x); ok || e != -1 {
			t.Errorf("Find(%v) = %d %v, want -1 false", x, e, ok)
		}
		if e, _, _, ok := lc.Nearest(x); ok || e != -1 {
			t.Errorf("Nearest(%v) = %d %v, want -1 false", x, e, ok)
		}
	}
	empty := NewLocator(nil, 0)
	if _, _, _, ok := empty.Nearest([2]float64{0, 0}); ok {
		t.Errorf("Nearest on an empty locator found a triangle")
	}
}

// TestPointsDist checks the nearest-point distance against brute force
// (the least math.Sqrt of the squared distances, bit for bit) and the
// cut-off rule, on point sets of different shapes with queries inside and
// far outside them.
func TestPointsDist(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	square := make([][2]float64, 500)
	for i := range square {
		square[i] = [2]float64{rng.Float64(), rng.Float64()}
	}
	curve := make([][2]float64, 2000)
	for i := range curve {
		s := float64(i) / 2000
		curve[i] = [2]float64{-10 * s, 0.3 * math.Sin(20*s)}
	}
	for _, c := range []struct {
		name string
		pts  [][2]float64
		lo   [2]float64 // queries in [lo, lo + size]²
		size float64
	}{
		{"random in the unit square", square, [2]float64{-1, -1}, 3},
		{"a wavy line (a wake)", curve, [2]float64{-20, -10}, 30},
		{"one point", [][2]float64{{0.5, 0.5}}, [2]float64{-1, -1}, 3},
		{"repeated points", [][2]float64{{0, 0}, {0, 0}, {1, 0}, {1, 0}}, [2]float64{-1, -1}, 3},
	} {
		s := NewPoints(c.pts)
		if s.Len() != len(c.pts) {
			t.Fatalf("%s: Len = %d, want %d", c.name, s.Len(), len(c.pts))
		}
		for k := 0; k < 1000; k++ {
			x := [2]float64{c.lo[0] + c.size*rng.Float64(), c.lo[1] + c.size*rng.Float64()}
			best := math.Inf(1)
			for _, p := range c.pts {
				best = math.Min(best, (p[0]-x[0])*(p[0]-x[0])+(p[1]-x[1])*(p[1]-x[1]))
			}
			want := math.Sqrt(best)
			if got := s.Dist(x, math.Inf(1)); got != want {
				t.Fatalf("%s: Dist(%v) = %g, brute force %g", c.name, x, got, want)
			}
			if got := s.Dist(x, 2*want); got != want {
				t.Fatalf("%s: Dist(%v) with the cut-off beyond it = %g, brute force %g", c.name, x, got, want)
			}
			if got := s.Dist(x, 0.5*want); got < 0.5*want {
				t.Fatalf("%s: cut-off query returned %g below the cut-off %g", c.name, got, 0.5*want)
			}
		}
	}
	if d := NewPoints(nil).Dist([2]float64{0, 0}, 1); !math.IsInf(d, 1) {
		t.Errorf("Dist on no points = %g, want +Inf", d)
	}
}

func BenchmarkPointsDist(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	pts := make([][2]float64, 5000)
	for i := range pts {
		s := float64(i) / 5000
		pts[i] = [2]float64{-10 * s, 0.3 * math.Sin(20*s)}
	}
	s := NewPoints(pts)
	q := make([][2]float64, 1024)
	for i := range q {
		q[i] = [2]float64{rng.Float64()*30 - 20, rng.Float64()*20 - 10}
	}
	b.ReportAllocs()
	sum := 0.0
	i := 0
	for b.Loop() {
		sum += s.Dist(q[i%len(q)], 50)
		i++
	}
	if sum < 0 {
		b.Fatal(sum)
	}
}

// BenchmarkLocator indexes the ≈ 10⁵ triangles of a perturbed 224×224 grid
// and locates 10⁴ points with each rule.
func BenchmarkLocator(b *testing.B) {
	tri := gridTriangles(224, 224, 0.4, 1)
	corners := func(i int) [3][2]float64 { return tri[i] }
	rng := rand.New(rand.NewPCG(3, 4))
	pts := make([][2]float64, 10000)
	for i := range pts {
		pts[i] = [2]float64{rng.Float64(), rng.Float64()}
	}
	b.Run("NewLocator", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			NewLocator(corners, len(tri))
		}
	})
	lc := NewLocator(corners, len(tri))
	for _, c := range []struct {
		name string
		find func(x [2]float64) bool
	}{
		{"Find", func(x [2]float64) bool { _, _, ok := lc.Find(x); return ok }},
		{"FindFirst", func(x [2]float64) bool { _, _, ok := lc.FindFirst(x, 1e-12); return ok }},
		{"Nearest", func(x [2]float64) bool { _, _, _, ok := lc.Nearest(x); return ok }},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				for _, x := range pts {
					if !c.find(x) {
						b.Fatalf("%v not found", x)
					}
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(pts)), "ns/point")
		})
	}
}
