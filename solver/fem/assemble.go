package fem

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"
	"sync/atomic"

	"tearline/solver/sparse"
)

// Assembly. The sparsity pattern is built once per mesh from the node
// graph: the unknowns of two nodes that share a triangle couple in full
// node blocks (a few structural zeros, e.g. P–ā, in exchange for a pattern
// that needs no field logic). Rows are sorted, so the pattern is a valid
// sparse.CSR.
//
// Parallel assembly uses element colouring: a greedy colouring gives every
// element a colour not used by any element sharing a vertex with it, so
// the elements of one colour touch disjoint unknowns and a bounded pool of
// workers (Options.Workers, default GOMAXPROCS) adds their contributions
// straight into the global vector and matrix without locks or races. The
// colours are processed one after another; within a colour the workers
// take chunks of elements from a shared counter. Each worker has its own
// preallocated scratch; after the first call nothing allocates.

// buildPattern builds the node adjacency in numbering order and the CSR
// pattern of the tangent.
func (p *Problem) buildPattern() error {
	d := p.Dofs
	nn := len(p.Mesh.X)
	ptr, adj := nodeGraph(p.Mesh)
	start := d.Start
	for i := 0; i < nn; i++ {
		row := adj[ptr[i]:ptr[i+1]]
		sort.Slice(row, func(a, b int) bool { return start[row[a]] < start[row[b]] })
	}
	off := make([]int, len(adj))
	width := make([]int, nn)
	for i := 0; i < nn; i++ {
		o := 0
		for k := ptr[i]; k < ptr[i+1]; k++ {
			off[k] = o
			o += d.Count(adj[k])
		}
		width[i] = o
	}
	nnz := 0
	for i := 0; i < nn; i++ {
		nnz += d.Count(i) * width[i]
	}
	if nnz < 0 || nnz > math.MaxInt32*8 {
		return fmt.Errorf("fem: tangent would have %d entries", nnz)
	}
	rowPtr := make([]int, d.N+1)
	colInd := make([]int, 0, nnz)
	for r := 0; r < d.N; r++ {
		i := d.NodeOf[r]
		for k := ptr[i]; k < ptr[i+1]; k++ {
			j := adj[k]
			for c := 0; c < d.Count(j); c++ {
				colInd = append(colInd, start[j]+c)
			}
		}
		rowPtr[r+1] = len(colInd)
	}
	p.adjPtr, p.adj, p.adjOff = ptr, adj, off
	p.K = &sparse.CSR{Rows: d.N, Cols: d.N, RowPtr: rowPtr, ColInd: colInd, Val: make([]float64, len(colInd))}
	return nil
}

// nodeOff returns the column offset of node j's block within the rows of
// node i (−1 if they do not share a triangle).
func (p *Problem) nodeOff(i, j int) int {
	lo, hi := p.adjPtr[i], p.adjPtr[i+1]
	sj := p.Dofs.Start[j]
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		switch s := p.Dofs.Start[p.adj[m]]; {
		case s < sj:
			lo = m + 1
		case s > sj:
			hi = m
		default:
			return p.adjOff[m]
		}
	}
	return -1
}

// pos returns the index in K.Val of entry (row unknown a, column unknown b).
func (p *Problem) pos(a, b int) int {
	na, nb := p.Dofs.NodeOf[a], p.Dofs.NodeOf[b]
	o := p.nodeOff(na, nb)
	if o < 0 {
		return -1
	}
	return p.K.RowPtr[a] + o + b - p.Dofs.Start[nb]
}

// buildColours colours the elements greedily so that no two elements of
// one colour share a vertex (and hence any node).
func (p *Problem) buildColours() error {
	m := p.Mesh
	mask := make([]uint64, m.NumCorners)
	col := make([]int, len(m.Tri))
	nc := 0
	for e, t := range m.Tri {
		used := mask[t[0]] | mask[t[1]] | mask[t[2]]
		c := 0
		for c < 64 && used&(1<<uint(c)) != 0 {
			c++
		}
		if c == 64 {
			return fmt.Errorf("fem: element %d needs more than 64 assembly colours (a vertex with too many triangles?)", e)
		}
		col[e] = c
		for k := 0; k < 3; k++ {
			mask[t[k]] |= 1 << uint(c)
		}
		if c+1 > nc {
			nc = c + 1
		}
	}
	p.colours = make([][]int, nc)
	cnt := make([]int, nc)
	for _, c := range col {
		cnt[c]++
	}
	for c := range p.colours {
		p.colours[c] = make([]int, 0, cnt[c])
	}
	for e, c := range col {
		p.colours[c] = append(p.colours[c], e)
	}
	return nil
}

