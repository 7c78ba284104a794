package meshing

import (
	"math"
	"testing"

	"tearline/remesh/geom"
	"tearline/solver/fem"
)

// graded is a size field fine at c and growing linearly away from it
// (common practice: a graded mesh around a crack tip).
func graded(c [2]float64, hFine, rate, hFar float64) func(x, y float64) float64 {
	return func(x, y float64) float64 {
		return math.Min(hFar, hFine+rate*math.Hypot(x-c[0], y-c[1]))
	}
}

// plate is a rectangle with a hole-free outline in labelled pieces and a
// named tip on its lower edge.
func plate(tip [2]float64) *geom.Domain {
	return &geom.Domain{Outer: geom.Loop{
		{Kind: geom.Line, A: [2]float64{0, 0}, B: [2]float64{4, 0}, Label: "base"},
		{Kind: geom.Line, A: [2]float64{4, 0}, B: [2]float64{4, 2}, Label: "side"},
		{Kind: geom.Line, A: [2]float64{4, 2}, B: [2]float64{0, 2}, Label: "top"},
		{Kind: geom.Line, A: [2]float64{0, 2}, B: [2]float64{0, 0}, Label: "side"},
	}, Points: map[string]geom.Point{"tip": {X: tip, Tip: true, Dir: [2]float64{1, 0}}}}
}

// TestMeshLocal remeshes a patch of a graded mesh around a moved fine
// zone and checks: kept triangles are identical (all six node
// coordinates bit for bit), the mesh conforms (every edge in two triangles
// or on the boundary, no corner node inside another edge: no hanging
// nodes), the patch triangles on kept edges keep the accepted angle, and
// the areas sum to the domain's (shoelace, closed form).
func TestMeshLocal(t *testing.T) {
	cases := []struct {
		name     string
		from, to [2]float64
		hFine    float64
	}{
		{"tip moves along the base", [2]float64{1.5, 0}, [2]float64{2, 0}, 0.02},
		{"fine zone moves inside", [2]float64{1, 1}, [2]float64{1.2, 1.05}, 0.03},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d0 := plate([2]float64{1.5, 0})
			old, _, err := Mesh(d0, graded(c.from, c.hFine, 0.3, 0.4), Options{})
			if err != nil {
				t.Fatal(err)
			}
			h := graded(c.to, c.hFine, 0.3, 0.4)
			patch := Patch(old, nil, [][2]float64{c.to}, h, PatchRule{})
			m, rep, err := MeshLocal(old, d0, patch, h, Options{}, PatchRule{})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%d old, %d new triangles, %d kept, %d rings", len(old.Tri), len(m.Tri), rep.Kept, rep.Rings)
			for _, r := range rep.Retries {
				t.Log(r)
			}
			if rep.Kept < len(old.Tri)/2 {
				t.Errorf("only %d of %d triangles kept", rep.Kept, len(old.Tri))
			}
			checkKept(t, old, m)
			checkConforming(t, m)
			if a, want := meshArea(m), d0.Area(); math.Abs(a-want) > 1e-12*want {
				t.Errorf("area %.15g, want %.15g", a, want)
			}
			if rep.MinAngleDeg < 15 {
				t.Errorf("patch minimum angle %.3g° below 15°", rep.MinAngleDeg)
			}
		})
	}
}

func sixKey(m *fem.Mesh, e int) [6][2]float64 {
	var k [6][2]float64
	for i, n := range m.Tri[e] {
		k[i] = m.X[n]
	}
	return k
}

// checkKept checks that every old triangle the new mesh still has a
// triangle at (by its corners) is there with all six nodes unchanged, and
// that it has the same count of such triangles as kept ones.
func checkKept(t *testing.T, old, m *fem.Mesh) {
	t.Helper()
	byCorners := map[[3][2]float64][6][2]float64{}
	for e := range m.Tri {
		k := sixKey(m, e)
		byCorners[[3][2]float64{k[0], k[1], k[2]}] = k
	}
	same := 0
	for e := range old.Tri {
		k := sixKey(old, e)
		if got, ok := byCorners[[3][2]float64{k[0], k[1], k[2]}]; ok {
			if got != k {
				t.Fatalf("old triangle %d kept with other nodes: %v, want %v", e, got, k)
			}
			same++
		}
	}
	if same == 0 {
		t.Error("no triangle kept")
	}
}

// checkConforming checks that every corner edge belongs to two triangles
// (with one midside node) or to one and the boundary list, and that no
// corner node lies inside an edge.
func checkConforming(t *testing.T, m *fem.Mesh) {
	t.Helper()
	type use struct{ n, mid int }
	edges := map[[2]int]use{}
	for _, tr := range m.Tri {
		for k := 0; k < 3; k++ {
			key := edgeKey(tr[k], tr[(k+1)%3])
			u := edges[key]
			if u.n > 0 && u.mid != tr[3+k] {
				t.Fatalf("edge %v has two midside nodes %d and %d", key, u.mid, tr[3+k])
			}
			edges[key] = use{u.n + 1, tr[3+k]}
		}
	}
	onBoundary := map[[2]int]bool{}
	for _, ed := range m.Boundary {
		onBoundary[edgeKey(ed.A, ed.B)] = true
	}
	for key, u := range edges {
		if u.n > 2 || (u.n == 1) != onBoundary[key] {
			t.Fatalf("edge %v in %d triangles, on the boundary: %v", key, u.n, onBoundary[key])
		}
		a, b := m.X[key[0]], m.X[key[1]]
		for v := 0; v < m.NumCorners; v++ {
			if v == key[0] || v == key[1] {
				continue
			}
			p := m.X[v]
			cross := (b[0]-a[0])*(p[1]-a[1]) - (b[1]-a[1])*(p[0]-a[0])
			dot := (p[0]-a[0])*(b[0]-a[0]) + (p[1]-a[1])*(b[1]-a[1])
			l2 := (b[0]-a[0])*(b[0]-a[0]) + (b[1]-a[1])*(b[1]-a[1])
			if math.Abs(cross) <= 1e-12*l2 && dot > 0 && dot < l2 {
				t.Fatalf("node %d (%v) lies inside edge %v", v, p, key)
			}
		}
	}
}

func meshArea(m *fem.Mesh) float64 {
	a := 0.0
	for _, tr := range m.Tri {
		p, q, r := m.X[tr[0]], m.X[tr[1]], m.X[tr[2]]
		a += 0.5 * ((q[0]-p[0])*(r[1]-p[1]) - (r[0]-p[0])*(q[1]-p[1]))
	}
	return a
}
