package sparse

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
)

// Ordering selects the fill-reducing ordering applied symmetrically to the
// pattern of A+Aᵀ before factorisation.
type Ordering int

const (
	// OrderAMD is approximate minimum degree (Amestoy, Davis & Duff 1996).
	OrderAMD Ordering = iota
	// OrderNatural keeps the given order; useful for tests and for matrices
	// that are already well ordered.
	OrderNatural
)

func (o Ordering) String() string {
	switch o {
	case OrderAMD:
		return "amd"
	case OrderNatural:
		return "natural"
	}
	return fmt.Sprintf("Ordering(%d)", int(o))
}

// Options controls an LU factorisation. The zero value is not valid; start
// from DefaultOptions.
type Options struct {
	// PivotThreshold τ ∈ (0, 1]: a candidate pivot is accepted if its
	// magnitude is at least τ times the largest magnitude in its column of
	// the front. 1 is partial pivoting; smaller values keep more pivots on
	// the diagonal and delay fewer.
	PivotThreshold float64
	// SingularTol: a pivot whose magnitude is at most SingularTol times the
	// largest magnitude in A is treated as zero (numerically singular).
	SingularTol float64
	// Ordering is the fill-reducing ordering.
	Ordering Ordering
	// RefineSteps is the largest number of iterative-refinement steps
	// Solve takes; refinement stops early once the residual no longer
	// decreases. 0 turns refinement off.
	RefineSteps int
	// Workers bounds the number of goroutines used by the numeric
	// factorisation (independent subtrees of the assembly tree).
	Workers int
}

// DefaultOptions returns the default options: threshold 0.1, singular
// tolerance 1e-14, AMD ordering, up to 2 refinement steps, one worker per
// available processor.
func DefaultOptions() Options {
	return Options{
		PivotThreshold: 0.1,
		SingularTol:    1e-14,
		Ordering:       OrderAMD,
		RefineSteps:    2,
		Workers:        runtime.GOMAXPROCS(0),
	}
}

// Validate reports the first option outside its allowed range.
func (o Options) Validate() error {
	switch {
	case !(o.PivotThreshold > 0 && o.PivotThreshold <= 1):
		return fmt.Errorf("sparse: PivotThreshold %g must be in (0, 1]", o.PivotThreshold)
	case !(o.SingularTol >= 0 && o.SingularTol < 1):
		return fmt.Errorf("sparse: SingularTol %g must be in [0, 1)", o.SingularTol)
	case o.Ordering != OrderAMD && o.Ordering != OrderNatural:
		return fmt.Errorf("sparse: unknown Ordering %d (allowed: OrderAMD, OrderNatural)", int(o.Ordering))
	case o.RefineSteps < 0 || o.RefineSteps > 100:
		return fmt.Errorf("sparse: RefineSteps %d must be in [0, 100]", o.RefineSteps)
	case o.Workers < 1 || o.Workers > 1024:
		return fmt.Errorf("sparse: Workers %d must be in [1, 1024]", o.Workers)
	}
	return nil
}

// SingularError reports a matrix that is structurally or numerically
// singular: no acceptable pivot was found for column Col (an index of the
// original matrix). Pivot is the largest magnitude available for it in the
// equilibrated matrix, whose rows and columns have largest magnitude 1, so
// it compares directly with Options.SingularTol.
type SingularError struct {
	Col   int
	Pivot float64
}

func (e *SingularError) Error() string {
	return fmt.Sprintf("sparse: matrix is singular: column %d has no usable pivot (largest candidate magnitude %g)", e.Col, e.Pivot)
}

// ErrNotFactorized is returned by Solve before a successful Factorize.
var ErrNotFactorized = errors.New("sparse: LU not factorized")

// LU is a sparse LU factorisation P·A·Q = L·U of a square matrix, of the
// matrix equilibrated by row and column scaling (see equilibrate). The zero
// value is ready to use with DefaultOptions; NewLU sets other options.
//
// Analyze computes the ordering and symbolic analysis for a pattern;
// Factorize reuses them for every matrix with the same pattern, so a Newton
// loop pays for the analysis once per mesh. An LU is not safe for
// concurrent use.
type LU struct {
	opts    Options
	optsSet bool

	sym *symbolic
	num numeric
	ok  bool // numeric factors valid

	// Equilibration in two stages: R = diag(r1), C = diag(c1) and the
	// values of R·A·C (the system Solve refines); then D_r = diag(rs),
	// D_c = diag(cs) and the values of D_r·R·A·C·D_c (the matrix factored).
	r1, c1, val1 []float64
	rs, cs, sval []float64

	// Solve work space.
	w, x, r, d, t, rb []float64
}

