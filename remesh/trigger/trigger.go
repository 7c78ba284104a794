// Package trigger decides when the adaptive cycle remeshes: when a crack
// tip or the damage front comes within a margin of the edge of the fine
// zone, or when damage or plastic activity sits in an element larger than
// the size field promised there (DESIGN.md §4). Right after a remesh none
// of these holds, so remeshes are rare by construction.
package trigger

import (
	"fmt"
	"math"

	"tearline/criteria"
	"tearline/remesh/size"
	"tearline/solver/fem"
)

// Options sets when Check asks for a new mesh. Distances are in
// units of the internal length ℓ (Length).
type Options struct {
	// Length is the internal length ℓ (> 0).
	Length float64
	// Margin: remesh when a tip or a front point comes within Margin·ℓ of
	// the edge of the fine zone (> 0). With the default zone (edge 8ℓ
	// ahead of the tip) and margin 1.5ℓ a remesh follows about every 6ℓ
	// of growth. The zone's half-width beside the tip must exceed the
	// margin plus the damage band's half-width, or the flanks trigger.
	Margin float64
	// FrontLevel is the porosity on the damage front, f_front (0 < f_front
	// < 1). It has no default here: it belongs to the material, and
	// whoever builds the options sets it to the level the damage front is
	// located at (criteria.FrontOptions: 2·f_c of the material).
	FrontLevel float64
	// WakeBehind: front points more than WakeBehind·ℓ behind the nearest
	// current tip (along its direction) are the crack's flanks, not its
	// front, and are left to the element-size test.
	WakeBehind float64
	// FAlert and PAlert are the alert levels of porosity and cumulative
	// plastic strain (≤ 0 or +Inf switches a test off); broken points
	// always count.
	FAlert, PAlert float64
	// SizeTol: a point above an alert level in an element whose longest
	// edge exceeds SizeTol × the size the field promised there (h_fine
	// inside the zone, h_wake outside) triggers a remesh (≥ 1).
	SizeTol float64
	// MaxRemesh is the largest number of remeshes of a run (≥ 0).
	MaxRemesh int
}

// DefaultOptions returns the defaults for internal length ell:
// margin 1.5ℓ, flanks from 1ℓ behind a tip, alert levels f ≥ 0.02 and
// p ≥ 0.1 (common practice: well above f₀ and the elastic range, well
// below the front), size tolerance 1.5, at most 200 remeshes. FrontLevel is
// left 0, for the caller to set from the material (see Options).
func DefaultOptions(ell float64) Options {
	return Options{Length: ell, Margin: 1.5, WakeBehind: 1,
		FAlert: 0.02, PAlert: 0.1, SizeTol: 1.5, MaxRemesh: 200}
}

// Validate checks the options and says which one is wrong and what is allowed.
func (o *Options) Validate() error {
	for _, c := range []struct {
		n string
		v float64
	}{{"Length", o.Length}, {"Margin", o.Margin}, {"FrontLevel", o.FrontLevel}} {
		if !(c.v > 0) || math.IsInf(c.v, 0) {
			return fmt.Errorf("remesh: trigger option %s = %g must be finite and > 0", c.n, c.v)
		}
	}
	if o.FrontLevel >= 1 {
		return fmt.Errorf("remesh: trigger option FrontLevel = %g must be a porosity < 1", o.FrontLevel)
	}
	if !(o.WakeBehind >= 0) || math.IsInf(o.WakeBehind, 0) {
		return fmt.Errorf("remesh: trigger option WakeBehind = %g must be finite and ≥ 0", o.WakeBehind)
	}
	if math.IsNaN(o.FAlert) || math.IsNaN(o.PAlert) {
		return fmt.Errorf("remesh: trigger alert levels FAlert = %g, PAlert = %g must not be NaN", o.FAlert, o.PAlert)
	}
	if !(o.SizeTol >= 1) || math.IsInf(o.SizeTol, 0) {
		return fmt.Errorf("remesh: trigger option SizeTol = %g must be finite and ≥ 1", o.SizeTol)
	}
	if o.MaxRemesh < 0 {
		return fmt.Errorf("remesh: trigger option MaxRemesh = %d must be ≥ 0", o.MaxRemesh)
	}
	return nil
}

// Cause says why Check decided as it did.
type Cause int

const (
	// Quiet: nothing calls for a new mesh.
	Quiet Cause = iota
	// TipNearEdge: a crack tip is within the margin of the fine zone's edge.
	TipNearEdge
	// FrontNearEdge: a damage-front point is within the margin of the edge.
	FrontNearEdge
	// CoarseDamage: a point above an alert level sits in a too-large element.
	CoarseDamage
	// LimitReached: a remesh is due but MaxRemesh is spent.
	LimitReached
)

func (c Cause) String() string {
	switch c {
	case Quiet:
		return "quiet"
	case TipNearEdge:
		return "tip near zone edge"
	case FrontNearEdge:
		return "front near zone edge"
	case CoarseDamage:
		return "damage in coarse element"
	case LimitReached:
		return "remesh limit reached"
	}
	return fmt.Sprintf("cause(%d)", int(c))
}

// Decision is Check's answer.
type Decision struct {
	Remesh  bool
	Cause   Cause
	Reason  string     // one line for the log
	Where   [2]float64 // the point that decided
	Element int        // the element concerned (CoarseDamage), else −1
}

// LongestEdge returns the longest corner-to-corner edge of triangle e, the
// element size convention of the mesher.
func LongestEdge(m *fem.Mesh, e int) float64 {
	t := m.Tri[e]
	h := 0.0
	for k := 0; k < 3; k++ {
		a, b := m.X[t[k]], m.X[t[(k+1)%3]]
		h = math.Max(h, math.Hypot(b[0]-a[0], b[1]-a[1]))
	}
	return h
}

