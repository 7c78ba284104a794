package transfer

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/plane"
)

// fieldsFrom fills Fields on m: displacement u(x) on every node, the corner
// fields lin on corner nodes, and the Gauss-point state and data from
// state(x) and gauss(x) (nil: no data) at the isoparametric Gauss-point
// positions.
func fieldsFrom(m *fem.Mesh, u func([2]float64) [2]float64, lin []func([2]float64) float64,
	state func([2]float64) material.State, gauss func([2]float64) GaussData) *Fields {
	f := &Fields{U: make([][2]float64, len(m.X))}
	for n, p := range m.X {
		f.U[n] = u(p)
	}
	for _, g := range lin {
		v := make([]float64, m.NumCorners)
		for n := range v {
			v[n] = g(m.X[n])
		}
		f.Linear = append(f.Linear, v)
	}
	x, _ := gaussGeometry(m, fem.ElementRule(), 1)
	f.State = make([]material.State, len(x))
	for i, p := range x {
		f.State[i] = state(p)
	}
	if gauss != nil {
		f.Gauss = make([]GaussData, len(x))
		for i, p := range x {
			f.Gauss[i] = gauss(p)
		}
	}
	return f
}

// work is Gauss-point data with the stress work w(x) alone.
func work(w func([2]float64) float64) func([2]float64) GaussData {
	return func(p [2]float64) GaussData { return GaussData{W: w(p)} }
}

// linearGauss is Gauss-point data whose every component is a different
// linear function of the position.
func linearGauss(p [2]float64) GaussData {
	var v [gaussComponents]float64
	for k := range v {
		c := float64(k + 1)
		v[k] = linear{0.1 * c, 0.02 * c * c, -0.3 / c}.at(p)
	}
	var d GaussData
	d.get(v[:])
	return d
}

// TestLinearFieldsExact: linear displacement, linear corner fields and a
// linear Gauss-point state are transferred exactly (to round-off) between
// different meshes of the same square — polynomial reproduction of the
// Lagrange shape functions and of linear least-squares fits (Zienkiewicz &
// Zhu 1992, IJNME 33; any FE text for the shape functions). A quadratic
// displacement is reproduced by the quadratic shape functions as well.
func TestLinearFieldsExact(t *testing.T) {
	uq := func(p [2]float64) [2]float64 {
		return [2]float64{0.01 + 0.02*p[0] - 0.03*p[1] + 0.05*p[0]*p[1], -0.02 + 0.04*p[0] + 0.01*p[1] - 0.02*p[1]*p[1]}
	}
	ul := func(p [2]float64) [2]float64 {
		return [2]float64{0.01 + 0.02*p[0] - 0.03*p[1], -0.02 + 0.04*p[0] + 0.01*p[1]}
	}
	lins := []linear{{0.1, -0.2, 0.3}, {5, 1, -2}}
	ep := [4]linear{{0.01, 0.02, -0.01}, {-0.02, 0.01, 0.03}, {0.005, -0.004, 0.002}, {0.001, 0.002, 0.003}}
	pl := linear{0.1, 0.2, 0.3}
	fl := linear{0.01, 0.02, 0.015}
	state := func(p [2]float64) material.State {
		return material.State{Ep: material.Sym{ep[0].at(p), ep[1].at(p), ep[2].at(p), ep[3].at(p)}, P: pl.at(p), F: fl.at(p)}
	}
	for _, tc := range []struct {
		name    string
		old, nw *fem.Mesh
		method  Method
		u       func([2]float64) [2]float64
	}{
		{"structured 8x8 to perturbed 11x7, patch", squareMesh(8, 8, 0, 0), squareMesh(11, 7, 0.3, 1), PatchRecovery, ul},
		{"perturbed 9x9 to structured 5x6, patch", squareMesh(9, 9, 0.35, 2), squareMesh(5, 6, 0, 0), PatchRecovery, ul},
		{"perturbed 6x10 to perturbed 13x12, L2", squareMesh(6, 10, 0.3, 3), squareMesh(13, 12, 0.3, 4), L2Projection, ul},
		{"quadratic u, perturbed 7x7 to 10x9", squareMesh(7, 7, 0.3, 5), squareMesh(10, 9, 0.25, 6), PatchRecovery, uq},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var lf []func([2]float64) float64
			for _, l := range lins {
				lf = append(lf, l.at)
			}
			from := fieldsFrom(tc.old, tc.u, lf, state, linearGauss)
			opt := DefaultOptions()
			opt.Method = tc.method
			to, rec, err := Map(tc.old, from, tc.nw, opt)
			if err != nil {
				t.Fatal(err)
			}
			want := fieldsFrom(tc.nw, tc.u, lf, state, linearGauss)
			tol := 1e-12
			if tc.method == L2Projection {
				tol = 1e-11 // CG stops at a relative residual of 1e-13
			}
			for n := range to.U {
				if d := math.Hypot(to.U[n][0]-want.U[n][0], to.U[n][1]-want.U[n][1]); d > tol {
					t.Fatalf("node %d at %v: u %v, want %v", n, tc.nw.X[n], to.U[n], want.U[n])
				}
			}
			for k := range to.Linear {
				for n := range to.Linear[k] {
					if d := math.Abs(to.Linear[k][n] - want.Linear[k][n]); d > tol {
						t.Fatalf("linear field %d node %d: %g, want %g", k, n, to.Linear[k][n], want.Linear[k][n])
					}
				}
			}
			maxErr := 0.0
			for i, s := range to.State {
				w := want.State[i]
				for c := 0; c < 4; c++ {
					maxErr = math.Max(maxErr, math.Abs(s.Ep[c]-w.Ep[c]))
				}
				maxErr = math.Max(maxErr, math.Max(math.Abs(s.P-w.P), math.Abs(s.F-w.F)))
				var got, wv [gaussComponents]float64
				to.Gauss[i].put(got[:])
				want.Gauss[i].put(wv[:])
				for c := range got {
					maxErr = math.Max(maxErr, math.Abs(got[c]-wv[c]))
				}
			}
			if maxErr > tol {
				t.Fatalf("Gauss-point state error %g > %g", maxErr, tol)
			}
			if rec.Projected+rec.Verbatim != len(to.State) || rec.ClampedF+rec.ClampedP+rec.Extrapolated+rec.Broken != 0 {
				t.Errorf("record %+v: expected every point projected or verbatim, none clamped", rec)
			}
			// ∫p dA of a linear p over the unit square is p at the centroid
			// (closed form); the Degree-4 rule integrates it exactly.
			if want := pl.at([2]float64{0.5, 0.5}); math.Abs(rec.Before.IntP-want) > 1e-13 || math.Abs(rec.After.IntP-want) > 1e-13 {
				t.Errorf("∫p dA before %.15g after %.15g, closed form %.15g", rec.Before.IntP, rec.After.IntP, want)
			}
			t.Logf("max Gauss-point error %.2e; record %+v", maxErr, rec.Wall)
		})
	}
}

