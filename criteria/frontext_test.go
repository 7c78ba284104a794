package criteria

import (
	"math"
	"testing"
)

// frontField is a prescribed nodal porosity whose contour f = frontLevel
// is known in closed form: the front of a crack along +x from the origin
// whose extension is a.
type frontField struct {
	name string
	f    func(x [2]float64, a float64) float64
}

const frontLevel, frontW = 0.04, 0.1

var frontFields = []frontField{
	// f = f_level·(1 + (a − x)/w): the straight front x = a.
	{"straight", func(x [2]float64, a float64) float64 { return frontLevel * (1 + (a-x[0])/frontW) }},
	// f = f_level·(1 + (R − |x − c|)/w), c = (a − R, 0): the circle of
	// radius R = 0.3 whose point farthest along +x is (a, 0).
	{"circle", func(x [2]float64, a float64) float64 {
		const r = 0.3
		return frontLevel * (1 + (r-math.Hypot(x[0]-(a-r), x[1]))/frontW)
	}},
}

// rotateMesh turns the nodes of a mesh about the origin by th: the same
// elements at another angle to a fixed field.
func rotateMesh(xs [][2]float64, th float64) [][2]float64 {
	c, s := math.Cos(th), math.Sin(th)
	out := make([][2]float64, len(xs))
	for i, x := range xs {
		out[i] = [2]float64{c*x[0] - s*x[1], s*x[0] + c*x[1]}
	}
	return out
}

// TestFrontExtension checks DAFront's measure (frontExtension on the
// contour of a prescribed nodal field) against the closed-form front
// position a, for fronts between nodes (a = 0.5 + k·h/5) along a path on
// the crack axis that ends at the last node before the front, as a
// node-based measure would see it; on the mesh at 0°, 17° and 40° to the
// field. References: the closed-form level sets of frontFields; the bound
// of 1% of h is the linear interpolation error of the circle's cone on
// sub-triangle edges, about h²/(32R) (Taylor's theorem, common practice).
// The measure must also grow with a (no jumps back at the nodes).
func TestFrontExtension(t *testing.T) {
	const h = 0.025
	base := gridMesh(-1, 1.5, -1, 1, 100, 80, true)
	for _, ff := range frontFields {
		for _, deg := range []float64{0, 17, 40} {
			m := *base
			m.X = rotateMesh(base.X, deg*math.Pi/180)
			prev := math.Inf(-1)
			for k := 0; k <= 5; k++ {
				a := 0.5 + float64(k)*h/5
				f := make([]float64, len(m.X))
				for n, x := range m.X {
					f[n] = ff.f(x, a)
				}
				lines := contour(&m, f, frontLevel)
				path := [][2]float64{{0, 0}, {math.Floor(a/h+1e-9) * h, 0}}
				got := frontExtension(lines, path, 2*h)
				t.Logf("%s %2.0f° a = %.4f: DAFront − a = %+.2e (%.2f%% of h)", ff.name, deg, a, got-a, 100*(got-a)/h)
				if math.Abs(got-a) > 0.01*h {
					t.Errorf("%s at %g°: a = %.5f, DAFront = %.5f: off by more than 1%% of h", ff.name, deg, a, got)
				}
				if got < prev {
					t.Errorf("%s at %g°: DAFront falls from %.6f to %.6f as a grows to %.5f", ff.name, deg, prev, got, a)
				}
				prev = got
			}
		}
	}
}

// TestLocateFrontDAFront follows the circular front of TestFrontExtension
// through the whole tip search (locateTips on the nodal field, its own
// path, whose end wanders off the axis at 0°), on the mesh at 0° and 17°:
// DAFront stays within 1% of h of the closed-form a, as in
// TestFrontExtension (the measure does not depend on where along the front
// the path ends).
func TestLocateFrontDAFront(t *testing.T) {
	const h = 0.025
	base := gridMesh(-1, 1.5, -1, 1, 100, 80, true)
	circle := frontFields[1]
	for _, deg := range []float64{0, 17} {
		m := *base
		m.X = rotateMesh(base.X, deg*math.Pi/180)
		for k := 0; k <= 5; k++ {
			a := 0.5 + float64(k)*h/5
			f := make([]float64, len(m.X))
			for n, x := range m.X {
				f[n] = circle.f(x, a)
			}
			opt := FrontOptions{Fc: frontLevel / 2, Tips: []Tip{{Dir: [2]float64{1, 0}}}}
			tp := locateTips(&m, f, frontLevel, opt, contour(&m, f, frontLevel))[0]
			t.Logf("%2.0f° a = %.4f: DA − a = %+.2e, DAFront − a = %+.2e (of h: %+.1f%%, %+.1f%%)",
				deg, a, tp.DA-a, tp.DAFront-a, 100*(tp.DA-a)/h, 100*(tp.DAFront-a)/h)
			if math.Abs(tp.DAFront-a) > 0.01*h {
				t.Errorf("%g° a = %.5f: DAFront %.6f off by more than 1%% of h", deg, a, tp.DAFront)
			}
		}
	}
}
