package sparse

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func dense(a *CSR) *mat.Dense {
	d := mat.NewDense(a.Rows, a.Cols, nil)
	for i := 0; i < a.Rows; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			d.Set(i, a.ColInd[p], a.Val[p])
		}
	}
	return d
}

// TestLUAgainstDense compares the sparse solution with gonum's dense LU
// (mat.LU, partial pivoting) on small random sparse matrices, with and
// without a full diagonal, in both orderings.
func TestLUAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	tested := 0
	for trial := 0; trial < 300; trial++ {
		n := 1 + rng.IntN(60)
		density := 0.02 + 0.3*rng.Float64()
		a := randomSparse(rng, n, density, trial%3 != 0)
		var dlu mat.LU
		dlu.Factorize(dense(a))
		if c := dlu.Cond(); c > 1e8 || math.IsInf(c, 0) || math.IsNaN(c) {
			continue
		}
		b := make([]float64, n)
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		var xd mat.VecDense
		if err := dlu.SolveVecTo(&xd, false, mat.NewVecDense(n, b)); err != nil {
			continue
		}
		for _, ord := range []Ordering{OrderAMD, OrderNatural} {
			o := DefaultOptions()
			o.Ordering = ord
			o.RefineSteps = 0
			lu, err := NewLU(o)
			if err != nil {
				t.Fatal(err)
			}
			if err := lu.Factorize(a); err != nil {
				t.Fatalf("trial %d (n=%d, %v): %v", trial, n, ord, err)
			}
			x := make([]float64, n)
			if err := lu.Solve(x, b); err != nil {
				t.Fatal(err)
			}
			var diff, xn float64
			for i := range x {
				diff = max(diff, math.Abs(x[i]-xd.AtVec(i)))
				xn = max(xn, math.Abs(xd.AtVec(i)))
			}
			if diff > 1e-9*xn*max(1, dlu.Cond()/1e4) {
				t.Errorf("trial %d (n=%d, %v): max |x − x_dense| = %g (|x| = %g, cond %g)", trial, n, ord, diff, xn, dlu.Cond())
			}
		}
		tested++
	}
	if tested < 100 {
		t.Fatalf("only %d of 300 random matrices were well conditioned", tested)
	}
}

// TestLUFEResidual checks ‖Ax−b‖/‖b‖ ≤ 1e-10 (design check V5) on
// finite-element-like matrices: vector Laplacian, the three-field mixed
// system with a zero block, the gradient fields with a second zero block
// and a nonsymmetric coupling, and a convective nonsymmetric perturbation.
func TestLUFEResidual(t *testing.T) {
	cases := []struct {
		name string
		o    feOptions
	}{
		{"vector-laplacian", feOptions{nc: 12, seed: 1}},
		{"mixed-saddle", feOptions{nc: 12, mixed: true, seed: 2}},
		{"mixed-gradient", feOptions{nc: 10, mixed: true, gradient: true, seed: 3}},
		{"mixed-gradient-convective-soft", feOptions{nc: 10, mixed: true, gradient: true, convection: 5, soft: 0.2, seed: 4}},
		{"saddle-convective", feOptions{nc: 16, mixed: true, convection: 20, seed: 5}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a := feSystem(c.o)
			b := onesRHS(a)
			for _, ord := range []Ordering{OrderAMD, OrderNatural} {
				o := DefaultOptions()
				o.Ordering = ord
				lu, _ := NewLU(o)
				if err := lu.Factorize(a); err != nil {
					t.Fatalf("%v: %v", ord, err)
				}
				x := make([]float64, a.Rows)
				if err := lu.Solve(x, b); err != nil {
					t.Fatal(err)
				}
				if r := relResidual(a, x, b); !(r <= 1e-10) {
					t.Errorf("%v: n=%d residual %g > 1e-10", ord, a.Rows, r)
				}
				// The exact solution is the vector of ones.
				for i, v := range x {
					if math.Abs(v-1) > 1e-6 {
						t.Errorf("%v: x[%d] = %g, want 1", ord, i, v)
						break
					}
				}
			}
		})
	}
}

