package size

import (
	"fmt"
	"math"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/solver/plane"
)

// FollowOptions sets up the tip-following size field. Lengths other than
// Length and HFar are in units of the internal length ℓ (Length), sizes in
// units of h_fine = ℓ/κ.
type FollowOptions struct {
	// Length is the internal length ℓ (> 0). A local model (ℓ = 0) passes
	// the length scale it wants the zone measured in, e.g. 2·h_fine.
	Length float64
	// Kappa sets h_fine = ℓ/κ; κ ≥ DefaultKappa (h ≤ ℓ/2, common practice
	// for a converged J–Δa curve, DESIGN.md §1). The case key mesh.h_fine
	// maps to κ = ℓ/h_fine.
	Kappa float64
	// HFar is the size far from every tip and damaged point (> h_fine).
	HFar float64
	// Ahead and Behind: the fine zone runs along the tip's direction from
	// Behind·ℓ behind the tip to Ahead·ℓ ahead of it (Ahead > 0, Behind ≥ 0).
	Ahead, Behind float64
	// Width is the zone's half-width (ℓ) at its back end and Spread its
	// half-width (ℓ) at its front end; Spread ≥ Width widens the zone ahead
	// so that a path that turns stays inside (a turn of up to about
	// atan(Spread/Ahead) before the next remesh).
	Width, Spread float64
	// Grading bounds the size gradient: |∇h| ≤ Grading everywhere the
	// field itself sets the size (0 < Grading ≤ 1; 0.2–0.3 is common
	// practice for a smooth Delaunay refinement), as Options.Grading does
	// for the initial Field.
	Grading float64
	// Wake is the size, in units of h_fine, given to damaged points
	// outside the fine zone (the unloading wake): ≥ 1, and h_wake ≤ h_far.
	Wake float64
}

// DefaultKappa is the default κ = ℓ/h_fine: h_fine = ℓ/2, the coarsest
// size at which J–Δa converges (DESIGN.md §1).
const DefaultKappa = 2

// DefaultFollowOptions returns the defaults for internal length ell and far
// size hFar: κ = DefaultKappa; a zone whose axis runs from 1ℓ behind to 4ℓ
// ahead of the tip, with half-width 3ℓ at the back and 4ℓ at the front (so
// its edge is 8ℓ ahead of the tip, about 3ℓ beside it and 4ℓ behind it: a
// damage band of width 1.5ℓ, V10, sits well inside); grading
// DefaultGrading; wake 4·h_fine.
func DefaultFollowOptions(ell, hFar float64) FollowOptions {
	return FollowOptions{
		Length: ell, Kappa: DefaultKappa, HFar: hFar,
		Ahead: 4, Behind: 1, Width: 3, Spread: 4,
		Grading: DefaultGrading, Wake: 4,
	}
}

// hFine returns h_fine = ℓ/κ.
func (o *FollowOptions) hFine() float64 { return o.Length / o.Kappa }

// HWake returns the wake size Wake·h_fine.
func (o *FollowOptions) HWake() float64 { return o.Wake * o.hFine() }

