package fem

import (
	"math"
	"math/rand/v2"
	"testing"

	"tearline/solver/material"
)

// tangentCase is one configuration of the V9 check.
type tangentCase struct {
	name string
	kin  Kinematics
	disp bool // displacement only
	reg  bool // c > 0
}

func tangentCases() []tangentCase {
	var cs []tangentCase
	for _, kin := range []Kinematics{PlaneStrain, Axisymmetric} {
		for _, disp := range []bool{false, true} {
			for _, reg := range []bool{false, true} {
				n := kin.String()
				if disp {
					n += "/displacement-only"
				} else {
					n += "/mixed"
				}
				if reg {
					n += "/regularised"
				}
				cs = append(cs, tangentCase{n, kin, disp, reg})
			}
		}
	}
	return cs
}

// randomProblem builds a small curved mesh away from the axis with a random
// finite-strain state of every field.
func randomProblem(t *testing.T, tc tangentCase, nx, ny int, rng *rand.Rand) *Problem {
	t.Helper()
	m, err := Structured(nx, ny, AnnularSector(1, 2, 0.1, 0.9, 1))
	if err != nil {
		t.Fatal(err)
	}
	mat := &coupledT{lam: 120, mu: 80, k1: 30, k2: 0.7, k3: 50, k4: 0.8, k5: 0.3, k6: 0.02}
	if tc.reg {
		mat.c, mat.r = 0.5, 3
	}
	p, err := NewProblem(m, mat, Options{Kinematics: tc.kin, DisplacementOnly: tc.disp}, BCs{})
	if err != nil {
		t.Fatal(err)
	}
	for d := range p.U {
		switch p.Dofs.FieldOf[d] {
		case Ux, Uy:
			p.U[d] = 0.1 / float64(max(nx, ny)) * (2*rng.Float64() - 1)
		case Theta:
			p.U[d] = 0.05 * (2*rng.Float64() - 1)
		case Pressure:
			p.U[d] = 10 * (2*rng.Float64() - 1)
		case Abar:
			p.U[d] = 0.1 * rng.Float64()
		case Lambda:
			p.U[d] = 2 * (2*rng.Float64() - 1)
		}
	}
	return p
}

// TestElementTangentFD checks V9 for the element: the tangent equals the
// central finite difference of the residual to 1e-6 relative (DESIGN.md §5
// V9; central differences, error O(h²)), for plane strain and axisymmetry,
// mixed and displacement-only, local and regularised.
func TestElementTangentFD(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tc := range tangentCases() {
		t.Run(tc.name, func(t *testing.T) {
			p := randomProblem(t, tc, 2, 1, rng)
			w := &worker{}
			for e := range p.Mesh.Tri {
				if err := p.element(e, p.U, w, true); err != nil {
					t.Fatal(err)
				}
				nd := p.nd
				k := w.ke
				gd := w.gd
				var kmax, emax float64
				var bmax, berr [NumFields][NumFields]float64
				for b := 0; b < nd; b++ {
					u0 := p.U[gd[b]]
					h := 1e-6 * math.Max(1, math.Abs(u0))
					p.U[gd[b]] = u0 + h
					wp := &worker{}
					if err := p.element(e, p.U, wp, false); err != nil {
						t.Fatal(err)
					}
					p.U[gd[b]] = u0 - h
					wm := &worker{}
					if err := p.element(e, p.U, wm, false); err != nil {
						t.Fatal(err)
					}
					p.U[gd[b]] = u0
					for a := 0; a < nd; a++ {
						fd := (wp.re[a] - wm.re[a]) / (2 * h)
						kmax = math.Max(kmax, math.Abs(k[a][b]))
						emax = math.Max(emax, math.Abs(fd-k[a][b]))
						fa, fb := p.locFld[a]/2, p.locFld[b]/2 // blocks u, (θ,P), (ā,λ)
						bmax[fa][fb] = math.Max(bmax[fa][fb], math.Abs(k[a][b]))
						berr[fa][fb] = math.Max(berr[fa][fb], math.Abs(fd-k[a][b]))
					}
				}
				if rel := emax / kmax; !(rel < 1e-6) {
					t.Errorf("element %d: max |K − K_fd| / max |K| = %.3g (max |K| %.3g), want < 1e-6", e, rel, kmax)
				}
				// each coupling block on its own scale, so that small blocks
				// (multiplier rows) are not hidden by the stiffness.
				for fa := range bmax {
					for fb := range bmax[fa] {
						if bmax[fa][fb] > 1e-9*kmax {
							if rel := berr[fa][fb] / bmax[fa][fb]; !(rel < 1e-6) {
								t.Errorf("element %d block (%v, %v): relative error %.3g, want < 1e-6", e, Field(2*fa), Field(2*fb), rel)
							}
						} else if berr[fa][fb] > 1e-9*kmax {
							t.Errorf("element %d block (%v, %v) is zero but the finite difference is %.3g", e, Field(2*fa), Field(2*fb), berr[fa][fb])
						}
					}
				}
			}
		})
	}
}

