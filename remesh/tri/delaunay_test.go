package tri

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand"
	"os/exec"
	"sort"
	"testing"

	"tearline/solver/plane"
)

func randomPoints(r *rand.Rand, n int, grid bool) [][2]float64 {
	p := make([][2]float64, 0, n)
	seen := map[[2]float64]bool{}
	for len(p) < n {
		q := [2]float64{r.Float64(), r.Float64()}
		if grid { // many collinear and cocircular points
			q = [2]float64{float64(r.Intn(20)) / 19, float64(r.Intn(20)) / 19}
		}
		if !seen[q] {
			seen[q] = true
			p = append(p, q)
		}
	}
	return p
}

// hullCount counts the points on the boundary of the convex hull by brute
// force: a point is on it when some line through it has all points on one
// closed side — tested here on the hull edges found by checking every pair
// (O(n³)), counting collinear boundary points too.
func hullCount(p [][2]float64) int {
	on := make([]bool, len(p))
	for i := range p {
		for j := range p {
			if i == j {
				continue
			}
			left, right := false, false
			for k := range p {
				switch o := plane.Orient(p[i], p[j], p[k]); {
				case o > 0:
					left = true
				case o < 0:
					right = true
				}
			}
			if !(left && right) { // i–j supports the hull
				for k := range p {
					if plane.Orient(p[i], p[j], p[k]) == 0 {
						on[k] = true
					}
				}
			}
		}
	}
	h := 0
	for _, b := range on {
		if b {
			h++
		}
	}
	return h
}

// TestCDTPointSets checks the unrefined triangulation of point sets (no
// segments: the convex hull is the domain) against two outside facts:
// Euler's formula for a triangulated point set, T = 2n − h − 2 with h points
// on the hull boundary (de Berg et al. 2008, Computational Geometry, Thm. 9.1),
// and the empty-circumcircle property of the Delaunay triangulation
// (Delaunay 1934), by brute force over all points.
func TestCDTPointSets(t *testing.T) {
	r := rand.New(rand.NewSource(3))
	for _, c := range []struct {
		name string
		n    int
		grid bool
	}{{"random 300", 300, false}, {"random 40", 40, false}, {"grid points 150 (degenerate)", 150, true}} {
		t.Run(c.name, func(t *testing.T) {
			p := randomPoints(r, c.n, c.grid)
			m, err := CDT(&Input{Points: p})
			if err != nil {
				t.Fatal(err)
			}
			if err := Check(m); err != nil {
				t.Fatal(err)
			}
			h := hullCount(p)
			if want := 2*c.n - h - 2; len(m.Triangles) != want {
				t.Errorf("%d triangles, Euler's formula gives 2n−h−2 = %d (n = %d, h = %d)", len(m.Triangles), want, c.n, h)
			}
			for i, tr := range m.Triangles {
				for k, q := range p {
					if k == tr[0] || k == tr[1] || k == tr[2] {
						continue
					}
					if plane.InCircle(p[tr[0]], p[tr[1]], p[tr[2]], q) > 0 {
						t.Fatalf("point %d lies inside the circumcircle of triangle %d %v", k, i, tr)
					}
				}
			}
		})
	}
}

// TestCDTAgainstSciPy compares the Delaunay triangulation of random points
// (unique: points in general position) with scipy.spatial.Delaunay (Qhull).
func TestCDTAgainstSciPy(t *testing.T) {
	py, err := exec.LookPath("/usr/bin/python3")
	if err != nil {
		t.Skip("python3 not available")
	}
	script := `
import sys, json
from scipy.spatial import Delaunay
p = json.load(sys.stdin)
print(json.dumps([sorted(int(v) for v in s) for s in Delaunay(p).simplices]))
`
	if err := exec.Command(py, "-c", "import scipy.spatial").Run(); err != nil {
		t.Skip("scipy not available")
	}
	p := randomPoints(rand.New(rand.NewSource(11)), 500, false)
	in, _ := json.Marshal(p)
	cmd := exec.Command(py, "-c", script)
	cmd.Stdin = bytes.NewReader(in)
	out, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	var want [][3]int
	if err := json.Unmarshal(out, &want); err != nil {
		t.Fatal(err)
	}
	m, err := CDT(&Input{Points: p})
	if err != nil {
		t.Fatal(err)
	}
	key := func(tr [3]int) [3]int {
		s := tr[:]
		sort.Ints(s)
		return [3]int{s[0], s[1], s[2]}
	}
	got := map[[3]int]bool{}
	for _, tr := range m.Triangles {
		got[key(tr)] = true
	}
	if len(got) != len(want) {
		t.Fatalf("%d triangles, SciPy %d", len(got), len(want))
	}
	for _, tr := range want {
		if !got[key(tr)] {
			t.Fatalf("SciPy triangle %v missing", tr)
		}
	}
}

