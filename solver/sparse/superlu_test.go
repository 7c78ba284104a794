package sparse

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"
)

// superLU runs testdata/splu_time.py (SciPy's SuperLU, scipy.sparse.linalg.splu)
// on the matrix file and returns its JSON result; xfile, if not empty,
// receives SuperLU's solution. It skips the test when /usr/bin/python3 or
// SciPy is missing.
func superLU(tb testing.TB, mtx, xfile string) map[string]float64 {
	tb.Helper()
	const py = "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		tb.Skip("no /usr/bin/python3")
	}
	if err := exec.Command(py, "-c", "import scipy.sparse.linalg, scipy.io").Run(); err != nil {
		tb.Skip("SciPy not importable by /usr/bin/python3")
	}
	args := []string{filepath.Join("testdata", "splu_time.py"), mtx}
	if xfile != "" {
		args = append(args, xfile)
	}
	out, err := exec.Command(py, args...).Output()
	if err != nil {
		tb.Fatalf("splu_time.py: %v", err)
	}
	var r map[string]float64
	if err := json.Unmarshal(out, &r); err != nil {
		tb.Fatalf("splu_time.py output %q: %v", out, err)
	}
	return r
}

func writeMTX(tb testing.TB, a *CSR) string {
	tb.Helper()
	p := filepath.Join(tb.TempDir(), "a.mtx")
	f, err := os.Create(p)
	if err != nil {
		tb.Fatal(err)
	}
	if err := WriteMatrixMarket(f, a); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	return p
}

// TestAgainstSuperLU solves a small mixed saddle-point FE system exported
// to Matrix Market with SciPy's SuperLU and with this package: the
// solutions agree and our residual is no worse than SuperLU's (within a
// factor 10, at the 1e-15 level).
func TestAgainstSuperLU(t *testing.T) {
	a := feSystem(feOptions{nc: 10, mixed: true, gradient: true, convection: 2, soft: 0.1, seed: 8})
	mtx := writeMTX(t, a)
	xfile := filepath.Join(t.TempDir(), "x.mtx")
	ref := superLU(t, mtx, xfile)
	f, err := os.Open(xfile)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	xs, err := ReadVector(f)
	if err != nil {
		t.Fatal(err)
	}
	var lu LU
	if err := lu.Factorize(a); err != nil {
		t.Fatal(err)
	}
	b := onesRHS(a)
	x := make([]float64, a.Rows)
	if err := lu.Solve(x, b); err != nil {
		t.Fatal(err)
	}
	res := relResidual(a, x, b)
	if res > max(10*ref["residual"], 1e-15) {
		t.Errorf("residual %g, SuperLU %g", res, ref["residual"])
	}
	for i := range x {
		if d := x[i] - xs[i]; d > 1e-8 || d < -1e-8 {
			t.Fatalf("x[%d] = %.15g, SuperLU %.15g", i, x[i], xs[i])
		}
	}
	t.Logf("n=%d: fill ours %d, SuperLU %v; residual ours %.2e, SuperLU %.2e", a.Rows, lu.NNZ(), ref["nnz_factors"], res, ref["residual"])
}

// BenchmarkVersusSuperLU times SciPy's SuperLU and this package's
// factorisation side by side on the same exported 2D mixed saddle-point
// matrix (nc=91: about 1e5 unknowns), reporting both times, fills and
// residuals. It is long (SuperLU alone takes minutes): run it with
// -bench VersusSuperLU -benchtime 1x.
func BenchmarkVersusSuperLU(b *testing.B) {
	a := feSystem(feOptions{nc: 91, mixed: true, gradient: true, convection: 1, soft: 0.05, seed: 1})
	mtx := writeMTX(b, a)
	for it := 0; it < b.N; it++ {
		ref := superLU(b, mtx, "")
		var lu LU
		t0 := time.Now()
		if err := lu.Analyze(a); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		if err := lu.Factorize(a); err != nil {
			b.Fatal(err)
		}
		t2 := time.Now()
		rhs := onesRHS(a)
		x := make([]float64, a.Rows)
		if err := lu.Solve(x, rhs); err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(a.Rows), "n")
		b.ReportMetric(t1.Sub(t0).Seconds(), "order_s")
		b.ReportMetric(t2.Sub(t1).Seconds(), "factor_s")
		b.ReportMetric(float64(lu.NNZ()), "nnz_factors")
		b.ReportMetric(ref["factor_s"], "superlu_factor_s")
		b.ReportMetric(ref["nnz_factors"], "superlu_nnz_factors")
		b.Logf("n=%d: factor %.3g s (SuperLU %.3g s), fill %d (SuperLU %.0f), residual %.2e (SuperLU %.2e)",
			a.Rows, t2.Sub(t1).Seconds(), ref["factor_s"], lu.NNZ(), ref["nnz_factors"], relResidual(a, x, rhs), ref["residual"])
	}
}
