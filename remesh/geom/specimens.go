package geom

import (
	"fmt"
	"math"
	"tearline/solver/plane"
)

// Boundary labels used by the built-in specimens.
const (
	LabelRemote   = "remote"    // outer arc of the boundary-layer disk (remote field)
	LabelCrack    = "crack"     // crack faces and crack-tip surfaces (traction free)
	LabelSymmetry = "symmetry"  // mirror plane (ligament, minimum section)
	LabelPin      = "pin"       // surface of the (upper) pin hole
	LabelPinLower = "pin_lower" // surface of the lower pin hole (full C(T))
	LabelNotch    = "notch"     // machined notch surface
	LabelFree     = "free"      // other traction-free faces
	LabelAxis     = "axis"      // axis of symmetry r = 0
	LabelEnd      = "end"       // loaded end
	LabelBase     = "base"      // opposite end of a full model
	LabelSurface  = "surface"   // outer cylindrical surface of a round bar
	LabelTop      = "top"       // loaded upper edge of a plate
	LabelBottom   = "bottom"    // lower edge of a plate
)

// Names of the points the built-in specimens and the opening control attach
// to a domain. A "_lower" twin is the mirror image of a point in a full model.
const (
	PointTip        = "tip"         // crack tip (growth direction in Point.Dir)
	PointTipRight   = "tip_right"   // second crack tip (right notch of the DENT)
	PointLoad       = "load"        // pin centre (reference point inside the hole)
	PointLoadLower  = "load_lower"  // lower pin centre (full C(T))
	PointMouth      = "mouth"       // notch mouth on the front face
	PointMouthLower = "mouth_lower" // lower notch mouth (full C(T), left notch of the DENT)
	// PointMouthRight and PointMouthRightLower are the mouth corners of the
	// DENT's right notch.
	PointMouthRight      = "mouth_right"
	PointMouthRightLower = "mouth_right_lower"
	PointLoadLine        = "loadline"       // load line on the notch face (clip gauge)
	PointLoadLineLower   = "loadline_lower" // load line on the lower notch face (full C(T))
	PointRoot            = "root"           // notch root of the round bar
	PointOpening         = "opening"        // opening-control point on the upper crack face
	PointOpeningLower    = "opening_lower"  // opening-control point on the lower crack face
)

func line(a, b [2]float64, label string) Piece {
	return Piece{Kind: Line, A: a, B: b, Label: label}
}

func arc(c, a, b [2]float64, cw bool, label string) Piece {
	return Piece{Kind: Arc, A: a, B: b, Centre: c, Radius: plane.Dist(a, c), CW: cw, Label: label}
}

func positive(name string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s = %g: must be a positive finite length", name, v)
	}
	return nil
}

// length is a named length of a specimen.
type length struct {
	name string
	v    float64
}

// positives returns the error of positive for the first of ls that is not
// a positive finite length.
func positives(ls ...length) error {
	for _, l := range ls {
		if err := positive(l.name, l.v); err != nil {
			return err
		}
	}
	return nil
}

// SSY is the small-scale-yielding boundary-layer disk: a disk of radius R
// about the crack tip with the crack along the negative x axis, its faces
// y = ±ρ₀ joined by a semicircular blunt tip of radius ρ₀ whose apex (the
// point "tip", growth direction +x) is the origin. The half model is the
// upper half with the ligament y = 0, x > 0 a mirror plane.
//
// Labels: "remote" (outer arc), "crack" (faces and tip), "symmetry"
// (ligament, half model only).
type SSY struct {
	Radius    float64 // outer radius R
	TipRadius float64 // blunt-tip radius ρ₀; 0 = sharp crack (half model only)
	Full      bool    // full disk instead of the upper half
}

// DefaultSSY returns a half disk of radius 50 with a 0.02 blunt tip (mm).
func DefaultSSY() SSY { return SSY{Radius: 50, TipRadius: 0.02} }

