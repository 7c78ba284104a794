package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tearline/solver/sparse"
)

// poisson2D is the 5-point Laplacian on a k×k grid (LeVeque 2007, Finite
// Difference Methods, §3.2), nonsingular with Dirichlet boundaries.
func poisson2D(k int) *sparse.CSR {
	t := sparse.NewTriplet(k*k, k*k)
	for j := 0; j < k; j++ {
		for i := 0; i < k; i++ {
			p := j*k + i
			t.Add(p, p, 4)
			if i > 0 {
				t.Add(p, p-1, -1)
			}
			if i < k-1 {
				t.Add(p, p+1, -1)
			}
			if j > 0 {
				t.Add(p, p-k, -1)
			}
			if j < k-1 {
				t.Add(p, p+k, -1)
			}
		}
	}
	return t.CSR()
}

func writeFile(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestBenchSolve(t *testing.T) {
	a := poisson2D(20)
	var mtx bytes.Buffer
	if err := sparse.WriteMatrixMarket(&mtx, a); err != nil {
		t.Fatal(err)
	}
	file := writeFile(t, "a.mtx", mtx.String())
	// b = A·x with x_i = i, for the --rhs run.
	x := make([]float64, a.Rows)
	for i := range x {
		x[i] = float64(i)
	}
	b := make([]float64, a.Rows)
	a.MulVec(b, x)
	var vb bytes.Buffer
	sparse.WriteVector(&vb, b)
	rhs := writeFile(t, "b.mtx", vb.String())

	for _, args := range [][]string{{"solve", file}, {"solve", file, "--rhs", rhs}, {"solve", "--rhs=" + rhs, file}} {
		var out, errb bytes.Buffer
		if code := benchCommand(args, &out, &errb); code != 0 {
			t.Fatalf("%v: exit %d, stderr %s", args, code, errb.String())
		}
		var r map[string]float64
		if err := json.Unmarshal(out.Bytes(), &r); err != nil {
			t.Fatalf("%v: output %q is not one JSON object: %v", args, out.String(), err)
		}
		for _, k := range []string{"n", "nnz", "nnz_factors", "order_s", "factor_s", "solve_s", "residual"} {
			if _, ok := r[k]; !ok {
				t.Errorf("%v: key %q missing in %s", args, k, out.String())
			}
		}
		if r["n"] != 400 || r["nnz"] != float64(a.NNZ()) {
			t.Errorf("%v: n=%v nnz=%v, want 400 and %d", args, r["n"], r["nnz"], a.NNZ())
		}
		// Design check V5: relative residual ≤ 1e-10.
		if !(r["residual"] <= 1e-10) {
			t.Errorf("%v: residual %v", args, r["residual"])
		}
		// The factors hold at least the matrix's own entries (fill only adds).
		if r["nnz_factors"] < r["nnz"] {
			t.Errorf("%v: nnz_factors %v < nnz %v", args, r["nnz_factors"], r["nnz"])
		}
	}
}

func TestBenchErrors(t *testing.T) {
	good := writeFile(t, "good.mtx", "%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n2 2 1\n")
	bad := writeFile(t, "bad.mtx", "%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n2 x 1\n")
	rect := writeFile(t, "rect.mtx", "%%MatrixMarket matrix coordinate real general\n2 3 1\n1 1 1\n")
	sing := writeFile(t, "sing.mtx", "%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n1 2 1\n")
	short := writeFile(t, "short.mtx", "%%MatrixMarket matrix array real general\n3 1\n1\n2\n3\n")
	cases := []struct {
		args []string
		code int
		want string
	}{
		{nil, 2, "usage"},
		{[]string{"--help"}, 0, ""},
		{[]string{"solve", "--help"}, 0, ""},
		{[]string{"factor"}, 2, "allowed: solve"},
		{[]string{"solve"}, 2, "missing FILE.mtx"},
		{[]string{"solve", good, "--bogus"}, 2, "allowed: --rhs"},
		{[]string{"solve", good, "--rhs"}, 2, "needs a file"},
		{[]string{"solve", filepath.Join(t.TempDir(), "none.mtx")}, 2, "none.mtx"},
		{[]string{"solve", bad}, 2, "bad.mtx: matrix market: line 4"},
		{[]string{"solve", rect}, 2, "square"},
		{[]string{"solve", sing}, 1, "singular"},
		{[]string{"solve", good, "--rhs", short}, 2, "3 entries"},
		{[]string{"solve", good, "--rhs", bad}, 2, "allowed: array"},
	}
	for _, c := range cases {
		var out, errb bytes.Buffer
		code := benchCommand(c.args, &out, &errb)
		if code != c.code {
			t.Errorf("%v: exit %d, want %d (stderr %q)", c.args, code, c.code, errb.String())
		}
		if c.want != "" && !strings.Contains(errb.String(), c.want) {
			t.Errorf("%v: stderr %q does not mention %q", c.args, errb.String(), c.want)
		}
		if c.code == 0 && !strings.Contains(out.String(), "usage: tearline bench solve") {
			t.Errorf("%v: help text missing", c.args)
		}
	}
}