// Check decides whether the mesh m with Gauss-point data gp needs
// replacing (DESIGN.md §4). tips are the current crack tips, zone the fine
// zone of the size field the mesh was built with, remeshes the number done
// so far. It answers yes when
//
//   - a current tip lies less than Margin·ℓ inside the zone's edge (or
//     outside the zone);
//   - a front point (f ≥ FrontLevel) does, unless it lies more than
//     WakeBehind·ℓ behind the nearest current tip (then it is the crack's
//     flank);
//   - a point above an alert level sits in an element whose longest edge
//     exceeds SizeTol·h_fine (inside the zone) or SizeTol·h_wake (outside).
//
// Right after a remesh none of these holds (the zone reaches Ahead·ℓ ahead
// of the tips, the field gives damaged points h_wake), so the next remesh
// waits for about (Ahead − Margin)·ℓ of growth: remeshes are rare by
// construction. When a remesh is due but remeshes ≥ MaxRemesh, the
// decision is no, with cause LimitReached.
func Check(m *fem.Mesh, gp *fem.GaussPoints, tips []criteria.Tip, zone *size.FineZone, remeshes int, opt Options) (Decision, error) {
	quiet := Decision{Cause: Quiet, Reason: "no remesh needed", Element: -1}
	if err := opt.Validate(); err != nil {
		return quiet, err
	}
	if m == nil || zone == nil {
		return quiet, fmt.Errorf("remesh: trigger: mesh and fine zone must be given")
	}
	if ne, err := gp.Elements(); err != nil || ne != len(m.Tri) {
		return quiet, fmt.Errorf("remesh: trigger: Gauss points do not fit the %d elements of the mesh (%v)", len(m.Tri), err)
	}
	if !(zone.HFine > 0) || !(zone.HWake >= zone.HFine) {
		return quiet, fmt.Errorf("remesh: trigger: fine zone sizes h_fine = %g, h_wake = %g must satisfy 0 < h_fine ≤ h_wake", zone.HFine, zone.HWake)
	}
	dirs := make([][2]float64, len(tips))
	for i, t := range tips {
		d, ok := t.UnitDir()
		if !ok {
			return quiet, fmt.Errorf("remesh: trigger: tip %d %q direction (%g, %g) must be finite and non-zero", i, t.Name, t.Dir[0], t.Dir[1])
		}
		dirs[i] = d
	}
	ell := opt.Length
	margin := opt.Margin * ell
	dec := quiet
	due := func(c Cause, where [2]float64, el int, reason string) {
		dec = Decision{Remesh: true, Cause: c, Reason: reason, Where: where, Element: el}
	}
	// 1. the tips themselves
	for i, t := range tips {
		if dep := zone.Depth(t.X); dep < margin {
			due(TipNearEdge, t.X, -1, fmt.Sprintf("tip %q at (%.6g, %.6g) is %.3gℓ inside the fine zone's edge (margin %.3gℓ)", t.Name, t.X[0], t.X[1], dep/ell, opt.Margin))
			_ = i
			break
		}
	}
	// 2. the damage front
	if !dec.Remesh {
		for i := range gp.Points {
			g := &gp.Points[i]
			if g.State.F < opt.FrontLevel {
				continue
			}
			if behindAll(g.X, tips, dirs, opt.WakeBehind*ell) {
				continue
			}
			if dep := zone.Depth(g.X); dep < margin {
				due(FrontNearEdge, g.X, i/gp.PerElement, fmt.Sprintf("damage front (f = %.3g ≥ %.3g) at (%.6g, %.6g) is %.3gℓ inside the fine zone's edge (margin %.3gℓ)", g.State.F, opt.FrontLevel, g.X[0], g.X[1], dep/ell, opt.Margin))
				break
			}
		}
	}
	// 3. damage or plastic activity in a coarse element
	if !dec.Remesh {
	elements:
		for e := range m.Tri {
			var h float64 = -1
			for i := 0; i < gp.PerElement; i++ {
				g := gp.At(e, i)
				if !size.AboveAlert(g, opt.FAlert, opt.PAlert) {
					continue
				}
				if h < 0 {
					h = LongestEdge(m, e)
				}
				target := zone.HWake
				if zone.Depth(g.X) > 0 {
					target = zone.HFine
				}
				if h > opt.SizeTol*target {
					due(CoarseDamage, g.X, e, fmt.Sprintf("element %d (size %.3g > %.3g × target %.3g) holds a point with f = %.3g, p = %.3g at (%.6g, %.6g)", e, h, opt.SizeTol, target, g.State.F, g.State.P, g.X[0], g.X[1]))
					break elements
				}
			}
		}
	}
	if dec.Remesh && remeshes >= opt.MaxRemesh {
		dec.Remesh = false
		dec.Reason = fmt.Sprintf("remesh due (%s) but the limit of %d remeshes is reached", dec.Reason, opt.MaxRemesh)
		dec.Cause = LimitReached
	}
	return dec, nil
}

// behindAll reports whether x lies more than wake behind the nearest tip
// (along that tip's direction). With no tips nothing is behind.
func behindAll(x [2]float64, tips []criteria.Tip, dirs [][2]float64, wake float64) bool {
	best, bi := math.Inf(1), -1
	for i, t := range tips {
		if d := math.Hypot(x[0]-t.X[0], x[1]-t.X[1]); d < best {
			best, bi = d, i
		}
	}
	if bi < 0 {
		return false
	}
	t, d := tips[bi], dirs[bi]
	return (x[0]-t.X[0])*d[0]+(x[1]-t.X[1])*d[1] < -wake
}
