package sparse

import (
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// The Schur-complement update C −= A·B of a front is where a multifrontal
// factorisation spends its time. It goes to gonum's blas64 Dgemm in tiles
// small enough (gemmTileRows × gemmTileCols) that Dgemm stays on its serial
// path, which neither allocates nor starts goroutines; large updates are
// split by rows between the workers of a gemmPool instead.

const (
	gemmTileRows = 64
	gemmTileCols = 128
	gemmParFlops = 1 << 21 // smallest update (m·n·k) split between workers
)

// gemmSub computes C −= A·B for row-major A (m×k, stride lda), B (k×n,
// stride ldb) and C (m×n, stride ldc), rows i0…i1−1 of C only.
func gemmSub(i0, i1, n, k int, a []float64, lda int, b []float64, ldb int, c []float64, ldc int) {
	if i1 <= i0 || n == 0 || k == 0 {
		return
	}
	impl := blas64.Implementation()
	for r := i0; r < i1; r += gemmTileRows {
		mr := min(gemmTileRows, i1-r)
		for j := 0; j < n; j += gemmTileCols {
			nc := min(gemmTileCols, n-j)
			impl.Dgemm(blas.NoTrans, blas.NoTrans, mr, nc, k, -1, a[r*lda:], lda, b[j:], ldb, 1, c[r*ldc+j:], ldc)
		}
	}
}

// gemmPool splits large updates by rows between a fixed set of goroutines
// that live for one factorisation.
type gemmPool struct {
	tasks chan gemmTask
	wg    sync.WaitGroup
	n     int
}

type gemmTask struct {
	i0, i1, n, k int
	a            []float64
	lda          int
	b            []float64
	ldb          int
	c            []float64
	ldc          int
}

func (p *gemmPool) start(workers int) {
	p.n = workers - 1
	if p.n <= 0 {
		return
	}
	p.tasks = make(chan gemmTask, p.n)
	for w := 0; w < p.n; w++ {
		go func() {
			for t := range p.tasks {
				gemmSub(t.i0, t.i1, t.n, t.k, t.a, t.lda, t.b, t.ldb, t.c, t.ldc)
				p.wg.Done()
			}
		}()
	}
}

func (p *gemmPool) stop() {
	if p.n > 0 {
		close(p.tasks)
		p.n = 0
	}
}

// sub computes C −= A·B (m×n result), sharing rows with the pool's
// workers when the update is large.
func (p *gemmPool) sub(m, n, k int, a []float64, lda int, b []float64, ldb int, c []float64, ldc int) {
	if p.n <= 0 || m*n*k < gemmParFlops || m < 2*gemmTileRows {
		gemmSub(0, m, n, k, a, lda, b, ldb, c, ldc)
		return
	}
	parts := p.n + 1
	chunk := (m + parts - 1) / parts
	p.wg.Add(parts - 1)
	for w := 1; w < parts; w++ {
		p.tasks <- gemmTask{i0: min(m, w*chunk), i1: min(m, (w+1)*chunk), n: n, k: k, a: a, lda: lda, b: b, ldb: ldb, c: c, ldc: ldc}
	}
	gemmSub(0, min(m, chunk), n, k, a, lda, b, ldb, c, ldc)
	p.wg.Wait()
}
