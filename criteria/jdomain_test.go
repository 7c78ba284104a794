package criteria

import (
	"math"
	"strings"
	"testing"

	"tearline/solver/fem"
)

// TestDomainJWilliams evaluates the domain integral on the exact Williams
// field sampled at the Gauss points of a cracked-disk mesh (F = I + ∇u,
// P = small-strain stress, W = ½σ:ε) and checks J = K²(1−ν²)/E within 1%
// on every ring (V4/V11: Williams 1957; Rice 1968, J. Appl. Mech. 35). The
// superposed rigid rotation checks the finite-strain form: J is unchanged
// by a rigid rotation of the deformed state (Rice 1968; frame indifference).
func TestDomainJWilliams(t *testing.T) {
	el := Elastic{E: 210e3, Nu: 0.3}
	rings := []Ring{{0, 0.1}, {0.05, 0.3}, {0.2, 0.5}, {0.4, 0.8}, {0.1, 0.95}}
	for _, tc := range []struct {
		name      string
		tip, dir  [2]float64
		K, T, rot float64
		nr, nth   int
	}{
		{"aligned", [2]float64{0, 0}, [2]float64{1, 0}, 60, 0, 0, 16, 32},
		{"T-stress, turned tip", [2]float64{3, -2}, [2]float64{math.Cos(0.6), math.Sin(0.6)}, 40, 150, 0, 16, 32},
		{"rigid rotation 30°", [2]float64{0, 0}, [2]float64{1, 0}, 60, 0, math.Pi / 6, 16, 32},
	} {
		m := crackedDisk(1, tc.nr, tc.nth, tc.tip, tc.dir)
		if err := m.Check(); err != nil {
			t.Fatalf("%s: test mesh: %v", tc.name, err)
		}
		k := KField{K: tc.K, T: tc.T, El: el, Tip: tc.tip, Dir: tc.dir}
		gp := gaussFrom(m, williamsGauss(k, tc.rot))
		J, err := DomainJ(m, gp, JOptions{Tip: tc.tip, Dir: tc.dir, Rings: rings, Cross: []string{"crack"}})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		want := FarFieldJ(tc.K, el)
		for i, j := range J {
			rel := j/want - 1
			t.Logf("%s ring %v: J = %.6g, K²(1−ν²)/E = %.6g, rel. error %.2e", tc.name, rings[i], j, want, rel)
			if math.Abs(rel) > 0.01 {
				t.Errorf("%s ring %v: J = %g, want %g within 1%%", tc.name, rings[i], j, want)
			}
		}
	}
}

// TestDomainJSymmetric checks the half-model factor: the upper half of the
// cracked disk with Symmetric gives the full J (mirror symmetry of mode I,
// Williams 1957).
func TestDomainJSymmetric(t *testing.T) {
	el := Elastic{E: 70e3, Nu: 0.33}
	full := crackedDisk(1, 12, 32, [2]float64{0, 0}, [2]float64{1, 0})
	// keep the triangles of the upper half (centroid y > 0).
	half := &fem.Mesh{X: full.X, NumCorners: full.NumCorners, Labels: full.Labels, Points: full.Points}
	for _, tr := range full.Tri {
		if full.X[tr[0]][1]+full.X[tr[1]][1]+full.X[tr[2]][1] > 0 {
			half.Tri = append(half.Tri, tr)
		}
	}
	k := KField{K: 25, El: el, Dir: [2]float64{1, 0}}
	gp := gaussFrom(half, williamsGauss(k, 0))
	rings := []Ring{{0.1, 0.4}, {0.3, 0.9}}
	J, err := DomainJ(half, gp, JOptions{Dir: [2]float64{1, 0}, Rings: rings, Symmetric: true})
	if err != nil {
		t.Fatal(err)
	}
	want := FarFieldJ(25, el)
	for i, j := range J {
		if math.Abs(j/want-1) > 0.01 {
			t.Errorf("half model ring %v: J = %g, want %g within 1%%", rings[i], j, want)
		}
	}
}