// TestSmallInputAngles meshes wedges with apex angles below 60°: refinement
// must terminate, and the only triangles below 20° must be those whose
// shortest edge joins the two wedge sides (the unavoidable exception at
// small input angles, Shewchuk 2002 §4); the size bound holds everywhere.
func TestSmallInputAngles(t *testing.T) {
	for _, deg := range []float64{45, 20, 10, 5, 1} {
		a := deg * math.Pi / 180
		pts := [][2]float64{{0, 0}, {1, 0}, {math.Cos(a), math.Sin(a)}}
		in := &Input{Points: pts, Segments: loop(0, 3), SegmentMarks: []int{1, 2, 3}}
		size := func(x, y float64) float64 { return 0.05 }
		m, err := Triangulate(in, &Options{Size: size})
		if err != nil {
			t.Fatalf("%g°: %v", deg, err)
		}
		if err := Check(m); err != nil {
			t.Fatalf("%g°: %v", deg, err)
		}
		checkConformity(t, in, m)
		if got, want := meshArea(m), polyArea(pts); math.Abs(got-want) > 1e-10*want {
			t.Errorf("%g°: area %.15g, want %.15g", deg, got, want)
		}
		rep := Quality(m, size)
		if rep.SizeRatioMax > 1+1e-12 {
			t.Errorf("%g°: size ratio %g > 1", deg, rep.SizeRatioMax)
		}
		onSide := func(q [2]float64, side int) bool { // side 0: y = 0; side 1: the other ray
			d := [2]float64{math.Cos(a), math.Sin(a)}
			if side == 0 {
				d = [2]float64{1, 0}
			}
			return math.Abs(d[0]*q[1]-d[1]*q[0]) <= 1e-12
		}
		skinny := 0
		for _, tr := range m.Triangles {
			q := Quality(&Mesh{Points: m.Points, Triangles: [][3]int{tr}}, nil)
			if q.MinAngleDeg >= 20 {
				continue
			}
			skinny++
			// shortest edge
			best, bi := math.Inf(1), 0
			for k := 0; k < 3; k++ {
				if l := plane.Dist(m.Points[tr[k]], m.Points[tr[(k+1)%3]]); l < best {
					best, bi = l, k
				}
			}
			u, v := m.Points[tr[bi]], m.Points[tr[(bi+1)%3]]
			if !((onSide(u, 0) && onSide(v, 1)) || (onSide(u, 1) && onSide(v, 0))) {
				t.Errorf("%g°: triangle %v with minimum angle %.2f° is not in the corner of the small angle", deg, tr, q.MinAngleDeg)
			}
		}
		if deg >= 60 && skinny > 0 {
			t.Errorf("%g°: %d skinny triangles", deg, skinny)
		}
		t.Logf("%g°: %+v, %d triangles below 20°", deg, rep, skinny)
	}
}

// TestCDTPolygons checks the unrefined CDT of polygons whose edges are
// mostly not Delaunay edges (spiky star polygons, a comb), so that segment
// recovery must flip: a polygon with n vertices and k polygonal holes is
// triangulated without new points into n + 2k − 2 triangles (Euler's formula;
// de Berg et al. 2008, Computational Geometry, Thm. 3.1 for k = 0), with the
// shoelace area and the input segments as edges.
func TestCDTPolygons(t *testing.T) {
	r := rand.New(rand.NewSource(9))
	star := func(n int, r0, r1 float64) [][2]float64 {
		p := make([][2]float64, n)
		for k := range p {
			a := 2 * math.Pi * (float64(k) + 0.3*r.Float64()) / float64(n)
			rad := r0
			if k%2 == 1 {
				rad = r1 * (0.8 + 0.4*r.Float64())
			}
			p[k] = [2]float64{rad * math.Cos(a), rad * math.Sin(a)}
		}
		return p
	}
	comb := [][2]float64{{0, 0}, {10, 0}, {10, 1}}
	for k := 9; k >= 0; k-- { // teeth of width 0.5 and height 5 pointing up
		x := float64(k)
		comb = append(comb, [2]float64{x + 0.75, 1}, [2]float64{x + 0.75, 6}, [2]float64{x + 0.25, 6}, [2]float64{x + 0.25, 1})
	}
	comb = append(comb, [2]float64{0, 1})
	cases := []struct {
		name  string
		outer [][2]float64
		holes [][][2]float64
	}{
		{"spiky star, 40 vertices", star(40, 1, 0.1), nil},
		{"spiky star, 400 vertices", star(400, 1, 0.3), nil},
		{"comb with 10 thin teeth", comb, nil},
		{"star with two star holes", star(60, 3, 1.5), [][][2]float64{
			translate(star(12, 0.3, 0.1), 0.5, 0), translate(star(16, 0.3, 0.15), -0.5, 0.2)}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in, area := polygonInput(c.outer, c.holes...)
			m, err := CDT(in)
			if err != nil {
				t.Fatal(err)
			}
			if err := Check(m); err != nil {
				t.Fatal(err)
			}
			if want := len(in.Points) + 2*len(c.holes) - 2; len(m.Triangles) != want {
				t.Errorf("%d triangles, want n + 2k − 2 = %d", len(m.Triangles), want)
			}
			if len(m.Points) != len(in.Points) {
				t.Errorf("%d points, want the %d input points only", len(m.Points), len(in.Points))
			}
			if got := meshArea(m); math.Abs(got-area) > 1e-12*area {
				t.Errorf("area %.15g, shoelace %.15g", got, area)
			}
			checkConformity(t, in, m)
		})
	}
}

func translate(p [][2]float64, dx, dy float64) [][2]float64 {
	q := make([][2]float64, len(p))
	for k := range p {
		q[k] = [2]float64{p[k][0] + dx, p[k][1] + dy}
	}
	return q
}
