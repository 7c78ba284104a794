package geom

import (
	"math"
	"strings"
	"tearline/solver/plane"
	"testing"
)

// specimenCase is a built-in specimen with its area in closed form.
type specimenCase struct {
	name string
	d    func() (*Domain, error)
	area float64
}

// notchStrip is ∫₀^ρ (√(R²−y²) − ρ) dy: the part of a disk of radius R
// about the origin taken by a crack slot of half-width ρ along −x up to
// x = −ρ (calculus: ∫√(R²−y²)dy = y√(R²−y²)/2 + R² asin(y/R)/2).
func notchStrip(R, r float64) float64 {
	return r*math.Sqrt(R*R-r*r)/2 + R*R*math.Asin(r/R)/2 - r*r
}

// barNotch is the area cut by the notch of a round bar in 0 ≤ z ≤ z₁ of
// the (r, z) section: ∫₀^z₁ (r_out − c + √(R_n²−z²)) dz.
func barNotch(p NotchedBar) float64 {
	c := p.MinRadius + p.NotchRadius
	z1 := p.notchHeight()
	Rn := p.NotchRadius
	return (p.OuterRadius-c)*z1 + z1*math.Sqrt(Rn*Rn-z1*z1)/2 + Rn*Rn*math.Asin(z1/Rn)/2
}

func specimenCases() []specimenCase {
	ssyH := DefaultSSY()
	ssy0 := SSY{Radius: 20}
	ssyF := SSY{Radius: 30, TipRadius: 0.5, Full: true}
	ct := DefaultCT()
	ctB := DefaultCT()
	ctB.TipRadius = 0.2
	ctF := ctB
	ctF.Full = true
	nb := DefaultNotchedBar()
	nbF := nb
	nbF.Full = true
	nbDeep := NotchedBar{MinRadius: 3, OuterRadius: 6, NotchRadius: 3, Length: 20}
	dent := DefaultDENT()
	W := ct.W
	n := 0.5 * ct.NotchWidthOverW * W
	an, a := ct.NotchOverW*W, ct.AOverW*W
	pin := math.Pi * math.Pow(0.125*W, 2)
	rb := ctB.TipRadius
	return []specimenCase{
		// Closed forms: areas of rectangles, disks and circular segments
		// (elementary geometry) and the integrals notchStrip, barNotch.
		{"ssy half sharp", ssy0.Domain, math.Pi * 400 / 2},
		{"ssy half blunt", ssyH.Domain, math.Pi*50*50/2 - notchStrip(50, 0.02) - math.Pi*0.02*0.02/4},
		{"ssy full blunt", ssyF.Domain, math.Pi*900 - 2*notchStrip(30, 0.5) - math.Pi*0.25/2},
		{"ct half sharp", ct.Domain, 1.25*W*0.6*W - (an+0.25*W)*n - pin},
		{"ct half blunt", ctB.Domain, 1.25*W*0.6*W - (an+0.25*W)*n - (a-rb-an)*rb - math.Pi*rb*rb/4 - pin},
		{"ct full blunt", ctF.Domain, 1.25*W*1.2*W - 2*(an+0.25*W)*n - 2*(a-rb-an)*rb - math.Pi*rb*rb/2 - 2*pin},
		{"notched bar half", nb.Domain, nb.OuterRadius*nb.Length/2 - barNotch(nb)},
		{"notched bar full", nbF.Domain, nbF.OuterRadius*nbF.Length - 2*barNotch(nbF)},
		{"notched bar depth = radius", nbDeep.Domain, nbDeep.OuterRadius*nbDeep.Length/2 - barNotch(nbDeep)},
		{"dent", dent.Domain, dent.Width*dent.Height - 2*(2*dent.TipRadius*(dent.NotchDepth-dent.TipRadius)+math.Pi*dent.TipRadius*dent.TipRadius/2)},
	}
}

func TestSpecimenArea(t *testing.T) {
	for _, c := range specimenCases() {
		d, err := c.d()
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if got := d.Area(); math.Abs(got-c.area) > 1e-12*c.area {
			t.Errorf("%s: area %.15g, closed form %.15g", c.name, got, c.area)
		}
		if len(d.Tips()) == 0 {
			t.Errorf("%s: no crack tip", c.name)
		}
	}
}

