package transfer

import (
	"fmt"
	"math"
	"sort"

	"tearline/solver/fem"
	"tearline/solver/plane"
)

// gaussGeometry returns the position and the area weight (rule weight ×
// Jacobian, no 2πr factor) of every Gauss point of m under the isoparametric
// quadratic map, point i of triangle e at index e*r.Len()+i.
func gaussGeometry(m *fem.Mesh, r fem.Rule, workers int) (x [][2]float64, da []float64) {
	nq := r.Len()
	x = make([][2]float64, len(m.Tri)*nq)
	da = make([]float64, len(m.Tri)*nq)
	parallel(len(m.Tri), workers, func(lo, hi int) {
		for e := lo; e < hi; e++ {
			t := m.Tri[e]
			for q := 0; q < nq; q++ {
				N := fem.ShapeP2(r.L[q])
				dxi, deta := fem.ShapeP2Deriv(r.L[q])
				var p [2]float64
				var j00, j01, j10, j11 float64
				for k, n := range t {
					xn := m.X[n]
					p[0] += N[k] * xn[0]
					p[1] += N[k] * xn[1]
					j00 += dxi[k] * xn[0]
					j01 += deta[k] * xn[0]
					j10 += dxi[k] * xn[1]
					j11 += deta[k] * xn[1]
				}
				x[e*nq+q] = p
				// The reference triangle (ξ, η) = (L1, L2) has area ½.
				da[e*nq+q] = r.W[q] * 0.5 * (j00*j11 - j01*j10)
			}
		}
	})
	return x, da
}

// recovery holds the continuous linear fields recovered on the old corner
// nodes: value c of corner node n at n*nc+c.
type recovery struct {
	nc    int
	nodal []float64
}

// at evaluates the recovered fields at area coordinates l of old triangle t
// into v (length nc).
func (r *recovery) at(t [6]int, l [3]float64, v []float64) {
	nc := r.nc
	a, b, c := r.nodal[t[0]*nc:t[0]*nc+nc], r.nodal[t[1]*nc:t[1]*nc+nc], r.nodal[t[2]*nc:t[2]*nc+nc]
	for k := range v {
		v[k] = l[0]*a[k] + l[1]*b[k] + l[2]*c[k]
	}
}

// cornerPatches returns, for every corner node, the triangles that share it
// (CSR layout: the triangles of node n are elems[start[n]:start[n+1]]).
func cornerPatches(m *fem.Mesh) (start, elems []int) {
	start = make([]int, m.NumCorners+1)
	for _, t := range m.Tri {
		for k := 0; k < 3; k++ {
			start[t[k]+1]++
		}
	}
	for n := 0; n < m.NumCorners; n++ {
		start[n+1] += start[n]
	}
	elems = make([]int, start[m.NumCorners])
	fill := append([]int(nil), start[:m.NumCorners]...)
	for e, t := range m.Tri {
		for k := 0; k < 3; k++ {
			elems[fill[t[k]]] = e
			fill[t[k]]++
		}
	}
	return start, elems
}

