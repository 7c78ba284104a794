package fem

import (
	"testing"

	"tearline/solver/material"
)

// BenchmarkAssembly measures the assembly rate (residual and tangent) on a
// mesh of about 10⁵ mixed elements (Hencky elasticity, a small
// homogeneous strain) with all cores and with one worker; the figure of
// merit is elements/s.
func BenchmarkAssembly(b *testing.B) {
	m, err := Structured(224, 224, Rectangle(0, 0, 1, 1))
	if err != nil {
		b.Fatal(err)
	}
	mat, err := material.NewHencky(material.Elastic{Young: 200e3, Poisson: 0.3})
	if err != nil {
		b.Fatal(err)
	}
	for _, bc := range []struct {
		name    string
		workers int
	}{{"all-cores", 0}, {"one-worker", 1}} {
		b.Run(bc.name, func(b *testing.B) {
			p, err := NewProblem(m, mat, Options{Workers: bc.workers}, BCs{})
			if err != nil {
				b.Fatal(err)
			}
			defer p.Close()
			for n, x := range m.X {
				p.U[p.Dofs.Of(n, Ux)] = 1e-3 * x[0]
				p.U[p.Dofs.Of(n, Uy)] = -5e-4 * x[1]
			}
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if err := p.Assemble(true); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(m.Tri))*float64(b.N)/b.Elapsed().Seconds(), "elements/s")
		})
	}
}