// TestLURefactor refactors the same pattern with new values and checks
// that the analysis is kept and the result is right.
func TestLURefactor(t *testing.T) {
	a := feSystem(feOptions{nc: 8, mixed: true, gradient: true, seed: 9})
	var lu LU
	if err := lu.Factorize(a); err != nil {
		t.Fatal(err)
	}
	sym := lu.sym
	rng := rand.New(rand.NewPCG(3, 3))
	for it := 0; it < 3; it++ {
		for p := range a.Val {
			a.Val[p] *= 1 + 0.1*rng.NormFloat64()
		}
		if err := lu.Factorize(a); err != nil {
			t.Fatal(err)
		}
		if lu.sym != sym {
			t.Fatal("same pattern analysed again")
		}
		b := onesRHS(a)
		x := make([]float64, a.Rows)
		if err := lu.Solve(x, b); err != nil {
			t.Fatal(err)
		}
		if r := relResidual(a, x, b); r > 1e-10 {
			t.Errorf("refactor %d: residual %g", it, r)
		}
	}
	// Refactoring the same pattern reuses all storage; only the worker
	// goroutines of the factorisation are started afresh (a few objects).
	allocs := testing.AllocsPerRun(3, func() {
		if err := lu.Factorize(a); err != nil {
			t.Fatal(err)
		}
	})
	if allocs > float64(2+2*lu.Options().Workers) {
		t.Errorf("refactorisation allocates %v objects", allocs)
	}
}

// TestLUSingular: structurally and numerically singular matrices give a
// *SingularError naming a column.
func TestLUSingular(t *testing.T) {
	build := func(n int, entries [][3]float64) *CSR {
		tr := NewTriplet(n, n)
		for _, e := range entries {
			tr.Add(int(e[0]), int(e[1]), e[2])
		}
		return tr.CSR()
	}
	sat := feSystem(feOptions{nc: 4, mixed: true, seed: 1})
	// Zero the coupling of the first P dof: a zero row and column in the
	// saddle-point system, numerically singular with its pattern intact.
	pdof := -1
	for i := 0; i < sat.Rows && pdof < 0; i++ {
		if sat.Pos(i, i) < 0 || sat.At(i, i) == 0 {
			pdof = i
		}
	}
	for p := sat.RowPtr[pdof]; p < sat.RowPtr[pdof+1]; p++ {
		sat.Val[p] = 0
	}
	cases := []struct {
		name string
		a    *CSR
	}{
		{"empty column", build(3, [][3]float64{{0, 0, 1}, {1, 0, 2}, {2, 2, 3}, {1, 2, 1}})},
		{"equal rows", build(3, [][3]float64{{0, 0, 1}, {0, 1, 2}, {1, 0, 1}, {1, 1, 2}, {2, 2, 5}})},
		{"zero matrix", build(2, [][3]float64{{0, 0, 0}, {1, 1, 0}})},
		{"rank-one 3x3", build(3, [][3]float64{{0, 0, 1}, {0, 1, 2}, {0, 2, 3}, {1, 0, 2}, {1, 1, 4}, {1, 2, 6}, {2, 0, 3}, {2, 1, 6}, {2, 2, 9}})},
		{"saddle zero multiplier row", sat},
	}
	for _, c := range cases {
		for _, ord := range []Ordering{OrderAMD, OrderNatural} {
			o := DefaultOptions()
			o.Ordering = ord
			lu, _ := NewLU(o)
			err := lu.Factorize(c.a)
			var se *SingularError
			if !errors.As(err, &se) {
				t.Errorf("%s (%v): got %v, want *SingularError", c.name, ord, err)
				continue
			}
			if se.Col < 0 || se.Col >= c.a.Cols {
				t.Errorf("%s: column %d out of range", c.name, se.Col)
			}
			if lu.Solve(make([]float64, c.a.Rows), make([]float64, c.a.Rows)) == nil {
				t.Errorf("%s: Solve after a failed factorisation succeeded", c.name)
			}
		}
	}
}