// patchRecovery fits, for every corner node, a linear polynomial by least
// squares to the Gauss-point values vals (nc per point) of the triangles
// around it, using only the points with use[i] true (all of the patch's
// points if none is usable), and takes its value at the node
// (Zienkiewicz & Zhu 1992, IJNME 33). A patch whose normal equations are
// singular (collinear points) falls back to the mean.
func patchRecovery(m *fem.Mesh, nq int, gx [][2]float64, vals []float64, nc int, use []bool, workers int) *recovery {
	start, elems := cornerPatches(m)
	// coef[n] holds the patch polynomial of node n, a0 + a1 ξ + a2 η in
	// ξ = (x − xn)/scale[n], η = (y − yn)/scale[n]: component c's
	// coefficients at coef[n*3*nc + {0, nc, 2nc} + c].
	coef := make([]float64, m.NumCorners*3*nc)
	scale := make([]float64, m.NumCorners)
	fitted := make([]bool, m.NumCorners)
	parallel(m.NumCorners, workers, func(lo, hi int) {
		b := make([]float64, 3*nc)
		for n := lo; n < hi; n++ {
			patch := elems[start[n]:start[n+1]]
			if len(patch) == 0 {
				continue
			}
			any := false
			for _, e := range patch {
				for q := 0; q < nq; q++ {
					any = any || use[e*nq+q]
				}
			}
			xn := m.X[n]
			h := 0.0
			for _, e := range patch {
				for q := 0; q < nq; q++ {
					h = math.Max(h, plane.DistSq(gx[e*nq+q], xn))
				}
			}
			h = math.Sqrt(h)
			if !(h > 0) {
				h = 1
			}
			var A [3][3]float64
			clear(b)
			cnt := 0
			for _, e := range patch {
				for q := 0; q < nq; q++ {
					i := e*nq + q
					if any && !use[i] {
						continue
					}
					cnt++
					phi := [3]float64{1, (gx[i][0] - xn[0]) / h, (gx[i][1] - xn[1]) / h}
					v := vals[i*nc : i*nc+nc]
					for r := 0; r < 3; r++ {
						for s := 0; s < 3; s++ {
							A[r][s] += phi[r] * phi[s]
						}
						br := b[r*nc : r*nc+nc]
						for c, vc := range v {
							br[c] += phi[r] * vc
						}
					}
				}
			}
			out := coef[n*3*nc : (n+1)*3*nc]
			scale[n] = h
			// Scaled coordinates lie in [-1, 1]: a determinant this small
			// relative to cnt³ means the points are (nearly) collinear.
			if inv, det, ok := plane.Inverse3(A); ok && det > 1e-10*float64(cnt*cnt*cnt) {
				for r := 0; r < 3; r++ {
					for c := 0; c < nc; c++ {
						out[r*nc+c] = inv[r][0]*b[c] + inv[r][1]*b[nc+c] + inv[r][2]*b[2*nc+c]
					}
				}
				fitted[n] = true
			} else {
				for c := 0; c < nc; c++ {
					out[c] = b[c] / float64(cnt)
				}
			}
		}
	})
	// Nodal values: an interior node takes its own patch's value; a node on
	// the boundary (outer boundary, holes, crack faces — edges with one
	// triangle) the mean of its interior neighbours' patch polynomials at
	// its position, as Zienkiewicz & Zhu 1992 recover boundary values,
	// falling back to its own one-sided patch when it has none.
	boundary := boundaryCorners(m)
	rec := &recovery{nc: nc, nodal: make([]float64, m.NumCorners*nc)}
	parallel(m.NumCorners, workers, func(lo, hi int) {
		for n := lo; n < hi; n++ {
			out := rec.nodal[n*nc : n*nc+nc]
			own := coef[n*3*nc : n*3*nc+nc]
			if !boundary[n] {
				copy(out, own)
				continue
			}
			cnt := 0
			xn := m.X[n]
			for _, e := range elems[start[n]:start[n+1]] {
				for _, k := range m.Tri[e][:3] {
					if k == n || boundary[k] || !fitted[k] || seenBefore(m, elems[start[n]:start[n+1]], e, k) {
						continue
					}
					cnt++
					xi, eta := (xn[0]-m.X[k][0])/scale[k], (xn[1]-m.X[k][1])/scale[k]
					ck := coef[k*3*nc : (k+1)*3*nc]
					for c := range out {
						out[c] += ck[c] + xi*ck[nc+c] + eta*ck[2*nc+c]
					}
				}
			}
			if cnt == 0 {
				copy(out, own)
				continue
			}
			for c := range out {
				out[c] /= float64(cnt)
			}
		}
	})
	return rec
}

// seenBefore reports whether node k is a vertex of a triangle of patch that
// comes before e (so that every neighbour counts once).
func seenBefore(m *fem.Mesh, patch []int, e, k int) bool {
	for _, f := range patch {
		if f == e {
			return false
		}
		t := m.Tri[f]
		if t[0] == k || t[1] == k || t[2] == k {
			return true
		}
	}
	return false
}

// boundaryCorners flags the corner nodes on an edge that only one triangle
// has.
func boundaryCorners(m *fem.Mesh) []bool {
	count := make(map[[2]int]int, 3*len(m.Tri))
	for _, t := range m.Tri {
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			count[[2]int{min(a, b), max(a, b)}]++
		}
	}
	on := make([]bool, m.NumCorners)
	for e, c := range count {
		if c == 1 {
			on[e[0]], on[e[1]] = true, true
		}
	}
	return on
}