// Validate checks the options and says which one is wrong and what is allowed.
func (o *FollowOptions) Validate() error {
	pos := func(name string, v float64) error {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("remesh: follow option %s = %g must be finite and > 0", name, v)
		}
		return nil
	}
	for _, c := range []struct {
		n string
		v float64
	}{{"Length", o.Length}, {"Kappa", o.Kappa}, {"HFar", o.HFar}, {"Ahead", o.Ahead},
		{"Width", o.Width}, {"Spread", o.Spread}, {"Grading", o.Grading}, {"Wake", o.Wake}} {
		if err := pos(c.n, c.v); err != nil {
			return err
		}
	}
	if o.Kappa < DefaultKappa {
		return fmt.Errorf("remesh: follow option Kappa = %g must be ≥ %d (h_fine ≤ ℓ/%d)", o.Kappa, DefaultKappa, DefaultKappa)
	}
	if !(o.Behind >= 0) || math.IsInf(o.Behind, 0) {
		return fmt.Errorf("remesh: follow option Behind = %g must be finite and ≥ 0", o.Behind)
	}
	if o.Grading > 1 {
		return fmt.Errorf("remesh: follow option Grading = %g must be ≤ 1", o.Grading)
	}
	if o.Wake < 1 {
		return fmt.Errorf("remesh: follow option Wake = %g must be ≥ 1 (the wake is not finer than the zone)", o.Wake)
	}
	if o.HFar < o.HWake() {
		return fmt.Errorf("remesh: follow option HFar = %g must be ≥ the wake size Wake·ℓ/κ = %g", o.HFar, o.HWake())
	}
	if math.Abs(o.Spread-o.Width) >= o.Ahead+o.Behind {
		return fmt.Errorf("remesh: follow options |Spread − Width| = %g must be < Ahead + Behind = %g (the zone would not be a tapered capsule)",
			math.Abs(o.Spread-o.Width), o.Ahead+o.Behind)
	}
	return nil
}

// ZonePiece is the fine zone of one tip: the union of the discs whose
// centres run along the segment A→B and whose radii vary linearly from RA
// at A to RB at B (a tapered capsule, the convex hull of the two end discs).
type ZonePiece struct {
	Tip    criteria.Tip
	A, B   [2]float64
	RA, RB float64
}

// distance returns the signed distance-like function of the piece: the
// distance from x to the zone outside it (exact), and minus the depth of x
// in the deepest disc inside it (a lower bound of the depth below the
// zone's edge, exact for RA = RB). It is 1-Lipschitz.
func (z *ZonePiece) distance(x [2]float64) float64 {
	ux, uy := z.B[0]-z.A[0], z.B[1]-z.A[1]
	L := math.Hypot(ux, uy)
	if L == 0 {
		return math.Hypot(x[0]-z.A[0], x[1]-z.A[1]) - math.Max(z.RA, z.RB)
	}
	ux, uy = ux/L, uy/L
	dx, dy := x[0]-z.A[0], x[1]-z.A[1]
	p := dx*ux + dy*uy            // along the axis
	q := math.Abs(-dx*uy + dy*ux) // across it
	k := (z.RB - z.RA) / L        // radius slope, |k| < 1
	// Minimise |x − c(s)| − r(s) over s ∈ [0, L]: the stationary point of
	// the convex function is s − p = k q / √(1 − k²); clamp to the segment.
	s := p + k*q/math.Sqrt(1-k*k)
	s = math.Max(0, math.Min(L, s))
	return math.Hypot(p-s, q) - (z.RA + k*s)
}

// FineZone describes the fine zones of a size field, one piece per tip, as
// the trigger needs them, together with the sizes the field promised.
type FineZone struct {
	Pieces []ZonePiece
	HFine  float64 // size inside the zone
	HWake  float64 // size at damaged points outside the zone
}

// distance returns the smallest piece distance (negative inside the zone);
// +Inf when the zone has no piece.
func (z *FineZone) distance(x [2]float64) float64 {
	d := math.Inf(1)
	for i := range z.Pieces {
		d = math.Min(d, z.Pieces[i].distance(x))
	}
	return d
}

// Depth returns how far x lies inside the zone, −distance: positive inside,
// negative outside.
func (z *FineZone) Depth(x [2]float64) float64 { return -z.distance(x) }

