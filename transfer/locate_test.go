package transfer

import (
	"math"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/plane"
)

// bruteContains is the reference point-in-triangle test: exact orientation
// (plane.Orient, checked against rational arithmetic in its package).
func bruteContains(m *fem.Mesh, e int, p [2]float64) bool {
	t := m.Tri[e]
	a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
	return plane.Orient(a, b, p) >= 0 && plane.Orient(b, c, p) >= 0 && plane.Orient(c, a, p) >= 0
}

// bruteDistance is the reference distance from p to the mesh: the minimum
// over all triangles and edges, by the projection onto each edge.
func bruteDistance(m *fem.Mesh, p [2]float64) float64 {
	d := math.Inf(1)
	for e, t := range m.Tri {
		if bruteContains(m, e, p) {
			return 0
		}
		for k := 0; k < 3; k++ {
			a, b := m.X[t[k]], m.X[t[(k+1)%3]]
			s := ((p[0]-a[0])*(b[0]-a[0]) + (p[1]-a[1])*(b[1]-a[1])) / plane.DistSq(a, b)
			s = math.Max(0, math.Min(1, s))
			d = math.Min(d, math.Hypot(p[0]-a[0]-s*(b[0]-a[0]), p[1]-a[1]-s*(b[1]-a[1])))
		}
	}
	return d
}

// pointAt maps area coordinates in triangle e to a position.
func pointAt(m *fem.Mesh, e int, l [3]float64) [2]float64 {
	t := m.Tri[e]
	a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
	return [2]float64{l[0]*a[0] + l[1]*b[0] + l[2]*c[0], l[0]*a[1] + l[1]*b[1] + l[2]*c[1]}
}

// checkHit verifies a Locate result against the brute-force references.
func checkHit(t *testing.T, m *fem.Mesh, p [2]float64, e int, l [3]float64, inside bool, tol float64) {
	t.Helper()
	if e < 0 || e >= len(m.Tri) {
		t.Fatalf("Locate(%v): element %d of %d", p, e, len(m.Tri))
	}
	if s := l[0] + l[1] + l[2]; math.Abs(s-1) > 1e-12 || l[0] < 0 || l[1] < 0 || l[2] < 0 {
		t.Fatalf("Locate(%v): area coordinates %v not in the triangle", p, l)
	}
	d := bruteDistance(m, p)
	q := pointAt(m, e, l)
	dq := math.Hypot(q[0]-p[0], q[1]-p[1])
	scale := math.Max(1, math.Hypot(p[0], p[1]))
	if d == 0 {
		if !inside || !bruteContains(m, e, p) {
			t.Fatalf("Locate(%v) = %d inside %v; brute force finds it inside the mesh, and in %d: %v", p, e, inside, e, bruteContains(m, e, p))
		}
		if dq > 1e-12*scale {
			t.Fatalf("Locate(%v): area coordinates give %v", p, q)
		}
		return
	}
	// Outside: the nearest point, within round-off of the brute distance.
	if math.Abs(dq-d) > 1e-12*scale {
		t.Fatalf("Locate(%v) = %d: distance %g, brute-force nearest %g", p, e, dq, d)
	}
	size := 0.0
	tr := m.Tri[e]
	for k := 0; k < 3; k++ {
		size = math.Max(size, math.Sqrt(plane.DistSq(m.X[tr[k]], m.X[tr[(k+1)%3]])))
	}
	if want := d <= tol*size; inside != want {
		t.Fatalf("Locate(%v): inside %v at distance %g (tolerance %g × %g)", p, inside, d, tol, size)
	}
}

// TestLocate checks points inside, on edges and vertices, just outside and
// far outside a perturbed square mesh against brute-force search.
func TestLocate(t *testing.T) {
	m := squareMesh(6, 5, 0.3, 7)
	lc, err := NewLocator(m, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		p    [2]float64
	}{
		{"interior", [2]float64{0.31, 0.47}},
		{"vertex", m.X[9]},
		{"edge midpoint", m.X[m.NumCorners+4]},
		{"corner of the square", [2]float64{1, 1}},
		{"on the boundary", [2]float64{0.5, 0}},
		{"just outside by 1e-12", [2]float64{0.5, -1e-12}},
		{"outside by 1e-3", [2]float64{1.001, 0.3}},
		{"far outside", [2]float64{-3, 7}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e, l, in := lc.Locate(tc.p)
			checkHit(t, m, tc.p, e, l, in, 1e-9)
		})
	}
	if e, _, in := lc.Locate([2]float64{math.NaN(), 0}); e != -1 || in {
		t.Errorf("Locate(NaN) = %d, %v; want -1, false", e, in)
	}
	if e, _, _ := lc.Locate([2]float64{math.Inf(1), 0}); e != -1 {
		t.Errorf("Locate(+Inf) = %d; want -1", e)
	}
	// LocateAll agrees with Locate point by point.
	pts := m.X
	hits := lc.LocateAll(pts, 2)
	for i, p := range pts {
		e, l, in := lc.Locate(p)
		if hits[i].Elem != e || hits[i].L != l || hits[i].Inside != in {
			t.Fatalf("LocateAll[%d] = %+v, Locate = %d %v %v", i, hits[i], e, l, in)
		}
	}
}

