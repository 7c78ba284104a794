package tri

import (
	"math"
	"testing"
)

// gradedInput is a 1 × 1 square meshed with h = 0.0002 + 0.018·r around
// (0.3, 0.4), capped at 0.05: fine near a point, coarse far (about 3·10⁵
// triangles).
func gradedInput() (*Input, func(x, y float64) float64) {
	in := &Input{Points: square(0, 0, 1, 1), Segments: loop(0, 4), SegmentMarks: []int{1, 2, 3, 4}}
	size := func(x, y float64) float64 {
		return math.Min(0.05, 0.0002+0.018*math.Hypot(x-0.3, y-0.4))
	}
	return in, size
}

// BenchmarkGraded300k measures refinement speed on a graded mesh of about
// 3·10⁵ triangles, reported as triangles per second.
func BenchmarkGraded300k(b *testing.B) {
	in, size := gradedInput()
	b.ReportAllocs()
	var ntri int
	for i := 0; i < b.N; i++ {
		m, err := Triangulate(in, &Options{Size: size})
		if err != nil {
			b.Fatal(err)
		}
		ntri = len(m.Triangles)
	}
	b.ReportMetric(float64(ntri), "triangles")
	b.ReportMetric(float64(ntri)*float64(b.N)/b.Elapsed().Seconds(), "triangles/s")
}