// NewLU returns an LU that uses the given options.
func NewLU(o Options) (*LU, error) {
	if err := o.Validate(); err != nil {
		return nil, err
	}
	return &LU{opts: o, optsSet: true}, nil
}

func (lu *LU) options() Options {
	if !lu.optsSet {
		lu.opts = DefaultOptions()
		lu.optsSet = true
	}
	return lu.opts
}

// Options returns the options in use.
func (lu *LU) Options() Options { return lu.options() }

func checkSquare(a *CSR) error {
	if a == nil {
		return errors.New("sparse: nil matrix")
	}
	if a.Rows != a.Cols {
		return fmt.Errorf("sparse: matrix is %d×%d, LU needs a square matrix", a.Rows, a.Cols)
	}
	if len(a.RowPtr) != a.Rows+1 || a.RowPtr[a.Rows] != len(a.ColInd) || len(a.ColInd) != len(a.Val) {
		return fmt.Errorf("sparse: inconsistent CSR arrays (len(RowPtr)=%d, len(ColInd)=%d, len(Val)=%d, Rows=%d)", len(a.RowPtr), len(a.ColInd), len(a.Val), a.Rows)
	}
	return nil
}

// Analyze computes the fill-reducing ordering and the symbolic
// factorisation of a's pattern. Values are not used. Calling it is
// optional: Factorize analyses a new pattern itself.
func (lu *LU) Analyze(a *CSR) error {
	if err := checkSquare(a); err != nil {
		return err
	}
	if err := a.Check(); err != nil {
		return err
	}
	o := lu.options()
	s, err := analyze(a, o)
	if err != nil {
		return err
	}
	lu.sym = s
	lu.ok = false
	return nil
}

// Factorize computes the numeric factorisation of a. If a's pattern differs
// from the one last analysed, it analyses it first. Refactoring a matrix
// with the same pattern reuses all storage. It returns a *SingularError if
// no acceptable pivot exists for some column.
func (lu *LU) Factorize(a *CSR) error {
	lu.ok = false
	if err := checkSquare(a); err != nil {
		return err
	}
	if lu.sym == nil || !lu.sym.samePattern(a) {
		if err := lu.Analyze(a); err != nil {
			return err
		}
	}
	for _, v := range a.Val {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("sparse: matrix holds a non-finite value %g", v)
		}
	}
	amax, err := lu.equilibrate(a)
	if err != nil {
		return err
	}
	o := lu.options()
	if err := lu.num.factor(lu.sym, lu.sval, o.PivotThreshold, o.SingularTol*amax, o.Workers); err != nil {
		return err
	}
	lu.ok = true
	n := a.Rows
	if len(lu.w) != n {
		lu.w = make([]float64, n)
		lu.x = make([]float64, n)
		lu.r = make([]float64, n)
		lu.d = make([]float64, n)
		lu.t = make([]float64, n)
		lu.rb = make([]float64, n)
	}
	return nil
}

// NNZ returns the number of entries stored in L and U (the unit diagonal of
// L not counted), zero before a factorisation.
func (lu *LU) NNZ() int {
	if !lu.ok {
		return 0
	}
	return lu.num.nnz
}

// Estimate returns what the symbolic analysis predicts of a factorisation:
// the entries of L and U (without delayed pivots, which add some) and the
// floating-point operations; zeros before Analyze. It lets a caller size a
// problem without factorising it.
func (lu *LU) Estimate() (nnz int, flops float64) {
	if lu.sym == nil {
		return 0, 0
	}
	return lu.sym.nnzEst, lu.sym.flops
}