// Assemble evaluates the residual at p.U (Full, and Res with constrained
// rows cleared) and, if tangent is true, the tangent K. It integrates the
// material from the committed state; the result becomes the committed one
// only through Commit. It returns an *ElementError (det F ≤ 0, non-finite
// stress, material failure) of the first failing element found.
func (p *Problem) Assemble(tangent bool) error {
	clear(p.Full)
	if tangent {
		clear(p.K.Val)
	}
	p.processZoneStart(tangent)
	if err := p.assembleElements(tangent); err != nil {
		return err
	}
	p.updateScales()
	for _, d := range p.fextList {
		p.Full[d] -= p.T * p.fext[d]
	}
	p.assembleFollower(tangent)
	p.addReleaseForces()
	if p.imbalance != nil && p.imbScale != 0 {
		for d, v := range p.imbalance {
			p.Full[d] -= p.imbScale * v
		}
	}
	p.refreshConstraints(true)
	p.processZoneFinish(tangent)
	copy(p.Res, p.Full)
	for _, d := range p.Full {
		if math.IsNaN(d) || math.IsInf(d, 0) {
			return errors.New("fem: non-finite residual")
		}
	}
	if len(p.constr) == 0 {
		return nil
	}
	diag := 1.0
	if tangent {
		diag = p.meanDiagonal()
	}
	if tangent && p.rate != nil {
		p.loadRate()
	}
	p.clearConstrained(tangent, diag)
	return nil
}

// assembleElements adds the element contributions to Full (and K), colour
// after colour, and returns the first error of the workers.
func (p *Problem) assembleElements(tangent bool) error {
	nw := len(p.workers)
	for i := range p.workers {
		p.workers[i].err = nil
	}
	for c, els := range p.colours {
		if nw == 1 || len(els) < 2*assemblyChunk {
			p.work(0, els, tangent)
			continue
		}
		// dynamic scheduling: the workers take chunks of the colour from a
		// shared counter, so a worker the scheduler delays holds up the
		// colour barrier by one chunk at most
		p.pool.next.Store(0)
		for i := 1; i < nw; i++ {
			p.pool.wg.Add(1)
			p.pool.jobs <- job{p: p, wi: i, colour: c, tangent: tangent}
		}
		p.workChunks(0, c, tangent)
		p.pool.wg.Wait()
	}
	var err error
	for i := range p.workers {
		if e := p.workers[i].err; e != nil && err == nil {
			err = e
		}
	}
	return err
}

// updateScales sets Scale from the element contributions of the active
// elements, summed in element order.
func (p *Problem) updateScales() {
	var sum [NumFields]float64
	for e, a := range p.active {
		if !a {
			continue
		}
		for f := range sum {
			sum[f] += p.elemScale[e][f]
		}
	}
	na := 0
	for _, a := range p.active {
		if a {
			na++
		}
	}
	for f := Field(0); f < NumFields; f++ {
		per := 3.0
		if f <= Uy {
			per = 6
		}
		p.Scale[f] = 0
		if na > 0 {
			p.Scale[f] = sum[f] / (per * float64(na))
		}
	}
	// The strain-like equations (tr E − θ, p − ā) get a floor of 1e-10
	// strain, so that unstrained states are not judged against round-off.
	for _, f := range [2]Field{Pressure, Lambda} {
		p.Scale[f] = math.Max(p.Scale[f], 1e-10*p.meanVol/3)
	}
}

// meanDiagonal returns the mean absolute diagonal of K over the free
// displacement unknowns (1 if there are none or it is zero): the value
// the identity rows of constrained unknowns get, so they do not spoil the
// conditioning.
func (p *Problem) meanDiagonal() float64 {
	diag := 1.0
	var s float64
	var n int
	for r := 0; r < p.Dofs.N; r++ {
		if p.Dofs.FieldOf[r] <= Uy && !p.Constrained(r) {
			if q := p.pos(r, r); q >= 0 {
				s += math.Abs(p.K.Val[q])
				n++
			}
		}
	}
	if n > 0 && s > 0 {
		diag = s / float64(n)
	}
	return diag
}