// l2Projection projects the Gauss-point values onto continuous P1 on the
// corner nodes of m: M c = b with M_ij = ∫ N_i N_j dA and b_i = ∫ N_i g dA,
// both by the element rule, solved per component by Jacobi-preconditioned
// conjugate gradients (Hestenes & Stiefel 1952, J. Res. NBS 49).
func l2Projection(m *fem.Mesh, r fem.Rule, da []float64, vals []float64, nc int, tol float64, maxIter, workers int) (*recovery, error) {
	nq := r.Len()
	nn := m.NumCorners
	// Sparsity: corner neighbours through shared triangles.
	start, elems := cornerPatches(m)
	ptr := make([]int, nn+1)
	col := make([]int, 0, 7*nn)
	var buf []int
	for n := 0; n < nn; n++ {
		buf = buf[:0]
		for _, e := range elems[start[n]:start[n+1]] {
			buf = append(buf, m.Tri[e][0], m.Tri[e][1], m.Tri[e][2])
		}
		if len(buf) == 0 { // unused corner node: identity row
			buf = append(buf, n)
		}
		sort.Ints(buf)
		for i, c := range buf {
			if i == 0 || c != buf[i-1] {
				col = append(col, c)
			}
		}
		ptr[n+1] = len(col)
	}
	val := make([]float64, len(col))
	find := func(i, j int) int {
		lo, hi := ptr[i], ptr[i+1]
		return lo + sort.SearchInts(col[lo:hi], j)
	}
	b := make([]float64, nn*nc) // component c of node n at c*nn+n
	for e, t := range m.Tri {
		for q := 0; q < nq; q++ {
			w := da[e*nq+q]
			N := r.L[q]
			g := vals[(e*nq+q)*nc : (e*nq+q)*nc+nc]
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					val[find(t[i], t[j])] += w * N[i] * N[j]
				}
				for c, gc := range g {
					b[c*nn+t[i]] += w * N[i] * gc
				}
			}
		}
	}
	for n := 0; n < nn; n++ {
		if ptr[n+1]-ptr[n] == 1 && col[ptr[n]] == n && val[ptr[n]] == 0 {
			val[ptr[n]] = 1
		}
	}
	diag := make([]float64, nn)
	for n := 0; n < nn; n++ {
		diag[n] = val[find(n, n)]
		if !(diag[n] > 0) {
			return nil, fmt.Errorf("transfer: L2 projection: mass matrix diagonal %g at corner node %d is not positive", diag[n], n)
		}
	}
	mul := func(y, x []float64) {
		for i := 0; i < nn; i++ {
			s := 0.0
			for k := ptr[i]; k < ptr[i+1]; k++ {
				s += val[k] * x[col[k]]
			}
			y[i] = s
		}
	}
	sol := make([]float64, nn*nc)
	errs := make([]error, nc)
	parallelChunks(nc, workers, 1, func(lo, hi int) {
		rr, z, p, ap := make([]float64, nn), make([]float64, nn), make([]float64, nn), make([]float64, nn)
		for c := lo; c < hi; c++ {
			errs[c] = pcg(mul, diag, b[c*nn:(c+1)*nn], sol[c*nn:(c+1)*nn], rr, z, p, ap, tol, maxIter)
			if errs[c] != nil {
				errs[c] = fmt.Errorf("transfer: L2 projection of component %d: %w", c, errs[c])
			}
		}
	})
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	rec := &recovery{nc: nc, nodal: make([]float64, nn*nc)}
	for n := 0; n < nn; n++ {
		for c := 0; c < nc; c++ {
			rec.nodal[n*nc+c] = sol[c*nn+n]
		}
	}
	return rec, nil
}

// pcg solves A x = b (A symmetric positive definite, applied by mul) with the
// Jacobi preconditioner diag, from x = 0, to ‖r‖ ≤ tol ‖b‖.
func pcg(mul func(y, x []float64), diag, b, x, r, z, p, ap []float64, tol float64, maxIter int) error {
	clear(x)
	copy(r, b)
	bnorm := math.Sqrt(dot(b, b))
	if bnorm == 0 {
		return nil
	}
	for i := range z {
		z[i] = r[i] / diag[i]
	}
	copy(p, z)
	rz := dot(r, z)
	for it := 0; it < maxIter; it++ {
		mul(ap, p)
		alpha := rz / dot(p, ap)
		for i := range x {
			x[i] += alpha * p[i]
			r[i] -= alpha * ap[i]
		}
		if rn := math.Sqrt(dot(r, r)); rn <= tol*bnorm {
			return nil
		} else if !finite(rn) {
			return fmt.Errorf("conjugate gradients diverged at iteration %d", it+1)
		}
		for i := range z {
			z[i] = r[i] / diag[i]
		}
		rzNew := dot(r, z)
		beta := rzNew / rz
		rz = rzNew
		for i := range p {
			p[i] = z[i] + beta*p[i]
		}
	}
	return fmt.Errorf("conjugate gradients did not reach relative residual %g in %d iterations", tol, maxIter)
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}