// TestMeasureAxisymmetric: ∫ p 2πr dA of p = a + b r + c z over the unit
// square (r, z) ∈ [0,1]² is 2π(a/2 + b/3 + c/4) (closed form).
func TestMeasureAxisymmetric(t *testing.T) {
	m := squareMesh(5, 4, 0.3, 9)
	pl := linear{0.3, 0.2, -0.1}
	f := fieldsFrom(m, func([2]float64) [2]float64 { return [2]float64{} }, nil,
		func(p [2]float64) material.State { return material.State{P: pl.at(p), F: 0.01} }, work(pl.at))
	for _, tc := range []struct {
		axi        bool
		want, volW float64
	}{
		{false, pl.at([2]float64{0.5, 0.5}), 1},
		{true, 2 * math.Pi * (pl[0]/2 + pl[1]/3 + pl[2]/4), math.Pi},
	} {
		ms, err := Measure(m, f, tc.axi)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(ms.IntP-tc.want) > 1e-13 || math.Abs(ms.Work-tc.want) > 1e-13 || math.Abs(ms.Volume-tc.volW) > 1e-13 {
			t.Errorf("axisymmetric %v: ∫p %.15g ∫W %.15g volume %.15g; want %.15g, %.15g", tc.axi, ms.IntP, ms.Work, ms.Volume, tc.want, tc.volW)
		}
		if ms.MaxF != 0.01 {
			t.Errorf("max f %g, want 0.01", ms.MaxF)
		}
	}
}