// TestDomainJUniform checks that a uniform field in a body without a crack
// gives J = 0 (path independence: the closed-contour J of a regular field
// vanishes, Rice 1968), for finite deformation and stress alike.
func TestDomainJUniform(t *testing.T) {
	m := gridMesh(-1, 1, -1, 1, 10, 10, true)
	F := [5]float64{1.05, 0.02, -0.03, 0.97, 1}
	P := [5]float64{300, 40, 35, -120, 50}
	gp := gaussFrom(m, func(x [2]float64) ([5]float64, [5]float64, float64, float64) { return F, P, 12.5, 0 })
	J, err := DomainJ(m, gp, JOptions{Tip: [2]float64{0.13, -0.07}, Dir: [2]float64{1, 0.4}, Rings: []Ring{{0.1, 0.5}, {0, 0.8}}})
	if err != nil {
		t.Fatal(err)
	}
	// scale of one term: |P||H| area ~ 300·0.05·1
	for i, j := range J {
		if math.Abs(j) > 1e-11 {
			t.Errorf("ring %d: J = %g, want 0 for a uniform field", i, j)
		}
	}
}

// TestDomainJBadInput checks that bad input gives clear errors.
func TestDomainJBadInput(t *testing.T) {
	m := crackedDisk(1, 4, 8, [2]float64{0, 0}, [2]float64{1, 0})
	k := KField{K: 1, El: Elastic{E: 1, Nu: 0.3}, Dir: [2]float64{1, 0}}
	gp := gaussFrom(m, williamsGauss(k, 0))
	ok := JOptions{Dir: [2]float64{1, 0}, Rings: []Ring{{0.1, 0.5}}}
	short := &fem.GaussPoints{PerElement: gp.PerElement, Points: gp.Points[:10]}
	for _, tc := range []struct {
		name string
		m    *fem.Mesh
		gp   *fem.GaussPoints
		opt  JOptions
		want string
	}{
		{"nil mesh", nil, gp, ok, "empty mesh"},
		{"empty mesh", &fem.Mesh{}, gp, ok, "empty mesh"},
		{"no Gauss data", m, nil, ok, "no Gauss-point data"},
		{"short Gauss data", m, short, ok, "the mesh needs"},
		{"inverted ring", m, gp, JOptions{Dir: [2]float64{1, 0}, Rings: []Ring{{0.5, 0.1}}}, "need 0 ≤ in < out"},
		{"no rings", m, gp, JOptions{Dir: [2]float64{1, 0}}, "no rings"},
		{"zero direction", m, gp, JOptions{Rings: ok.Rings}, "crack direction"},
		{"axisymmetric tip on the axis", m, gp, JOptions{Dir: [2]float64{1, 0}, Rings: ok.Rings, Axisymmetric: true}, "need r > 0"},
		{"axisymmetric points across the axis", m, gp, JOptions{Tip: [2]float64{0.2, 0}, Dir: [2]float64{1, 0}, Rings: ok.Rings, Axisymmetric: true}, "need r > 0"},
		{"missing label", m, gp, JOptions{Dir: [2]float64{1, 0}, Rings: ok.Rings, Cross: []string{"flank"}}, `label "flank"`},
		{"ring reaches outer boundary", m, gp, JOptions{Dir: [2]float64{1, 0}, Rings: []Ring{{0.5, 1.5}}, Cross: []string{"crack"}}, `boundary "outer"`},
		{"ring outside the mesh", m, gp, JOptions{Tip: [2]float64{10, 10}, Dir: [2]float64{1, 0}, Rings: []Ring{{0.1, 0.5}}}, "holds no element"},
	} {
		_, err := DomainJ(tc.m, tc.gp, tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

// TestDomainJAxisymmetric checks the axisymmetric domain integral: on the
// Lamé thick cylinder (u_r = AR + B/R, Timoshenko & Goodier, Theory of
// Elasticity), a regular field, J = 0 on every ring, which holds only with
// the hoop term (the plane-strain evaluation of the same data is shown to be
// far from 0); and a crack front at a large radius R₀ carrying the Williams
// field gives the plane-strain J = K²(1−ν²)/E (Williams 1957; Rice 1968)
// within 1%, the hoop terms being O(r/R₀).
func TestDomainJAxisymmetric(t *testing.T) {
	el := Elastic{E: 200e3, Nu: 0.3}
	lam := el.E * el.Nu / ((1 + el.Nu) * (1 - 2*el.Nu))
	mu := el.Shear()
	const A, B = 1e-3, 2e-3
	m := gridMesh(1, 3, -1, 1, 40, 40, true)
	gp := gaussFrom(m, func(x [2]float64) (F, P [5]float64, W, f float64) {
		R := x[0]
		err, eth := A-B/(R*R), A+B/(R*R)
		srr := lam*(err+eth) + 2*mu*err
		sth := lam*(err+eth) + 2*mu*eth
		szz := lam * (err + eth)
		return [5]float64{1 + err, 0, 0, 1, 1 + eth}, [5]float64{srr, 0, 0, szz, sth}, 0.5 * (srr*err + sth*eth), 0
	})
	rings := []Ring{{0.1, 0.5}, {0.3, 0.9}, {0, 0.7}}
	scale := 0.5 * 2 * (lam + 2*mu) * A * A * 0.9 // W·r_out
	for _, dir := range [][2]float64{{1, 0}, {0.6, 0.8}, {-1, 0}} {
		opt := JOptions{Tip: [2]float64{2, 0.05}, Dir: dir, Rings: rings, Axisymmetric: true}
		J, err := DomainJ(m, gp, opt)
		if err != nil {
			t.Fatal(err)
		}
		opt.Axisymmetric = false
		Jp, err := DomainJ(m, gp, opt)
		if err != nil {
			t.Fatal(err)
		}
		for i := range J {
			t.Logf("Lamé, direction %v, ring %v: J axisymmetric %.3g, plane-strain reading %.3g (scale %.3g)", dir, rings[i], J[i], Jp[i], scale)
			if math.Abs(J[i]) > 1e-6*scale {
				t.Errorf("Lamé ring %v direction %v: axisymmetric J = %g, want 0 (scale %g)", rings[i], dir, J[i], scale)
			}
		}
		if dir[0] != 0 && math.Abs(Jp[1]) < 1e-3*scale {
			t.Errorf("the plane-strain reading of the axisymmetric field is %g: the test would not see a missing hoop term", Jp[1])
		}
	}

	const R0 = 1000.0
	tip := [2]float64{R0, 0}
	disk := crackedDisk(1, 16, 32, tip, [2]float64{1, 0})
	k := KField{K: 40, El: el, Tip: tip, Dir: [2]float64{1, 0}}
	plane := williamsGauss(k, 0)
	gpa := gaussFrom(disk, func(x [2]float64) (F, P [5]float64, W, f float64) {
		F, P, W, f = plane(x)
		u := k.Displacement(x)
		F[4] = 1 + u[0]/x[0]
		return F, P, W + 0.5*P[4]*(F[4]-1), f
	})
	J, err := DomainJ(disk, gpa, JOptions{Tip: tip, Dir: [2]float64{1, 0}, Rings: []Ring{{0.1, 0.5}, {0.3, 0.9}}, Axisymmetric: true})
	if err != nil {
		t.Fatal(err)
	}
	want := FarFieldJ(40, el)
	for i, j := range J {
		t.Logf("front at R0 = %g, ring %d: J = %.6g, plane strain %.6g", R0, i, j, want)
		if math.Abs(j/want-1) > 0.01 {
			t.Errorf("front at R0 = %g ring %d: J = %g, want %g within 1%%", R0, i, j, want)
		}
	}
}

// TestDomainJSkipsBroken checks that broken Gauss points, which carry no
// stress and have left the assembly, do not enter J: marking points broken
// and filling them with garbage gives the same J as zeroing them (void).
func TestDomainJSkipsBroken(t *testing.T) {
	m := crackedDisk(1, 8, 16, [2]float64{0, 0}, [2]float64{1, 0})
	k := KField{K: 10, El: Elastic{E: 1000, Nu: 0.3}, Dir: [2]float64{1, 0}}
	void := gaussFrom(m, williamsGauss(k, 0))
	junk := gaussFrom(m, williamsGauss(k, 0))
	for e := 0; e < len(m.Tri); e += 7 {
		for i := 0; i < void.PerElement; i++ {
			v, j := void.At(e, i), junk.At(e, i)
			v.F, v.P, v.W = [5]float64{1, 0, 0, 1, 1}, [5]float64{}, 0
			j.P, j.W = [5]float64{1e9, 2e9, 3e9, 4e9, 5e9}, 1e9
			j.State.Broken = true
		}
	}
	opt := JOptions{Dir: [2]float64{1, 0}, Rings: []Ring{{0.2, 0.8}}}
	a, err1 := DomainJ(m, void, opt)
	b, err2 := DomainJ(m, junk, opt)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	if math.Abs(a[0]-b[0]) > 1e-12*math.Abs(a[0]) {
		t.Errorf("J with broken points %g, with void points %g: broken points entered J", b[0], a[0])
	}
}