func TestDiscretiseConforms(t *testing.T) {
	for _, c := range specimenCases() {
		d, err := c.d()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		h := 0.05 * d.Scale()
		size := func(x, y float64) float64 { return h * (0.2 + math.Abs(x)/d.Scale()) }
		g, err := d.Discretise(size)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		tol := 1e-12 * d.Scale()
		covered := make([]float64, d.NumPieces())
		for s, seg := range g.Segments {
			p := d.PieceOfMark(g.SegmentMarks[s])
			if p == nil {
				t.Fatalf("%s: segment %d has mark %d of no piece", c.name, s, g.SegmentMarks[s])
			}
			a, b := g.Points[seg[0]], g.Points[seg[1]]
			for _, x := range [][2]float64{a, b} {
				if dd := p.Distance(x); dd > tol {
					t.Errorf("%s: segment %d end (%g, %g) is %g off its piece %q", c.name, s, x[0], x[1], dd, p.Label)
				}
			}
			// Boundary conformity: segment lengths (along the piece) add up
			// to each piece's length (common practice).
			if p.Kind == Arc {
				covered[g.SegmentMarks[s]-1] += math.Abs(p.param(b)-p.param(a)) * p.Length()
				if ang := 2 * math.Asin(plane.Dist(a, b)/(2*p.Radius)); ang > MaxArcChordDeg*math.Pi/180*(1+1e-9) {
					t.Errorf("%s: chord subtends %g°", c.name, ang*180/math.Pi)
				}
			} else {
				covered[g.SegmentMarks[s]-1] += plane.Dist(a, b)
			}
			// Segment sizes follow h: at most h at either end plus the
			// variation of h along it (h is 1/d.Scale()-Lipschitz here).
			if L := plane.Dist(a, b); L > 1.1*math.Max(size(a[0], a[1]), size(b[0], b[1])) {
				t.Errorf("%s: segment of length %g where h ≤ %g", c.name, L, math.Max(size(a[0], a[1]), size(b[0], b[1])))
			}
		}
		for i := range covered {
			p, _, _ := d.Piece(i)
			// a piece ending at t = 1 has param 1 at its end
			if math.Abs(covered[i]-p.Length()) > 1e-9*p.Length() {
				t.Errorf("%s: piece %d (%q) covered %g of %g", c.name, i, p.Label, covered[i], p.Length())
			}
		}
		for name, pt := range d.Points {
			idx, ok := g.Named[name]
			if pt.Ref {
				if ok {
					t.Errorf("%s: reference point %q was inserted", c.name, name)
				}
				continue
			}
			if !ok || g.Points[idx] != pt.X {
				t.Errorf("%s: point %q not inserted exactly", c.name, name)
			}
		}
		if len(g.Holes) != len(d.Holes) {
			t.Errorf("%s: %d hole points for %d holes", c.name, len(g.Holes), len(d.Holes))
		}
		for k, x := range g.Holes {
			if d.Contains(x) || d.Holes[k].Winding(x) == 0 {
				t.Errorf("%s: hole point %d (%g, %g) not in its hole", c.name, k, x[0], x[1])
			}
		}
	}
}

func square(label string) Loop {
	return Loop{
		line([2]float64{0, 0}, [2]float64{1, 0}, label),
		line([2]float64{1, 0}, [2]float64{1, 1}, label),
		line([2]float64{1, 1}, [2]float64{0, 1}, label),
		line([2]float64{0, 1}, [2]float64{0, 0}, label),
	}
}