// transferError returns the dA-weighted RMS error of the transferred p and
// of u at the new nodes for smooth fields g and ug.
func transferError(t *testing.T, old, nw *fem.Mesh, method Method) (gErr, uErr float64) {
	g := func(p [2]float64) float64 { return 1 + math.Sin(math.Pi*p[0])*math.Cos(0.8*math.Pi*p[1]) }
	ug := func(p [2]float64) [2]float64 {
		return [2]float64{math.Sin(2 * p[0] * p[1]), math.Cos(p[0] + 2*p[1])}
	}
	from := fieldsFrom(old, ug, nil, func(p [2]float64) material.State { return material.State{P: g(p), F: 0.01} }, nil)
	opt := DefaultOptions()
	opt.Method = method
	to, _, err := Map(old, from, nw, opt)
	if err != nil {
		t.Fatal(err)
	}
	x, da := gaussGeometry(nw, fem.ElementRule(), 1)
	s, a := 0.0, 0.0
	for i, p := range x {
		d := to.State[i].P - g(p)
		s += d * d * da[i]
		a += da[i]
	}
	for n, p := range nw.X {
		w := ug(p)
		uErr = math.Max(uErr, math.Hypot(to.U[n][0]-w[0], to.U[n][1]-w[1]))
	}
	return math.Sqrt(s / a), uErr
}

// TestSmoothConvergence: a smooth field's transfer error falls with the
// mesh size: O(h²) for the recovered linear Gauss-point fields (patch
// recovery of a smooth field, Zienkiewicz & Zhu 1992; P1 interpolation
// error, common practice) and O(h³) for the displacement interpolated by the
// quadratic shape functions (interpolation theory, e.g. Ciarlet 1978). The
// new meshes are perturbed and about 1.4 times finer than the old ones.
func TestSmoothConvergence(t *testing.T) {
	for _, method := range []Method{PatchRecovery, L2Projection} {
		t.Run(method.String(), func(t *testing.T) {
			var hs, ge, ue []float64
			for _, n := range []int{6, 12, 24, 48} {
				old := squareMesh(n, n, 0.25, uint64(n))
				nw := squareMesh(n*7/5, n*7/5, 0.25, uint64(n+100))
				g, u := transferError(t, old, nw, method)
				hs, ge, ue = append(hs, 1/float64(n)), append(ge, g), append(ue, u)
			}
			for i := 1; i < len(hs); i++ {
				rg := math.Log(ge[i-1]/ge[i]) / math.Log(hs[i-1]/hs[i])
				ru := math.Log(ue[i-1]/ue[i]) / math.Log(hs[i-1]/hs[i])
				t.Logf("h %.4f → %.4f: Gauss-point error %.3e → %.3e (order %.2f), nodal u max error %.3e → %.3e (order %.2f)",
					hs[i-1], hs[i], ge[i-1], ge[i], rg, ue[i-1], ue[i], ru)
			}
			// The orders over the whole sequence (least-squares slope in
			// log–log; single steps are noisy on perturbed meshes).
			rg, ru := slope(hs, ge), slope(hs, ue)
			t.Logf("overall: Gauss-point order %.2f, displacement order %.2f", rg, ru)
			if rg < 1.8 {
				t.Errorf("Gauss-point transfer order %.2f, want ≈ 2 (≥ 1.8)", rg)
			}
			if ru < 2.7 {
				t.Errorf("displacement transfer order %.2f, want ≈ 3 (≥ 2.7)", ru)
			}
		})
	}
}

