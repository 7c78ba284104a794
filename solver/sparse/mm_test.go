package sparse

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestMatrixMarketRoundTrip writes and reads back random matrices; values
// written with 17 digits must come back bit for bit (IEEE 754 round trip,
// Goldberg 1991, ACM Computing Surveys 23).
func TestMatrixMarketRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := 0; trial < 20; trial++ {
		a := randomSparse(rng, 1+rng.IntN(40), 0.1, trial%2 == 0)
		for p := range a.Val {
			a.Val[p] *= math.Pow(10, float64(rng.IntN(40)-20))
		}
		var buf bytes.Buffer
		if err := WriteMatrixMarket(&buf, a); err != nil {
			t.Fatal(err)
		}
		b, err := ReadMatrixMarket(&buf)
		if err != nil {
			t.Fatal(err)
		}
		if b.Rows != a.Rows || b.Cols != a.Cols || b.NNZ() != a.NNZ() {
			t.Fatalf("dims %d×%d nnz %d, want %d×%d nnz %d", b.Rows, b.Cols, b.NNZ(), a.Rows, a.Cols, a.NNZ())
		}
		for i := 0; i < a.Rows; i++ {
			for p := a.RowPtr[i]; p < a.RowPtr[i+1]; p++ {
				if got := b.At(i, a.ColInd[p]); got != a.Val[p] {
					t.Fatalf("(%d,%d) = %v, want %v", i, a.ColInd[p], got, a.Val[p])
				}
			}
		}
	}
	v := []float64{1, -2.5e-300, math.Pi, 0}
	var buf bytes.Buffer
	if err := WriteVector(&buf, v); err != nil {
		t.Fatal(err)
	}
	w, err := ReadVector(&buf)
	if err != nil {
		t.Fatal(err)
	}
	for i := range v {
		if w[i] != v[i] {
			t.Fatalf("vector[%d] = %v, want %v", i, w[i], v[i])
		}
	}
}

// TestMatrixMarketVariants reads the symmetric, skew-symmetric, pattern
// and integer variants of the format (NISTIR 5935 §3) and checks the
// expanded matrix.
func TestMatrixMarketVariants(t *testing.T) {
	cases := []struct {
		name, in string
		want     [][]float64
	}{
		{"symmetric", "%%MatrixMarket matrix coordinate real symmetric\n% comment\n3 3 4\n1 1 2\n2 1 -1\n3 2 0.5\n3 3 4\n",
			[][]float64{{2, -1, 0}, {-1, 0, 0.5}, {0, 0.5, 4}}},
		{"skew", "%%MatrixMarket matrix coordinate real skew-symmetric\n2 2 1\n2 1 3\n",
			[][]float64{{0, -3}, {3, 0}}},
		{"pattern", "%%MatrixMarket matrix coordinate pattern general\n2 3 2\n1 3\n2 1\n",
			[][]float64{{0, 0, 1}, {1, 0, 0}}},
		{"integer duplicates", "%%MatrixMarket matrix coordinate integer general\n\n2 2 3\n1 1 4\n1 1 -1\n2 2 7\n",
			[][]float64{{3, 0}, {0, 7}}},
		{"upper-case header", "%%MatrixMarket MATRIX Coordinate Real General\n1 1 1\n1 1 5\n", [][]float64{{5}}},
	}
	for _, c := range cases {
		a, err := ReadMatrixMarket(strings.NewReader(c.in))
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		for i := range c.want {
			for j, w := range c.want[i] {
				if g := a.At(i, j); g != w {
					t.Errorf("%s: (%d,%d) = %g, want %g", c.name, i, j, g, w)
				}
			}
		}
	}
}

func TestMatrixMarketErrors(t *testing.T) {
	cases := []struct {
		in   string
		line int
	}{
		{"", 1},
		{"%%MatrixMarket matrix coordinate complex general\n1 1 1\n1 1 1 0\n", 1},
		{"%%MatrixMarket matrix array real general\n1 1\n1\n", 1},
		{"%%MatrixMarket matrix coordinate real general\n2 2\n", 2},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n3 1 1\n", 3},
		{"%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n", 3},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 x\n", 3},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 NaN\n", 3},
		{"%%MatrixMarket matrix coordinate real symmetric\n2 2 1\n1 2 1\n", 3},
		{"%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 1\n2 2 2\n", 4},
		{"%%MatrixMarket matrix coordinate integer general\n2 2 1\n1 1 1.5\n", 3},
		{"%%MatrixMarket matrix coordinate real symmetric\n2 3 0\n", 2},
	}
	for _, c := range cases {
		_, err := ReadMatrixMarket(strings.NewReader(c.in))
		var me *MMError
		if !errors.As(err, &me) {
			t.Errorf("%q: got %v, want *MMError", c.in, err)
			continue
		}
		if me.Line != c.line {
			t.Errorf("%q: error at line %d, want %d (%v)", c.in, me.Line, c.line, err)
		}
	}
	if _, err := ReadVector(strings.NewReader("%%MatrixMarket matrix array real general\n2 2\n1\n2\n3\n4\n")); err == nil {
		t.Error("two-column array accepted as a vector")
	}
}

func FuzzReadMatrixMarket(f *testing.F) {
	f.Add("%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1.5\n2 2 -3\n")
	f.Add("%%MatrixMarket matrix coordinate pattern symmetric\n3 3 2\n2 1\n3 3\n")
	f.Add("%%MatrixMarket matrix coordinate integer skew-symmetric\n2 2 1\n2 1 4\n")
	f.Add("%%MatrixMarket matrix array real general\n2 1\n1\n2\n")
	f.Fuzz(func(t *testing.T, in string) {
		a, err := ReadMatrixMarket(strings.NewReader(in))
		if err == nil {
			if err := a.Check(); err != nil {
				t.Fatalf("reader returned an invalid matrix: %v", err)
			}
		}
		ReadVector(strings.NewReader(in))
	})
}
