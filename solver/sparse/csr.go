package sparse

import (
	"fmt"
	"math"
	"sort"
)

// CSR is a sparse matrix in compressed sparse row form. The column indices
// of row i are ColInd[RowPtr[i]:RowPtr[i+1]], sorted increasingly and
// without duplicates, and Val holds the matching values. An entry present
// in the pattern may hold the value zero; the pattern is what a
// factorisation's symbolic analysis depends on.
type CSR struct {
	Rows, Cols int
	RowPtr     []int
	ColInd     []int
	Val        []float64
}

// NNZ returns the number of entries in the pattern.
func (a *CSR) NNZ() int { return len(a.ColInd) }

// Pos returns the index into Val of entry (i, j), or -1 if (i, j) is not in
// the pattern or outside the matrix. It does not allocate, so an assembly
// loop can add into a fixed pattern: a.Val[a.Pos(i, j)] += v.
func (a *CSR) Pos(i, j int) int {
	if i < 0 || i >= a.Rows || j < 0 || j >= a.Cols {
		return -1
	}
	lo, hi := a.RowPtr[i], a.RowPtr[i+1]
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		switch c := a.ColInd[m]; {
		case c < j:
			lo = m + 1
		case c > j:
			hi = m
		default:
			return m
		}
	}
	return -1
}

// At returns entry (i, j), zero if it is not in the pattern. It panics if
// (i, j) is outside the matrix, like gonum's mat.Matrix.At.
func (a *CSR) At(i, j int) float64 {
	if i < 0 || i >= a.Rows || j < 0 || j >= a.Cols {
		panic(fmt.Sprintf("sparse: At(%d, %d) outside %d×%d matrix", i, j, a.Rows, a.Cols))
	}
	if p := a.Pos(i, j); p >= 0 {
		return a.Val[p]
	}
	return 0
}

// Zero sets every value to zero and keeps the pattern.
func (a *CSR) Zero() {
	clear(a.Val)
}

// MulVec sets dst = A·x. It panics if the lengths do not match the matrix,
// a programming error.
func (a *CSR) MulVec(dst, x []float64) {
	if len(dst) != a.Rows || len(x) != a.Cols {
		panic(fmt.Sprintf("sparse: MulVec with len(dst)=%d, len(x)=%d for %d×%d matrix", len(dst), len(x), a.Rows, a.Cols))
	}
	for i := 0; i < a.Rows; i++ {
		var s float64
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			s += a.Val[p] * x[a.ColInd[p]]
		}
		dst[i] = s
	}
}

// Check verifies the structural invariants of a: consistent lengths, row
// pointers non-decreasing, column indices in range and strictly increasing
// within each row, finite values. It returns the first violation.
func (a *CSR) Check() error {
	if a.Rows < 0 || a.Cols < 0 {
		return fmt.Errorf("sparse: negative dimensions %d×%d", a.Rows, a.Cols)
	}
	if len(a.RowPtr) != a.Rows+1 {
		return fmt.Errorf("sparse: len(RowPtr) = %d, want Rows+1 = %d", len(a.RowPtr), a.Rows+1)
	}
	if a.RowPtr[0] != 0 {
		return fmt.Errorf("sparse: RowPtr[0] = %d, want 0", a.RowPtr[0])
	}
	nnz := a.RowPtr[a.Rows]
	if len(a.ColInd) != nnz || len(a.Val) != nnz {
		return fmt.Errorf("sparse: len(ColInd) = %d, len(Val) = %d, want RowPtr[Rows] = %d", len(a.ColInd), len(a.Val), nnz)
	}
	for i := 0; i < a.Rows; i++ {
		if a.RowPtr[i+1] < a.RowPtr[i] {
			return fmt.Errorf("sparse: RowPtr decreases at row %d", i)
		}
		prev := -1
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			j := a.ColInd[p]
			if j < 0 || j >= a.Cols {
				return fmt.Errorf("sparse: row %d: column %d outside [0, %d)", i, j, a.Cols)
			}
			if j <= prev {
				return fmt.Errorf("sparse: row %d: columns not strictly increasing (%d after %d)", i, j, prev)
			}
			prev = j
			if v := a.Val[p]; math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("sparse: entry (%d, %d) is %g", i, j, v)
			}
		}
	}
	return nil
}

// Triplet collects matrix entries in coordinate form. Entries added more
// than once at the same position are summed by CSR.
type Triplet struct {
	rows, cols int
	i, j       []int
	v          []float64
}

// NewTriplet returns an empty rows×cols coordinate builder. It panics on
// negative dimensions, a programming error.
func NewTriplet(rows, cols int) *Triplet {
	if rows < 0 || cols < 0 {
		panic(fmt.Sprintf("sparse: NewTriplet(%d, %d): negative dimension", rows, cols))
	}
	return &Triplet{rows: rows, cols: cols}
}

// Len returns the number of entries added so far, duplicates included.
func (t *Triplet) Len() int { return len(t.v) }

// Add records entry (i, j) += v. It panics if (i, j) is outside the matrix:
// assembly code computes the indices, so a bad index is a programming error.
// Adding v = 0 still puts (i, j) into the pattern.
func (t *Triplet) Add(i, j int, v float64) {
	if i < 0 || i >= t.rows || j < 0 || j >= t.cols {
		panic(fmt.Sprintf("sparse: Triplet.Add(%d, %d) outside %d×%d matrix", i, j, t.rows, t.cols))
	}
	t.i = append(t.i, i)
	t.j = append(t.j, j)
	t.v = append(t.v, v)
}

// CSR returns the compressed form, summing duplicate entries. Columns are
// sorted within each row.
func (t *Triplet) CSR() *CSR {
	a := &CSR{Rows: t.rows, Cols: t.cols, RowPtr: make([]int, t.rows+1)}
	// Bucket by row, then sort each row by column and merge duplicates.
	for _, i := range t.i {
		a.RowPtr[i+1]++
	}
	for i := 0; i < t.rows; i++ {
		a.RowPtr[i+1] += a.RowPtr[i]
	}
	cols := make([]int, len(t.i))
	vals := make([]float64, len(t.i))
	next := make([]int, t.rows)
	copy(next, a.RowPtr[:t.rows])
	for k, i := range t.i {
		q := next[i]
		next[i]++
		cols[q] = t.j[k]
		vals[q] = t.v[k]
	}
	out := 0
	start := 0
	for i := 0; i < t.rows; i++ {
		end := a.RowPtr[i+1]
		r := rowSorter{cols[start:end], vals[start:end]}
		if !sort.IsSorted(r) {
			sort.Sort(r)
		}
		a.RowPtr[i] = out
		for p := start; p < end; p++ {
			if out > a.RowPtr[i] && cols[out-1] == cols[p] {
				vals[out-1] += vals[p]
				continue
			}
			cols[out] = cols[p]
			vals[out] = vals[p]
			out++
		}
		start = end
	}
	a.RowPtr[t.rows] = out
	a.ColInd = cols[:out:out]
	a.Val = vals[:out:out]
	return a
}

type rowSorter struct {
	c []int
	v []float64
}

func (r rowSorter) Len() int           { return len(r.c) }
func (r rowSorter) Less(a, b int) bool { return r.c[a] < r.c[b] }
func (r rowSorter) Swap(a, b int) {
	r.c[a], r.c[b] = r.c[b], r.c[a]
	r.v[a], r.v[b] = r.v[b], r.v[a]
}