// TestPorosityBounds: a sharp porosity and plastic-strain peak (narrower
// than the old elements) makes the least-squares fits over- and undershoot;
// the transferred state must still satisfy F0 ≤ f < FBreak and p ≥ 0
// (DESIGN.md §4), points next to broken old points stay broken with the old
// state, and with TraceFromPorosity tr Ep = ln((1−F0)/(1−f)) (growth-only
// GTN porosity evolution, Gurson 1977; Tvergaard 1981).
func TestPorosityBounds(t *testing.T) {
	const f0, fb = 0.002, 0.15
	// An interior peak with a broken core, and a peak on the boundary x = 0
	// just below FBreak: the boundary nodes' patch fits extrapolate and
	// overshoot or undershoot (f below F0, p below 0 away from the peaks).
	c1, c2 := [2]float64{0.52, 0.47}, [2]float64{0, 0.3}
	peak := func(p, c [2]float64, w float64) float64 { return math.Exp(-plane.DistSq(p, c) / (w * w)) }
	state := func(p [2]float64) material.State {
		f := f0 + 0.25*peak(p, c1, 0.04) + 0.147*peak(p, c2, 0.08)
		s := material.State{P: 0.8*peak(p, c1, 0.03) + 0.5*peak(p, c2, 0.05), F: f}
		s.Ep = material.Sym{0.1 * s.P, -0.05 * s.P, -0.05 * s.P, 0.02 * s.P}
		s.Broken = f >= fb
		return s
	}
	old := squareMesh(16, 16, 0.2, 21)
	nw := squareMesh(23, 21, 0.3, 22)
	for _, method := range []Method{PatchRecovery, L2Projection} {
		for _, trace := range []bool{false, true} {
			from := fieldsFrom(old, func([2]float64) [2]float64 { return [2]float64{} }, nil, state, nil)
			opt := DefaultOptions()
			opt.Method, opt.F0, opt.FBreak, opt.TraceFromPorosity = method, f0, fb, trace
			to, rec, err := Map(old, from, nw, opt)
			if err != nil {
				t.Fatal(err)
			}
			oldX, _ := gaussGeometry(old, fem.ElementRule(), 1)
			newX, _ := gaussGeometry(nw, fem.ElementRule(), 1)
			lc, _ := NewLocator(old, 1e-9)
			for i, s := range to.State {
				// The reference for brokenness: the nearest old Gauss
				// point within the containing old triangle.
				e, _, _ := lc.Locate(newX[i])
				near := e * 6
				for j := e * 6; j < e*6+6; j++ {
					if plane.DistSq(oldX[j], newX[i]) < plane.DistSq(oldX[near], newX[i]) {
						near = j
					}
				}
				if s.Broken != from.State[near].Broken {
					t.Fatalf("%v: point %d broken %v, nearest old point broken %v", method, i, s.Broken, from.State[near].Broken)
				}
				if s.Broken {
					if s != from.State[near] {
						t.Fatalf("%v: broken point %d state %+v, old %+v", method, i, s, from.State[near])
					}
					continue
				}
				if !(s.F >= f0 && s.F < fb) || !(s.P >= 0) {
					t.Fatalf("%v: point %d f = %g (bounds [%g, %g)), p = %g", method, i, s.F, f0, fb, s.P)
				}
				if trace {
					if want := math.Log((1 - f0) / (1 - s.F)); math.Abs(s.Ep.Trace()-want) > 1e-15 {
						t.Fatalf("%v: tr Ep %g, want ln((1−f0)/(1−f)) = %g", method, s.Ep.Trace(), want)
					}
				}
			}
			if n := rec.Verbatim + rec.Broken + rec.Projected + rec.Extrapolated; n != len(to.State) {
				t.Errorf("%v: record counts %d points of %d", method, n, len(to.State))
			}
			if rec.ClampedF == 0 || rec.ClampedP == 0 || rec.Broken == 0 {
				t.Errorf("%v: the peaks clamped no f (%d) or no p (%d) or left no broken point (%d): the test checks nothing", method, rec.ClampedF, rec.ClampedP, rec.Broken)
			}
			if !trace {
				t.Logf("%v: max f %.4f → %.4f, ∫p dA %.5f → %.5f, clamped f %d p %d, broken %d → %d",
					method, rec.Before.MaxF, rec.After.MaxF, rec.Before.IntP, rec.After.IntP, rec.ClampedF, rec.ClampedP, rec.Before.Broken, rec.After.Broken)
			}
		}
	}
}

// shuffled returns a copy of m with nodes renumbered (corners still first),
// triangles reordered and each triangle's vertices rotated — the same
// geometry as a new mesh would present it.
func shuffled(m *fem.Mesh, seed uint64) *fem.Mesh {
	rng := rand.New(rand.NewPCG(seed, 2))
	nc := m.NumCorners
	perm := make([]int, len(m.X))
	cp := rng.Perm(nc)
	mp := rng.Perm(len(m.X) - nc)
	for i := range perm {
		if i < nc {
			perm[i] = cp[i]
		} else {
			perm[i] = nc + mp[i-nc]
		}
	}
	out := &fem.Mesh{X: make([][2]float64, len(m.X)), NumCorners: nc}
	for i, p := range m.X {
		out.X[perm[i]] = p
	}
	for _, e := range rng.Perm(len(m.Tri)) {
		t := m.Tri[e]
		s := rng.IntN(3)
		var r [6]int
		for k := 0; k < 3; k++ {
			r[k] = perm[t[(k+s)%3]]
			r[3+k] = perm[t[3+(k+s)%3]]
		}
		out.Tri = append(out.Tri, r)
	}
	return out
}