// zoneFor returns the zone piece that FollowOptions opt puts around tip t.
func zoneFor(t criteria.Tip, opt *FollowOptions) (ZonePiece, error) {
	d, ok := t.UnitDir()
	if !ok {
		return ZonePiece{}, fmt.Errorf("remesh: tip %q at (%g, %g): direction (%g, %g) must be finite and non-zero", t.Name, t.X[0], t.X[1], t.Dir[0], t.Dir[1])
	}
	if math.IsNaN(t.X[0]) || math.IsNaN(t.X[1]) || math.IsInf(t.X[0], 0) || math.IsInf(t.X[1], 0) {
		return ZonePiece{}, fmt.Errorf("remesh: tip %q position (%g, %g) must be finite", t.Name, t.X[0], t.X[1])
	}
	l := opt.Length
	return ZonePiece{
		Tip: t,
		A:   [2]float64{t.X[0] - opt.Behind*l*d[0], t.X[1] - opt.Behind*l*d[1]},
		B:   [2]float64{t.X[0] + opt.Ahead*l*d[0], t.X[1] + opt.Ahead*l*d[1]},
		RA:  opt.Width * l,
		RB:  opt.Spread * l,
	}, nil
}

// TipField is the tip-following size field of DESIGN.md §4:
//
//	h(x) = min( h_fine + g·dist(x, zone),          around and ahead of every tip
//	            h_wake + g·dist(x, damaged points), the wake (see below)
//	            feature(x),                          geometry features
//	            h_far )
//
// with g = Grading, h_wake = Wake·h_fine. The damaged points are thinned to
// one per cell of diagonal δ = 0.1·h_wake/g and the wake term's base
// lowered by g·δ (so h ≤ h_wake at every damaged point still holds, and h
// is at most 10% finer than h_wake there). Each of the first two terms is
// g-Lipschitz (a distance function is 1-Lipschitz) and so is their minimum
// with a constant: the field grades at most at rate g wherever the feature
// function does not set the size. The feature function is the caller's
// (notch roots, load points, arcs); its own gradation is its business.
type TipField struct {
	opt     FollowOptions
	zone    FineZone
	wake    *plane.Points
	feature func(x, y float64) float64
	// reach is the distance beyond which a term exceeds h_far.
	zoneReach, wakeReach float64
	wakeBase             float64 // h_wake less the thinning allowance
}

// NewTipField builds the size field for the given tips (several at once),
// damaged points (see DamagedPoints) and an optional feature size function
// (nil for none; it returns +Inf where it sets nothing).
func NewTipField(tips []criteria.Tip, damaged [][2]float64, feature func(x, y float64) float64, opt FollowOptions) (*TipField, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	f := &TipField{opt: opt, feature: feature}
	f.zone = FineZone{HFine: opt.hFine(), HWake: opt.HWake()}
	for i, t := range tips {
		z, err := zoneFor(t, &opt)
		if err != nil {
			return nil, fmt.Errorf("remesh: tip %d: %w", i, err)
		}
		f.zone.Pieces = append(f.zone.Pieces, z)
	}
	for i, p := range damaged {
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			return nil, fmt.Errorf("remesh: damaged point %d (%g, %g) must be finite", i, p[0], p[1])
		}
	}
	g := opt.Grading
	// Thin the damaged points to one per cell of diagonal δ = 0.1·h_wake/g
	// and lower the wake base by g·δ: every damaged point is within δ of a
	// kept one, so h ≤ h_wake still holds at every damaged point, the
	// field stays g-Lipschitz, and a query visits far fewer points.
	delta := 0.1 * f.zone.HWake / g
	f.wakeBase = f.zone.HWake - g*delta
	f.wake = plane.NewPoints(thinPoints(damaged, delta/math.Sqrt2))
	f.zoneReach = (opt.HFar - f.zone.HFine) / g
	f.wakeReach = (opt.HFar - f.wakeBase) / g
	return f, nil
}

// At returns the target element size at (x, y); it plugs into MeshDomain.
func (f *TipField) At(x, y float64) float64 {
	o := &f.opt
	h := o.HFar
	p := [2]float64{x, y}
	if d := f.zone.distance(p); d < f.zoneReach {
		h = math.Min(h, f.zone.HFine+o.Grading*math.Max(0, d))
	}
	if d := f.wake.Dist(p, f.wakeReach); d < f.wakeReach {
		h = math.Min(h, f.wakeBase+o.Grading*d)
	}
	if f.feature != nil {
		if v := f.feature(x, y); v > 0 && v < h {
			h = v
		}
	}
	return h
}