// Solve solves A·x = b for x, stored in dst, using the last factorisation,
// followed by up to Options.RefineSteps steps of iterative refinement
// (Wilkinson; see Higham 2002, Accuracy and Stability of Numerical
// Algorithms, ch. 12). dst and b may be the same slice. Solve works on the
// system of the first equilibration stage, (R·A·C)·y = R·b, refines y
// against R·A·C, and returns x = C·y; it does not allocate.
func (lu *LU) Solve(dst, b []float64) error {
	if !lu.ok {
		return ErrNotFactorized
	}
	n := lu.sym.n
	if len(dst) != n || len(b) != n {
		return fmt.Errorf("sparse: Solve with len(dst)=%d, len(b)=%d for a %d×%d factorisation", len(dst), len(b), n, n)
	}
	rb := lu.rb
	for i, v := range b {
		rb[i] = lu.r1[i] * v
	}
	lu.apply(lu.x, rb)
	steps := lu.options().RefineSteps
	if steps > 0 {
		// Refine while the componentwise backward error (Oettli & Prager
		// 1964, Numer. Math. 6) is above a few units of roundoff; stopping
		// rule after Arioli, Demmel & Duff 1989, SIAM J. Matrix Anal. Appl.
		// 10, "Solving sparse linear systems with sparse backward error".
		rnorm := lu.residual(lu.d, lu.x, rb)
		for k := 0; k < steps && rnorm > 4*epsilon; k++ {
			// d holds r = R·b − R·A·C·y; solve for the correction e and
			// try y + e.
			lu.apply(lu.r, lu.d)
			for i := range lu.r {
				lu.r[i] += lu.x[i]
			}
			rn := lu.residual(lu.d, lu.r, rb)
			if !(rn < rnorm) {
				break
			}
			lu.x, lu.r = lu.r, lu.x
			rnorm = rn
		}
	}
	for j := range dst {
		dst[j] = lu.x[j] * lu.c1[j]
	}
	return nil
}

// apply sets x = (R·A·C)⁻¹·b from the factors of D_r·R·A·C·D_c; b is not
// changed.
func (lu *LU) apply(x, b []float64) {
	for i, v := range b {
		lu.t[i] = v * lu.rs[i]
	}
	lu.num.solve(lu.sym, x, lu.t, lu.w)
	for j := range x {
		x[j] *= lu.cs[j]
	}
}

// equilibrate scales A in two stages and stores the scaled values: every
// row and column of D_r·R·A·C·D_c has largest magnitude close to 1, so that
// the pivot threshold compares like with like in systems whose fields have
// different units (displacement, volume and multiplier rows of a mixed
// element differ by powers of the element size and the moduli). It returns
// the largest magnitude of the matrix factored, and an error if the
// scaling overflows (a row or column whose largest magnitude is
// subnormal).
//
// The first stage, scaleByMax, brings each row and then each column to
// largest magnitude exactly 1 in one pass; the second, the iteration of
// Ruiz, balances rows and columns together.
func (lu *LU) equilibrate(a *CSR) (float64, error) {
	n := a.Rows
	if len(lu.rs) != n || len(lu.sval) != len(a.Val) {
		lu.r1 = make([]float64, n)
		lu.c1 = make([]float64, n)
		lu.val1 = make([]float64, len(a.Val))
		lu.rs = make([]float64, n)
		lu.cs = make([]float64, n)
		lu.sval = make([]float64, len(a.Val))
		lu.d = make([]float64, n)
		lu.t = make([]float64, n)
	}
	lu.scaleByMax(a)
	for i := 0; i < n; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if v := lu.val1[p]; math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("sparse: entry (%d, %d) = %g cannot be equilibrated: its row or column scale overflows", i, a.ColInd[p], a.Val[p])
			}
		}
	}
	return lu.ruiz(a), nil
}

// scaleByMax is the first stage of equilibrate, the two-pass scaling of
// LAPACK's dgeequ (Anderson et al., LAPACK Users' Guide, 3rd ed., SIAM
// 1999): r_i = 1/max_j |a_ij|, then c_j = 1/max_i |r_i a_ij|, with 1 for
// an empty row or column. It stores R·A·C, scaled by r_i and then by c_j.
func (lu *LU) scaleByMax(a *CSR) {
	r, c, v := lu.r1, lu.c1, lu.val1
	clear(c)
	for i := 0; i < a.Rows; i++ {
		m := 0.0
		for q := a.RowPtr[i]; q < a.RowPtr[i+1]; q++ {
			m = math.Max(m, math.Abs(a.Val[q]))
		}
		r[i] = 1
		if m > 0 {
			r[i] = 1 / m
		}
		for q := a.RowPtr[i]; q < a.RowPtr[i+1]; q++ {
			v[q] = a.Val[q] * r[i]
			j := a.ColInd[q]
			c[j] = math.Max(c[j], math.Abs(v[q]))
		}
	}
	for j, m := range c {
		if m > 0 {
			c[j] = 1 / m
		} else {
			c[j] = 1
		}
	}
	for q, j := range a.ColInd {
		v[q] *= c[j]
	}
}

