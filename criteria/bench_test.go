package criteria

import "testing"

// BenchmarkDomainJ measures the domain integral on a cracked disk of about
// 10⁵ elements with three rings.
func BenchmarkDomainJ(b *testing.B) {
	m := crackedDisk(1, 200, 256, [2]float64{0, 0}, [2]float64{1, 0})
	k := KField{K: 50, El: Elastic{E: 200e3, Nu: 0.3}, Dir: [2]float64{1, 0}}
	gp := gaussFrom(m, williamsGauss(k, 0))
	opt := JOptions{Dir: [2]float64{1, 0}, Rings: []Ring{{0.1, 0.3}, {0.3, 0.6}, {0.5, 0.9}}}
	b.ReportMetric(float64(len(m.Tri)), "elements")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := DomainJ(m, gp, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLocateFront measures front and tip location on a mesh of about
// 10⁵ elements with a straight damage band of 200 elements' length.
func BenchmarkLocateFront(b *testing.B) {
	m := gridMesh(-0.5, 1.5, -1, 1, 224, 224, true)
	gp := gaussFrom(m, porosity([]band{{[][2]float64{{0, 0}, {0.9, 0}}, 0.05}}))
	opt := FrontOptions{Fc: 0.025, FTip: 0.1, Tips: []Tip{{Dir: [2]float64{1, 0}}}}
	b.ReportMetric(float64(len(m.Tri)), "elements")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := LocateFront(m, gp, opt); err != nil {
			b.Fatal(err)
		}
	}
}
