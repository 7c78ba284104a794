package sparse

import (
	"math"
	"sort"
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// panelWidth is the number of pivots factored left-looking before a blocked
// update of the rest of the front (LAPACK's getrf organisation; Anderson et
// al. 1999, LAPACK Users' Guide).
const panelWidth = 32

// numeric holds the factors of every front. For supernode s with front
// size m = fm[s] and np = npiv[s] pivots, val[s] holds the first np columns
// of the factored front, row-major m×np (unit-lower L below the diagonal,
// U11 on and above it), followed by U12, row-major np×(m−np). idx[s] holds
// the front's m row indices then its m column indices, original numbering;
// the first np of each are the pivot rows and columns in pivot order.
type numeric struct {
	val  [][]float64
	idx  [][]int
	npiv []int
	fm   []int
	nnz  int
	cb   []cbInfo // contribution block of each supernode
	// wss[0…workers−1] factor independent subtrees; wss[len−1] the
	// supernodes above them (or everything, when serial).
	wss  []workspace
	errs []error
	wg   sync.WaitGroup
}

// cbInfo locates a contribution block on the stack of workspace ws.
type cbInfo struct {
	ws, off, ioff, m, ndelay int
}

type workspace struct {
	front          []float64
	stack          []float64
	istack         []int
	top, itop      int
	rowPos, colPos []int
	tmp, u         []float64
	cmap           []int
	rows, cols     []int
	pool           gemmPool
}

func growF(s []float64, n int) []float64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]float64, n, n+n/4)
}

func growI(s []int, n int) []int {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]int, n, n+n/4)
}

// treePlan assigns whole subtrees of the assembly tree to workers; the
// supernodes above them (top) are factored afterwards with the Schur
// updates split between all workers. Subtree-to-processor mapping as in
// Geist & Ng 1989 (Int. J. Parallel Programming 18, "Task scheduling for
// parallel sparse Cholesky factorization"), greedy by estimated flops.
type treePlan struct {
	workers int
	sub     [][]int // per worker: subtree roots
	size    []int   // supernodes in the subtree of s
	top     []int   // remaining supernodes, increasing (postorder)
}

func (sym *symbolic) planFor(workers int) *treePlan {
	if sym.plan != nil && sym.plan.workers == workers {
		return sym.plan
	}
	ns := len(sym.first) - 1
	p := &treePlan{workers: workers, sub: make([][]int, workers), size: make([]int, ns)}
	wt := make([]float64, ns)
	var total float64
	for sn := 0; sn < ns; sn++ {
		k := float64(sym.first[sn+1] - sym.first[sn])
		r := float64(sym.strPtr[sn+1] - sym.strPtr[sn])
		wt[sn] += 2*k*k*k/3 + 2*k*k*r + 2*k*r*r
		p.size[sn]++
		if q := sym.parent[sn]; q >= 0 {
			wt[q] += wt[sn]
			p.size[q] += p.size[sn]
		}
	}
	var list []int
	inTop := make([]bool, ns)
	for sn := 0; sn < ns; sn++ {
		if sym.parent[sn] < 0 {
			list = append(list, sn)
			total += wt[sn]
		}
	}
	// Split the heaviest subtree into its children until the heaviest
	// fits well inside one worker's share.
	for iter := 0; iter < 4*ns && len(list) > 0; iter++ {
		hi, sum := 0, 0.0
		for i, s := range list {
			sum += wt[s]
			if wt[s] > wt[list[hi]] {
				hi = i
			}
		}
		s := list[hi]
		kids := sym.kids[sym.kidPtr[s]:sym.kidPtr[s+1]]
		if wt[s] <= 0.4*sum || len(kids) == 0 || len(list) > 16*workers {
			break
		}
		inTop[s] = true
		list = append(list[:hi], list[hi+1:]...)
		list = append(list, kids...)
	}
	// Largest subtree first to the least loaded worker.
	sort.Slice(list, func(i, j int) bool { return wt[list[i]] > wt[list[j]] })
	load := make([]float64, workers)
	for _, s := range list {
		w := 0
		for i := range load {
			if load[i] < load[w] {
				w = i
			}
		}
		load[w] += wt[s]
		p.sub[w] = append(p.sub[w], s)
	}
	for sn := 0; sn < ns; sn++ {
		if inTop[sn] {
			p.top = append(p.top, sn)
		}
	}
	sym.plan = p
	return p
}

