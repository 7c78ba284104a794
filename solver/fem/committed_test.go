package fem

import (
	"errors"
	"math"
	"testing"
)

// stretched returns a problem on a 2 × 2 structured mesh of the rectangle
// [x0, x0+1] × [0, 1] whose committed (and current) displacement is the
// homogeneous stretch u = ((λ₁−1)X, (λ₂−1)Y), with θ = theta at every
// corner of a mixed problem.
func stretched(t *testing.T, kin Kinematics, mixed, reg bool, x0, l1, l2, theta float64) *Problem {
	t.Helper()
	m, err := Structured(2, 2, Rectangle(x0, 0, x0+1, 1))
	if err != nil {
		t.Fatal(err)
	}
	mat := newHenckyT(200e3, 0.3)
	if reg {
		mat.c, mat.r = 1, 10
	}
	p, err := NewProblem(m, mat, Options{Kinematics: kin, DisplacementOnly: !mixed}, BCs{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(p.Close)
	ux, uy, th := make([]float64, len(m.X)), make([]float64, len(m.X)), make([]float64, len(m.X))
	for n, x := range m.X {
		ux[n], uy[n], th[n] = (l1-1)*x[0], (l2-1)*x[1], theta
	}
	for _, f := range []struct {
		f Field
		v []float64
	}{{Ux, ux}, {Uy, uy}, {Theta, th}} {
		if p.Dofs.Has(f.f) {
			if err := p.SetNodalField(f.f, f.v); err != nil {
				t.Fatal(err)
			}
		}
	}
	return p
}

// TestMaterialStrainStretch: under a homogeneous stretch the logarithmic
// strain is E = diag(ln λ₁, ln λ₂, ln λ₃) (Hencky strain; Miehe, Apel &
// Lambrecht 2002), with λ₃ = 1 in plane strain and λ₃ = λ₁ in axisymmetry
// (u_r/R = λ₁ − 1); the three-field element shifts its trace to θ,
// Ẽ = E + ((θ − tr E)/3) I (Simo, Taylor & Pister 1985). A stretch with
// λ₁ < 0 inverts every element: an *ElementError with Inverted set.
func TestMaterialStrainStretch(t *testing.T) {
	for _, c := range []struct {
		name   string
		kin    Kinematics
		mixed  bool
		x0     float64
		l1, l2 float64
		theta  float64
	}{
		{"plane strain, displacement only", PlaneStrain, false, 0, 1.3, 0.8, 0},
		{"plane strain, mixed", PlaneStrain, true, 0, 1.3, 0.8, 0.05},
		{"axisymmetric, displacement only", Axisymmetric, false, 1, 1.1, 1.25, 0},
		{"axisymmetric, mixed", Axisymmetric, true, 1, 0.9, 1.2, -0.02},
	} {
		p := stretched(t, c.kin, c.mixed, false, c.x0, c.l1, c.l2, c.theta)
		l3 := 1.0
		if c.kin == Axisymmetric {
			l3 = c.l1
		}
		want := [4]float64{math.Log(c.l1), math.Log(c.l2), math.Log(l3), 0}
		if c.mixed {
			d := (c.theta - want[0] - want[1] - want[2]) / 3
			want[0], want[1], want[2] = want[0]+d, want[1]+d, want[2]+d
		}
		for e := range p.Mesh.Tri {
			for g := 0; g < perElem; g++ {
				E, err := p.MaterialStrain(e, g)
				if err != nil {
					t.Fatalf("%s: element %d point %d: %v", c.name, e, g, err)
				}
				for k := range E {
					if math.Abs(E[k]-want[k]) > 1e-14 {
						t.Errorf("%s: element %d point %d: E[%d] = %.16g, want %.16g", c.name, e, g, k, E[k], want[k])
					}
				}
			}
		}
	}
	p := stretched(t, PlaneStrain, true, false, 0, -0.5, 1, 0)
	_, err := p.MaterialStrain(0, 0)
	var ee *ElementError
	if !errors.As(err, &ee) || !ee.Inverted || ee.Elem != 0 || ee.Point != 0 {
		t.Errorf("inverted element: got %v, want an *ElementError with Inverted at element 0 point 0", err)
	}
}

// TestStraighten: with straight edges (every midside displacement the mean
// of its corners') an element is left alone; a quadratic element inverted
// by a midside displacement (negative Jacobian of the isoparametric map
// inside it) becomes the straight-sided element of its corners, whose F is
// constant: for the stretch of the corners, E = diag(ln λ₁, ln λ₂, 0)
// (closed form, as in TestMaterialStrainStretch).
func TestStraighten(t *testing.T) {
	// Dyadic stretch and coordinates: the midside values of the linear
	// field are the means of the corner values exactly.
	const l1, l2 = 1.25, 0.75
	p := stretched(t, PlaneStrain, false, false, 0, l1, l2, 0)
	before := append([]float64(nil), p.Committed...)
	for e := range p.Mesh.Tri {
		if p.Straighten(e) {
			t.Errorf("straight element %d changed", e)
		}
	}
	for d := range before {
		if p.Committed[d] != before[d] || p.U[d] != before[d] {
			t.Fatalf("straightening straight elements changed unknown %d", d)
		}
	}

	// Push the midside node of edge 0–1 of element 0 beyond the opposite
	// corner.
	const e = 0
	tri := p.Mesh.Tri[e]
	xm, x2 := p.Mesh.X[tri[3]], p.Mesh.X[tri[2]]
	for c, f := range [2]Field{Ux, Uy} {
		d := p.Dofs.Of(tri[3], f)
		p.Committed[d] += 1.5 * (x2[c] - xm[c])
		p.U[d] = p.Committed[d]
	}
	inverted := false
	for g := 0; g < perElem; g++ {
		var ee *ElementError
		if _, err := p.LogStrain(e, g); errors.As(err, &ee) && ee.Inverted {
			inverted = true
		}
	}
	if !inverted {
		t.Fatal("the curved element is not inverted: the test does not test anything")
	}
	if !p.Straighten(e) {
		t.Fatal("Straighten reported no change on a curved element")
	}
	want := [4]float64{math.Log(l1), math.Log(l2), 0, 0}
	for g := 0; g < perElem; g++ {
		E, err := p.LogStrain(e, g)
		if err != nil {
			t.Fatalf("point %d after straightening: %v", g, err)
		}
		for k := range E {
			if math.Abs(E[k]-want[k]) > 1e-14 {
				t.Errorf("point %d: E[%d] = %.16g, want %.16g", g, k, E[k], want[k])
			}
		}
	}
	for d := range p.U {
		if p.U[d] != p.Committed[d] {
			t.Fatalf("unknown %d: iterate %g and committed %g differ", d, p.U[d], p.Committed[d])
		}
	}
}

// TestProjectVolume: a linear displacement has a constant tr E, and the
// lumped L2 projection of a constant is that constant,
// Σ N_a c dA / Σ N_a dA = c (closed form), at every corner node, whatever
// θ was before; tr E = ln λ₁ + ln λ₂ + ln λ₃ as in TestMaterialStrainStretch.
// Without the mixed element there is no θ and nothing to do.
func TestProjectVolume(t *testing.T) {
	for _, c := range []struct {
		name   string
		kin    Kinematics
		x0     float64
		l1, l2 float64
	}{
		{"plane strain", PlaneStrain, 0, 1.3, 0.8},
		{"axisymmetric", Axisymmetric, 1, 1.1, 1.25},
	} {
		p := stretched(t, c.kin, true, false, c.x0, c.l1, c.l2, 0.3)
		if err := p.ProjectVolume(); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		want := math.Log(c.l1) + math.Log(c.l2)
		if c.kin == Axisymmetric {
			want += math.Log(c.l1)
		}
		for n := 0; n < p.Mesh.NumCorners; n++ {
			th, _ := p.Nodal(p.Committed, n, Theta)
			cur, _ := p.Nodal(p.U, n, Theta)
			if math.Abs(th-want) > 1e-14 || cur != th {
				t.Errorf("%s: node %d: θ = %.16g (iterate %.16g), want %.16g", c.name, n, th, cur, want)
			}
		}
	}
	p := stretched(t, PlaneStrain, false, false, 0, 1.3, 0.8, 0)
	if err := p.ProjectVolume(); err != nil {
		t.Errorf("displacement only: %v", err)
	}
}

// TestResetRegularisation: the corners of the element get the local
// solution of the regularisation equations, ā = p and λ = 0 (Peerlings et
// al. 1996, p − ā = 0 without gradient), in the iterate and the committed
// unknowns; every other unknown keeps its value.
func TestResetRegularisation(t *testing.T) {
	p := stretched(t, PlaneStrain, true, true, 0, 1.1, 0.9, 0.01)
	for d := range p.U {
		if f := p.Dofs.FieldOf[d]; f == Abar || f == Lambda {
			p.U[d] = 0.5 + float64(d)
			p.Committed[d] = p.U[d]
		}
	}
	before := append([]float64(nil), p.Committed...)
	const e, pl = 3, 0.125
	p.ResetRegularisation(e, pl)
	corner := map[int]bool{}
	for k := 0; k < 3; k++ {
		corner[p.Mesh.Tri[e][k]] = true
	}
	for n := range p.Mesh.X {
		for _, c := range []struct {
			f    Field
			want float64
		}{{Abar, pl}, {Lambda, 0}, {Ux, math.NaN()}, {Theta, math.NaN()}} {
			d := p.Dofs.Of(n, c.f)
			if d < 0 {
				continue
			}
			want := before[d]
			if corner[n] && !math.IsNaN(c.want) {
				want = c.want
			}
			if p.Committed[d] != want || p.U[d] != want {
				t.Errorf("node %d field %v: committed %g, iterate %g, want %g", n, c.f, p.Committed[d], p.U[d], want)
			}
		}
	}
}

// TestCommittedFields: the displacement is the committed (u_x, u_y) of
// every node; a linear corner field at area coordinates l is Σ lₖ fₖ, the
// corner's value at a corner and the mean of the three at the centroid
// (linear interpolation, closed form).
func TestCommittedFields(t *testing.T) {
	p := stretched(t, PlaneStrain, true, false, 0, 1.25, 0.75, 0)
	for n := 0; n < p.Mesh.NumCorners; n++ {
		p.Committed[p.Dofs.Of(n, Theta)] = 0.25 * float64(n)
	}
	u := p.Displacement()
	for n, x := range p.Mesh.X {
		if want := [2]float64{0.25 * x[0], -0.25 * x[1]}; u[n] != want {
			t.Errorf("node %d: u = %v, want %v", n, u[n], want)
		}
	}
	const e = 2
	th := func(k int) float64 { return 0.25 * float64(p.Mesh.Tri[e][k]) }
	for _, c := range []struct {
		name string
		l    [3]float64
		want float64
	}{
		{"corner 0", [3]float64{1, 0, 0}, th(0)},
		{"corner 1", [3]float64{0, 1, 0}, th(1)},
		{"corner 2", [3]float64{0, 0, 1}, th(2)},
		{"centroid", [3]float64{1.0 / 3, 1.0 / 3, 1.0 / 3}, (th(0) + th(1) + th(2)) / 3},
	} {
		if got := p.LinearFieldAt(Theta, e, c.l); math.Abs(got-c.want) > 1e-15*math.Abs(c.want) {
			t.Errorf("%s: θ = %.16g, want %.16g", c.name, got, c.want)
		}
	}
}