func TestValidateErrors(t *testing.T) {
	sq := square("edge")
	bow := Loop{
		line([2]float64{0, 0}, [2]float64{1, 1}, "e"),
		line([2]float64{1, 1}, [2]float64{1, 0}, "e"),
		line([2]float64{1, 0}, [2]float64{0, 1}, "e"),
		line([2]float64{0, 1}, [2]float64{0, 0}, "e"),
	}
	badArc := Loop{
		line([2]float64{0, 0}, [2]float64{2, 0}, "e"),
		{Kind: Arc, A: [2]float64{2, 0}, B: [2]float64{0, 0}, Centre: [2]float64{1, 0}, Radius: 1.5, Label: "e"},
	}
	hole := func(c [2]float64, r float64) Loop {
		return Loop{
			arc(c, [2]float64{c[0], c[1] + r}, [2]float64{c[0], c[1] - r}, true, "h"),
			arc(c, [2]float64{c[0], c[1] - r}, [2]float64{c[0], c[1] + r}, true, "h"),
		}
	}
	rev := (&Domain{Outer: square("edge")})
	rev.Orient()
	cw := Loop{sq[3].Reverse(), sq[2].Reverse(), sq[1].Reverse(), sq[0].Reverse()}
	cusp := Loop{
		line([2]float64{0, 0}, [2]float64{2, 0}, "e"),
		line([2]float64{2, 0}, [2]float64{0, 1e-6}, "e"),
	}
	cusp = append(cusp[:1], line([2]float64{2, 0}, [2]float64{0, 1e-5}, "e"), line([2]float64{0, 1e-5}, [2]float64{0, 0}, "e"))
	zero := append(Loop{}, sq...)
	zero = append(zero[:2], append(Loop{line([2]float64{1, 1}, [2]float64{1, 1}, "e")}, zero[2:]...)...)
	open := append(Loop{}, sq[:3]...)
	nolabel := append(Loop{}, sq...)
	nolabel[1].Label = ""
	// Every case must fail with a message naming the problem (common practice).
	cases := []struct {
		name string
		d    *Domain
		want string
	}{
		{"empty", &Domain{}, "outer loop has no pieces"},
		{"bow tie", &Domain{Outer: bow}, "crosses or touches"},
		{"arc radius", &Domain{Outer: badArc}, "inconsistent radius"},
		{"clockwise outer", &Domain{Outer: cw}, "runs clockwise"},
		{"counter-clockwise hole", &Domain{Outer: sq, Holes: []Loop{{
			arc([2]float64{0.5, 0.5}, [2]float64{0.5, 0.3}, [2]float64{0.5, 0.7}, false, "h"),
			arc([2]float64{0.5, 0.5}, [2]float64{0.5, 0.7}, [2]float64{0.5, 0.3}, false, "h")}}}, "holes must run clockwise"},
		{"hole outside", &Domain{Outer: sq, Holes: []Loop{hole([2]float64{3, 3}, 0.2)}}, "outside loop 0"},
		{"nested holes", &Domain{Outer: sq, Holes: []Loop{hole([2]float64{0.5, 0.5}, 0.3), hole([2]float64{0.5, 0.5}, 0.1)}}, "nested"},
		{"hole crossing", &Domain{Outer: sq, Holes: []Loop{hole([2]float64{0.9, 0.5}, 0.2)}}, "crosses or touches"},
		{"cusp", &Domain{Outer: cusp}, "cusp"},
		{"zero length", &Domain{Outer: zero}, "zero length"},
		{"not closed", &Domain{Outer: open}, "must be closed"},
		{"no label", &Domain{Outer: nolabel}, "no label"},
		{"point outside", &Domain{Outer: sq, Points: map[string]Point{"p": {X: [2]float64{2, 2}}}}, "outside the domain"},
		{"tip direction", &Domain{Outer: sq, Points: map[string]Point{"tip": {X: [2]float64{0.5, 0.5}, Tip: true}}}, "unit vector"},
		{"nan", &Domain{Outer: Loop{line([2]float64{math.NaN(), 0}, [2]float64{1, 0}, "e"), line([2]float64{1, 0}, [2]float64{math.NaN(), 0}, "e")}}, "not a finite number"},
	}
	if notes := rev.Orient(); len(notes) != 0 {
		t.Errorf("Orient reversed a counter-clockwise square: %v", notes)
	}
	for _, c := range cases {
		err := c.d.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	// Orient repairs the clockwise square (and says so).
	d := &Domain{Outer: cw}
	if notes := d.Orient(); len(notes) != 1 || d.Validate() != nil || math.Abs(d.Area()-1) > 1e-15 {
		t.Errorf("Orient: notes %v, error %v, area %g", notes, d.Validate(), d.Area())
	}
}

func TestSpecimenParameterErrors(t *testing.T) {
	cases := []struct {
		name string
		err  error
		want string
	}{
		{"ssy radius", SSY{Radius: -1}.Validate(), "positive"},
		{"ssy full sharp", SSY{Radius: 10, Full: true}.Validate(), "blunt tip"},
		{"ssy big tip", SSY{Radius: 10, TipRadius: 2}.Validate(), "tenth"},
		{"ct order", CT{W: 50, AOverW: 0.4, NotchOverW: 0.5, NotchWidthOverW: 0.03}.Validate(), "notch < crack"},
		{"ct tip", CT{W: 50, AOverW: 0.5, NotchOverW: 0.45, NotchWidthOverW: 0.03, TipRadius: 1}.Validate(), "half the notch width"},
		{"bar depth", NotchedBar{MinRadius: 1, OuterRadius: 6, NotchRadius: 2, Length: 20}.Validate(), "notch depth"},
		{"bar short", NotchedBar{MinRadius: 4, OuterRadius: 6, NotchRadius: 4, Length: 5}.Validate(), "half height"},
		{"dent ligament", DENT{Width: 10, Height: 20, NotchDepth: 5, TipRadius: 0.1}.Validate(), "ligament"},
	}
	for _, c := range cases {
		if c.err == nil || !strings.Contains(c.err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, c.err, c.want)
		}
	}
}

