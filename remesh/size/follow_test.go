package size

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"tearline/criteria"
	"tearline/remesh/geom"
)

// discsDistance is the distance-like function of a tapered capsule from its
// definition, the minimum over its discs of |x − c(s)| − r(s), found by
// ternary search of the convex function of s (a numerical reference for
// the closed form of ZonePiece.distance).
func discsDistance(z *ZonePiece, x [2]float64) float64 {
	g := func(s float64) float64 {
		c := [2]float64{z.A[0] + s*(z.B[0]-z.A[0]), z.A[1] + s*(z.B[1]-z.A[1])}
		return math.Hypot(x[0]-c[0], x[1]-c[1]) - (z.RA + s*(z.RB-z.RA))
	}
	lo, hi := 0.0, 1.0
	for k := 0; k < 200; k++ {
		a, b := lo+(hi-lo)/3, hi-(hi-lo)/3
		if g(a) < g(b) {
			hi = b
		} else {
			lo = a
		}
	}
	return g(0.5 * (lo + hi))
}

func TestZonePieceDistance(t *testing.T) {
	// Closed-form minimiser against the definition (union of discs).
	rng := rand.New(rand.NewPCG(1, 2))
	for _, z := range []ZonePiece{
		{A: [2]float64{0, 0}, B: [2]float64{8, 0}, RA: 2, RB: 4},
		{A: [2]float64{1, 2}, B: [2]float64{-3, 5}, RA: 3, RB: 1},
		{A: [2]float64{0, 0}, B: [2]float64{0, 5}, RA: 2, RB: 2},
	} {
		for k := 0; k < 2000; k++ {
			x := [2]float64{rng.Float64()*24 - 12, rng.Float64()*24 - 12}
			got, want := z.distance(x), discsDistance(&z, x)
			if math.Abs(got-want) > 1e-12 {
				t.Fatalf("zone %+v at %v: distance %g, from the discs %g", z, x, got, want)
			}
		}
	}
}

func TestTipFieldSizes(t *testing.T) {
	const ell = 0.2
	o := DefaultFollowOptions(ell, 2)
	o.Ahead, o.Behind, o.Width, o.Spread = 6, 2, 2, 4
	hf, hw := o.hFine(), o.HWake()
	tips := []criteria.Tip{
		{Name: "right", X: [2]float64{3, 0}, Dir: [2]float64{1, 0}},
		{Name: "left", X: [2]float64{-3, 0}, Dir: [2]float64{-1, 0}},
		{Name: "turning", X: [2]float64{0, 4}, Dir: [2]float64{1, 1}},
	}
	// damaged points along the wake of the right tip, from x = 0 to 1.5 (the
	// zone starts 2ℓ = 0.4 behind the tip, at x = 2.6)
	var dmg [][2]float64
	for x := 0.0; x <= 1.5; x += 0.05 {
		dmg = append(dmg, [2]float64{x, 0.02})
	}
	feat := func(x, y float64) float64 {
		if math.Hypot(x-5, y+5) < 0.1 { // a load point with its own size
			return 0.01
		}
		return math.Inf(1)
	}
	f, err := NewTipField(tips, dmg, feat, o)
	if err != nil {
		t.Fatal(err)
	}
	zone := f.Zone()
	if len(zone.Pieces) != 3 || zone.HFine != hf || zone.HWake != hw {
		t.Fatalf("zone %+v, want 3 pieces, h_fine %g, h_wake %g", zone, hf, hw)
	}
	for _, c := range []struct {
		name string
		x    [2]float64
		want float64
	}{
		// in the zone: h_fine (by construction of the field, DESIGN.md §4)
		{"at right tip", [2]float64{3, 0}, hf},
		{"ahead of right tip", [2]float64{3 + 5.9*ell, 0.5 * ell}, hf},
		{"beside right tip", [2]float64{3, 1.9 * ell}, hf},
		{"at left tip", [2]float64{-3, 0}, hf},
		{"ahead of left tip", [2]float64{-3 - 5*ell, 0}, hf},
		{"along the turned direction", [2]float64{5 * ell * math.Sqrt2 / 2, 4 + 5*ell*math.Sqrt2/2}, hf},

		// far away: h_far
		{"far", [2]float64{0, -20}, o.HFar},
		// the feature size wins where it is smaller
		{"feature", [2]float64{5, -5}, 0.01},
	} {
		got := f.At(c.x[0], c.x[1])
		if math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s at %v: h = %g, want %g", c.name, c.x, got, c.want)
		}
	}
	if !(hw > hf) {
		t.Errorf("wake size %g is not coarser than the zone's %g", hw, hf)
	}
	// the wake: h ≤ h_wake at every damaged point and at most 10% finer
	// (the thinning allowance); graded by g away from them
	// (or the zone's graded size, where that is finer)
	for _, p := range dmg {
		lo := math.Min(0.9*hw, hf+o.Grading*math.Max(0, zone.distance(p)))
		if h := f.At(p[0], p[1]); h > hw || h < lo-1e-12 {
			t.Errorf("wake at damaged point %v: h = %g, want in [%g, %g]", p, h, lo, hw)
		}
	}
	if h, want := f.At(0.5, 0.32), hw+o.Grading*0.3; math.Abs(h-want) > 0.1*hw+1e-12 {
		t.Errorf("wake graded 0.3 from the damaged points: h = %g, want %g ± %g", h, want, 0.1*hw)
	}
}