// TestGlobalTangentFD checks V9 for the assembled system: every column of
// the tangent in its sparse pattern equals the central finite difference
// of the global residual to 1e-6 relative (and the difference vanishes
// outside the pattern), assembled by two workers — elastic (coupled
// synthetic law) and plastic (GTN).
func TestGlobalTangentFD(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, tc := range tangentCases() {
		for _, plastic := range []bool{false, true} {
			name := tc.name
			if plastic {
				name += "/GTN"
			}
			t.Run(name, func(t *testing.T) { globalTangentCase(t, tc, plastic, rng) })
		}
	}
}

func globalTangentCase(t *testing.T, tc tangentCase, plastic bool, rng *rand.Rand) {
	p := randomProblem(t, tc, 3, 2, rng)
	if plastic {
		usePlastic(t, p, tc)
	}
	p.workers = make([]worker, 2)
	p.pool = newPool(1)
	if err := p.Assemble(true); err != nil {
		t.Fatal(err)
	}
	n := p.Dofs.N
	dense := make([][]float64, n)
	var kmax float64
	for i := range dense {
		dense[i] = make([]float64, n)
		for q := p.K.RowPtr[i]; q < p.K.RowPtr[i+1]; q++ {
			dense[i][p.K.ColInd[q]] = p.K.Val[q]
			kmax = math.Max(kmax, math.Abs(p.K.Val[q]))
		}
	}
	emax := fdTangentError(t, p, func(a, b int) float64 { return dense[a][b] })
	if rel := emax / kmax; !(rel < 1e-6) {
		t.Errorf("global tangent: max |K − K_fd| / max |K| = %.3g, want < 1e-6", rel)
	}
}

// TestAssemblyDoesNotAllocate checks the rule of DEVELOPERS.md: once warm,
// a full assembly (residual and tangent, two workers) allocates nothing.
func TestAssemblyDoesNotAllocate(t *testing.T) {
	p := parallelProblem(t, 5, 12, 2)
	if err := p.Assemble(true); err != nil {
		t.Fatal(err)
	}
	allocs := testing.AllocsPerRun(5, func() {
		if err := p.Assemble(true); err != nil {
			t.Fatal(err)
		}
	})
	if allocs > 0 {
		t.Errorf("Assemble allocates %.1f times per call, want 0", allocs)
	}
}