func TestLUDimensionErrors(t *testing.T) {
	var lu LU
	if err := lu.Factorize(NewTriplet(2, 3).CSR()); err == nil {
		t.Error("non-square matrix accepted")
	}
	a := feSystem(feOptions{nc: 3, seed: 1})
	if err := lu.Factorize(a); err != nil {
		t.Fatal(err)
	}
	if err := lu.Solve(make([]float64, a.Rows-1), make([]float64, a.Rows)); err == nil {
		t.Error("short dst accepted")
	}
	if err := lu.Solve(make([]float64, a.Rows), make([]float64, a.Rows+1)); err == nil {
		t.Error("long b accepted")
	}
	bad := []Options{
		{PivotThreshold: 0, SingularTol: 1e-14, RefineSteps: 1, Workers: 1},
		{PivotThreshold: 1.5, SingularTol: 1e-14, RefineSteps: 1, Workers: 1},
		{PivotThreshold: 0.1, SingularTol: -1, RefineSteps: 1, Workers: 1},
		{PivotThreshold: 0.1, SingularTol: 1e-14, RefineSteps: -1, Workers: 1},
		{PivotThreshold: 0.1, SingularTol: 1e-14, RefineSteps: 1, Workers: 0},
		{PivotThreshold: 0.1, SingularTol: 1e-14, RefineSteps: 1, Workers: 1, Ordering: 7},
	}
	for _, o := range bad {
		if o.Validate() == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	if err := DefaultOptions().Validate(); err != nil {
		t.Error(err)
	}
}

// TestLUWorkers: the subtree mapping and the split Schur updates change
// only who computes each front, not the arithmetic, so any number of
// workers gives bit-for-bit the serial solution.
func TestLUWorkers(t *testing.T) {
	a := feSystem(feOptions{nc: 22, mixed: true, gradient: true, convection: 1, soft: 0.1, seed: 12})
	b := onesRHS(a)
	var ref []float64
	for _, w := range []int{1, 2, 3} {
		o := DefaultOptions()
		o.Workers = w
		lu, _ := NewLU(o)
		if err := lu.Factorize(a); err != nil {
			t.Fatal(err)
		}
		if w > 1 && lu.sym.plan == nil {
			t.Fatalf("workers=%d: no subtree plan (flops %g)", w, lu.sym.flops)
		}
		x := make([]float64, a.Rows)
		if err := lu.Solve(x, b); err != nil {
			t.Fatal(err)
		}
		if r := relResidual(a, x, b); r > 1e-10 {
			t.Errorf("workers=%d: residual %g", w, r)
		}
		if ref == nil {
			ref = x
			continue
		}
		for i := range x {
			if x[i] != ref[i] {
				t.Fatalf("workers=%d: x[%d] = %v, serial %v", w, i, x[i], ref[i])
			}
		}
	}
}

// TestLUEquilibration: rows and columns scaled over many orders of
// magnitude leave the solution unchanged but for the column scale,
// (D_r·A·D_c)·(D_c⁻¹x) = D_r·b (closed form), with x = 1 for the right-hand
// side A·1. After the first stage (dgeequ's scaling, LAPACK Users' Guide)
// every column of R·A·C has largest magnitude 1 and no entry exceeds 1,
// to rounding; Factorize leaves the caller's matrix as it was.
func TestLUEquilibration(t *testing.T) {
	for _, c := range []struct {
		name   string
		o      feOptions
		orders float64 // row and column scales 10^k, |k| ≤ orders
	}{
		{"mixed-saddle, unscaled", feOptions{nc: 8, mixed: true, seed: 6}, 0},
		{"mixed-saddle, 10^±6", feOptions{nc: 8, mixed: true, seed: 6}, 6},
		{"mixed-gradient, 10^±8", feOptions{nc: 8, mixed: true, gradient: true, seed: 7}, 8},
	} {
		a := feSystem(c.o)
		rng := rand.New(rand.NewPCG(7, 7))
		dr, dc := make([]float64, a.Rows), make([]float64, a.Cols)
		for i := range dr {
			dr[i] = math.Pow(10, math.Round(c.orders*(2*rng.Float64()-1)))
			dc[i] = math.Pow(10, math.Round(c.orders*(2*rng.Float64()-1)))
		}
		b := onesRHS(a)
		for i := 0; i < a.Rows; i++ {
			b[i] *= dr[i]
			for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
				a.Val[p] *= dr[i] * dc[a.ColInd[p]]
			}
		}
		orig := append([]float64(nil), a.Val...)
		var lu LU
		if err := lu.Factorize(a); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		for p := range orig {
			if math.Float64bits(a.Val[p]) != math.Float64bits(orig[p]) {
				t.Fatalf("%s: Factorize changed entry %d of the caller's matrix", c.name, p)
			}
		}
		colMax := make([]float64, a.Cols)
		for p, j := range a.ColInd {
			v := math.Abs(lu.val1[p])
			colMax[j] = max(colMax[j], v)
			if v > 1+4*epsilon {
				t.Errorf("%s: |(R·A·C)[%d]| = %v > 1", c.name, p, v)
			}
		}
		for j, m := range colMax {
			if math.Abs(m-1) > 4*epsilon {
				t.Errorf("%s: column %d of R·A·C has largest magnitude %v, want 1", c.name, j, m)
			}
		}
		y := make([]float64, a.Rows)
		if err := lu.Solve(y, b); err != nil {
			t.Fatal(err)
		}
		for j, v := range y {
			if x := v * dc[j]; math.Abs(x-1) > 1e-6 {
				t.Errorf("%s: x[%d] = %g, want 1", c.name, j, x)
				break
			}
		}
	}
}