func TestTipFieldGradation(t *testing.T) {
	// |∇h| ≤ g: sample |Δh|/|Δx| between grid neighbours and random pairs
	// (a minimum of g-Lipschitz functions is g-Lipschitz; the bound of a
	// graded size function, Persson 2006, Eng. Comput. 22).
	for _, g := range []float64{0.2, 0.3} {
		o := DefaultFollowOptions(0.1, 1)
		o.Grading = g
		tips := []criteria.Tip{
			{X: [2]float64{0, 0}, Dir: [2]float64{1, 0.3}},
			{X: [2]float64{1, 1}, Dir: [2]float64{-1, 0}},
		}
		var dmg [][2]float64
		for s := 0.0; s < 1; s += 0.01 {
			dmg = append(dmg, [2]float64{-s, 0.1 * math.Sin(5*s)})
		}
		f, err := NewTipField(tips, dmg, nil, o)
		if err != nil {
			t.Fatal(err)
		}
		const n, lo, hi = 300, -4.0, 4.0
		dx := (hi - lo) / n
		worst := 0.0
		prev := make([]float64, n+1)
		for j := 0; j <= n; j++ {
			y := lo + float64(j)*dx
			var left float64
			for i := 0; i <= n; i++ {
				x := lo + float64(i)*dx
				h := f.At(x, y)
				if i > 0 {
					worst = math.Max(worst, math.Abs(h-left)/dx)
				}
				if j > 0 {
					worst = math.Max(worst, math.Abs(h-prev[i])/dx)
				}
				left, prev[i] = h, h
			}
		}
		rng := rand.New(rand.NewPCG(3, 4))
		for k := 0; k < 20000; k++ {
			p := [2]float64{lo + rng.Float64()*(hi-lo), lo + rng.Float64()*(hi-lo)}
			q := [2]float64{p[0] + 0.05*rng.NormFloat64(), p[1] + 0.05*rng.NormFloat64()}
			d := math.Hypot(p[0]-q[0], p[1]-q[1])
			worst = math.Max(worst, math.Abs(f.At(p[0], p[1])-f.At(q[0], q[1]))/d)
		}
		if worst > g+1e-9 {
			t.Errorf("grading %g: largest sampled |Δh|/|Δx| = %g", g, worst)
		}
		if worst < 0.9*g { // the bound is reached on the grading slopes
			t.Errorf("grading %g: largest sampled |Δh|/|Δx| = %g, the field does not grade at its rate", g, worst)
		}
	}
}