// Validate checks the parameters.
func (p SSY) Validate() error {
	if err := positive("ssy radius", p.Radius); err != nil {
		return err
	}
	if !(p.TipRadius >= 0) || math.IsInf(p.TipRadius, 0) {
		return fmt.Errorf("ssy tip radius = %g: must be ≥ 0 (0 = sharp crack)", p.TipRadius)
	}
	if p.TipRadius >= 0.1*p.Radius {
		return fmt.Errorf("ssy tip radius %g must be below a tenth of the disk radius %g (small-scale yielding needs ρ₀ ≪ R)", p.TipRadius, p.Radius)
	}
	if p.Full && p.TipRadius == 0 {
		return fmt.Errorf("ssy full disk needs a blunt tip radius > 0 (a sharp crack would be a slit of zero width); use the half model for a sharp crack")
	}
	return nil
}

// Domain builds the disk.
func (p SSY) Domain() (*Domain, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	R, r := p.Radius, p.TipRadius
	o := [2]float64{0, 0}
	d := &Domain{Points: map[string]Point{PointTip: {X: o, Tip: true, Dir: [2]float64{1, 0}}}}
	switch {
	case !p.Full && r == 0:
		d.Outer = Loop{
			line(o, [2]float64{R, 0}, LabelSymmetry),
			arc(o, [2]float64{R, 0}, [2]float64{-R, 0}, false, LabelRemote),
			line([2]float64{-R, 0}, o, LabelCrack),
		}
	case !p.Full:
		xr := math.Sqrt(R*R - r*r)
		d.Outer = Loop{
			line(o, [2]float64{R, 0}, LabelSymmetry),
			arc(o, [2]float64{R, 0}, [2]float64{-xr, r}, false, LabelRemote),
			line([2]float64{-xr, r}, [2]float64{-r, r}, LabelCrack),
			arc([2]float64{-r, 0}, [2]float64{-r, r}, o, true, LabelCrack),
		}
	default:
		xr := math.Sqrt(R*R - r*r)
		c := [2]float64{-r, 0}
		d.Outer = Loop{
			arc(c, [2]float64{-r, r}, o, true, LabelCrack),
			arc(c, o, [2]float64{-r, -r}, true, LabelCrack),
			line([2]float64{-r, -r}, [2]float64{-xr, -r}, LabelCrack),
			arc(o, [2]float64{-xr, -r}, [2]float64{-xr, r}, false, LabelRemote),
			line([2]float64{-xr, r}, [2]float64{-r, r}, LabelCrack),
		}
	}
	return d, d.Validate()
}

// CT is the compact-tension specimen C(T) with the proportions of ASTM
// E1820 (from memory: overall width 1.25W and height 1.2W, load line 0.25W
// from the front face, pin holes of diameter 0.25W centred on the load line
// ±0.275W from the crack line). The origin is on the load line in the crack
// plane; x runs towards the back face x = W. A machined notch of width
// NotchWidthOverW·W runs from the front face to NotchOverW·W and a fatigue
// crack from there to the tip at a₀ = AOverW·W, sharp (half model) or with
// a semicircular tip of radius TipRadius.
//
// Labels: "pin" (upper pin hole; "pin_lower" for the lower one of the full
// model), "notch", "crack", "free" (outer faces), "symmetry" (ligament,
// half model). Points: "tip" (+x), "load" (upper pin centre, a reference
// point inside the hole; "load_lower" in the full model), "mouth" (notch
// mouth on the front face) and "loadline" (load line on the notch face),
// with "_lower" twins in the full model.
type CT struct {
	W               float64 // width, load line to back face
	AOverW          float64 // crack length a₀/W
	NotchOverW      float64 // machined notch length from the load line / W
	NotchWidthOverW float64 // full width of the machined notch / W
	TipRadius       float64 // crack-tip radius ρ₀; 0 = sharp (half model only)
	BOverW          float64 // thickness B/W (carried as Domain.Thickness)
	Full            bool    // both halves instead of the upper half
}

// DefaultCT returns a 1T-like C(T) of W = 50 mm, a₀/W = 0.55, notch to
// 0.45W, notch width 0.03W, sharp tip, B = W/2.
func DefaultCT() CT {
	return CT{W: 50, AOverW: 0.55, NotchOverW: 0.45, NotchWidthOverW: 0.03, BOverW: 0.5}
}