// TestNewLocatorErrors checks bad input gives errors.
func TestNewLocatorErrors(t *testing.T) {
	bad := squareMesh(2, 2, 0, 0)
	bad.Tri[0][1], bad.Tri[0][2] = bad.Tri[0][2], bad.Tri[0][1] // clockwise
	for _, tc := range []struct {
		name string
		m    *fem.Mesh
		tol  float64
	}{
		{"nil mesh", nil, 0},
		{"negative tolerance", squareMesh(2, 2, 0, 0), -1},
		{"NaN tolerance", squareMesh(2, 2, 0, 0), math.NaN()},
		{"clockwise triangle", bad, 0},
	} {
		if _, err := NewLocator(tc.m, tc.tol); err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
}

// TestArcBoundary: a coarse mesh of an annular sector with straight-sided
// elements replaces the arc r = 1 by chords; the new boundary vertices of a
// finer mesh lie on the arc, outside the old chords, and must be handled by
// the nearest old triangle. The distance from an arc point at angle φ to the
// chord of [θ₀, θ₁] is cos(φ − θm) − cos(Δθ/2) in the chord's normal
// direction (θm the chord's mid-angle) — closed form of circle geometry.
func TestArcBoundary(t *testing.T) {
	old := sectorMesh(3, 4, 0.5, false)
	nw := sectorMesh(5, 7, 0.5, true)
	lc, err := NewLocator(old, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	dth := 0.5 * math.Pi / 4
	outside := 0
	for n := 0; n < nw.NumCorners; n++ {
		p := nw.X[n]
		e, l, in := lc.Locate(p)
		checkHit(t, old, p, e, l, in, 1e-9)
		r := math.Hypot(p[0], p[1])
		if math.Abs(r-1) > 1e-12 {
			continue
		}
		phi := math.Atan2(p[1], p[0])
		k := math.Min(math.Floor(phi/dth), 3)
		want := math.Cos(phi-(k+0.5)*dth) - math.Cos(0.5*dth)
		q := pointAt(old, e, l)
		got := math.Hypot(q[0]-p[0], q[1]-p[1])
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("arc vertex at %.4f rad: distance to the old mesh %g, chord geometry %g", phi, got, want)
		}
		if want > 1e-9 {
			outside++
			if in {
				t.Errorf("arc vertex at %.4f rad, %g outside the chord, reported inside", phi, want)
			}
		}
	}
	if outside == 0 {
		t.Fatal("no new arc vertex fell outside the old chords: the test checks nothing")
	}
	// Through Map: a linear field is exact at points inside the old mesh;
	// outside it takes the value at the nearest old point, so its error is
	// at most |∇u| × the distance to the old mesh (closed form).
	ux, uy := linear{0.1, 0.3, -0.2}, linear{-0.2, 0.05, 0.4}
	grad := math.Hypot(ux[1], ux[2])
	st := linear{0.2, 0.1, 0.1}
	from := fieldsFrom(old, func(p [2]float64) [2]float64 { return [2]float64{ux.at(p), uy.at(p)} }, nil,
		func(p [2]float64) material.State { return material.State{P: st.at(p), F: 0.01} }, nil)
	to, rec, err := Map(old, from, nw, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if rec.NodesOutside == 0 || rec.Extrapolated == 0 {
		t.Fatalf("no node (%d) or Gauss point (%d) extrapolated", rec.NodesOutside, rec.Extrapolated)
	}
	for n, p := range nw.X {
		d := bruteDistance(old, p)
		if err := math.Abs(to.U[n][0] - ux.at(p)); err > grad*d+1e-13 {
			t.Errorf("node %d at %v, %g outside: u_x error %g > |∇u| d = %g", n, p, d, err, grad*d)
		}
	}
	t.Logf("straight-sided old mesh: %d nodes and %d Gauss points outside the old chords", rec.NodesOutside, rec.Extrapolated)
}

// TestCurvedElements: with curved old boundary elements (midside nodes on
// the arc) local coordinates come from the inverse isoparametric map, so a
// point between a chord and the arc is inside its curved element and a
// linear field — which the quadratic isoparametric element reproduces
// exactly (isoparametric concept, Ergatoudis, Irons & Zienkiewicz 1968,
// Int. J. Solids Struct. 4) — is transferred exactly there; points beyond
// the curved boundary get a point of the curved element closer to them than
// the chord.
func TestCurvedElements(t *testing.T) {
	old := sectorMesh(3, 4, 0.5, true)
	nw := sectorMesh(5, 7, 0.5, true)
	lc, err := NewLocator(old, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	iso := func(e int, l [3]float64) [2]float64 {
		N := fem.ShapeP2(l)
		var q [2]float64
		for k, n := range old.Tri[e] {
			q[0] += N[k] * old.X[n][0]
			q[1] += N[k] * old.X[n][1]
		}
		return q
	}
	bulge, beyond := 0, 0
	// The new nodes, and points just inside the arc (r = 0.999, within the
	// chords' sagitta 1 − cos(Δθ/2) ≈ 0.019 of the arc).
	pts := append([][2]float64(nil), nw.X...)
	for k := 0; k <= 50; k++ {
		phi := 0.5 * math.Pi * float64(k) / 50
		pts = append(pts, [2]float64{0.999 * math.Cos(phi), 0.999 * math.Sin(phi)})
	}
	for _, p := range pts {
		e, l, in := lc.Locate(p)
		q := iso(e, l)
		d := math.Hypot(q[0]-p[0], q[1]-p[1])
		chord := bruteDistance(old, p)
		switch {
		case in && d > 1e-13:
			t.Errorf("%v inside curved triangle %d, but its area coordinates map to %v", p, e, q)
		case !in && !(d <= chord+1e-14):
			t.Errorf("%v outside: nearest curved point %v at %g, not closer than the chord's %g", p, q, d, chord)
		case in && chord > 1e-9:
			bulge++
		case !in:
			beyond++
		}
	}
	t.Logf("new nodes between chord and arc, inside curved elements: %d; beyond the curved boundary: %d", bulge, beyond)
	if bulge == 0 {
		t.Fatal("no new node between an old chord and the arc: the test checks nothing")
	}
	ux := linear{0.1, 0.3, -0.2}
	from := fieldsFrom(old, func(p [2]float64) [2]float64 { return [2]float64{ux.at(p), 0} }, nil,
		func(p [2]float64) material.State { return material.State{P: ux.at(p), F: 0.01} }, nil)
	to, _, err := Map(old, from, nw, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for n, p := range nw.X {
		if e, l, in := lc.Locate(p); in {
			if err := math.Abs(to.U[n][0] - ux.at(p)); err > 1e-13 {
				t.Errorf("node %d at %v in curved triangle %d: u_x error %g", n, p, e, err)
			}
		} else {
			q := iso(e, l)
			if err := math.Abs(to.U[n][0] - ux.at(q)); err > 1e-13 {
				t.Errorf("node %d at %v beyond the curved boundary: u_x %g, want the value %g at the nearest point %v", n, p, to.U[n][0], ux.at(q), q)
			}
		}
	}
}

// FuzzLocate: any point gives either a containing triangle or the nearest
// one, never a panic (checked against brute force).
func FuzzLocate(f *testing.F) {
	m := squareMesh(5, 4, 0.35, 3)
	lc, err := NewLocator(m, 1e-9)
	if err != nil {
		f.Fatal(err)
	}
	for _, p := range [][2]float64{{0.5, 0.5}, {0, 0}, {1, 1}, {-0.1, 0.5}, {2, 2}, {0.2, 1e-300}, m.X[7], m.X[m.NumCorners+3]} {
		f.Add(p[0], p[1])
	}
	f.Fuzz(func(t *testing.T, x, y float64) {
		p := [2]float64{x, y}
		e, l, in := lc.Locate(p)
		if !finite(x) || !finite(y) {
			if e != -1 {
				t.Fatalf("Locate(%v) = %d, want -1", p, e)
			}
			return
		}
		if math.Abs(x) > 1e100 || math.Abs(y) > 1e100 {
			// Distances overflow; only the range of the result is checked.
			if e < 0 || e >= len(m.Tri) {
				t.Fatalf("Locate(%v) = %d", p, e)
			}
			return
		}
		checkHit(t, m, p, e, l, in, 1e-9)
	})
}