func TestFeatureTooSmall(t *testing.T) {
	// nearly coincident vertices: a 1e-7 step in a unit square's edge
	sq := square("e")
	l := Loop{sq[0], line([2]float64{1, 0}, [2]float64{1, 1e-7}, "e"), line([2]float64{1, 1e-7}, [2]float64{1, 1}, "e"), sq[2], sq[3]}
	d := &Domain{Outer: l}
	if _, err := d.Discretise(func(x, y float64) float64 { return 0.1 }); err == nil || !strings.Contains(err.Error(), "smaller than") {
		t.Errorf("tiny piece: error %v", err)
	}
	// tiny crack-tip radius against the mesh size
	dd, err := SSY{Radius: 10, TipRadius: 1e-7}.Domain()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := dd.Discretise(func(x, y float64) float64 { return 0.5 }); err == nil || !strings.Contains(err.Error(), "smaller than") {
		t.Errorf("tiny tip: error %v", err)
	}
	// a size function that is not positive
	if _, err := (&Domain{Outer: square("e")}).Discretise(func(x, y float64) float64 { return -1 }); err == nil || !strings.Contains(err.Error(), "positive") {
		t.Errorf("negative size: error %v", err)
	}
}

func TestPolygonOrientsAndSplits(t *testing.T) {
	// A unit square (given clockwise) with a round hole of radius 0.25
	// given counter-clockwise: Domain reverses both and says so.
	p := Polygon{Loops: []LoopSpec{
		{Start: [2]float64{0, 0}, Pieces: []PieceSpec{{To: [2]float64{0, 1}, Label: "w"}, {To: [2]float64{1, 1}, Label: "n"}, {To: [2]float64{1, 0}, Label: "e"}, {To: [2]float64{0, 0}, Label: "s"}}},
		{Start: [2]float64{0.75, 0.5}, Pieces: []PieceSpec{{To: [2]float64{0.25, 0.5}, Arc: true, Centre: [2]float64{0.5, 0.5}, Label: "hole"}, {To: [2]float64{0.75, 0.5}, Arc: true, Centre: [2]float64{0.5, 0.5}, Label: "hole"}}},
	}, Points: map[string]Point{"tip": {X: [2]float64{0.1, 0.5}, Tip: true, Dir: [2]float64{2, 0}}}}
	d, notes, err := p.Domain()
	if err != nil {
		t.Fatal(err)
	}
	if len(notes) != 2 {
		t.Errorf("notes %v, want two reversals", notes)
	}
	// closed form: 1 − π/16
	if a := d.Area(); math.Abs(a-(1-math.Pi/16)) > 1e-14 {
		t.Errorf("area %.16g, want %.16g", a, 1-math.Pi/16)
	}
	if d.Points["tip"].Dir != [2]float64{1, 0} {
		t.Errorf("tip direction not normalised: %v", d.Points["tip"].Dir)
	}
	// Split puts the point on the arc, halfway in angle.
	hp := &d.Holes[0][0]
	m := d.Split(len(d.Outer)+1, hp.A, hp.At(0.5))
	if r := plane.Dist(m, hp.Centre); math.Abs(r-0.25) > 1e-15 || plane.Dist(m, hp.At(0.25)) > 1e-15 {
		t.Errorf("split point %v at radius %.17g, want %v on the arc", m, r, hp.At(0.25))
	}
}

func TestDiscretiseRefinesCrossingChords(t *testing.T) {
	// A half disk of radius 10 with a small hole just inside its arc: at the
	// coarsest chords (22.5°) the hole sticks out through a chord, whose
	// sagitta is R(1 − cos 11.25°) ≈ 0.19 (elementary geometry), so the arc
	// must be split further.
	a := 33.75 * math.Pi / 180
	c := [2]float64{9.85 * math.Cos(a), 9.85 * math.Sin(a)}
	r := 0.05
	d := &Domain{
		Outer: Loop{
			line([2]float64{-10, 0}, [2]float64{10, 0}, "base"),
			arc([2]float64{0, 0}, [2]float64{10, 0}, [2]float64{-10, 0}, false, "arc"),
		},
		Holes: []Loop{{
			arc(c, [2]float64{c[0], c[1] + r}, [2]float64{c[0], c[1] - r}, true, "hole"),
			arc(c, [2]float64{c[0], c[1] - r}, [2]float64{c[0], c[1] + r}, true, "hole"),
		}},
	}
	g, err := d.Discretise(func(x, y float64) float64 { return 50 })
	if err != nil {
		t.Fatal(err)
	}
	if _, _, crossing := crossingSegments(g, 1e-9*d.Scale()); crossing {
		t.Fatal("chords still cross")
	}
	arcSegs := 0
	for _, m := range g.SegmentMarks {
		if m == 2 {
			arcSegs++
		}
	}
	if arcSegs <= 8 {
		t.Errorf("outer arc kept %d chords; the crossing needs more than 8", arcSegs)
	}
}