// Validate checks the parameters.
func (p CT) Validate() error {
	if err := positive("ct width W", p.W); err != nil {
		return err
	}
	if !(p.NotchOverW > 0 && p.NotchOverW < p.AOverW && p.AOverW < 1) {
		return fmt.Errorf("ct notch length %g W and crack length %g W: need 0 < notch < crack < 1 (E1820 uses a₀/W from 0.45 to 0.70)", p.NotchOverW, p.AOverW)
	}
	if !(p.NotchWidthOverW > 0 && p.NotchWidthOverW < 0.2) {
		return fmt.Errorf("ct notch width %g W: must be in (0, 0.2) W so that it stays clear of the pin holes", p.NotchWidthOverW)
	}
	n := 0.5 * p.NotchWidthOverW * p.W
	if !(p.TipRadius >= 0) || p.TipRadius >= n {
		return fmt.Errorf("ct tip radius %g: must be ≥ 0 and below half the notch width (%g)", p.TipRadius, n)
	}
	if p.TipRadius > 0 && (p.AOverW-p.NotchOverW)*p.W <= p.TipRadius {
		return fmt.Errorf("ct tip radius %g: the fatigue crack (%g long) must be longer than the tip radius", p.TipRadius, (p.AOverW-p.NotchOverW)*p.W)
	}
	if p.Full && p.TipRadius == 0 {
		return fmt.Errorf("ct full model needs a tip radius > 0 (a sharp crack would be a slit of zero width); use the half model for a sharp crack")
	}
	if !(p.BOverW >= 0) || math.IsInf(p.BOverW, 0) {
		return fmt.Errorf("ct thickness B/W = %g: must be ≥ 0", p.BOverW)
	}
	return nil
}

// Domain builds the specimen.
func (p CT) Domain() (*Domain, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	W := p.W
	a := p.AOverW * W
	an := p.NotchOverW * W
	n := 0.5 * p.NotchWidthOverW * W
	r := p.TipRadius
	xf, yt := -0.25*W, 0.6*W
	pc, pr := 0.275*W, 0.125*W
	hole := func(yc float64, label string) Loop {
		c := [2]float64{0, yc}
		top, bot := [2]float64{0, yc + pr}, [2]float64{0, yc - pr}
		return Loop{arc(c, top, bot, true, label), arc(c, bot, top, true, label)}
	}
	d := &Domain{Thickness: p.BOverW * W, Points: map[string]Point{
		PointTip:      {X: [2]float64{a, 0}, Tip: true, Dir: [2]float64{1, 0}},
		PointLoad:     {X: [2]float64{0, pc}, Ref: true},
		PointMouth:    {X: [2]float64{xf, n}},
		PointLoadLine: {X: [2]float64{0, n}},
	}}
	if !p.Full {
		upper := Loop{
			line([2]float64{a, 0}, [2]float64{W, 0}, LabelSymmetry),
			line([2]float64{W, 0}, [2]float64{W, yt}, LabelFree),
			line([2]float64{W, yt}, [2]float64{xf, yt}, LabelFree),
			line([2]float64{xf, yt}, [2]float64{xf, n}, LabelFree),
			line([2]float64{xf, n}, [2]float64{an, n}, LabelNotch),
		}
		if r == 0 {
			upper = append(upper,
				line([2]float64{an, n}, [2]float64{an, 0}, LabelNotch),
				line([2]float64{an, 0}, [2]float64{a, 0}, LabelCrack))
		} else {
			upper = append(upper,
				line([2]float64{an, n}, [2]float64{an, r}, LabelNotch),
				line([2]float64{an, r}, [2]float64{a - r, r}, LabelCrack),
				arc([2]float64{a - r, 0}, [2]float64{a - r, r}, [2]float64{a, 0}, true, LabelCrack))
		}
		d.Outer = upper
		d.Holes = []Loop{hole(pc, LabelPin)}
		return d, d.Validate()
	}
	c := [2]float64{a - r, 0}
	d.Outer = Loop{
		line([2]float64{W, -yt}, [2]float64{W, yt}, LabelFree),
		line([2]float64{W, yt}, [2]float64{xf, yt}, LabelFree),
		line([2]float64{xf, yt}, [2]float64{xf, n}, LabelFree),
		line([2]float64{xf, n}, [2]float64{an, n}, LabelNotch),
		line([2]float64{an, n}, [2]float64{an, r}, LabelNotch),
		line([2]float64{an, r}, [2]float64{a - r, r}, LabelCrack),
		arc(c, [2]float64{a - r, r}, [2]float64{a, 0}, true, LabelCrack),
		arc(c, [2]float64{a, 0}, [2]float64{a - r, -r}, true, LabelCrack),
		line([2]float64{a - r, -r}, [2]float64{an, -r}, LabelCrack),
		line([2]float64{an, -r}, [2]float64{an, -n}, LabelNotch),
		line([2]float64{an, -n}, [2]float64{xf, -n}, LabelNotch),
		line([2]float64{xf, -n}, [2]float64{xf, -yt}, LabelFree),
		line([2]float64{xf, -yt}, [2]float64{W, -yt}, LabelFree),
	}
	d.Holes = []Loop{hole(pc, LabelPin), hole(-pc, LabelPinLower)}
	d.Points[PointLoadLower] = Point{X: [2]float64{0, -pc}, Ref: true}
	d.Points[PointMouthLower] = Point{X: [2]float64{xf, -n}}
	d.Points[PointLoadLineLower] = Point{X: [2]float64{0, -n}}
	return d, d.Validate()
}

