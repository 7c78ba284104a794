package solver

import (
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/sparse"
)

// BenchmarkNewtonIteration measures one Newton iteration — assembly of
// residual and tangent, numeric LU factorisation (symbolic analysis done
// once, outside the timing) and solve — on a mixed (u–θ–P) mesh of about
// 5·10⁴ unknowns.
func BenchmarkNewtonIteration(b *testing.B) {
	m, err := fem.Structured(70, 70, fem.Rectangle(0, 0, 1, 1))
	if err != nil {
		b.Fatal(err)
	}
	mat, err := material.NewHencky(material.Elastic{Young: 200e3, Poisson: 0.3})
	if err != nil {
		b.Fatal(err)
	}
	bcs := fem.BCs{
		Symmetries:    []fem.Symmetry{{Label: "left", Comp: 0}, {Label: "bottom", Comp: 1}},
		Displacements: []fem.Displacement{{Label: "top", Fix: [2]bool{false, true}, Value: [2]float64{0, 1e-3}}},
	}
	p, err := fem.NewProblem(m, mat, fem.Options{}, bcs)
	if err != nil {
		b.Fatal(err)
	}
	defer p.Close()
	p.SetTime(1)
	if err := p.Assemble(true); err != nil {
		b.Fatal(err)
	}
	lu := &sparse.LU{}
	if err := lu.Analyze(p.K); err != nil {
		b.Fatal(err)
	}
	// one factorisation outside the timing allocates the LU's storage
	if err := lu.Factorize(p.K); err != nil {
		b.Fatal(err)
	}
	du := make([]float64, p.Dofs.N)
	rhs := make([]float64, p.Dofs.N)
	b.ReportMetric(float64(p.Dofs.N), "unknowns")
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := p.Assemble(true); err != nil {
			b.Fatal(err)
		}
		if err := lu.Factorize(p.K); err != nil {
			b.Fatal(err)
		}
		for j, r := range p.Res {
			rhs[j] = -r
		}
		if err := lu.Solve(du, rhs); err != nil {
			b.Fatal(err)
		}
	}
}
