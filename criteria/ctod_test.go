package criteria

import (
	"math"
	"strings"
	"testing"

	"tearline/solver/fem"
)

// faceStrip builds the body above the crack line, [−L, L2]×[0, H], with the
// crack face "crack" along y = 0, x < 0, the ligament "ligament" along
// y = 0, x > 0 and the rest "outer". With below set it builds the mirror
// body under the line instead.
func faceStrip(L, L2, H float64, nx, ny int, below bool) *fem.Mesh {
	var b meshBuilder
	id := func(i, j int) int { return j*(nx+1) + i }
	for j := 0; j <= ny; j++ {
		for i := 0; i <= nx; i++ {
			y := H * float64(j) / float64(ny)
			if below {
				y = -H + y
			}
			b.corners = append(b.corners, [2]float64{-L + (L+L2)*float64(i)/float64(nx), y})
		}
	}
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			a, c, d, e := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			b.tris = append(b.tris, [3]int{a, c, d}, [3]int{a, d, e})
		}
	}
	return b.build(func(a, c [2]float64) string {
		if a[1] == 0 && c[1] == 0 {
			if math.Max(a[0], c[0]) <= 1e-12 {
				return "crack"
			}
			return "ligament"
		}
		return "outer"
	})
}

// merge puts two meshes side by side in one (labels by name).
func merge(a, b *fem.Mesh) *fem.Mesh {
	m := &fem.Mesh{Labels: append([]string(nil), a.Labels...)}
	// corners of a, corners of b, midsides of a, midsides of b
	mapA := make([]int, len(a.X))
	mapB := make([]int, len(b.X))
	for i := 0; i < a.NumCorners; i++ {
		mapA[i] = len(m.X)
		m.X = append(m.X, a.X[i])
	}
	for i := 0; i < b.NumCorners; i++ {
		mapB[i] = len(m.X)
		m.X = append(m.X, b.X[i])
	}
	m.NumCorners = len(m.X)
	for i := a.NumCorners; i < len(a.X); i++ {
		mapA[i] = len(m.X)
		m.X = append(m.X, a.X[i])
	}
	for i := b.NumCorners; i < len(b.X); i++ {
		mapB[i] = len(m.X)
		m.X = append(m.X, b.X[i])
	}
	add := func(src *fem.Mesh, mp []int) {
		off := len(m.Tri)
		for _, t := range src.Tri {
			var n [6]int
			for k := range t {
				n[k] = mp[t[k]]
			}
			m.Tri = append(m.Tri, n)
		}
		for _, e := range src.Boundary {
			li := m.Label(src.Labels[e.Label])
			if li < 0 {
				m.Labels = append(m.Labels, src.Labels[e.Label])
				li = len(m.Labels) - 1
			}
			m.Boundary = append(m.Boundary, fem.Edge{A: mp[e.A], B: mp[e.B], Mid: mp[e.Mid], Label: li, Tri: e.Tri + off})
		}
	}
	add(a, mapA)
	add(b, mapB)
	return m
}

// ellipseProfile is the opening of a blunted tip: a half ellipse with
// semi-axes a (along the crack) and b (across) with its apex at the origin,
// then parallel faces at height b.
func ellipseProfile(a, b, x float64) float64 {
	if x >= 0 {
		return 0
	}
	if x <= -a {
		return b
	}
	s := (x + a) / a
	return b * math.Sqrt(math.Max(0, 1-s*s))
}