// ruiz is the second stage of equilibrate: row and column scalings D_r,
// D_c of R·A·C by the iteration of Ruiz 2001 ("A scaling algorithm to
// equilibrate both rows and columns norms in matrices", Rutherford Appleton
// Laboratory RAL-TR-2001-034), which divides every row and column by the
// square root of its largest magnitude until all are within 1% of 1 (at
// most 20 sweeps). It
// stores D_r·R·A·C·D_c and returns its largest magnitude.
func (lu *LU) ruiz(a *CSR) float64 {
	n := a.Rows
	rs, cs := lu.rs, lu.cs
	rmax, cmax := lu.d, lu.t // scratch
	for i := range rs {
		rs[i], cs[i] = 1, 1
	}
	for it := 0; it < 20; it++ {
		clear(rmax)
		clear(cmax)
		for i := 0; i < n; i++ {
			for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
				j := a.ColInd[p]
				v := math.Abs(lu.val1[p]) * rs[i] * cs[j]
				rmax[i] = max(rmax[i], v)
				cmax[j] = max(cmax[j], v)
			}
		}
		dev := 0.0
		for i := 0; i < n; i++ {
			if rmax[i] > 0 {
				rs[i] /= math.Sqrt(rmax[i])
				dev = max(dev, math.Abs(1-rmax[i]))
			}
			if cmax[i] > 0 {
				cs[i] /= math.Sqrt(cmax[i])
				dev = max(dev, math.Abs(1-cmax[i]))
			}
		}
		if dev < 1e-2 {
			break
		}
	}
	amax := 0.0
	for i := 0; i < n; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			v := lu.val1[p] * rs[i] * cs[a.ColInd[p]]
			lu.sval[p] = v
			amax = max(amax, math.Abs(v))
		}
	}
	return amax
}

const epsilon = 0x1p-52

// residual sets r = b − M·x for M = R·A·C, the matrix of the first
// equilibration stage, and returns the componentwise backward error
// max_i |r_i| / (|M|·|x| + |b|)_i.
func (lu *LU) residual(r, x, b []float64) float64 {
	rowPtr, colInd := lu.sym.rowPtr, lu.sym.colInd
	var w float64
	for i := 0; i < lu.sym.n; i++ {
		s, d := b[i], math.Abs(b[i])
		for p := rowPtr[i]; p < rowPtr[i+1]; p++ {
			t := lu.val1[p] * x[colInd[p]]
			s -= t
			d += math.Abs(t)
		}
		r[i] = s
		switch {
		case d > 0:
			w = max(w, math.Abs(s)/d)
		case s != 0:
			w = math.Inf(1)
		}
	}
	return w
}

// symbolic is the ordering and symbolic factorisation of one pattern.
type symbolic struct {
	n              int
	rowPtr, colInd []int // copy of the analysed pattern

	perm []int // perm[k] = original index of the k-th variable

	// Supernodes in postorder; supernode s holds variables
	// first[s] … first[s+1]-1 of the permuted order.
	first  []int
	parent []int // parent supernode, -1 at a root
	// Children of s: kids[kidPtr[s]:kidPtr[s+1]], in increasing order.
	kidPtr, kids []int
	// Rows of the front below the supernode's own variables, as original
	// indices: strct[strPtr[s]:strPtr[s+1]].
	strPtr, strct []int
	// Original entries assembled into the front of s: value index,
	// local row, local column (before delayed pivots shift them).
	asmPtr             []int
	asmVal             []int
	asmRow, asmCol     []int32
	maxFront, stackEst int
	nnzEst             int
	flops              float64   // estimated factorisation flops
	plan               *treePlan // subtree mapping, built on first use
}