// gtnModel returns a GTN model of the material package with porosity and
// nucleation switched on so that every coupling term is active.
func gtnModel(t *testing.T, reg bool) material.Model {
	t.Helper()
	par := material.DefaultGTN()
	par.F0 = 0.01
	par.FN = 0.04
	if reg {
		par.Length = 0.2
	}
	m, err := material.NewGTN(par)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestPlasticTangentFD is V9 in the plastic regime: with the GTN model at
// a random finite strain well beyond yield (strains of several per cent
// against a yield strain of 0.2%), element and global tangents equal the
// central finite differences of the residual to 1e-6 relative — plane
// strain and axisymmetric, mixed and displacement-only, local and
// regularised (DESIGN.md §5 V9).
func TestPlasticTangentFD(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, tc := range tangentCases() {
		t.Run(tc.name, func(t *testing.T) {
			p := randomProblem(t, tc, 2, 1, rng)
			usePlastic(t, p, tc)
			w := &worker{}
			plastic := 0
			for e := range p.Mesh.Tri {
				if err := p.element(e, p.U, w, true); err != nil {
					t.Fatal(err)
				}
				for g := 0; g < perElem; g++ {
					if p.newState[e][g].P > 0 {
						plastic++
					}
				}
				nd := p.nd
				k := w.ke
				gd := w.gd
				var kmax, emax float64
				for b := 0; b < nd; b++ {
					u0 := p.U[gd[b]]
					h := 1e-7 * math.Max(1, math.Abs(u0))
					var rp, rm [maxND]float64
					for s, sign := range [2]float64{1, -1} {
						p.U[gd[b]] = u0 + sign*h
						wq := &worker{}
						if err := p.element(e, p.U, wq, false); err != nil {
							t.Fatal(err)
						}
						if s == 0 {
							rp = wq.re
						} else {
							rm = wq.re
						}
					}
					p.U[gd[b]] = u0
					for a := 0; a < nd; a++ {
						fd := (rp[a] - rm[a]) / (2 * h)
						kmax = math.Max(kmax, math.Abs(k[a][b]))
						emax = math.Max(emax, math.Abs(fd-k[a][b]))
					}
				}
				if rel := emax / kmax; !(rel < 1e-6) {
					t.Errorf("element %d: max |K − K_fd| / max |K| = %.3g, want < 1e-6", e, rel)
				}
			}
			if plastic < perElem*len(p.Mesh.Tri)/2 {
				t.Errorf("only %d of %d points plastic: the check would not test plasticity", plastic, perElem*len(p.Mesh.Tri))
			}
		})
	}
}

// usePlastic switches p to the GTN model with a virgin state and scales
// the random unknowns to strains of 1–2% (several times the yield strain).
func usePlastic(t *testing.T, p *Problem, tc tangentCase) {
	t.Helper()
	p.Model = gtnModel(t, tc.reg)
	p.c, p.r = p.Model.Regularisation()
	init := p.Model.Initial()
	for e := range p.oldState {
		for g := range p.oldState[e] {
			p.oldState[e][g] = init
		}
	}
	for d := range p.U {
		switch p.Dofs.FieldOf[d] {
		case Ux, Uy, Theta:
			// strains of 1–2% (mixed: θ carries the volume change);
			// displacement-only random fields carry large volume
			// changes, so keep them smaller (trial σ_m of tens of σ₀
			// is outside what a return mapping must handle)
			if tc.disp {
				p.U[d] *= 0.05
			} else {
				p.U[d] *= 0.2
			}
		case Pressure, Lambda:
			p.U[d] *= 10 // stresses of the order of the yield stress
		case Abar:
			p.U[d] *= 0.1
		}
	}
}

// TestFollowerTangentFD: the load stiffness of follower pressures (current
// area and normal) is the exact derivative of their nodal forces (V9),
// plane strain and axisymmetric, checked on the assembled system.
func TestFollowerTangentFD(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for _, kin := range []Kinematics{PlaneStrain, Axisymmetric} {
		m, err := Structured(2, 2, AnnularSector(1, 2, 0.1, 0.9, 1))
		if err != nil {
			t.Fatal(err)
		}
		bcs := BCs{Tractions: []Traction{{Label: "left", Pressure: 5000, Follower: true}, {Label: "top", Pressure: -3000, Follower: true}}}
		p, err := NewProblem(m, newHenckyT(200, 0.3), Options{Kinematics: kin}, bcs)
		if err != nil {
			t.Fatal(err)
		}
		for d := range p.U {
			p.U[d] = 0.05 * (2*rng.Float64() - 1)
		}
		p.T = 0.7
		if err := p.Assemble(true); err != nil {
			t.Fatal(err)
		}
		var kmax float64
		kv := append([]float64(nil), p.K.Val...)
		for _, v := range kv {
			kmax = math.Max(kmax, math.Abs(v))
		}
		// (the pressures are large against the modulus, so the load
		// stiffness dominates the tangent)
		emax := fdTangentError(t, p, func(a, b int) float64 {
			if q := p.pos(a, b); q >= 0 {
				return kv[q]
			}
			return 0
		})
		if rel := emax / kmax; !(rel < 1e-6) {
			t.Errorf("%v: follower tangent error %.3g relative, want < 1e-6", kin, rel)
		}
	}
}

// fdTangentError returns the largest difference between the tangent k(a, b)
// and the central finite difference (step 1e-6 relative) of the global
// residual p.Full with respect to each unknown.
func fdTangentError(t *testing.T, p *Problem, k func(a, b int) float64) float64 {
	t.Helper()
	n := p.Dofs.N
	rp, rm := make([]float64, n), make([]float64, n)
	var emax float64
	for b := 0; b < n; b++ {
		u0 := p.U[b]
		h := 1e-6 * math.Max(1, math.Abs(u0))
		p.U[b] = u0 + h
		if err := p.Assemble(false); err != nil {
			t.Fatal(err)
		}
		copy(rp, p.Full)
		p.U[b] = u0 - h
		if err := p.Assemble(false); err != nil {
			t.Fatal(err)
		}
		copy(rm, p.Full)
		p.U[b] = u0
		for a := 0; a < n; a++ {
			emax = math.Max(emax, math.Abs((rp[a]-rm[a])/(2*h)-k(a, b)))
		}
	}
	return emax
}

// TestAssemblyDeterministic: with several workers taking chunks of elements
// in whatever order the scheduler gives them, repeated assemblies of the
// same state give bit-identical residuals, tangents and force scales, so
// that a run repeated or resumed takes the same decisions (common practice
// for reproducible results; the convergence tests divide by the scales).
func TestAssemblyDeterministic(t *testing.T) {
	p := parallelProblem(t, 7, 40, 4)
	if err := p.Assemble(true); err != nil {
		t.Fatal(err)
	}
	res := append([]float64(nil), p.Res...)
	val := append([]float64(nil), p.K.Val...)
	scale := p.Scale
	for run := 0; run < 30; run++ {
		if err := p.Assemble(true); err != nil {
			t.Fatal(err)
		}
		if p.Scale != scale {
			t.Fatalf("assembly %d: force scales %v, first assembly %v", run+2, p.Scale, scale)
		}
		for i := range res {
			if p.Res[i] != res[i] {
				t.Fatalf("assembly %d: residual %d is %v, first assembly %v", run+2, i, p.Res[i], res[i])
			}
		}
		for i := range val {
			if p.K.Val[i] != val[i] {
				t.Fatalf("assembly %d: tangent entry %d is %v, first assembly %v", run+2, i, p.K.Val[i], val[i])
			}
		}
	}
}

// parallelProblem returns a random plastic problem on an n × n mesh
// assembled by the given number of workers (≥ 2).
func parallelProblem(t *testing.T, seed uint64, n, workers int) *Problem {
	t.Helper()
	p := randomProblem(t, tangentCases()[1], n, n, rand.New(rand.NewPCG(seed, seed+1)))
	p.workers = make([]worker, workers)
	p.pool = newPool(workers - 1)
	return p
}