// NotchedBar is the circumferentially notched round bar in axisymmetric
// (r, z) coordinates: minimum radius r₀ at the notch root in the plane
// z = 0, a circular notch of radius R_n centred at (r₀ + R_n, 0) cut into a
// bar of outer radius r_out, bar length L (the half model covers
// 0 ≤ z ≤ L/2 with the minimum section a mirror plane). The notch depth
// r_out − r₀ must not exceed R_n.
//
// Labels: "axis" (r = 0), "symmetry" (z = 0, half model), "notch",
// "surface" (r = r_out), "end" (loaded end z = L/2), "base" (z = −L/2, full
// model). Points: "tip" at the centre of the minimum section (where a
// ductile crack starts, growth +r) and "root" at the notch root.
type NotchedBar struct {
	MinRadius   float64 // r₀, radius at the notch root
	OuterRadius float64 // r_out, radius of the bar
	NotchRadius float64 // R_n, radius of the notch
	Length      float64 // L, length of the modelled bar (full length)
	Full        bool    // both halves (cup-cone studies)
}

// DefaultNotchedBar returns r₀ = 4, r_out = 6, R_n = 4, L = 40 (mm).
func DefaultNotchedBar() NotchedBar {
	return NotchedBar{MinRadius: 4, OuterRadius: 6, NotchRadius: 4, Length: 40}
}

// notchHeight returns the z at which the notch meets the outer surface.
func (p NotchedBar) notchHeight() float64 {
	e := p.MinRadius + p.NotchRadius - p.OuterRadius
	return math.Sqrt(math.Max(0, p.NotchRadius*p.NotchRadius-e*e))
}

// Validate checks the parameters.
func (p NotchedBar) Validate() error {
	if err := positives(length{"notched bar minimum radius", p.MinRadius}, length{"notched bar outer radius", p.OuterRadius},
		length{"notched bar notch radius", p.NotchRadius}, length{"notched bar length", p.Length}); err != nil {
		return err
	}
	if p.MinRadius >= p.OuterRadius {
		return fmt.Errorf("notched bar minimum radius %g must be below the outer radius %g", p.MinRadius, p.OuterRadius)
	}
	if depth := p.OuterRadius - p.MinRadius; depth > p.NotchRadius {
		return fmt.Errorf("notched bar notch depth %g (outer − minimum radius) must not exceed the notch radius %g", depth, p.NotchRadius)
	}
	if z := p.notchHeight(); p.Length/2 <= z*(1+1e-6) {
		return fmt.Errorf("notched bar length %g: half of it must exceed the notch's half height %g", p.Length, z)
	}
	return nil
}