// factor computes the numeric factorisation of a for the analysed pattern.
// Pivots of magnitude ≤ tiny are refused.
func (num *numeric) factor(sym *symbolic, val []float64, tau, tiny float64, workers int) error {
	ns := len(sym.first) - 1
	if len(num.val) != ns {
		num.val = make([][]float64, ns)
		num.idx = make([][]int, ns)
		num.npiv = make([]int, ns)
		num.fm = make([]int, ns)
		num.cb = make([]cbInfo, ns)
	}
	n := sym.n
	// Tree parallelism pays only when there is enough work to share.
	if workers > 1 && (ns < 8*workers || sym.flops < 2e7) {
		workers = 1
	}
	if len(num.wss) != workers+1 {
		num.wss = make([]workspace, workers+1)
		num.errs = make([]error, workers+1)
	}
	for i := range num.wss {
		ws := &num.wss[i]
		if i == workers && cap(ws.stack) < sym.stackEst {
			ws.stack = make([]float64, sym.stackEst)
		}
		ws.stack = ws.stack[:cap(ws.stack)] // keep what earlier runs grew
		ws.rowPos = growI(ws.rowPos, n)
		ws.colPos = growI(ws.colPos, n)
		ws.top, ws.itop = 0, 0
		num.errs[i] = nil
	}
	topWS := workers
	ws := &num.wss[topWS]
	ws.pool.start(workers)
	defer ws.pool.stop()
	if workers == 1 {
		for sn := 0; sn < ns; sn++ {
			if err := num.factorFront(sym, sn, val, tau, tiny, topWS); err != nil {
				return err
			}
		}
	} else {
		plan := sym.planFor(workers)
		num.wg.Add(workers)
		for w := 0; w < workers; w++ {
			go num.factorSubtrees(sym, plan, w, val, tau, tiny)
		}
		num.wg.Wait()
		for w := 0; w < workers; w++ {
			if num.errs[w] != nil {
				return num.errs[w]
			}
		}
		for _, sn := range plan.top {
			if err := num.factorFront(sym, sn, val, tau, tiny, topWS); err != nil {
				return err
			}
		}
	}
	num.nnz = 0
	for sn := 0; sn < ns; sn++ {
		np, m := num.npiv[sn], num.fm[sn]
		num.nnz += np*np + 2*np*(m-np)
	}
	return nil
}

// factorSubtrees factors worker w's subtrees in workspace w.
func (num *numeric) factorSubtrees(sym *symbolic, plan *treePlan, w int, val []float64, tau, tiny float64) {
	defer num.wg.Done()
	for _, root := range plan.sub[w] {
		for sn := root - plan.size[root] + 1; sn <= root; sn++ {
			if err := num.factorFront(sym, sn, val, tau, tiny, w); err != nil {
				num.errs[w] = err
				return
			}
		}
	}
}