// TestUnchangedVerbatim: triangles the remesh left unchanged keep their
// Gauss-point state and data bit for bit (reflect.DeepEqual,
// math.Float64bits), whatever the node numbering, element order and vertex
// rotation; the re-triangulated part is projected. The old state is random
// noise, so nothing but a verbatim copy reproduces it.
func TestUnchangedVerbatim(t *testing.T) {
	const n = 8
	x := gridCorners(n, n, 0, 1, 0, 1, 0.2, 5)
	old := buildP2(x, gridTris(n, n, nil), nil)
	// The new mesh flips the diagonals of the right half (i ≥ n/2).
	nw := shuffled(buildP2(x, gridTris(n, n, func(i, j int) bool { return i >= n/2 }), nil), 11)
	rng := rand.New(rand.NewPCG(1, 1))
	from := fieldsFrom(old, func([2]float64) [2]float64 { return [2]float64{rng.Float64(), rng.Float64()} }, nil,
		func([2]float64) material.State {
			return material.State{Ep: material.Sym{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()},
				P: rng.Float64(), F: 0.01 + 0.1*rng.Float64(), Broken: rng.IntN(10) == 0}
		}, work(func([2]float64) float64 { return rng.NormFloat64() }))
	opt := DefaultOptions()
	to, rec, err := Map(old, from, nw, opt)
	if err != nil {
		t.Fatal(err)
	}
	if want := n * n; rec.UnchangedElements != want || rec.Verbatim != 6*want {
		t.Fatalf("unchanged elements %d, verbatim points %d; want %d and %d", rec.UnchangedElements, rec.Verbatim, want, 6*want)
	}
	oldX, _ := gaussGeometry(old, fem.ElementRule(), 1)
	newX, _ := gaussGeometry(nw, fem.ElementRule(), 1)
	same, _ := unchanged(old, nw, fem.ElementRule())
	for e := range nw.Tri {
		for q := 0; q < 6; q++ {
			i := e*6 + q
			// Reference: the old point at the same position (brute force).
			j := 0
			for k := range oldX {
				if plane.DistSq(oldX[k], newX[i]) < plane.DistSq(oldX[j], newX[i]) {
					j = k
				}
			}
			if same[e].elem < 0 {
				continue
			}
			if d := math.Sqrt(plane.DistSq(oldX[j], newX[i])); d > 1e-14 {
				t.Fatalf("new point %d of unchanged triangle %d has no old point at its position (nearest %g away)", q, e, d)
			}
			if !reflect.DeepEqual(to.State[i], from.State[j]) || math.Float64bits(to.Gauss[i].W) != math.Float64bits(from.Gauss[j].W) {
				t.Fatalf("unchanged triangle %d point %d: state %+v, old %+v", e, q, to.State[i], from.State[j])
			}
		}
	}
	// Nodes at old nodes' positions (all but the midside nodes of the
	// flipped diagonals) copy the old values verbatim.
	atOld := 0
	for n, p := range nw.X {
		for on, q := range old.X {
			if p == q {
				atOld++
				if to.U[n] != from.U[on] {
					t.Fatalf("node %d at %v: u %v, old node %d has %v", n, p, to.U[n], on, from.U[on])
				}
			}
		}
	}
	if rec.NodesCopied != atOld || atOld != len(nw.X)-n*n/2 {
		t.Errorf("%d nodes copied verbatim, %d at old nodes' positions, want %d", rec.NodesCopied, atOld, len(nw.X)-n*n/2)
	}
}

// TestRulePermutation verifies that the element rule maps onto itself under
// every rotation of the vertex order: each rotated point has an old point
// with identical area coordinates (the symmetric Degree-4 rule of Dunavant
// 1985, IJNME 21) and identical weight.
func TestRulePermutation(t *testing.T) {
	r := fem.ElementRule()
	old := squareMesh(1, 1, 0, 0)
	for s := 0; s < 3; s++ {
		nw := &fem.Mesh{X: old.X, NumCorners: old.NumCorners}
		for _, tr := range old.Tri {
			var rt [6]int
			for k := 0; k < 3; k++ {
				rt[k], rt[3+k] = tr[(k+s)%3], tr[3+(k+s)%3]
			}
			nw.Tri = append(nw.Tri, rt)
		}
		same, perm := unchanged(old, nw, r)
		for e, m := range same {
			if m.elem != e || m.shift != s {
				t.Fatalf("rotation %d: triangle %d matched %+v", s, e, m)
			}
		}
		for q, j := range perm[s] {
			if j < 0 || r.W[j] != r.W[q] {
				t.Fatalf("rotation %d: point %d maps to %d", s, q, j)
			}
			a := r.Point(q, nw.X[nw.Tri[0][0]], nw.X[nw.Tri[0][1]], nw.X[nw.Tri[0][2]])
			b := r.Point(j, old.X[old.Tri[0][0]], old.X[old.Tri[0][1]], old.X[old.Tri[0][2]])
			if math.Sqrt(plane.DistSq(a, b)) > 1e-15 {
				t.Fatalf("rotation %d: point %d at %v, old point %d at %v", s, q, a, j, b)
			}
		}
	}
}

