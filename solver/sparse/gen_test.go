package sparse

import (
	"math"
	"math/rand/v2"
)

// Generators of finite-element-like test matrices on a triangulated unit
// square: nc×nc squares, each cut into two triangles; 6-node (P2) triangles
// for the vector field u and 3-node (P1) fields at the corners. The forms
// are the textbook ones (Braess 2007, Finite Elements, ch. III for the
// mixed Stokes-type blocks; Zienkiewicz & Taylor 2000 for the element
// integrals), integrated with the 3-point edge-midpoint rule, exact for
// quadratics (Strang & Fix 1973, table 4.1).

type feOptions struct {
	nc         int     // squares per side
	mixed      bool    // add θ and P (three-field u–θ–P, zero P–P block)
	gradient   bool    // add ā and λ (zero λ–λ block, nonsymmetric λ–u)
	convection float64 // nonsymmetric perturbation ∫(b·∇u)·v in the u block
	soft       float64 // fraction of elements with a 1e-3 softened modulus
	seed       uint64
}

// feSystem assembles the matrix. Dofs are numbered node by node, corner
// nodes first (as tearline's mesh does), u on nodes off the boundary.
func feSystem(o feOptions) *CSR {
	nc := o.nc
	nf := 2*nc + 1 // fine grid points per side
	h := 1.0 / float64(nc)
	ncorner := (nc + 1) * (nc + 1)
	// node numbering: corners first, then the other fine-grid points
	nodeOf := make([]int, nf*nf)
	next := 0
	for j := 0; j < nf; j += 2 {
		for i := 0; i < nf; i += 2 {
			nodeOf[j*nf+i] = next
			next++
		}
	}
	for j := 0; j < nf; j++ {
		for i := 0; i < nf; i++ {
			if i%2 == 1 || j%2 == 1 {
				nodeOf[j*nf+i] = next
				next++
			}
		}
	}
	nnode := next
	onBoundary := make([]bool, nnode)
	for j := 0; j < nf; j++ {
		for i := 0; i < nf; i++ {
			if i == 0 || j == 0 || i == nf-1 || j == nf-1 {
				onBoundary[nodeOf[j*nf+i]] = true
			}
		}
	}
	nscal := 0
	if o.mixed {
		nscal += 2
	}
	if o.gradient {
		nscal += 2
	}
	// dof[node][field]: 0,1 = u_x,u_y; 2,3 = θ,P; 4,5 = ā,λ
	dof := make([][6]int, nnode)
	nd := 0
	for v := 0; v < nnode; v++ {
		for f := range dof[v] {
			dof[v][f] = -1
		}
		if !onBoundary[v] {
			dof[v][0], dof[v][1] = nd, nd+1
			nd += 2
		}
		if v < ncorner {
			f := 2
			if !o.mixed {
				f = 4
			}
			for k := 0; k < nscal; k++ {
				dof[v][f+k] = nd
				nd++
			}
		}
	}
	rng := rand.New(rand.NewPCG(o.seed, 7))
	t := NewTriplet(nd, nd)
	add := func(i, j int, v float64) {
		if i >= 0 && j >= 0 {
			t.Add(i, j, v)
		}
	}
	// Quadrature: edge midpoints in barycentric coordinates, weight 1/3.
	qp := [3][3]float64{{0.5, 0.5, 0}, {0, 0.5, 0.5}, {0.5, 0, 0.5}}
	bx, by := 1.0, 0.5
	for cj := 0; cj < nc; cj++ {
		for ci := 0; ci < nc; ci++ {
			// fine-grid coordinates of the square's corners
			p00 := [2]int{2 * ci, 2 * cj}
			p10 := [2]int{2*ci + 2, 2 * cj}
			p01 := [2]int{2 * ci, 2*cj + 2}
			p11 := [2]int{2*ci + 2, 2*cj + 2}
			for _, tri := range [2][3][2]int{{p00, p10, p11}, {p00, p11, p01}} {
				var nodes [6]int
				var fine [6][2]int
				for k := 0; k < 3; k++ {
					fine[k] = tri[k]
				}
				for k := 0; k < 3; k++ {
					a, b := tri[k], tri[(k+1)%3]
					fine[3+k] = [2]int{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
				}
				for k := 0; k < 6; k++ {
					nodes[k] = nodeOf[fine[k][1]*nf+fine[k][0]]
				}
				// geometry: gradients of barycentric coordinates
				var x, y [3]float64
				for k := 0; k < 3; k++ {
					x[k] = float64(tri[k][0]) / 2 * h
					y[k] = float64(tri[k][1]) / 2 * h
				}
				det := (x[1]-x[0])*(y[2]-y[0]) - (x[2]-x[0])*(y[1]-y[0])
				area := det / 2
				var gl [3][2]float64
				for k := 0; k < 3; k++ {
					k1, k2 := (k+1)%3, (k+2)%3
					gl[k] = [2]float64{(y[k1] - y[k2]) / det, (x[k2] - x[k1]) / det}
				}
				mu := 0.5 + rng.Float64()
				if rng.Float64() < o.soft {
					mu *= 1e-3
				}
				for _, L := range qp {
					w := area / 3
					// P2 shape functions and gradients at L
					var phi [6]float64
					var gphi [6][2]float64
					for k := 0; k < 3; k++ {
						phi[k] = L[k] * (2*L[k] - 1)
						for c := 0; c < 2; c++ {
							gphi[k][c] = (4*L[k] - 1) * gl[k][c]
						}
						k1 := (k + 1) % 3
						phi[3+k] = 4 * L[k] * L[k1]
						for c := 0; c < 2; c++ {
							gphi[3+k][c] = 4 * (L[k]*gl[k1][c] + L[k1]*gl[k][c])
						}
					}
					// u–u: μ∇u:∇v + μ div u div v + convection
					for a := 0; a < 6; a++ {
						for b := 0; b < 6; b++ {
							lap := mu * (gphi[a][0]*gphi[b][0] + gphi[a][1]*gphi[b][1])
							conv := o.convection * (bx*gphi[b][0] + by*gphi[b][1]) * phi[a]
							for c := 0; c < 2; c++ {
								add(dof[nodes[a]][c], dof[nodes[b]][c], w*(lap+conv))
								for e := 0; e < 2; e++ {
									add(dof[nodes[a]][c], dof[nodes[b]][e], w*mu*gphi[a][c]*gphi[b][e])
								}
							}
						}
					}
					for a := 0; a < 3; a++ { // P1 test/trial at corners
						for b := 0; b < 3; b++ {
							mass := w * L[a] * L[b]
							if o.mixed {
								add(dof[nodes[a]][2], dof[nodes[b]][2], 1e3*mass) // κ θ ψ
								add(dof[nodes[a]][2], dof[nodes[b]][3], -mass)
								add(dof[nodes[a]][3], dof[nodes[b]][2], -mass)
							}
							if o.gradient {
								stiff := w * 1e-2 * (gl[a][0]*gl[b][0] + gl[a][1]*gl[b][1])
								add(dof[nodes[a]][4], dof[nodes[b]][4], stiff+10*mass)
								add(dof[nodes[a]][4], dof[nodes[b]][5], -mass)
								add(dof[nodes[a]][5], dof[nodes[b]][4], -mass)
							}
						}
						for b := 0; b < 6; b++ {
							for c := 0; c < 2; c++ {
								div := w * L[a] * gphi[b][c]
								if o.mixed {
									add(dof[nodes[b]][c], dof[nodes[a]][3], div)
									add(dof[nodes[a]][3], dof[nodes[b]][c], div)
								}
								if o.gradient {
									add(dof[nodes[a]][5], dof[nodes[b]][c], 0.3*div*(1+float64(c)))
								}
							}
						}
					}
				}
			}
		}
	}
	return t.CSR()
}

// randomSparse returns an n×n matrix with about density·n² random entries
// plus, if diag, a random diagonal.
func randomSparse(rng *rand.Rand, n int, density float64, diag bool) *CSR {
	t := NewTriplet(n, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if (i == j && diag) || rng.Float64() < density {
				t.Add(i, j, rng.NormFloat64())
			}
		}
	}
	return t.CSR()
}

// residual returns ‖A·x − b‖₂/‖b‖₂.
func relResidual(a *CSR, x, b []float64) float64 {
	ax := make([]float64, a.Rows)
	a.MulVec(ax, x)
	var rn, bn float64
	for i := range ax {
		rn += (ax[i] - b[i]) * (ax[i] - b[i])
		bn += b[i] * b[i]
	}
	return math.Sqrt(rn / bn)
}

func onesRHS(a *CSR) []float64 {
	x := make([]float64, a.Cols)
	for i := range x {
		x[i] = 1
	}
	b := make([]float64, a.Rows)
	a.MulVec(b, x)
	return b
}