func TestFollowValidate(t *testing.T) {
	for _, c := range []struct {
		name string
		mod  func(*FollowOptions)
		want string
	}{
		{"zero length", func(o *FollowOptions) { o.Length = 0 }, "Length"},
		{"kappa below 2", func(o *FollowOptions) { o.Kappa = 1.5 }, "Kappa"},
		{"grading above 1", func(o *FollowOptions) { o.Grading = 1.5 }, "Grading"},
		{"wake below 1", func(o *FollowOptions) { o.Wake = 0.5 }, "Wake"},
		{"h_far below wake", func(o *FollowOptions) { o.HFar = 0.1 }, "HFar"},
		{"negative behind", func(o *FollowOptions) { o.Behind = -1 }, "Behind"},
		{"taper too steep", func(o *FollowOptions) { o.Spread = 20 }, "Spread"},
		{"NaN ahead", func(o *FollowOptions) { o.Ahead = math.NaN() }, "Ahead"},
	} {
		t.Run(c.name, func(t *testing.T) {
			o := DefaultFollowOptions(1, 10)
			c.mod(&o)
			err := o.Validate()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one naming %q", err, c.want)
			}
			if _, err := NewTipField(nil, nil, nil, o); err == nil {
				t.Fatal("NewTipField accepted invalid options")
			}
		})
	}
	o := DefaultFollowOptions(1, 10)
	if err := o.Validate(); err != nil {
		t.Fatalf("defaults rejected: %v", err)
	}
	if _, err := NewTipField([]criteria.Tip{{X: [2]float64{0, 0}}}, nil, nil, o); err == nil || !strings.Contains(err.Error(), "direction") {
		t.Fatalf("zero tip direction: error %v", err)
	}
	if _, err := NewTipField(nil, [][2]float64{{math.NaN(), 0}}, nil, o); err == nil || !strings.Contains(err.Error(), "damaged point") {
		t.Fatalf("NaN damaged point: error %v", err)
	}
}

func TestInitialZone(t *testing.T) {
	// The zone of the initial SizeField: h = h_fine exactly where the
	// description says "inside" (both from the same capsule definition).
	s := &Field{Options: Options{HFine: 0.1, HFar: 5, FineRadius: 1, Grading: 0.25},
		Zones: []Zone{{From: [2]float64{0, 0}, To: [2]float64{3, 0}}}}
	z := InitialZone(s, 0.4)
	if z.HFine != 0.1 || z.HWake != 0.4 || len(z.Pieces) != 1 {
		t.Fatalf("zone %+v", z)
	}
	rng := rand.New(rand.NewPCG(7, 8))
	for k := 0; k < 5000; k++ {
		x := [2]float64{rng.Float64()*8 - 2, rng.Float64()*6 - 3}
		inside := z.Depth(x) > 1e-9
		fine := s.At(x[0], x[1]) == s.Options.HFine
		if inside && !fine {
			t.Fatalf("at %v: inside the zone description but h = %g", x, s.At(x[0], x[1]))
		}
		if !inside && z.Depth(x) < -1e-9 && fine {
			t.Fatalf("at %v: outside the zone description but h = h_fine", x)
		}
	}
}