func (s *symbolic) samePattern(a *CSR) bool {
	return a.Rows == s.n && slices.Equal(a.RowPtr, s.rowPtr) && slices.Equal(a.ColInd, s.colInd)
}

// analyze computes the symbolic factorisation of a's pattern.
func analyze(a *CSR, o Options) (*symbolic, error) {
	n := a.Rows
	s := &symbolic{n: n, rowPtr: slices.Clone(a.RowPtr), colInd: slices.Clone(a.ColInd)}
	adjPtr, adj := symmetricPattern(a)
	var perm []int
	switch o.Ordering {
	case OrderNatural:
		perm = make([]int, n)
		for i := range perm {
			perm[i] = i
		}
	default:
		perm = orderAMD(a, adjPtr, adj)
	}
	iperm := make([]int, n)
	for k, i := range perm {
		iperm[i] = k
	}

	// Elimination tree of the permuted pattern (Liu 1986, ACM TOMS 12),
	// with path compression through ancestor links.
	parent := make([]int, n)
	anc := make([]int, n)
	for k := 0; k < n; k++ {
		parent[k], anc[k] = -1, -1
		for _, j := range adj[adjPtr[perm[k]]:adjPtr[perm[k]+1]] {
			i := iperm[j]
			for i != -1 && i < k {
				next := anc[i]
				anc[i] = k
				if next == -1 {
					parent[i] = k
				}
				i = next
			}
		}
	}
	// Postorder the tree and renumber so that every subtree is contiguous.
	post := postorder(parent)
	ipost := make([]int, n)
	for k, v := range post {
		ipost[v] = k
	}
	np := make([]int, n)
	par2 := make([]int, n)
	for k, v := range post {
		np[k] = perm[v]
		if parent[v] == -1 {
			par2[k] = -1
		} else {
			par2[k] = ipost[parent[v]]
		}
	}
	perm, parent = np, par2
	for k, i := range perm {
		iperm[i] = k
	}
	s.perm = perm

	// Column counts of the Cholesky factor of the permuted pattern: row k
	// of L is the row subtree from each neighbour j < k up to k (Liu 1990,
	// SIAM J. Matrix Anal. Appl. 11, "The role of elimination trees").
	cnt := make([]int, n)
	mark := anc // reuse
	for i := range mark {
		mark[i] = -1
	}
	for k := 0; k < n; k++ {
		mark[k] = k
		cnt[k]++
		for _, jj := range adj[adjPtr[perm[k]]:adjPtr[perm[k]+1]] {
			for j := iperm[jj]; j < k && mark[j] != k; j = parent[j] {
				mark[j] = k
				cnt[j]++
			}
		}
	}

	// Fundamental supernodes: k joins k-1 when k is k-1's parent and the
	// column structures nest exactly.
	first := []int{0}
	for k := 1; k < n; k++ {
		if !(parent[k-1] == k && cnt[k-1] == cnt[k]+1) {
			first = append(first, k)
		}
	}
	first = append(first, n)
	ns := len(first) - 1
	ncol := make([]int, ns)
	nrow := make([]int, ns) // rows below the diagonal block
	for sn := 0; sn < ns; sn++ {
		ncol[sn] = first[sn+1] - first[sn]
		nrow[sn] = cnt[first[sn+1]-1] - 1
	}
	super := make([]int, n)
	for sn := 0; sn < ns; sn++ {
		for k := first[sn]; k < first[sn+1]; k++ {
			super[k] = sn
		}
	}

	// Relaxed amalgamation: merge a supernode into its parent when it
	// immediately precedes it and the explicit zeros stay few (size and
	// zero-fraction limits after Ashcraft & Grimes 1989, SIAM J. Sci.
	// Stat. Comput. 10, "The influence of relaxed supernode partitions").
	alive := make([]bool, ns)
	zeros := make([]float64, ns)
	start := slices.Clone(first[:ns])
	for i := range alive {
		alive[i] = true
	}
	for p := 0; p < ns; p++ {
		for start[p] > 0 {
			// The supernode ending just before p is a candidate when its
			// last variable's parent lies in p.
			lastc := start[p] - 1
			if parent[lastc] < start[p] || parent[lastc] >= first[p+1] {
				break
			}
			c := super[lastc]
			nc, np := ncol[c], ncol[p]
			tot := nc + np
			merged := float64(tot*(tot+1)/2 + tot*nrow[p])
			trueNZ := float64(nc*(nc+1)/2+nc*nrow[c]+np*(np+1)/2+np*nrow[p]) - zeros[c] - zeros[p]
			z := merged - trueNZ
			frac := z / merged
			if !(tot <= 4 || (tot <= 16 && frac < 0.8) || (tot <= 48 && frac < 0.1) || frac < 0.05) {
				break
			}
			alive[c] = false
			ncol[p] = tot
			zeros[p] = z
			start[p] = start[c]
			for k := start[c]; k < start[c]+nc; k++ {
				super[k] = p
			}
		}
	}
	// Compact the surviving supernodes.
	newID := make([]int, ns)
	first = first[:0]
	m := 0
	for sn := 0; sn < ns; sn++ {
		if alive[sn] {
			newID[sn] = m
			first = append(first, start[sn])
			m++
		}
	}
	first = append(first, n)
	ns = m
	for k := 0; k < n; k++ {
		super[k] = newID[super[k]]
	}
	s.first = first
	s.parent = make([]int, ns)
	for sn := 0; sn < ns; sn++ {
		last := first[sn+1] - 1
		if parent[last] == -1 {
			s.parent[sn] = -1
		} else {
			s.parent[sn] = super[parent[last]]
		}
	}
	s.kidPtr = make([]int, ns+1)
	for sn := 0; sn < ns; sn++ {
		if p := s.parent[sn]; p >= 0 {
			s.kidPtr[p+1]++
		}
	}
	for sn := 0; sn < ns; sn++ {
		s.kidPtr[sn+1] += s.kidPtr[sn]
	}
	s.kids = make([]int, s.kidPtr[ns])
	fill := slices.Clone(s.kidPtr[:ns])
	for sn := 0; sn < ns; sn++ {
		if p := s.parent[sn]; p >= 0 {
			s.kids[fill[p]] = sn
			fill[p]++
		}
	}

	// Front structure: own variables' neighbours beyond the supernode plus
	// the children's structures (Liu 1990).
	for i := range mark {
		mark[i] = -1
	}
	s.strPtr = make([]int, ns+1)
	var strct []int // permuted indices while building
	for sn := 0; sn < ns; sn++ {
		f, l := first[sn], first[sn+1]
		begin := len(strct)
		for k := f; k < l; k++ {
			for _, jj := range adj[adjPtr[perm[k]]:adjPtr[perm[k]+1]] {
				if j := iperm[jj]; j >= l && mark[j] != sn {
					mark[j] = sn
					strct = append(strct, j)
				}
			}
		}
		for _, c := range s.kids[s.kidPtr[sn]:s.kidPtr[sn+1]] {
			for _, j := range strct[s.strPtr[c]:s.strPtr[c+1]] {
				if j >= l && mark[j] != sn {
					mark[j] = sn
					strct = append(strct, j)
				}
			}
		}
		slices.Sort(strct[begin:])
		s.strPtr[sn+1] = len(strct)
	}

	// Assembly map of the original entries. Entry (i, j) goes to the front
	// of the supernode holding min(iperm[i], iperm[j]).
	colPtr, rowOf, valOf := cscIndex(a)
	pos := make([]int, n)
	s.asmPtr = make([]int, ns+1)
	s.asmVal = make([]int, 0, len(a.ColInd))
	s.asmRow = make([]int32, 0, len(a.ColInd))
	s.asmCol = make([]int32, 0, len(a.ColInd))
	for sn := 0; sn < ns; sn++ {
		f, l := first[sn], first[sn+1]
		for k := f; k < l; k++ {
			pos[k] = k - f
		}
		for t, j := range strct[s.strPtr[sn]:s.strPtr[sn+1]] {
			pos[j] = l - f + t
		}
		for k := f; k < l; k++ {
			i := perm[k]
			for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
				if j := iperm[a.ColInd[p]]; j >= k {
					s.asmVal = append(s.asmVal, p)
					s.asmRow = append(s.asmRow, int32(pos[k]))
					s.asmCol = append(s.asmCol, int32(pos[j]))
				}
			}
			for p := colPtr[i]; p < colPtr[i+1]; p++ {
				if r := iperm[rowOf[p]]; r > k {
					s.asmVal = append(s.asmVal, valOf[p])
					s.asmRow = append(s.asmRow, int32(pos[r]))
					s.asmCol = append(s.asmCol, int32(pos[k]))
				}
			}
		}
		s.asmPtr[sn+1] = len(s.asmVal)
	}
	// Structure as original indices, and size estimates.
	for t, j := range strct {
		strct[t] = perm[j]
	}
	s.strct = strct
	stack, peak := 0, 0
	for sn := 0; sn < ns; sn++ {
		k := first[sn+1] - first[sn]
		r := s.strPtr[sn+1] - s.strPtr[sn]
		s.maxFront = max(s.maxFront, k+r)
		s.nnzEst += k*k + 2*k*r
		fk, fr := float64(k), float64(r)
		s.flops += 2*fk*fk*fk/3 + 2*fk*fk*fr + 2*fk*fr*fr
		for _, c := range s.kids[s.kidPtr[sn]:s.kidPtr[sn+1]] {
			rc := s.strPtr[c+1] - s.strPtr[c]
			stack -= rc * rc
		}
		stack += r * r
		peak = max(peak, stack)
	}
	s.stackEst = peak
	return s, nil
}