// Domain builds the bar section.
func (p NotchedBar) Domain() (*Domain, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	r0, ro, L2 := p.MinRadius, p.OuterRadius, p.Length/2
	z1 := p.notchHeight()
	c := [2]float64{r0 + p.NotchRadius, 0}
	d := &Domain{Axisymmetric: true, Points: map[string]Point{
		PointTip:  {X: [2]float64{0, 0}, Tip: true, Dir: [2]float64{1, 0}},
		PointRoot: {X: [2]float64{r0, 0}},
	}}
	if !p.Full {
		d.Outer = Loop{
			line([2]float64{0, 0}, [2]float64{r0, 0}, LabelSymmetry),
			arc(c, [2]float64{r0, 0}, [2]float64{ro, z1}, true, LabelNotch),
			line([2]float64{ro, z1}, [2]float64{ro, L2}, LabelSurface),
			line([2]float64{ro, L2}, [2]float64{0, L2}, LabelEnd),
			line([2]float64{0, L2}, [2]float64{0, 0}, LabelAxis),
		}
		return d, d.Validate()
	}
	d.Outer = Loop{
		line([2]float64{0, -L2}, [2]float64{ro, -L2}, LabelBase),
		line([2]float64{ro, -L2}, [2]float64{ro, -z1}, LabelSurface),
		arc(c, [2]float64{ro, -z1}, [2]float64{r0, 0}, true, LabelNotch),
		arc(c, [2]float64{r0, 0}, [2]float64{ro, z1}, true, LabelNotch),
		line([2]float64{ro, z1}, [2]float64{ro, L2}, LabelSurface),
		line([2]float64{ro, L2}, [2]float64{0, L2}, LabelEnd),
		line([2]float64{0, L2}, [2]float64{0, -L2}, LabelAxis),
	}
	return d, d.Validate()
}

// DENT is the double-edge-notched plate in plane strain (full model): a
// plate of the given width and height centred on the origin, with two
// U-notches of depth a cut in from the side faces along y = 0, each of
// half-width ρ₀ ending in a semicircular root of radius ρ₀.
//
// Labels: "top" (loaded edge y = +H/2), "bottom" (y = −H/2), "free" (side
// faces), "notch". Points: "tip" (left notch root, growth +x) and
// "tip_right" (right notch root, growth −x).
type DENT struct {
	Width      float64 // full width
	Height     float64 // full height
	NotchDepth float64 // a, from each side face to the notch root
	TipRadius  float64 // ρ₀, notch-root radius and notch half-width
}

// DefaultDENT returns a 40 × 80 plate with 8 deep notches of root radius 0.1 (mm).
func DefaultDENT() DENT { return DENT{Width: 40, Height: 80, NotchDepth: 8, TipRadius: 0.1} }

// Validate checks the parameters.
func (p DENT) Validate() error {
	if err := positives(length{"dent width", p.Width}, length{"dent height", p.Height},
		length{"dent notch depth", p.NotchDepth}, length{"dent tip radius", p.TipRadius}); err != nil {
		return err
	}
	if p.NotchDepth <= p.TipRadius {
		return fmt.Errorf("dent notch depth %g must exceed the tip radius %g", p.NotchDepth, p.TipRadius)
	}
	if p.NotchDepth >= p.Width/2 {
		return fmt.Errorf("dent notch depth %g must be below half the width %g (the ligament must be positive)", p.NotchDepth, p.Width/2)
	}
	if p.TipRadius >= p.Height/4 {
		return fmt.Errorf("dent tip radius %g must be below a quarter of the height %g", p.TipRadius, p.Height)
	}
	return nil
}

