package tri

import (
	"math"
	"testing"
)

// graded returns h = h0 + g·r around (0.3, 0.4), capped at 0.05: fine near a
// point, coarse far.
func graded(h0, g float64) func(x, y float64) float64 {
	return func(x, y float64) float64 {
		return math.Min(0.05, h0+g*math.Hypot(x-0.3, y-0.4))
	}
}

func benchTriangulate(b *testing.B, in *Input, size func(x, y float64) float64) {
	b.ReportAllocs()
	var ntri int
	for i := 0; i < b.N; i++ {
		m, err := Triangulate(in, &Options{Size: size})
		if err != nil {
			b.Fatal(err)
		}
		ntri = len(m.Triangles)
	}
	s := b.Elapsed().Seconds()
	b.ReportMetric(float64(ntri), "triangles")
	b.ReportMetric(float64(ntri)*float64(b.N)/s, "triangles/s")
}

func unitSquare() *Input {
	return &Input{Points: square(0, 0, 1, 1), Segments: loop(0, 4), SegmentMarks: []int{1, 2, 3, 4}}
}

// BenchmarkGraded300k: the unit square with h = 0.0002 + 0.018·r (about
// 3.2·10⁵ triangles), reported as triangles per second.
func BenchmarkGraded300k(b *testing.B) {
	benchTriangulate(b, unitSquare(), graded(0.0002, 0.018))
}

// BenchmarkGraded30k: the same kind of field, ten times fewer triangles (for
// memory per triangle against BenchmarkGraded300k).
func BenchmarkGraded30k(b *testing.B) {
	benchTriangulate(b, unitSquare(), graded(0.0006, 0.06))
}

// BenchmarkGradedDisk300k: a disk of radius 0.5 (512 chords, no Split) with
// the graded field: an irregular boundary, so few exactly cocircular points.
func BenchmarkGradedDisk300k(b *testing.B) {
	in := &Input{Points: circleLoop([2]float64{0.5, 0.5}, 0.5, 512, false), Segments: loop(0, 512)}
	benchTriangulate(b, in, graded(0.00015, 0.016))
}
