package transfer

import (
	"math"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// benchMeshes returns a 64×64 perturbed square (8192 triangles, 16641
// nodes: 33282 displacement + 4 × 4225 corner unknowns ≈ 5·10⁴) as the old
// mesh, a different 66×62 one as the new mesh, and smooth fields on the old
// one with the stress work as Gauss-point data.
func benchMeshes() (old, nw *fem.Mesh, f *Fields) {
	old = squareMesh(64, 64, 0.25, 1)
	nw = squareMesh(66, 62, 0.25, 2)
	g := func(p [2]float64) float64 { return math.Sin(3*p[0]) * math.Cos(2*p[1]) }
	lin := make([]func([2]float64) float64, 4)
	for k := range lin {
		lin[k] = g
	}
	f = fieldsFrom(old, func(p [2]float64) [2]float64 { return [2]float64{g(p), -g(p)} }, lin,
		func(p [2]float64) material.State {
			v := 0.1 * (1 + g(p))
			return material.State{Ep: material.Sym{v, -v / 2, -v / 2, v / 5}, P: v, F: 0.001 + 0.01*v}
		}, work(g))
	return old, nw, f
}

func BenchmarkNewLocator(b *testing.B) {
	old, _, _ := benchMeshes()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := NewLocator(old, 1e-9); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLocateGaussPoints locates the ≈ 4.9·10⁴ Gauss points of the new
// mesh in the old one.
func BenchmarkLocateGaussPoints(b *testing.B) {
	old, nw, _ := benchMeshes()
	lc, err := NewLocator(old, 1e-9)
	if err != nil {
		b.Fatal(err)
	}
	x, _ := gaussGeometry(nw, fem.ElementRule(), 1)
	b.ReportAllocs()
	for b.Loop() {
		lc.LocateAll(x, 0)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(x)), "ns/point")
}

// BenchmarkMap is a whole transfer (index, nodes, Gauss points, recovery,
// evaluation, measures) of the ≈ 5·10⁴-unknown mesh.
func BenchmarkMap(b *testing.B) {
	old, nw, f := benchMeshes()
	for _, m := range []Method{PatchRecovery, L2Projection} {
		b.Run(m.String(), func(b *testing.B) {
			opt := DefaultOptions()
			opt.Method = m
			b.ReportAllocs()
			var rec *Record
			for b.Loop() {
				var err error
				if _, rec, err = Map(old, f, nw, opt); err != nil {
					b.Fatal(err)
				}
			}
			w := rec.Wall
			b.Logf("last run: index %v, nodes %v, locate %v, recover %v, evaluate %v, measure %v, total %v",
				w.Index, w.Nodes, w.Locate, w.Recover, w.Evaluate, w.Measure, w.Total)
		})
	}
}
