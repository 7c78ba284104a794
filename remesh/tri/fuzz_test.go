package tri

import (
	"math"
	"math/rand"
	"os"
	"testing"

	"tearline/solver/plane"
)

// fuzzPolygon turns fuzz bytes into an input: a star-shaped (hence simple)
// polygon, the same points in scrambled order (usually self-intersecting),
// a star-shaped polygon snapped to a coarse grid (collinear runs, repeated
// points), or a star-shaped polygon with a small hole.
func fuzzPolygon(data []byte) (in *Input, simple bool, area float64, opt *Options) {
	in, simple, area, opt, _ = fuzzDomain(data)
	return
}

// fuzzArc is a circle on which the sub-segments of one mark lie.
type fuzzArc struct {
	c [2]float64
	r float64
}

// fuzzDomain is fuzzPolygon with, in a fifth mode, some star edges replaced
// by shallow circular arcs (bulging in or out) that Options.Split follows.
func fuzzDomain(data []byte) (in *Input, simple bool, area float64, opt *Options, arcs map[int]fuzzArc) {
	at := func(i int) float64 { // byte i as a number in [0, 1)
		if len(data) == 0 {
			return 0.5
		}
		return float64(data[i%len(data)]) / 256
	}
	// Angular gaps with weights in [1, 2] and n ≥ 4 stay below 0.8π, so the
	// polygon is star-shaped about the origin, and its edges keep a distance
	// ≥ 0.1·cos(0.4π) ≈ 0.031 from it.
	n := 4 + int(at(0)*24)
	mode := int(at(1) * 5)
	pts := make([][2]float64, n)
	w := make([]float64, n)
	total := 0.0
	for k := range w {
		w[k] = 1 + at(2+2*k)
		total += w[k]
	}
	ang := 0.0
	for k := 0; k < n; k++ {
		ang += w[k] / total * 2 * math.Pi
		r := 0.1 + at(3+2*k)
		pts[k] = [2]float64{r * math.Cos(ang), r * math.Sin(ang)}
	}
	in = &Input{Points: pts, Segments: loop(0, n)}
	simple = true
	switch mode {
	case 1:
		for k := 0; k < n; k++ {
			j := int(at(5+k) * float64(n))
			pts[k], pts[j] = pts[j], pts[k]
		}
		simple = false
	case 2:
		for k := range pts {
			pts[k][0] = math.Round(pts[k][0]*8) / 8
			pts[k][1] = math.Round(pts[k][1]*8) / 8
		}
		simple = false
	case 3:
		hole := circleLoop([2]float64{0, 0}, 0.005+0.02*at(7), 3+int(at(8)*6), true)
		in.Points = append(in.Points, hole...)
		in.Segments = append(in.Segments, loop(n, len(hole))...)
		in.Holes = [][2]float64{{0, 0}}
	}
	in.SegmentMarks = make([]int, len(in.Segments))
	for k := range in.SegmentMarks {
		in.SegmentMarks[k] = k % 5
	}
	opt = &Options{MinAngle: 34 * at(9), MaxPoints: 20000}
	if h := at(10); h > 0.3 {
		opt.Size = func(x, y float64) float64 { return 0.02 + h*math.Hypot(x, y) }
	}
	if mode == 4 {
		arcs = map[int]fuzzArc{}
		for k := 0; k < n; k++ {
			if at(11+k) < 0.5 {
				continue
			}
			a, b := pts[k], pts[(k+1)%n]
			mid := [2]float64{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
			d := sub(b, a)
			L := math.Hypot(d[0], d[1])
			nrm := [2]float64{-d[1] / L, d[0] / L} // towards the inside
			f := 1.5 + 3*at(40+k)                  // centre at f·L from the chord
			if at(70+k) < 0.5 {
				f = -f // bulging inwards
			}
			c := [2]float64{mid[0] + f*L*nrm[0], mid[1] + f*L*nrm[1]}
			in.SegmentMarks[k] = 100 + k
			arcs[100+k] = fuzzArc{c, plane.Dist(a, c)}
		}
		opt.Split = func(mark int, a, b [2]float64) [2]float64 {
			m := [2]float64{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
			ar, ok := arcs[mark]
			if !ok {
				return m
			}
			d := sub(m, ar.c)
			l := math.Hypot(d[0], d[1])
			return [2]float64{ar.c[0] + ar.r*d[0]/l, ar.c[1] + ar.r*d[1]/l}
		}
		simple = false // the arcs change the area
	}
	area = math.Abs(polyArea(pts))
	if mode == 3 {
		area -= math.Abs(polyArea(in.Points[n:]))
	}
	return in, simple, area, opt, arcs
}

// FuzzTriangulate: every input ends in a valid mesh or an error — never a
// panic or an endless loop (MaxPoints bounds the work).
func FuzzTriangulate(f *testing.F) {
	f.Add([]byte{0})
	f.Add([]byte{200, 10, 7, 99, 3, 250, 1, 1, 80, 200, 120})
	f.Add([]byte{100, 100, 20, 30, 40, 50, 60, 70, 80, 90, 255})
	f.Add([]byte{255, 180, 0, 0, 0, 0, 0, 0, 0, 0})
	f.Add([]byte{17, 240, 33, 1, 2, 3, 4, 5, 6, 7, 8, 9})
	f.Add([]byte{250, 70, 1, 2, 250, 250, 3, 1, 1, 255, 0, 77})
	f.Add(inwardSeed)
	f.Fuzz(func(t *testing.T, data []byte) {
		in, simple, area, opt, arcs := fuzzDomain(data)
		m, err := Triangulate(in, opt)
		if err != nil {
			return
		}
		if err := Check(m); err != nil {
			t.Fatalf("invalid mesh without error: %v", err)
		}
		green := 0.0
		for j, s := range m.Segments {
			a, b := m.Points[s[0]], m.Points[s[1]]
			green += 0.5 * (a[0]*b[1] - b[0]*a[1])
			if ar, ok := arcs[m.SegmentMarks[j]]; ok {
				for _, p := range [2][2]float64{a, b} {
					// points off the arc only where the mesher had to split on the chord
					if r := plane.Dist(p, ar.c); math.Abs(r-ar.r) > 0.5*ar.r {
						t.Fatalf("arc point %v at radius %g, arc radius %g", p, r, ar.r)
					}
				}
			}
		}
		if got := meshArea(m); in.Holes == nil && math.Abs(got-math.Abs(green)) > 1e-9*got {
			t.Fatalf("area %.15g, enclosed by the sub-segments %.15g", got, green)
		}
		if simple {
			if got := meshArea(m); math.Abs(got-area) > 1e-9*area {
				t.Fatalf("area %.15g, polygon %.15g", got, area)
			}
		}
	})
}

// TestRandomDomainsLong runs the fuzz property on 50 000 pseudo-random inputs
// of every mode (set TEARLINE_LONG=1; about half a minute).
func TestRandomDomainsLong(t *testing.T) {
	if os.Getenv("TEARLINE_LONG") != "1" {
		t.Skip("set TEARLINE_LONG=1")
	}
	r := rand.New(rand.NewSource(2026))
	meshes := 0
	for i := 0; i < 50000; i++ {
		b := make([]byte, 12+r.Intn(100))
		r.Read(b)
		in, simple, area, opt, _ := fuzzDomain(b)
		m, err := Triangulate(in, opt)
		if err != nil {
			continue
		}
		meshes++
		if err := Check(m); err != nil {
			t.Fatalf("input %d (%x): %v", i, b, err)
		}
		if got := meshArea(m); simple && math.Abs(got-area) > 1e-9*area {
			t.Fatalf("input %d (%x): area %.15g, polygon %.15g", i, b, got, area)
		}
	}
	t.Logf("%d of %d inputs meshed, the others rejected with an error", meshes, 50000)
}