// factorFront assembles, factors and stores the front of supernode sn in
// workspace wi and pushes its contribution block there.
func (num *numeric) factorFront(sym *symbolic, sn int, val []float64, tau, tiny float64, wi int) error {
	ws := &num.wss[wi]
	kids := sym.kids[sym.kidPtr[sn]:sym.kidPtr[sn+1]]
	d := 0
	for _, c := range kids {
		d += num.cb[c].ndelay
	}
	f, l := sym.first[sn], sym.first[sn+1]
	k := l - f
	str := sym.strct[sym.strPtr[sn]:sym.strPtr[sn+1]]
	m := d + k + len(str)
	nfs := d + k

	// Index lists: delayed rows/columns from the children, own variables,
	// then the structure below.
	ws.rows = growI(ws.rows, m)
	ws.cols = growI(ws.cols, m)
	rows, cols := ws.rows, ws.cols
	t := 0
	for _, c := range kids {
		cb := num.cb[c]
		is := num.wss[cb.ws].istack
		copy(rows[t:], is[cb.ioff:cb.ioff+cb.ndelay])
		copy(cols[t:], is[cb.ioff+cb.m:cb.ioff+cb.m+cb.ndelay])
		t += cb.ndelay
	}
	for v := f; v < l; v++ {
		rows[t] = sym.perm[v]
		cols[t] = sym.perm[v]
		t++
	}
	copy(rows[t:], str)
	copy(cols[t:], str)
	for p := 0; p < m; p++ {
		ws.rowPos[rows[p]] = p
		ws.colPos[cols[p]] = p
	}

	ws.front = growF(ws.front, m*m)
	F := ws.front
	clear(F)
	// Original entries.
	for e := sym.asmPtr[sn]; e < sym.asmPtr[sn+1]; e++ {
		F[(int(sym.asmRow[e])+d)*m+int(sym.asmCol[e])+d] += val[sym.asmVal[e]]
	}
	// Extend-add of the children's contribution blocks.
	pop := -1
	for _, c := range kids {
		cb := num.cb[c]
		if cb.ws == wi && pop < 0 {
			pop = c
		}
		src := num.wss[cb.ws].stack[cb.off : cb.off+cb.m*cb.m]
		is := num.wss[cb.ws].istack[cb.ioff : cb.ioff+2*cb.m]
		mc := cb.m
		ws.cmap = growI(ws.cmap, mc)
		cm := ws.cmap
		for b := 0; b < mc; b++ {
			cm[b] = ws.colPos[is[mc+b]]
		}
		for r := 0; r < mc; r++ {
			dst := F[ws.rowPos[is[r]]*m:]
			srow := src[r*mc : r*mc+mc]
			for b, v := range srow {
				dst[cm[b]] += v
			}
		}
	}
	// The children factored in this workspace are on top of its stack.
	if pop >= 0 {
		ws.top = num.cb[pop].off
		ws.itop = num.cb[pop].ioff
	}

	np, bad, badMag := partialLU(F, m, nfs, rows, cols, tau, tiny, ws)
	if np < nfs && sym.parent[sn] == -1 {
		return &SingularError{Col: bad, Pivot: badMag}
	}

	// Store the factors.
	sz := m*np + np*(m-np)
	num.val[sn] = growF(num.val[sn], sz)
	v := num.val[sn]
	for i := 0; i < m; i++ {
		copy(v[i*np:i*np+np], F[i*m:i*m+np])
	}
	u12 := v[m*np:]
	mr := m - np
	for i := 0; i < np; i++ {
		copy(u12[i*mr:i*mr+mr], F[i*m+np:i*m+m])
	}
	num.idx[sn] = growI(num.idx[sn], 2*m)
	copy(num.idx[sn], rows[:m])
	copy(num.idx[sn][m:], cols[:m])
	num.npiv[sn] = np
	num.fm[sn] = m

	// Push the contribution block.
	cb := cbInfo{ws: wi, off: ws.top, ioff: ws.itop, m: mr, ndelay: nfs - np}
	if need := cb.off + mr*mr; need > len(ws.stack) {
		ns := make([]float64, need+need/4)
		copy(ns, ws.stack[:ws.top])
		ws.stack = ns
	}
	if need := cb.ioff + 2*mr; need > len(ws.istack) {
		ns := make([]int, need+need/4+64)
		copy(ns, ws.istack[:ws.itop])
		ws.istack = ns
	}
	dst := ws.stack[cb.off : cb.off+mr*mr]
	for i := 0; i < mr; i++ {
		copy(dst[i*mr:i*mr+mr], F[(np+i)*m+np:(np+i)*m+m])
	}
	copy(ws.istack[cb.ioff:], rows[np:m])
	copy(ws.istack[cb.ioff+mr:], cols[np:m])
	ws.top += mr * mr
	ws.itop += 2 * mr
	num.cb[sn] = cb
	return nil
}