// TestCTODBluntTip checks the 90° intercept on blunted-tip profiles with a
// closed-form answer (Shih 1981 definition; geometry): the 45° line
// y = −x from the apex meets the half ellipse at x = −2ab²/(a²+b²) when
// b ≤ a, so δ = 4ab²/(a²+b²); when b ≥ a it passes the ellipse and meets
// the flat face y = b, so δ = 2b; a circle (a = b = ρ) gives δ = 2ρ.
func TestCTODBluntTip(t *testing.T) {
	up := faceStrip(2, 1, 1, 300, 4, false)
	lo := faceStrip(2, 1, 1, 300, 4, true)
	full := merge(up, lo)
	for _, tc := range []struct {
		name string
		a, b float64
		want float64
	}{
		{"circle", 0.2, 0.2, 0.4},
		{"long ellipse", 0.4, 0.15, 4 * 0.4 * 0.15 * 0.15 / (0.4*0.4 + 0.15*0.15)},
		{"tall ellipse", 0.1, 0.25, 0.5},
	} {
		uUp := make([][2]float64, len(up.X))
		for i, x := range up.X {
			uUp[i] = [2]float64{0, ellipseProfile(tc.a, tc.b, x[0])}
		}
		o, err := CTOD(up, uUp, CTODOptions{Dir: [2]float64{1, 0}, Symmetric: true})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if math.Abs(o.Delta/tc.want-1) > 0.005 {
			t.Errorf("%s half model: δ = %.6g, closed form %.6g", tc.name, o.Delta, tc.want)
		}
		// full model: upper body up, lower body down
		u := make([][2]float64, len(full.X))
		for i, x := range full.X {
			sg := 1.0
			if x[1] < 0 {
				sg = -1
			}
			u[i] = [2]float64{0, sg * ellipseProfile(tc.a, tc.b, x[0])}
		}
		// the face nodes at y = 0 of the lower body open downwards: find them
		// through the boundary edges whose interior lies below (B − A along −x).
		for _, e := range full.Boundary {
			if full.Labels[e.Label] == "crack" && full.X[e.B][0] < full.X[e.A][0] {
				for _, n := range [3]int{e.A, e.Mid, e.B} {
					u[n][1] = -ellipseProfile(tc.a, tc.b, full.X[n][0])
				}
			}
		}
		o2, err := CTOD(full, u, CTODOptions{Dir: [2]float64{1, 0}})
		if err != nil {
			t.Fatalf("%s full: %v", tc.name, err)
		}
		if math.Abs(o2.Delta/tc.want-1) > 0.005 {
			t.Errorf("%s full model: δ = %.6g, closed form %.6g", tc.name, o2.Delta, tc.want)
		}
		t.Logf("%s: δ half %.6g, full %.6g, closed form %.6g", tc.name, o.Delta, o2.Delta, tc.want)
	}
}

// TestCTODWilliams checks the intercept on the elastic crack opening of the
// Williams field on the cracked disk (full model): the face opens as
// u₂ = c√r, c = K(κ+1)/(2μ√(2π)) (Williams 1957; Anderson ch. 2), so the
// 45° line meets it at r = c² and δ = 2c².
func TestCTODWilliams(t *testing.T) {
	el := Elastic{E: 1000, Nu: 0.3}
	m := crackedDisk(1, 16, 32, [2]float64{0, 0}, [2]float64{1, 0})
	kappa := 3 - 4*el.Nu
	c := math.Sqrt(0.08) // choose δ/R = 0.16
	K := c * 2 * el.Shear() * math.Sqrt(2*math.Pi) / (kappa + 1)
	k := KField{K: K, El: el, Dir: [2]float64{1, 0}}
	lower := map[int]bool{}
	for _, e := range m.Boundary {
		if m.Labels[e.Label] == "crack" && m.X[e.B][0] < m.X[e.A][0] {
			lower[e.A], lower[e.Mid], lower[e.B] = true, true, true
		}
	}
	u := make([][2]float64, len(m.X))
	for i, x := range m.X {
		if lower[i] {
			u[i] = k.DisplacementFace(x, LowerFace)
		} else {
			u[i] = k.Displacement(x)
		}
	}
	o, err := CTOD(m, u, CTODOptions{Dir: [2]float64{1, 0}})
	if err != nil {
		t.Fatal(err)
	}
	want := 2 * c * c
	t.Logf("Williams face: δ = %.6g, closed form 2c² = %.6g", o.Delta, want)
	if math.Abs(o.Delta/want-1) > 0.01 {
		t.Errorf("δ = %g, closed form 2c² = %g", o.Delta, want)
	}
}

// TestCTODBadInput checks the errors of bad input.
func TestCTODBadInput(t *testing.T) {
	up := faceStrip(2, 1, 1, 20, 2, false)
	zero := make([][2]float64, len(up.X))
	open := make([][2]float64, len(up.X))
	for i, x := range up.X {
		open[i] = [2]float64{0, ellipseProfile(0.3, 0.3, x[0])}
	}
	for _, tc := range []struct {
		name string
		m    *fem.Mesh
		u    [][2]float64
		opt  CTODOptions
		want string
	}{
		{"nil mesh", nil, zero, CTODOptions{Dir: [2]float64{1, 0}}, "empty mesh"},
		{"short displacement", up, zero[:3], CTODOptions{Dir: [2]float64{1, 0}}, "nodal displacements"},
		{"zero direction", up, open, CTODOptions{}, "crack direction"},
		{"missing label", up, open, CTODOptions{Dir: [2]float64{1, 0}, Label: "notch"}, `no boundary label "notch"`},
		{"tip outside", up, open, CTODOptions{Tip: [2]float64{5, 5}, Dir: [2]float64{1, 0}}, "outside the mesh"},
		{"closed crack", up, zero, CTODOptions{Dir: [2]float64{1, 0}, Symmetric: true}, "cuts no crack-face edge"},
		{"half model without Symmetric", up, open, CTODOptions{Dir: [2]float64{1, 0}}, "set Symmetric"},
	} {
		_, err := CTOD(tc.m, tc.u, tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}