// TestCrackFaces: on a slit (crack faces sharing reference coordinates) the
// displacement jumps; nodes of the new mesh on each face must take their own
// side's values (u_y = ±1 above/below, a linear field besides).
func TestCrackFaces(t *testing.T) {
	old, oldSide := slitMesh(8)
	nw, newSide := slitMesh(12)
	lin := linear{0.1, 0.2, -0.3}
	// Field: u_x linear everywhere, u_y = +1 on the upper side's nodes of
	// the faces, −1 on the lower, interpolated in between: build it from
	// the side flags of corner nodes and the midside nodes' triangles.
	from := &Fields{U: make([][2]float64, len(old.X)), Linear: [][]float64{make([]float64, old.NumCorners)}}
	for n, p := range old.X {
		from.U[n] = [2]float64{lin.at(p), float64(faceSide(old, oldSide, n))}
	}
	for n := 0; n < old.NumCorners; n++ {
		from.Linear[0][n] = float64(faceSide(old, oldSide, n))
	}
	from.State = make([]material.State, len(old.Tri)*6)
	to, _, err := Map(old, from, nw, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for n, p := range nw.X {
		s := faceSide(nw, newSide, n)
		if p[1] != 0.5 || p[0] >= 0.5 || s == 0 {
			continue
		}
		checked++
		// The old face values are ±1 up to the last duplicated node at
		// x = 3/8 and fall to 0 at the tip x = 1/2 (its midside node has
		// 0): the quadratic interpolant on that edge is (1−τ)(1−2τ), the
		// linear one 1−τ, τ = (x − 3/8)/(1/8) (closed form).
		wantU, wantL := 1.0, 1.0
		if tau := (p[0] - 0.375) / 0.125; tau > 0 {
			wantU, wantL = (1-tau)*(1-2*tau), 1-tau
		}
		wantU, wantL = float64(s)*wantU, float64(s)*wantL
		if math.Abs(to.U[n][1]-wantU) > 1e-14 || math.Abs(to.U[n][0]-lin.at(p)) > 1e-14 {
			t.Errorf("face node %d at %v (side %+d): u %v, want (%g, %g)", n, p, s, to.U[n], lin.at(p), wantU)
		}
		if n < nw.NumCorners && math.Abs(to.Linear[0][n]-wantL) > 1e-14 {
			t.Errorf("face corner %d at %v (side %+d): linear field %g, want %g", n, p, s, to.Linear[0][n], wantL)
		}
	}
	if checked < 10 {
		t.Fatalf("only %d face nodes checked", checked)
	}
}

// faceSide is +1 for a node of the upper face of the slit, −1 for the lower
// face, 0 elsewhere: corner nodes carry the flag, a midside node takes the
// flag of its edge's end nodes when both are on the same face.
func faceSide(m *fem.Mesh, side []int, n int) int {
	if n < m.NumCorners {
		return side[n]
	}
	for _, tr := range m.Tri {
		for k := 0; k < 3; k++ {
			if tr[3+k] == n {
				a, b := side[tr[k]], side[tr[(k+1)%3]]
				if a == b {
					return a
				}
				return 0
			}
		}
	}
	return 0
}

// TestOptionsValidate checks the defaults pass and each bad value is caught.
func TestOptionsValidate(t *testing.T) {
	if err := DefaultOptions().Validate(); err != nil {
		t.Fatalf("defaults: %v", err)
	}
	for _, tc := range []struct {
		name string
		set  func(*Options)
	}{
		{"unknown method", func(o *Options) { o.Method = 7 }},
		{"negative F0", func(o *Options) { o.F0 = -0.1 }},
		{"F0 = 1", func(o *Options) { o.F0 = 1 }},
		{"FBreak below F0", func(o *Options) { o.F0, o.FBreak = 0.1, 0.05 }},
		{"FBreak above 1", func(o *Options) { o.FBreak = 1.5 }},
		{"NaN FBreak", func(o *Options) { o.FBreak = math.NaN() }},
		{"negative Tol", func(o *Options) { o.Tol = -1 }},
		{"large Tol", func(o *Options) { o.Tol = 0.5 }},
		{"zero CGTol", func(o *Options) { o.CGTol = 0 }},
		{"zero CGMaxIter", func(o *Options) { o.CGMaxIter = 0 }},
	} {
		o := DefaultOptions()
		tc.set(&o)
		if err := o.Validate(); err == nil {
			t.Errorf("%s: no error", tc.name)
		}
	}
}

// TestMapErrors checks that bad input gives an error value, not a panic.
func TestMapErrors(t *testing.T) {
	old, nw := squareMesh(3, 3, 0, 0), squareMesh(4, 4, 0, 0)
	good := func() *Fields {
		return fieldsFrom(old, func([2]float64) [2]float64 { return [2]float64{} }, []func([2]float64) float64{func([2]float64) float64 { return 0 }},
			func([2]float64) material.State { return material.State{} }, work(func([2]float64) float64 { return 0 }))
	}
	if _, _, err := Map(old, good(), nw, DefaultOptions()); err != nil {
		t.Fatalf("good input: %v", err)
	}
	clockwise := squareMesh(4, 4, 0, 0)
	clockwise.Tri[3][0], clockwise.Tri[3][1] = clockwise.Tri[3][1], clockwise.Tri[3][0]
	for _, tc := range []struct {
		name    string
		old, nw *fem.Mesh
		f       func(*Fields) *Fields
		opt     func(*Options)
	}{
		{"nil old mesh", nil, nw, nil, nil},
		{"nil new mesh", old, nil, nil, nil},
		{"empty old mesh", &fem.Mesh{}, nw, func(*Fields) *Fields { return &Fields{} }, nil},
		{"clockwise new triangle", old, clockwise, nil, nil},
		{"nil fields", old, nw, func(*Fields) *Fields { return nil }, nil},
		{"short displacement", old, nw, func(f *Fields) *Fields { f.U = f.U[1:]; return f }, nil},
		{"short linear field", old, nw, func(f *Fields) *Fields { f.Linear[0] = f.Linear[0][1:]; return f }, nil},
		{"short state", old, nw, func(f *Fields) *Fields { f.State = f.State[1:]; return f }, nil},
		{"short Gauss-point data", old, nw, func(f *Fields) *Fields { f.Gauss = f.Gauss[1:]; return f }, nil},
		{"bad options", old, nw, nil, func(o *Options) { o.FBreak = 2 }},
	} {
		f := good()
		if tc.f != nil {
			f = tc.f(f)
		}
		o := DefaultOptions()
		if tc.opt != nil {
			tc.opt(&o)
		}
		if _, _, err := Map(tc.old, f, tc.nw, o); err == nil {
			t.Errorf("%s: no error", tc.name)
		} else {
			t.Logf("%s: %v", tc.name, err)
		}
	}
}

// slope is the least-squares slope of log y against log x.
func slope(x, y []float64) float64 {
	var sx, sy, sxx, sxy float64
	for i := range x {
		lx, ly := math.Log(x[i]), math.Log(y[i])
		sx, sy, sxx, sxy = sx+lx, sy+ly, sxx+lx*lx, sxy+lx*ly
	}
	n := float64(len(x))
	return (n*sxy - sx*sy) / (n*sxx - sx*sx)
}

// TestConcurrentAndDeterministic: Locate is safe for concurrent use (run
// with -race) and Map gives bit-identical results with one worker and with
// several (every point is computed independently of the scheduling).
func TestConcurrentAndDeterministic(t *testing.T) {
	old, nw := squareMesh(20, 20, 0.3, 31), squareMesh(27, 23, 0.3, 32)
	lc, err := NewLocator(old, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	pts := append(append([][2]float64(nil), nw.X...), [2]float64{-0.1, 0.5}, [2]float64{1.2, 1.3})
	serial := make([]Hit, len(pts))
	for i, p := range pts {
		serial[i] = lc.locate(p, nil)
	}
	done := make(chan []Hit)
	for g := 0; g < 4; g++ {
		go func() {
			h := make([]Hit, len(pts))
			for i, p := range pts {
				e, l, in := lc.Locate(p)
				h[i] = Hit{Elem: e, L: l, Inside: in, Node: -1}
			}
			done <- h
		}()
	}
	for g := 0; g < 4; g++ {
		if h := <-done; !reflect.DeepEqual(h, serial) {
			t.Fatal("concurrent Locate differs from serial")
		}
	}
	g := func(p [2]float64) float64 { return math.Exp(p[0]) * math.Sin(3*p[1]) }
	from := fieldsFrom(old, func(p [2]float64) [2]float64 { return [2]float64{g(p), p[0]} }, []func([2]float64) float64{g},
		func(p [2]float64) material.State {
			return material.State{P: 1 + g(p), F: 0.01, Ep: material.Sym{g(p), 0, 0, 0}}
		},
		work(g))
	for _, m := range []Method{PatchRecovery, L2Projection} {
		var res []*Fields
		for _, w := range []int{1, 4} {
			opt := DefaultOptions()
			opt.Method, opt.Workers = m, w
			to, _, err := Map(old, from, nw, opt)
			if err != nil {
				t.Fatal(err)
			}
			res = append(res, to)
		}
		if !reflect.DeepEqual(res[0], res[1]) {
			t.Errorf("%v: Map with 1 and 4 workers differs", m)
		}
	}
}

// TestCurvedUnchanged: the same curved mesh (midside nodes of the outer
// edges on the arc, off the chords), renumbered and rotated, takes every
// nodal value and every Gauss-point state verbatim.
func TestCurvedUnchanged(t *testing.T) {
	old := sectorMesh(4, 6, 0.4, true)
	nw := shuffled(old, 3)
	rng := rand.New(rand.NewPCG(2, 2))
	from := fieldsFrom(old, func([2]float64) [2]float64 { return [2]float64{rng.NormFloat64(), rng.NormFloat64()} },
		[]func([2]float64) float64{func([2]float64) float64 { return rng.NormFloat64() }},
		func([2]float64) material.State { return material.State{P: rng.Float64(), F: 0.05 * rng.Float64()} }, nil)
	to, rec, err := Map(old, from, nw, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if rec.NodesCopied != len(nw.X) || rec.Verbatim != len(to.State) || rec.UnchangedElements != len(nw.Tri) {
		t.Fatalf("copied %d of %d nodes, %d of %d points verbatim, %d of %d elements unchanged",
			rec.NodesCopied, len(nw.X), rec.Verbatim, len(to.State), rec.UnchangedElements, len(nw.Tri))
	}
	for n, p := range nw.X {
		for on, q := range old.X {
			if p == q && (to.U[n] != from.U[on] || (n < nw.NumCorners && to.Linear[0][n] != from.Linear[0][on])) {
				t.Fatalf("node %d at %v: not copied from old node %d", n, p, on)
			}
		}
	}
	// Integrals over the same geometry agree to round-off (the summation
	// order differs), and the isoparametric area approaches that of the
	// domain — the quarter annulus π(1 − r0²)/4 plus the six circular
	// segments r0²(Δθ − sin Δθ)/2 of the inner boundary, which sectorMesh
	// leaves straight (closed forms) — far closer than the chord polygon,
	// which misses the outer segments (Δθ − sin Δθ)/2.
	if math.Abs(rec.Before.IntP-rec.After.IntP) > 1e-14 || math.Abs(rec.Before.Volume-rec.After.Volume) > 1e-14 {
		t.Errorf("∫p %g → %g, volume %g → %g", rec.Before.IntP, rec.After.IntP, rec.Before.Volume, rec.After.Volume)
	}
	dth := math.Pi / 2 / 6
	chordDeficit := 6 * 0.5 * (dth - math.Sin(dth)) // six circular segments of the unit circle
	exact := math.Pi*(1-0.4*0.4)/4 + 0.4*0.4*chordDeficit
	t.Logf("area: isoparametric %.10f, exact %.10f (error %.2e), chord polygon error %.2e", rec.Before.Volume, exact, rec.Before.Volume-exact, chordDeficit)
	if math.Abs(rec.Before.Volume-exact) > 0.01*chordDeficit {
		t.Errorf("isoparametric area %.10f, exact %.10f: error above 1%% of the chord polygon's %.2e", rec.Before.Volume, exact, chordDeficit)
	}
}
