package solver

import (
	"math"

	"tearline/solver/sparse"
)

// Equilibrated wraps a LinearSolver with row and column equilibration
// (the two-pass scaling of LAPACK's dgeequ: r_i = 1/max_j |a_ij|, then
// c_j = 1/max_i |r_i a_ij|; Anderson et al., LAPACK Users' Guide, 1999).
// The mixed systems couple blocks of very different size — displacement
// rows of order E·h, volume rows of order K·h², multiplier rows of order
// h² — and at ν → 0.5 or with a stiff penalty the multiplier pivots fall
// below a solver's tolerance relative to the largest entry; equilibration
// brings every row and column to unit size first.
//
// Factorize scales the matrix values in place (the caller re-assembles
// before the next factorisation); Solve returns the solution of the
// original system.
type Equilibrated struct {
	Inner LinearSolver
	r, c  []float64
	tmp   []float64
}

// Analyze passes the pattern to the inner solver.
func (e *Equilibrated) Analyze(a *sparse.CSR) error { return e.Inner.Analyze(a) }

// Factorize equilibrates a in place and factorises it.
func (e *Equilibrated) Factorize(a *sparse.CSR) error {
	n := a.Rows
	if len(e.r) != n {
		e.r, e.c, e.tmp = make([]float64, n), make([]float64, a.Cols), make([]float64, n)
	}
	for i := range e.c {
		e.c[i] = 0
	}
	for i := 0; i < n; i++ {
		m := 0.0
		for q := a.RowPtr[i]; q < a.RowPtr[i+1]; q++ {
			m = math.Max(m, math.Abs(a.Val[q]))
		}
		e.r[i] = 1
		if m > 0 {
			e.r[i] = 1 / m
		}
		for q := a.RowPtr[i]; q < a.RowPtr[i+1]; q++ {
			a.Val[q] *= e.r[i]
			j := a.ColInd[q]
			e.c[j] = math.Max(e.c[j], math.Abs(a.Val[q]))
		}
	}
	for j, m := range e.c {
		if m > 0 {
			e.c[j] = 1 / m
		} else {
			e.c[j] = 1
		}
	}
	for q, j := range a.ColInd {
		a.Val[q] *= e.c[j]
	}
	return e.Inner.Factorize(a)
}

// Solve solves the original (unscaled) system.
func (e *Equilibrated) Solve(dst, b []float64) error {
	for i, v := range b {
		e.tmp[i] = e.r[i] * v
	}
	if err := e.Inner.Solve(dst, e.tmp); err != nil {
		return err
	}
	for j := range dst {
		dst[j] *= e.c[j]
	}
	return nil
}