// postorder returns the nodes of the forest given by parent in depth-first
// postorder, children visited in increasing order.
func postorder(parent []int) []int {
	n := len(parent)
	head := make([]int, n)
	next := make([]int, n)
	for i := range head {
		head[i] = -1
	}
	var roots []int
	for v := n - 1; v >= 0; v-- {
		if p := parent[v]; p == -1 {
			roots = append(roots, v)
		} else {
			next[v] = head[p]
			head[p] = v
		}
	}
	post := make([]int, 0, n)
	stack := make([]int, 0, 64)
	for r := len(roots) - 1; r >= 0; r-- {
		stack = append(stack, roots[r])
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			if c := head[v]; c != -1 {
				head[v] = next[c]
				stack = append(stack, c)
			} else {
				stack = stack[:len(stack)-1]
				post = append(post, v)
			}
		}
	}
	return post
}

// symmetricPattern returns the adjacency lists of the pattern of A+Aᵀ
// without the diagonal.
func symmetricPattern(a *CSR) (ptr, adj []int) {
	n := a.Rows
	deg := make([]int, n+1)
	for i := 0; i < n; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if j := a.ColInd[p]; j != i {
				deg[i+1]++
				deg[j+1]++
			}
		}
	}
	for i := 0; i < n; i++ {
		deg[i+1] += deg[i]
	}
	tmp := make([]int, deg[n])
	next := slices.Clone(deg[:n])
	for i := 0; i < n; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			if j := a.ColInd[p]; j != i {
				tmp[next[i]] = j
				next[i]++
				tmp[next[j]] = i
				next[j]++
			}
		}
	}
	// Remove duplicates (entries present in both A and Aᵀ).
	ptr = make([]int, n+1)
	mark := make([]int, n)
	for i := range mark {
		mark[i] = -1
	}
	out := 0
	for i := 0; i < n; i++ {
		for _, j := range tmp[deg[i]:deg[i+1]] {
			if mark[j] != i {
				mark[j] = i
				tmp[out] = j
				out++
			}
		}
		ptr[i+1] = out
	}
	return ptr, tmp[:out]
}

// cscIndex returns the column-wise index of a: for column j, rowOf and
// valOf over colPtr[j]:colPtr[j+1] give each entry's row and index in Val.
func cscIndex(a *CSR) (colPtr, rowOf, valOf []int) {
	colPtr = make([]int, a.Cols+1)
	for _, j := range a.ColInd {
		colPtr[j+1]++
	}
	for j := 0; j < a.Cols; j++ {
		colPtr[j+1] += colPtr[j]
	}
	rowOf = make([]int, len(a.ColInd))
	valOf = make([]int, len(a.ColInd))
	next := slices.Clone(colPtr[:a.Cols])
	for i := 0; i < a.Rows; i++ {
		for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
			q := next[a.ColInd[p]]
			next[a.ColInd[p]]++
			rowOf[q] = i
			valOf[q] = p
		}
	}
	return colPtr, rowOf, valOf
}
