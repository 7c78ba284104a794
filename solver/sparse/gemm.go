package sparse

import "sync"

// The Schur-complement update C −= A·B of a front is where a multifrontal
// factorisation spends its time. gemmSub packs B by blocks of four
// columns and computes C in 2×4 register blocks, so that each element of C
// is loaded and stored once per update and each loaded element of A and B
// feeds several multiply-adds (the register and cache blocking of Goto &
// van de Geijn 2008, ACM TOMS 34, "Anatomy of high-performance matrix
// multiplication", without assembly). It does not allocate once the
// packing buffer is large enough.

const (
	gemmColBlock = 256     // columns of B packed at a time (fits L2 with k ≤ 32)
	gemmParFlops = 1 << 21 // smallest update split between workers
)

// gemmSub computes C −= A·B for row-major A (m×k, stride lda), B (k×n,
// stride ldb) and C (m×n, stride ldc). pack is scratch, grown as needed,
// and returned.
func gemmSub(m, n, k int, a []float64, lda int, b []float64, ldb int, c []float64, ldc int, pack []float64) []float64 {
	if m == 0 || n == 0 || k == 0 {
		return pack
	}
	for j0 := 0; j0 < n; j0 += gemmColBlock {
		nb := min(gemmColBlock, n-j0)
		nb4 := (nb + 3) &^ 3
		if len(pack) < nb4*k {
			pack = make([]float64, nb4*k)
		}
		packB(nb, k, b[j0:], ldb, pack)
		gemmBlock(0, m, nb, k, a, lda, pack, c[j0:], ldc)
	}
	return pack
}

// packB stores columns 0…nb−1 of the k×nb block of B as groups of four:
// group g, row p holds B[p, 4g…4g+3] at pack[(g·k+p)·4 …], zero padded.
func packB(nb, k int, b []float64, ldb int, pack []float64) {
	for g := 0; g*4 < nb; g++ {
		dst := pack[g*k*4 : (g+1)*k*4]
		j := g * 4
		if j+4 <= nb {
			for p := 0; p < k; p++ {
				row := b[p*ldb+j : p*ldb+j+4]
				d := dst[p*4 : p*4+4]
				d[0], d[1], d[2], d[3] = row[0], row[1], row[2], row[3]
			}
			continue
		}
		for p := 0; p < k; p++ {
			d := dst[p*4 : p*4+4]
			for q := 0; q < 4; q++ {
				if j+q < nb {
					d[q] = b[p*ldb+j+q]
				} else {
					d[q] = 0
				}
			}
		}
	}
}

// gemmBlock updates rows i0…i1−1 of the nb columns of C from packed B.
func gemmBlock(i0, i1, nb, k int, a []float64, lda int, pack []float64, c []float64, ldc int) {
	i := i0
	for ; i+2 <= i1; i += 2 {
		a0 := a[i*lda : i*lda+k]
		a1 := a[(i+1)*lda : (i+1)*lda+k]
		c0 := c[i*ldc : i*ldc+nb]
		c1 := c[(i+1)*ldc : (i+1)*ldc+nb]
		for g := 0; g*4 < nb; g++ {
			bp := pack[g*k*4 : (g+1)*k*4]
			var s00, s01, s02, s03, s10, s11, s12, s13 float64
			for p := 0; p < k; p++ {
				bb := bp[p*4 : p*4+4 : p*4+4]
				x0, x1 := a0[p], a1[p]
				b0, b1, b2, b3 := bb[0], bb[1], bb[2], bb[3]
				s00 += x0 * b0
				s01 += x0 * b1
				s02 += x0 * b2
				s03 += x0 * b3
				s10 += x1 * b0
				s11 += x1 * b1
				s12 += x1 * b2
				s13 += x1 * b3
			}
			j := g * 4
			if j+4 <= nb {
				cc0 := c0[j : j+4 : j+4]
				cc1 := c1[j : j+4 : j+4]
				cc0[0] -= s00
				cc0[1] -= s01
				cc0[2] -= s02
				cc0[3] -= s03
				cc1[0] -= s10
				cc1[1] -= s11
				cc1[2] -= s12
				cc1[3] -= s13
			} else {
				s0 := [4]float64{s00, s01, s02, s03}
				s1 := [4]float64{s10, s11, s12, s13}
				for q := 0; j+q < nb; q++ {
					c0[j+q] -= s0[q]
					c1[j+q] -= s1[q]
				}
			}
		}
	}
	if i < i1 {
		a0 := a[i*lda : i*lda+k]
		c0 := c[i*ldc : i*ldc+nb]
		for g := 0; g*4 < nb; g++ {
			bp := pack[g*k*4 : (g+1)*k*4]
			var s0, s1, s2, s3 float64
			for p := 0; p < k; p++ {
				bb := bp[p*4 : p*4+4 : p*4+4]
				x0 := a0[p]
				s0 += x0 * bb[0]
				s1 += x0 * bb[1]
				s2 += x0 * bb[2]
				s3 += x0 * bb[3]
			}
			s := [4]float64{s0, s1, s2, s3}
			for q, j := 0, g*4; q < 4 && j+q < nb; q++ {
				c0[j+q] -= s[q]
			}
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
	i0, i1, nb, k int
	a             []float64
	lda           int
	pack          []float64
	c             []float64
	ldc           int
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
				gemmBlock(t.i0, t.i1, t.nb, t.k, t.a, t.lda, t.pack, t.c, t.ldc)
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

// sub computes C −= A·B like gemmSub, sharing rows with the pool's
// workers when the update is large.
func (p *gemmPool) sub(m, n, k int, a []float64, lda int, b []float64, ldb int, c []float64, ldc int, pack []float64) []float64 {
	if p.n <= 0 || m*n*k < gemmParFlops || m < 4*(p.n+1) {
		return gemmSub(m, n, k, a, lda, b, ldb, c, ldc, pack)
	}
	for j0 := 0; j0 < n; j0 += gemmColBlock {
		nb := min(gemmColBlock, n-j0)
		nb4 := (nb + 3) &^ 3
		if len(pack) < nb4*k {
			pack = make([]float64, nb4*k)
		}
		packB(nb, k, b[j0:], ldb, pack)
		parts := p.n + 1
		chunk := ((m+parts-1)/parts + 1) &^ 1
		p.wg.Add(parts - 1)
		for w := 1; w < parts; w++ {
			i0 := min(m, w*chunk)
			i1 := min(m, (w+1)*chunk)
			p.tasks <- gemmTask{i0: i0, i1: i1, nb: nb, k: k, a: a, lda: lda, pack: pack, c: c[j0:], ldc: ldc}
		}
		gemmBlock(0, min(m, chunk), nb, k, a, lda, pack, c[j0:], ldc)
		p.wg.Wait()
	}
	return pack
}
