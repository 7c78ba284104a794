package sparse

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// TestGemmSub compares the tiled and row-split C −= A·B with one call of
// gonum's Dgemm for shapes around the tile boundaries.
func TestGemmSub(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	var pool gemmPool
	pool.start(3)
	defer pool.stop()
	for _, sh := range [][3]int{{1, 1, 1}, {2, 4, 3}, {3, 5, 7}, {7, 9, 32}, {33, 257, 32}, {130, 300, 17}, {301, 513, 32}} {
		m, n, k := sh[0], sh[1], sh[2]
		lda, ldb, ldc := k+3, n+1, n+2
		a := make([]float64, m*lda)
		b := make([]float64, k*ldb)
		c := make([]float64, m*ldc)
		for i := range a {
			a[i] = rng.NormFloat64()
		}
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		for i := range c {
			c[i] = rng.NormFloat64()
		}
		want := append([]float64(nil), c...)
		blas64.Implementation().Dgemm(blas.NoTrans, blas.NoTrans, m, n, k, -1, a, lda, b, ldb, 1, want, ldc)
		for _, par := range []bool{false, true} {
			got := append([]float64(nil), c...)
			if par {
				pool.sub(m, n, k, a, lda, b, ldb, got, ldc)
			} else {
				gemmSub(0, m, n, k, a, lda, b, ldb, got, ldc)
			}
			for i := range got {
				if math.Abs(got[i]-want[i]) > 1e-12*float64(k) {
					t.Fatalf("%v par=%v: element %d = %g, want %g", sh, par, i, got[i], want[i])
				}
			}
		}
	}
}