// Domain builds the plate.
func (p DENT) Domain() (*Domain, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	w, h, a, r := p.Width/2, p.Height/2, p.NotchDepth, p.TipRadius
	cr := [2]float64{w - a + r, 0}
	cl := [2]float64{-w + a - r, 0}
	d := &Domain{Points: map[string]Point{
		PointTip:      {X: [2]float64{-w + a, 0}, Tip: true, Dir: [2]float64{1, 0}},
		PointTipRight: {X: [2]float64{w - a, 0}, Tip: true, Dir: [2]float64{-1, 0}},
		// the notch mouths' corners: where a clip gauge across each notch sits
		PointMouth:           {X: [2]float64{-w, r}},
		PointMouthLower:      {X: [2]float64{-w, -r}},
		PointMouthRight:      {X: [2]float64{w, r}},
		PointMouthRightLower: {X: [2]float64{w, -r}},
	}}
	d.Outer = Loop{
		line([2]float64{-w, -h}, [2]float64{w, -h}, LabelBottom),
		line([2]float64{w, -h}, [2]float64{w, -r}, LabelFree),
		line([2]float64{w, -r}, [2]float64{cr[0], -r}, LabelNotch),
		arc(cr, [2]float64{cr[0], -r}, [2]float64{w - a, 0}, true, LabelNotch),
		arc(cr, [2]float64{w - a, 0}, [2]float64{cr[0], r}, true, LabelNotch),
		line([2]float64{cr[0], r}, [2]float64{w, r}, LabelNotch),
		line([2]float64{w, r}, [2]float64{w, h}, LabelFree),
		line([2]float64{w, h}, [2]float64{-w, h}, LabelTop),
		line([2]float64{-w, h}, [2]float64{-w, r}, LabelFree),
		line([2]float64{-w, r}, [2]float64{cl[0], r}, LabelNotch),
		arc(cl, [2]float64{cl[0], r}, [2]float64{-w + a, 0}, true, LabelNotch),
		arc(cl, [2]float64{-w + a, 0}, [2]float64{cl[0], -r}, true, LabelNotch),
		line([2]float64{cl[0], -r}, [2]float64{-w, -r}, LabelNotch),
		line([2]float64{-w, -r}, [2]float64{-w, -h}, LabelFree),
	}
	return d, d.Validate()
}

// PieceSpec is one piece of a loop given as data: it runs from the end of
// the previous piece (or the loop's start) to To, straight or, with Arc,
// along the circle about Centre (clockwise with CW).
type PieceSpec struct {
	To     [2]float64
	Arc    bool
	Centre [2]float64
	CW     bool
	Label  string
}

// LoopSpec is a closed loop given as data: a start point and pieces; the
// last piece must end at the start.
type LoopSpec struct {
	Start  [2]float64
	Pieces []PieceSpec
}

// Polygon is a general domain of lines and arcs given as data. The first
// loop is the outer boundary, the others are holes; loops may be given in
// either direction (Domain orients them). Tip directions are normalised.
type Polygon struct {
	Loops        []LoopSpec
	Points       map[string]Point
	Axisymmetric bool
}

// Domain builds and validates the domain. The notes say which loops were
// reversed to the required orientation.
func (p Polygon) Domain() (*Domain, []string, error) {
	if len(p.Loops) == 0 {
		return nil, nil, fmt.Errorf("geometry: a polygon needs at least one loop (the outer boundary)")
	}
	d := &Domain{Axisymmetric: p.Axisymmetric, Points: map[string]Point{}}
	for k, ls := range p.Loops {
		if len(ls.Pieces) < 2 {
			return nil, nil, fmt.Errorf("geometry: %s has %d pieces; a closed loop needs at least 2", loopName(k), len(ls.Pieces))
		}
		var l Loop
		at := ls.Start
		for _, ps := range ls.Pieces {
			if ps.Arc {
				l = append(l, arc(ps.Centre, at, ps.To, ps.CW, ps.Label))
			} else {
				l = append(l, line(at, ps.To, ps.Label))
			}
			at = ps.To
		}
		if k == 0 {
			d.Outer = l
		} else {
			d.Holes = append(d.Holes, l)
		}
	}
	for n, pt := range p.Points {
		if pt.Tip {
			if ln := math.Hypot(pt.Dir[0], pt.Dir[1]); ln > 0 && !math.IsInf(ln, 0) {
				pt.Dir = [2]float64{pt.Dir[0] / ln, pt.Dir[1] / ln}
			} else {
				return nil, nil, fmt.Errorf("geometry: crack tip %q needs a non-zero growth direction", n)
			}
		}
		d.Points[n] = pt
	}
	var notes []string
	if err := d.checkClosedFinite(); err == nil {
		notes = d.Orient()
	}
	return d, notes, d.Validate()
}

// checkClosedFinite reports whether the loops are finite enough to orient.
func (d *Domain) checkClosedFinite() error {
	for _, l := range d.Loops() {
		for i := range l {
			if !finite2(l[i].A) || !finite2(l[i].B) || (l[i].Kind == Arc && !finite2(l[i].Centre)) {
				return fmt.Errorf("not finite")
			}
		}
	}
	return nil
}
