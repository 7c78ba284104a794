package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"time"

	"tearline/solver/sparse"
)

const benchUsage = `usage: tearline bench solve FILE.mtx [--rhs FILE.mtx]

Orders, factors and solves the sparse system in FILE.mtx (Matrix Market
coordinate format: real, integer or pattern; general, symmetric or
skew-symmetric) and prints one JSON object:
  n, nnz        size and entries of the matrix
  nnz_factors   entries in L and U
  order_s       ordering and symbolic analysis, seconds
  factor_s      numeric factorisation, seconds
  solve_s       solve with iterative refinement, seconds
  residual      ‖Ax − b‖₂ / ‖b‖₂

--rhs FILE.mtx  right-hand side b in Matrix Market array format (n 1);
                without it b = A·1.

Exit status: 0 solved, 1 the solver failed (singular matrix), 2 bad input.
`

// benchResult is the JSON printed by tearline bench solve.
type benchResult struct {
	N          int     `json:"n"`
	NNZ        int     `json:"nnz"`
	NNZFactors int     `json:"nnz_factors"`
	OrderS     float64 `json:"order_s"`
	FactorS    float64 `json:"factor_s"`
	SolveS     float64 `json:"solve_s"`
	Residual   float64 `json:"residual"`
}

// benchCommand implements "tearline bench ..."; args start after "bench".
func benchCommand(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, benchUsage)
		return 2
	}
	if args[0] == "--help" || args[0] == "-h" || args[0] == "help" {
		fmt.Fprint(stdout, benchUsage)
		return 0
	}
	if args[0] != "solve" {
		fmt.Fprintf(stderr, "tearline bench: unknown benchmark %q (allowed: solve)\n", args[0])
		return 2
	}
	var file, rhsFile string
	rest := args[1:]
	for i := 0; i < len(rest); i++ {
		a := rest[i]
		switch {
		case a == "--help" || a == "-h":
			fmt.Fprint(stdout, benchUsage)
			return 0
		case a == "--rhs":
			if i+1 >= len(rest) {
				fmt.Fprintln(stderr, "tearline bench solve: --rhs needs a file name")
				return 2
			}
			i++
			rhsFile = rest[i]
		case strings.HasPrefix(a, "--rhs="):
			rhsFile = strings.TrimPrefix(a, "--rhs=")
		case strings.HasPrefix(a, "-"):
			fmt.Fprintf(stderr, "tearline bench solve: unknown option %q (allowed: --rhs FILE.mtx, --help)\n", a)
			return 2
		case file == "":
			file = a
		default:
			fmt.Fprintf(stderr, "tearline bench solve: more than one matrix file (%q and %q)\n", file, a)
			return 2
		}
	}
	if file == "" {
		fmt.Fprint(stderr, "tearline bench solve: missing FILE.mtx\n"+benchUsage)
		return 2
	}
	a, err := readFile(file, sparse.ReadMatrixMarket)
	if err != nil {
		fmt.Fprintf(stderr, "tearline bench solve: %v\n", err)
		return 2
	}
	if a.Rows != a.Cols {
		fmt.Fprintf(stderr, "tearline bench solve: %s: matrix is %d×%d; a square matrix is needed\n", file, a.Rows, a.Cols)
		return 2
	}
	var b []float64
	if rhsFile != "" {
		b, err = readFile(rhsFile, sparse.ReadVector)
		if err != nil {
			fmt.Fprintf(stderr, "tearline bench solve: %v\n", err)
			return 2
		}
		if len(b) != a.Rows {
			fmt.Fprintf(stderr, "tearline bench solve: %s: right-hand side has %d entries; the matrix in %s has %d rows\n", rhsFile, len(b), file, a.Rows)
			return 2
		}
	} else {
		ones := make([]float64, a.Cols)
		for i := range ones {
			ones[i] = 1
		}
		b = make([]float64, a.Rows)
		a.MulVec(b, ones)
	}

	var lu sparse.LU
	t0 := time.Now()
	if err := lu.Analyze(a); err != nil {
		fmt.Fprintf(stderr, "tearline bench solve: %s: %v\n", file, err)
		return 2
	}
	t1 := time.Now()
	if err := lu.Factorize(a); err != nil {
		fmt.Fprintf(stderr, "tearline bench solve: %s: %v\n", file, err)
		var se *sparse.SingularError
		if errors.As(err, &se) {
			return 1
		}
		return 2
	}
	t2 := time.Now()
	x := make([]float64, a.Rows)
	if err := lu.Solve(x, b); err != nil {
		fmt.Fprintf(stderr, "tearline bench solve: %s: %v\n", file, err)
		return 1
	}
	t3 := time.Now()

	ax := make([]float64, a.Rows)
	a.MulVec(ax, x)
	var rn, bn float64
	for i := range ax {
		rn += (ax[i] - b[i]) * (ax[i] - b[i])
		bn += b[i] * b[i]
	}
	res := math.Sqrt(rn)
	if bn > 0 {
		res /= math.Sqrt(bn)
	}
	out := benchResult{
		N: a.Rows, NNZ: a.NNZ(), NNZFactors: lu.NNZ(),
		OrderS: t1.Sub(t0).Seconds(), FactorS: t2.Sub(t1).Seconds(), SolveS: t3.Sub(t2).Seconds(),
		Residual: res,
	}
	enc := json.NewEncoder(stdout)
	if err := enc.Encode(out); err != nil {
		fmt.Fprintf(stderr, "tearline bench solve: writing the result: %v\n", err)
		return 1
	}
	return 0
}

// readFile opens the file name and reads it with read; errors name the file.
func readFile[T any](name string, read func(io.Reader) (T, error)) (T, error) {
	f, err := os.Open(name)
	if err != nil {
		var zero T
		return zero, err
	}
	defer f.Close()
	v, err := read(f)
	if err != nil {
		err = fmt.Errorf("%s: %w", name, err)
	}
	return v, err
}