// A size field with one tip growing in +x, ℓ = 0.2: h_fine = 0.1 at and
// ahead of the tip, graded at 0.25 outside the zone, h_far far away. By
// hand: the zone runs from (−0.4, 0), radius 0.4, to (1.2, 0), radius 0.8;
// (0, 1) is 0.4683 outside it (nearest disc at s = 0.658), so h = 0.1 +
// 0.25 × 0.4683; (−5, 5) is √(4.6² + 5²) − 0.4 = 6.394 from the back disc.
func ExampleTipField() {
	opt := DefaultFollowOptions(0.2, 2)
	opt.Ahead, opt.Behind, opt.Width, opt.Spread = 6, 2, 2, 4
	f, err := NewTipField([]criteria.Tip{{Name: "tip", X: [2]float64{0, 0}, Dir: [2]float64{1, 0}}}, nil, nil, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, x := range [][2]float64{{0, 0}, {1, 0}, {0, 1}, {-5, 5}, {40, 0}} {
		fmt.Printf("h(%g, %g) = %.4g\n", x[0], x[1], f.At(x[0], x[1]))
	}
	// Output:
	// h(0, 0) = 0.1
	// h(1, 0) = 0.1
	// h(0, 1) = 0.2171
	// h(-5, 5) = 1.699
	// h(40, 0) = 2
}

func TestFeatureSizes(t *testing.T) {
	// A C(T) half model: the pin hole at 0.5 and the load-line point at
	// 0.2; the size grows by the grading with the distance (definition), and
	// the combined field keeps the feature sizes and the grading bound.
	d, err := geom.DefaultCT().Domain()
	if err != nil {
		t.Fatal(err)
	}
	feat, err := FeatureSizes(d, map[string]float64{geom.LabelPin: 0.5}, map[string]float64{"loadline": 0.2}, 0.25)
	if err != nil {
		t.Fatal(err)
	}
	var pin *geom.Piece
	for i := 0; i < d.NumPieces(); i++ {
		if p, _, _ := d.Piece(i); p.Label == geom.LabelPin {
			pin = p
		}
	}
	ll := d.Points["loadline"].X
	for _, x := range [][2]float64{pin.At(0.3), ll, {ll[0] + 3, ll[1]}, {20, 20}} {
		want := math.Min(0.5+0.25*pin.Distance(x), 0.2+0.25*math.Hypot(x[0]-ll[0], x[1]-ll[1]))
		for i := 0; i < d.NumPieces(); i++ { // the nearest pin piece
			if p, _, _ := d.Piece(i); p.Label == geom.LabelPin {
				want = math.Min(want, 0.5+0.25*p.Distance(x))
			}
		}
		if got := feat(x[0], x[1]); math.Abs(got-want) > 1e-12 {
			t.Errorf("feature size at %v: %g, want %g", x, got, want)
		}
	}
	f, err := NewTipField([]criteria.Tip{{X: d.Points["tip"].X, Dir: d.Points["tip"].Dir}}, nil, feat, DefaultFollowOptions(0.2, 5))
	if err != nil {
		t.Fatal(err)
	}
	if got := f.At(ll[0], ll[1]); got != 0.2 {
		t.Errorf("field at the load line %g, want the feature's 0.2", got)
	}
	for _, c := range []struct {
		lab map[string]float64
		pt  map[string]float64
		g   float64
		bad string
	}{
		{map[string]float64{"nowhere": 1}, nil, 0.25, "no label"},
		{nil, map[string]float64{"nopoint": 1}, 0.25, "no point"},
		{map[string]float64{geom.LabelPin: -1}, nil, 0.25, "size"},
		{nil, nil, 0, "grading"},
	} {
		if _, err := FeatureSizes(d, c.lab, c.pt, c.g); err == nil || !strings.Contains(err.Error(), c.bad) {
			t.Errorf("FeatureSizes(%v, %v, %g): error %v, want one about %q", c.lab, c.pt, c.g, err, c.bad)
		}
	}
}

// BenchmarkTipFieldAt times one size query with two tips and 5000 damaged
// points (the mesher calls At for every candidate triangle).
func BenchmarkTipFieldAt(b *testing.B) {
	var dmg [][2]float64
	for i := 0; i < 5000; i++ {
		s := float64(i) / 5000
		dmg = append(dmg, [2]float64{-10 * s, 0.3 * math.Sin(20*s)})
	}
	f, err := NewTipField([]criteria.Tip{{X: [2]float64{0, 0}, Dir: [2]float64{1, 0}}, {X: [2]float64{-10, 0}, Dir: [2]float64{-1, 0}}}, dmg, nil, DefaultFollowOptions(0.2, 2))
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(9, 10))
	pts := make([][2]float64, 1024)
	for i := range pts {
		pts[i] = [2]float64{rng.Float64()*30 - 20, rng.Float64()*20 - 10}
	}
	b.ResetTimer()
	s := 0.0
	for i := 0; i < b.N; i++ {
		p := pts[i%len(pts)]
		s += f.At(p[0], p[1])
	}
	if s < 0 {
		b.Fatal(s)
	}
}