// thinPoints keeps the first point of every square cell of side c.
func thinPoints(pts [][2]float64, c float64) [][2]float64 {
	seen := make(map[[2]int64]bool, len(pts))
	var out [][2]float64
	for _, p := range pts {
		k := [2]int64{int64(math.Floor(p[0] / c)), int64(math.Floor(p[1] / c))}
		if !seen[k] {
			seen[k] = true
			out = append(out, p)
		}
	}
	return out
}

// Zone returns the fine zone's description for the trigger.
func (f *TipField) Zone() FineZone {
	z := f.zone
	z.Pieces = append([]ZonePiece(nil), f.zone.Pieces...)
	return z
}

// InitialZone describes the fine zone of the initial mesh's Field (the
// capsules of radius FineRadius around its zones) for the trigger; hWake is
// the size damaged points may have outside it (FollowOptions.HWake).
func InitialZone(s *Field, hWake float64) FineZone {
	z := FineZone{HFine: s.Options.HFine, HWake: math.Max(hWake, s.Options.HFine)}
	r := s.Options.FineRadius
	for _, q := range s.Zones {
		z.Pieces = append(z.Pieces, ZonePiece{
			Tip: criteria.Tip{X: q.From, Dir: [2]float64{q.To[0] - q.From[0], q.To[1] - q.From[1]}},
			A:   q.From, B: q.To, RA: r, RB: r,
		})
	}
	return z
}

// FeatureSizes returns a feature size function for NewTipField that keeps
// geometry features at their own sizes: within the pieces of d whose label
// has a size in byLabel and at the named points with a size in byPoint,
// h ≤ size + grading·distance (so the feature's size grades like the rest of
// the field). Sizes must be positive; unknown labels or points are errors.
func FeatureSizes(d *geom.Domain, byLabel, byPoint map[string]float64, grading float64) (func(x, y float64) float64, error) {
	if d == nil {
		return nil, fmt.Errorf("remesh: feature sizes: no domain given")
	}
	if !(grading > 0 && grading <= 1) {
		return nil, fmt.Errorf("remesh: feature sizes: grading %g must lie in (0, 1]", grading)
	}
	type feat struct {
		p *geom.Piece
		x [2]float64
		h float64
	}
	var fs []feat
	labels := map[string]bool{}
	for _, l := range d.Labels() {
		labels[l] = true
	}
	for lab, h := range byLabel {
		if !(h > 0) || math.IsInf(h, 0) {
			return nil, fmt.Errorf("remesh: feature sizes: label %q size %g must be finite and > 0", lab, h)
		}
		if !labels[lab] {
			return nil, fmt.Errorf("remesh: feature sizes: the domain has no label %q (it has %v)", lab, d.Labels())
		}
	}
	for i := 0; i < d.NumPieces(); i++ {
		p, _, _ := d.Piece(i)
		if h, ok := byLabel[p.Label]; ok {
			fs = append(fs, feat{p: p, h: h})
		}
	}
	for name, h := range byPoint {
		pt, ok := d.Points[name]
		if !ok {
			return nil, fmt.Errorf("remesh: feature sizes: the domain has no point %q", name)
		}
		if !(h > 0) || math.IsInf(h, 0) {
			return nil, fmt.Errorf("remesh: feature sizes: point %q size %g must be finite and > 0", name, h)
		}
		fs = append(fs, feat{x: pt.X, h: h})
	}
	return func(x, y float64) float64 {
		h := math.Inf(1)
		q := [2]float64{x, y}
		for i := range fs {
			var dd float64
			if fs[i].p != nil {
				dd = fs[i].p.Distance(q)
			} else {
				dd = math.Hypot(x-fs[i].x[0], y-fs[i].x[1])
			}
			h = math.Min(h, fs[i].h+grading*dd)
		}
		return h
	}, nil
}
