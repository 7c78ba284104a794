package sparse

import (
	"fmt"
	"testing"
)

// Benchmarks on generated 2D mixed FE matrices (u in P2, θ, P, ā, λ in
// P1, two zero diagonal blocks, nonsymmetric couplings) of about 1e4,
// 5e4 and 2e5 unknowns. Run briefly, e.g.
//
//	go test -run XXX -bench FE -benchtime 2x ./solver/sparse/
//
// Each reports the fill (nnz_factors) and allocations; Factor refactors an
// analysed pattern, as a Newton iteration does.
var benchSizes = []struct {
	name string
	nc   int
}{{"1e4", 29}, {"5e4", 65}, {"2e5", 129}}

var benchCache = map[int]*CSR{}

func benchMatrix(nc int) *CSR {
	if a, ok := benchCache[nc]; ok {
		return a
	}
	a := feSystem(feOptions{nc: nc, mixed: true, gradient: true, convection: 1, soft: 0.05, seed: 1})
	benchCache[nc] = a
	return a
}

func BenchmarkFEOrder(b *testing.B) {
	for _, s := range benchSizes {
		b.Run(s.name, func(b *testing.B) {
			a := benchMatrix(s.nc)
			b.ReportAllocs()
			b.ResetTimer()
			for it := 0; it < b.N; it++ {
				var lu LU
				if err := lu.Analyze(a); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(a.Rows), "n")
		})
	}
}

func BenchmarkFEFactor(b *testing.B) {
	for _, s := range benchSizes {
		b.Run(s.name, func(b *testing.B) {
			a := benchMatrix(s.nc)
			var lu LU
			if err := lu.Factorize(a); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			for it := 0; it < b.N; it++ {
				if err := lu.Factorize(a); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(a.Rows), "n")
			b.ReportMetric(float64(a.NNZ()), "nnz")
			b.ReportMetric(float64(lu.NNZ()), "nnz_factors")
		})
	}
}

func BenchmarkFESolve(b *testing.B) {
	for _, s := range benchSizes {
		b.Run(s.name, func(b *testing.B) {
			a := benchMatrix(s.nc)
			var lu LU
			if err := lu.Factorize(a); err != nil {
				b.Fatal(err)
			}
			rhs := onesRHS(a)
			x := make([]float64, a.Rows)
			b.ReportAllocs()
			b.ResetTimer()
			for it := 0; it < b.N; it++ {
				if err := lu.Solve(x, rhs); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			if r := relResidual(a, x, rhs); r > 1e-10 {
				b.Fatalf("residual %g", r)
			}
			b.Logf("n=%d: residual %.2e", a.Rows, relResidual(a, x, rhs))
		})
	}
}

func ExampleLU() {
	// A 3×3 system with a zero diagonal entry (a saddle point):
	// [2 1 1; 1 2 1; 1 1 0]·x = (4, 4, 2), solution (1, 1, 1).
	t := NewTriplet(3, 3)
	for _, e := range [][3]float64{{0, 0, 2}, {0, 1, 1}, {0, 2, 1}, {1, 0, 1}, {1, 1, 2}, {1, 2, 1}, {2, 0, 1}, {2, 1, 1}} {
		t.Add(int(e[0]), int(e[1]), e[2])
	}
	a := t.CSR()
	var lu LU
	if err := lu.Factorize(a); err != nil {
		fmt.Println(err)
		return
	}
	x := make([]float64, 3)
	if err := lu.Solve(x, []float64{4, 4, 2}); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.6f\n", x)
	// Output: [1.000000 1.000000 1.000000]
}

func ExampleCSR_Pos() {
	// Build the pattern once, then re-assemble new values into it without
	// allocating, as each Newton iteration does.
	t := NewTriplet(2, 2)
	t.Add(0, 0, 0)
	t.Add(0, 1, 0)
	t.Add(1, 0, 0)
	t.Add(1, 1, 0)
	a := t.CSR()
	for iter := 1; iter <= 2; iter++ {
		a.Zero()
		for _, e := range [][3]float64{{0, 0, 2}, {1, 1, 3}, {0, 1, -1}, {0, 0, 1}} {
			a.Val[a.Pos(int(e[0]), int(e[1]))] += float64(iter) * e[2]
		}
		fmt.Println(a.At(0, 0), a.At(0, 1), a.At(1, 0), a.At(1, 1))
	}
	fmt.Println(a.Pos(5, 0))
	// Output:
	// 3 -1 0 3
	// 6 -2 0 6
	// -1
}