// partialLU eliminates up to nfs pivots from the leading block of the
// row-major m×m front F, choosing pivot columns among the first nfs
// columns and pivot rows among the first nfs rows by threshold partial
// pivoting: a candidate is accepted if its magnitude is at least tau times
// the largest in its (updated) column, the diagonal entry preferred
// (Duff, Erisman & Reid 1986, Direct Methods for Sparse Matrices, §5.4).
// Rows, columns and the index lists are permuted in place. It returns the
// number of pivots np; when np < nfs, bad and badMag name the first column
// without an acceptable pivot and its largest candidate magnitude. After
// return F[np:, np:] holds the Schur complement.
func partialLU(F []float64, m, nfs int, rows, cols []int, tau, tiny float64, ws *workspace) (np, bad int, badMag float64) {
	ws.tmp = growF(ws.tmp, m)
	ws.u = growF(ws.u, panelWidth)
	tmp, u := ws.tmp, ws.u
	impl := blas64.Implementation()
	j := 0
	bad = -1
	for j < nfs {
		p0 := j
		// Candidate columns are [j, nc); a column that fails is moved to
		// [nc, nfs) and tried again in the next panel, after the blocked
		// update has brought it up to date.
		nc := nfs
		bad, badMag = -1, 0
		for j < p0+panelWidth && j < nc {
			found := false
			for q := j; q < nc; {
				w := j - p0
				// U entries of column q for the panel's pivots so far.
				for t := p0; t < j; t++ {
					s := F[t*m+q]
					lt := F[t*m+p0 : t*m+t]
					for r, lv := range lt {
						s -= lv * u[r]
					}
					u[t-p0] = s
				}
				cmax := 0.0
				uu := u[:w]
				for i := j; i < m; i++ {
					row := F[i*m+p0 : i*m+j]
					s := F[i*m+q] - dot(row, uu)
					tmp[i] = s
					cmax = max(cmax, math.Abs(s))
				}
				// Candidate row among the fully summed ones.
				best, bmag, diag := -1, 0.0, -1
				for i := j; i < nfs; i++ {
					if a := math.Abs(tmp[i]); a > bmag {
						best, bmag = i, a
					}
					if rows[i] == cols[q] {
						diag = i
					}
				}
				thr := tau * cmax
				r := -1
				if diag >= 0 && math.Abs(tmp[diag]) >= thr && math.Abs(tmp[diag]) > tiny {
					r = diag
				} else if best >= 0 && bmag >= thr && bmag > tiny {
					r = best
				}
				if r < 0 {
					if bad < 0 {
						bad, badMag = cols[q], bmag
					}
					nc--
					if q != nc {
						for i := 0; i < m; i++ {
							F[i*m+q], F[i*m+nc] = F[i*m+nc], F[i*m+q]
						}
						cols[q], cols[nc] = cols[nc], cols[q]
					}
					continue
				}
				// Accept: bring column q to j and row r to j.
				if q != j {
					for i := 0; i < m; i++ {
						F[i*m+q], F[i*m+j] = F[i*m+j], F[i*m+q]
					}
					cols[q], cols[j] = cols[j], cols[q]
				}
				if r != j {
					rr, rj := F[r*m:r*m+m], F[j*m:j*m+m]
					for c := range rr {
						rr[c], rj[c] = rj[c], rr[c]
					}
					rows[r], rows[j] = rows[j], rows[r]
					tmp[r], tmp[j] = tmp[j], tmp[r]
				}
				for t := p0; t < j; t++ {
					F[t*m+j] = u[t-p0]
				}
				piv := tmp[j]
				F[j*m+j] = piv
				inv := 1 / piv
				for i := j + 1; i < m; i++ {
					F[i*m+j] = tmp[i] * inv
				}
				found = true
				break
			}
			if !found {
				break
			}
			j++
		}
		// Blocked update of the rest of the front by the panel's pivots.
		w := j - p0
		if w > 0 && j < m {
			impl.Dtrsm(blas.Left, blas.Lower, blas.NoTrans, blas.Unit, w, m-j, 1, F[p0*m+p0:], m, F[p0*m+j:], m)
			ws.pool.sub(m-j, m-j, w, F[j*m+p0:], m, F[p0*m+j:], m, F[j*m+j:], m)
		}
		if w == 0 {
			break // no column of the remaining ones has an acceptable pivot
		}
	}
	return j, bad, badMag
}

func dot(a, b []float64) float64 {
	var s0, s1, s2, s3 float64
	n := len(a)
	b = b[:n]
	i := 0
	for ; i+4 <= n; i += 4 {
		s0 += a[i] * b[i]
		s1 += a[i+1] * b[i+1]
		s2 += a[i+2] * b[i+2]
		s3 += a[i+3] * b[i+3]
	}
	for ; i < n; i++ {
		s0 += a[i] * b[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// solve sets x = A⁻¹b from the factors; b is overwritten (it serves as
// the work vector indexed by original rows). w is scratch of length n.
func (num *numeric) solve(sym *symbolic, x, b, w []float64) {
	ns := len(num.val)
	// Forward substitution L·y = P·b, front by front in postorder.
	for sn := 0; sn < ns; sn++ {
		np, m := num.npiv[sn], num.fm[sn]
		if np == 0 {
			continue
		}
		v := num.val[sn]
		rows := num.idx[sn][:m]
		y := w[:np]
		for t := 0; t < np; t++ {
			s := b[rows[t]]
			lt := v[t*np : t*np+t]
			for r, lv := range lt {
				s -= lv * y[r]
			}
			y[t] = s
			b[rows[t]] = s
		}
		for i := np; i < m; i++ {
			b[rows[i]] -= dot(v[i*np:i*np+np], y)
		}
	}
	// Backward substitution U·z = y, fronts in reverse postorder.
	for sn := ns - 1; sn >= 0; sn-- {
		np, m := num.npiv[sn], num.fm[sn]
		if np == 0 {
			continue
		}
		v := num.val[sn]
		rows := num.idx[sn][:m]
		cols := num.idx[sn][m : 2*m]
		mr := m - np
		u12 := v[m*np:]
		z := w[:np]
		xr := w[np : np+mr]
		for i := 0; i < mr; i++ {
			xr[i] = x[cols[np+i]]
		}
		for t := np - 1; t >= 0; t-- {
			s := b[rows[t]] - dot(u12[t*mr:t*mr+mr], xr)
			ut := v[t*np+t+1 : t*np+np]
			s -= dot(ut, z[t+1:np])
			z[t] = s / v[t*np+t]
		}
		for t := 0; t < np; t++ {
			x[cols[t]] = z[t]
		}
	}
}