// clearConstrained clears the residual of the constrained unknowns and,
// if tangent, turns their rows and columns of K into identity rows with
// diagonal diag.
func (p *Problem) clearConstrained(tangent bool, diag float64) {
	for _, d := range p.constr {
		p.Res[d] = 0
		if !tangent {
			continue
		}
		for q := p.K.RowPtr[d]; q < p.K.RowPtr[d+1]; q++ {
			j := p.K.ColInd[q]
			p.K.Val[q] = 0
			if j != d {
				if t := p.pos(j, d); t >= 0 {
					p.K.Val[t] = 0
				}
			}
		}
		p.K.Val[p.pos(d, d)] = diag
	}
}

// work assembles a list of elements of one colour with worker wi's scratch.
func (p *Problem) work(wi int, els []int, tangent bool) {
	w := &p.workers[wi]
	if w.err != nil {
		return
	}
	for _, e := range els {
		if !p.active[e] {
			continue
		}
		w.scale = [NumFields]float64{}
		if err := p.element(e, p.U, w, tangent); err != nil {
			w.err = err
			return
		}
		p.elemScale[e] = w.scale
		p.scatter(e, w, tangent)
	}
}

// scatter adds the element residual and tangent held by w into the globals.
func (p *Problem) scatter(e int, w *worker, tangent bool) {
	nd := p.nd
	for a := 0; a < nd; a++ {
		p.Full[w.gd[a]] += w.re[a]
	}
	if !tangent {
		return
	}
	if z := p.pz; z != nil {
		for a := 0; a < nd; a++ {
			z.grad[w.gd[a]] += w.pzGrad[a]
		}
		z.elemValue[e] = w.pzValue
	}
	tri := &p.Mesh.Tri[e]
	for ka := 0; ka < 6; ka++ {
		for kb := 0; kb < 6; kb++ {
			w.pos[ka][kb] = p.nodeOff(tri[ka], tri[kb])
		}
	}
	// column offsets within the rows of each local node
	for ka := 0; ka < 6; ka++ {
		pr, o := &w.pos[ka], &w.colOff[ka]
		for b := 0; b < nd; b++ {
			o[b] = pr[p.locN[b]] + int(p.locOff[b])
		}
	}
	val := p.K.Val
	for a := 0; a < nd; a++ {
		base := p.K.RowPtr[w.gd[a]]
		o := w.colOff[p.locN[a]][:nd]
		row := w.ke[a][:nd]
		v := val[base:]
		for b, c := range o {
			v[c] += row[b]
		}
	}
}

// pool is the set of assembly goroutines of a problem (all but the
// caller's). It is separate from the Problem so that the goroutines do not
// keep the problem alive: a cleanup closes the pool when the problem
// becomes unreachable (or Close does so explicitly).
type pool struct {
	jobs chan job
	wg   sync.WaitGroup
	once sync.Once
	next atomic.Int64 // next element of the colour being assembled
}

type job struct {
	p       *Problem
	wi      int
	colour  int
	tangent bool
}

// assemblyChunk is the number of elements a worker takes at a time.
const assemblyChunk = 64

// workChunks assembles chunks of colour c until none is left.
func (p *Problem) workChunks(wi, c int, tangent bool) {
	els := p.colours[c]
	for {
		hi := int(p.pool.next.Add(assemblyChunk))
		lo := hi - assemblyChunk
		if lo >= len(els) {
			return
		}
		p.work(wi, els[lo:min(hi, len(els))], tangent)
	}
}

func newPool(n int) *pool {
	pl := &pool{jobs: make(chan job)}
	for i := 0; i < n; i++ {
		go pl.run()
	}
	return pl
}

func (pl *pool) run() {
	for j := range pl.jobs {
		j.p.workChunks(j.wi, j.colour, j.tangent)
		j = job{}
		pl.wg.Done()
	}
}

func (pl *pool) close() { pl.once.Do(func() { close(pl.jobs) }) }

// Close stops the problem's assembly goroutines. It is optional (they stop
// when the problem is garbage-collected); the problem must not be
// assembled afterwards.
func (p *Problem) Close() {
	if p.pool != nil {
		p.pool.close()
	}
}