// TestLUSolveDoesNotAllocate: a Newton iteration solves once or more per
// factorisation; Solve works in the LU's own storage (DEVELOPERS.md: no
// allocation in the Newton loop's hot path).
func TestLUSolveDoesNotAllocate(t *testing.T) {
	a := feSystem(feOptions{nc: 8, mixed: true, gradient: true, seed: 8})
	var lu LU
	if err := lu.Factorize(a); err != nil {
		t.Fatal(err)
	}
	b := onesRHS(a)
	x := make([]float64, a.Rows)
	if allocs := testing.AllocsPerRun(10, func() {
		if err := lu.Solve(x, b); err != nil {
			t.Fatal(err)
		}
	}); allocs != 0 {
		t.Errorf("Solve allocates %v objects", allocs)
	}
}

// TestEstimate: the symbolic analysis predicts the factors' size. Without
// delayed pivots (a displacement-only FE matrix, pivots on the diagonal)
// the prediction is the factorisation's count exactly; with the mixed
// blocks, whose zero diagonal delays pivots, it is a lower bound (delays
// add entries). Both are the supernodal counts of the elimination tree
// (George & Liu 1981, Computer Solution of Large Sparse Positive Definite
// Systems).
func TestEstimate(t *testing.T) {
	for _, c := range []struct {
		name  string
		o     feOptions
		exact bool
	}{
		{"displacement", feOptions{nc: 12, seed: 1}, true},
		{"mixed and gradient", feOptions{nc: 12, mixed: true, gradient: true, seed: 2}, false},
	} {
		a := feSystem(c.o)
		var lu LU
		if nnz, flops := lu.Estimate(); nnz != 0 || flops != 0 {
			t.Fatalf("%s: estimate %d, %g before Analyze, want zeros", c.name, nnz, flops)
		}
		if err := lu.Analyze(a); err != nil {
			t.Fatal(err)
		}
		est, flops := lu.Estimate()
		if err := lu.Factorize(a); err != nil {
			t.Fatal(err)
		}
		got := lu.NNZ()
		if est <= 0 || flops <= 0 || est > got || (c.exact && est != got) {
			t.Errorf("%s: estimate %d entries (%g flops), factorisation %d (exact %v)", c.name, est, flops, got, c.exact)
		}
	}
}
