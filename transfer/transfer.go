package transfer

import (
	"fmt"
	"math"
	"time"

	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/solver/plane"
)

// Method selects how Gauss-point state is recovered on the old mesh.
type Method int

const (
	// PatchRecovery fits linear polynomials over the patch of old
	// triangles around every old corner node (Zienkiewicz & Zhu 1992).
	PatchRecovery Method = iota
	// L2Projection solves the global L2 projection onto continuous P1.
	L2Projection
)

// String returns the method's name.
func (m Method) String() string {
	switch m {
	case PatchRecovery:
		return "patch"
	case L2Projection:
		return "l2"
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// Options controls a transfer.
type Options struct {
	// Method is the recovery of Gauss-point state (default PatchRecovery).
	Method Method
	// F0 and FBreak bound the porosity of sound points: F0 ≤ f < FBreak.
	// Pass the material's initial and breaking porosity.
	F0, FBreak float64
	// TraceFromPorosity resets tr Ep to ln((1−F0)/(1−f)) after the bounds
	// are applied (growth-only GTN; wrong with nucleation).
	TraceFromPorosity bool
	// Axisymmetric weights the integrals of the Record with 2πr.
	Axisymmetric bool
	// Tol is the relative distance (to the old triangle's longest edge)
	// within which a point outside every old triangle counts as inside.
	Tol float64
	// Workers bounds the worker pool; ≤ 0 means GOMAXPROCS.
	Workers int
	// CGTol and CGMaxIter control the conjugate gradients of L2Projection.
	CGTol     float64
	CGMaxIter int
}

// DefaultOptions returns patch recovery, porosity bounds [0, 1), a location
// tolerance of 1e-9, and CG to a relative residual of 1e-13 in at most 2000
// iterations.
func DefaultOptions() Options {
	return Options{Method: PatchRecovery, F0: 0, FBreak: 1, Tol: 1e-9, CGTol: 1e-13, CGMaxIter: 2000}
}

// Validate reports the first option outside its allowed range.
func (o Options) Validate() error {
	switch {
	case o.Method != PatchRecovery && o.Method != L2Projection:
		return fmt.Errorf("transfer: method %v: allowed are %v and %v", o.Method, PatchRecovery, L2Projection)
	case !(o.F0 >= 0 && o.F0 < 1):
		return fmt.Errorf("transfer: F0 = %g must lie in [0, 1)", o.F0)
	case !(o.FBreak > o.F0 && o.FBreak <= 1):
		return fmt.Errorf("transfer: FBreak = %g must lie in (F0 = %g, 1]", o.FBreak, o.F0)
	case !(o.Tol >= 0 && o.Tol < 0.1):
		return fmt.Errorf("transfer: Tol = %g must lie in [0, 0.1)", o.Tol)
	case !(o.CGTol > 0 && o.CGTol < 1):
		return fmt.Errorf("transfer: CGTol = %g must lie in (0, 1)", o.CGTol)
	case o.CGMaxIter < 1:
		return fmt.Errorf("transfer: CGMaxIter = %d must be ≥ 1", o.CGMaxIter)
	}
	return nil
}

// GaussData is what a Gauss point carries besides its material state. W,
// F and P are those of fem.GaussPoint: a checkpoint restores the committed
// points exactly from them, and a transfer keeps W for the work integral of
// the Record. Ee is the elastic logarithmic strain the material saw: it is
// the stress-carrying part of the strain, smooth where the plastic strain
// is not, so that the caller can rebuild Eᵖ from it and the new
// displacement.
type GaussData struct {
	W  float64      // stress-work density per reference volume
	F  [5]float64   // deformation gradient (components 11, 12, 21, 22, 33)
	P  [5]float64   // first Piola–Kirchhoff stress (same layout)
	Ee material.Sym // elastic logarithmic strain Ẽ − Eᵖ
}

// gaussComponents is the number of values of a GaussData.
const gaussComponents = 15

// put stores the values of d in v, in the order W, F, P, Ee.
func (d *GaussData) put(v []float64) {
	v[0] = d.W
	copy(v[1:6], d.F[:])
	copy(v[6:11], d.P[:])
	copy(v[11:15], d.Ee[:])
}

// get sets d from the values of v, in the order of put.
func (d *GaussData) get(v []float64) {
	d.W = v[0]
	copy(d.F[:], v[1:6])
	copy(d.P[:], v[6:11])
	copy(d.Ee[:], v[11:15])
}

// Fields is the mechanical state on a mesh.
type Fields struct {
	// U is the displacement of every node.
	U [][2]float64
	// Linear holds the corner-node fields (θ, P, ā, λ, …), each with one
	// value per corner node.
	Linear [][]float64
	// State is the Gauss-point state: point i of triangle e at e*nq+i, nq
	// the number of points of fem.ElementRule (the layout of
	// fem.GaussPoints).
	State []material.State
	// Gauss is the Gauss-point data in the layout of State, or nil
	// (none carried).
	Gauss []GaussData
}

// Check verifies that the field sizes fit mesh m.
func (f *Fields) Check(m *fem.Mesh) error {
	if f == nil {
		return fmt.Errorf("fields: nil fields")
	}
	if len(f.U) != len(m.X) {
		return fmt.Errorf("fields: displacement has %d values for %d nodes", len(f.U), len(m.X))
	}
	for k, l := range f.Linear {
		if len(l) != m.NumCorners {
			return fmt.Errorf("fields: linear field %d has %d values for %d corner nodes", k, len(l), m.NumCorners)
		}
	}
	np := len(m.Tri) * fem.ElementRule().Len()
	if len(f.State) != np {
		return fmt.Errorf("fields: state has %d points for %d triangles × %d", len(f.State), len(m.Tri), fem.ElementRule().Len())
	}
	if f.Gauss != nil && len(f.Gauss) != np {
		return fmt.Errorf("fields: Gauss-point data has %d points, want %d", len(f.Gauss), np)
	}
	return nil
}

// Measures are the integral figures of a Gauss-point state.
type Measures struct {
	// MaxF is the largest porosity of a sound (not broken) point.
	MaxF float64
	// IntP is ∫ p dV (dV = dA, or 2πr dA in axisymmetry).
	IntP float64
	// Work is ∫ W dV of the stress-work density of the Gauss-point data
	// (0 without it).
	Work float64
	// Volume is ∫ dV.
	Volume float64
	// Broken counts the broken points.
	Broken int
}

// Phases are wall times of the phases of a transfer.
type Phases struct {
	Index    time.Duration // building the R-tree of the old mesh
	Nodes    time.Duration // locating and interpolating nodal fields
	Locate   time.Duration // Gauss-point geometry, unchanged elements, location
	Recover  time.Duration // patch recovery or L2 projection on the old mesh
	Evaluate time.Duration // evaluation at the new points and bounds
	Measure  time.Duration // the Measures before and after
	Total    time.Duration
}

// Record says what a transfer did. Every new Gauss point is counted in
// exactly one of Verbatim, Broken, Projected and Extrapolated.
type Record struct {
	Before, After Measures
	// Verbatim points belong to unchanged triangles; Broken points took a
	// broken old point's state; Projected points lie inside the old mesh;
	// Extrapolated ones outside it (nearest triangle, clamped).
	Verbatim, Broken, Projected, Extrapolated int
	// UnchangedElements counts the new triangles found in the old mesh.
	UnchangedElements int
	// NodesCopied coincide with an old node; NodesInside and NodesOutside
	// were interpolated inside the old mesh or at the nearest triangle.
	NodesCopied, NodesInside, NodesOutside int
	// ClampedF and ClampedP count the points whose projected f or p was
	// outside its bounds.
	ClampedF, ClampedP int
	Wall               Phases
}

// Map transfers the state from on the old mesh onto the new mesh nw.
func Map(old *fem.Mesh, from *Fields, nw *fem.Mesh, opt Options) (*Fields, *Record, error) {
	start := time.Now()
	if err := opt.Validate(); err != nil {
		return nil, nil, err
	}
	if old == nil || nw == nil {
		return nil, nil, fmt.Errorf("transfer: nil mesh")
	}
	if len(old.Tri) == 0 {
		return nil, nil, fmt.Errorf("transfer: the old mesh has no triangles")
	}
	if err := nw.Check(); err != nil {
		return nil, nil, fmt.Errorf("transfer: new mesh: %w", err)
	}
	if err := from.Check(old); err != nil {
		return nil, nil, fmt.Errorf("transfer: old %w", err)
	}
	rec := &Record{}
	w := opt.Workers
	lap := time.Now()
	tick := func(d *time.Duration) { now := time.Now(); *d = now.Sub(lap); lap = now }

	lc, err := NewLocator(old, opt.Tol)
	if err != nil {
		return nil, nil, err
	}
	tick(&rec.Wall.Index)

	to, err := mapNodes(lc, from, nw, rec, w)
	if err != nil {
		return nil, nil, err
	}
	tick(&rec.Wall.Nodes)

	// Gauss points: geometry, unchanged triangles, location of the rest.
	rule := fem.ElementRule()
	nq := rule.Len()
	oldX, oldDA := gaussGeometry(old, rule, w)
	newX, newDA := gaussGeometry(nw, rule, w)
	same, perm := unchanged(old, nw, rule)
	ghits, err := locateGauss(lc, nw, newX, same, nq, w)
	if err != nil {
		return nil, nil, err
	}
	tick(&rec.Wall.Locate)

	rc, nc, err := recoverState(old, from, rule, oldX, oldDA, opt)
	if err != nil {
		return nil, nil, err
	}
	tick(&rec.Wall.Recover)

	// Evaluation at the new points, bounds, broken points.
	gauss := from.Gauss != nil
	to.State = make([]material.State, len(newX))
	if gauss {
		to.Gauss = make([]GaussData, len(newX))
	}
	fMax := math.Nextafter(opt.FBreak, math.Inf(-1))
	kind := make([]pointKind, len(newX))
	clampF := make([]bool, len(newX))
	clampP := make([]bool, len(newX))
	parallel(len(nw.Tri), w, func(lo, hi int) {
		v := make([]float64, nc)
		for e := lo; e < hi; e++ {
			if oe := same[e].elem; oe >= 0 {
				pm := perm[same[e].shift]
				for q := 0; q < nq; q++ {
					j := oe*nq + pm[q]
					to.State[e*nq+q] = from.State[j]
					if gauss {
						to.Gauss[e*nq+q] = from.Gauss[j]
					}
					kind[e*nq+q] = kVerbatim
				}
				continue
			}
			for q := 0; q < nq; q++ {
				i := e*nq + q
				h := ghits[i]
				// The nearest old point in the old triangle decides
				// whether the new point is broken.
				near, nd := -1, math.Inf(1)
				for j := h.Elem * nq; j < (h.Elem+1)*nq; j++ {
					if d := plane.DistSq(oldX[j], newX[i]); d < nd {
						near, nd = j, d
					}
				}
				if from.State[near].Broken {
					to.State[i] = from.State[near]
					if gauss {
						to.Gauss[i] = from.Gauss[near]
					}
					kind[i] = kBroken
					continue
				}
				rc.at(old.Tri[h.Elem], h.L, v)
				to.State[i], clampF[i], clampP[i] = bounded(v, opt, fMax)
				if gauss {
					to.Gauss[i].get(v[6:])
				}
				if h.Inside {
					kind[i] = kProjected
				} else {
					kind[i] = kExtrapolated
				}
			}
		}
	})
	rec.count(kind, clampF, clampP, same)
	tick(&rec.Wall.Evaluate)

	rec.Before = measure(from, oldX, oldDA, opt.Axisymmetric)
	rec.After = measure(to, newX, newDA, opt.Axisymmetric)
	tick(&rec.Wall.Measure)
	rec.Wall.Total = time.Since(start)
	return to, rec, nil
}

// mapNodes interpolates the nodal fields of from (on the Locator's mesh) at
// the nodes of nw and counts in rec how each node was found.
func mapNodes(lc *Locator, from *Fields, nw *fem.Mesh, rec *Record, w int) (*Fields, error) {
	to := &Fields{U: make([][2]float64, len(nw.X)), Linear: make([][]float64, len(from.Linear))}
	hits := lc.LocateNodes(nw, w)
	if err := lc.InterpolateP2(to.U, hits, from.U); err != nil {
		return nil, err
	}
	for k, f := range from.Linear {
		to.Linear[k] = make([]float64, nw.NumCorners)
		if err := lc.InterpolateP1(to.Linear[k], hits, f); err != nil {
			return nil, fmt.Errorf("transfer: linear field %d: %w", k, err)
		}
	}
	for _, h := range hits {
		switch {
		case h.Elem < 0:
		case h.Node >= 0:
			rec.NodesCopied++
		case h.Inside:
			rec.NodesInside++
		default:
			rec.NodesOutside++
		}
	}
	return to, nil
}

// locateGauss locates the Gauss points newX (nq per triangle) of the new
// triangles that no old triangle equals (same[e].elem < 0).
func locateGauss(lc *Locator, nw *fem.Mesh, newX [][2]float64, same []match, nq, w int) ([]Hit, error) {
	ghits := make([]Hit, len(newX))
	parallel(len(nw.Tri), w, func(lo, hi int) {
		for e := lo; e < hi; e++ {
			if same[e].elem >= 0 {
				continue
			}
			for q := 0; q < nq; q++ {
				ghits[e*nq+q] = lc.locate(newX[e*nq+q], nil)
			}
		}
	})
	for e := range nw.Tri {
		if same[e].elem < 0 && ghits[e*nq].Elem < 0 {
			return nil, fmt.Errorf("transfer: Gauss point 0 of new triangle %d at %v could not be located", e, newX[e*nq])
		}
	}
	return ghits, nil
}

// recoverState recovers the Gauss-point state of from on the old mesh as
// linear fields on its corner nodes, component by component: Ep (4), p, f,
// then the Gauss-point data when from carries it. It returns the recovery
// and its number of components.
func recoverState(old *fem.Mesh, from *Fields, rule fem.Rule, oldX [][2]float64, oldDA []float64, opt Options) (*recovery, int, error) {
	nc := 6
	if from.Gauss != nil {
		nc += gaussComponents
	}
	vals := make([]float64, len(from.State)*nc)
	use := make([]bool, len(from.State))
	for i, s := range from.State {
		v := vals[i*nc : i*nc+nc]
		copy(v, s.Ep[:])
		v[4], v[5] = s.P, s.F
		if from.Gauss != nil {
			from.Gauss[i].put(v[6:])
		}
		use[i] = !s.Broken
	}
	if opt.Method == L2Projection {
		rc, err := l2Projection(old, rule, oldDA, vals, nc, opt.CGTol, opt.CGMaxIter, opt.Workers)
		return rc, nc, err
	}
	return patchRecovery(old, rule.Len(), oldX, vals, nc, use, opt.Workers), nc, nil
}

// bounded returns the material state of the recovered values v (Ep, p, f)
// with the physical bounds of opt applied (F0 ≤ f ≤ fMax, p ≥ 0, and on
// request tr Ep from the porosity), and whether f and p were clamped.
func bounded(v []float64, opt Options, fMax float64) (s material.State, clampF, clampP bool) {
	s = material.State{Ep: material.Sym{v[0], v[1], v[2], v[3]}, P: v[4], F: v[5]}
	if !(s.F >= opt.F0) {
		s.F, clampF = opt.F0, true
	} else if s.F > fMax {
		s.F, clampF = fMax, true
	}
	if !(s.P >= 0) {
		s.P, clampP = 0, true
	}
	if opt.TraceFromPorosity {
		d := (math.Log((1-opt.F0)/(1-s.F)) - s.Ep.Trace()) / 3
		s.Ep[0] += d
		s.Ep[1] += d
		s.Ep[2] += d
	}
	return s, clampF, clampP
}

// pointKind is how a new Gauss point got its state.
type pointKind uint8

const (
	kVerbatim pointKind = iota
	kBroken
	kProjected
	kExtrapolated
)

// count adds to rec the kinds and clamps of the new points and the
// unchanged triangles.
func (rec *Record) count(kind []pointKind, clampF, clampP []bool, same []match) {
	for i, k := range kind {
		switch k {
		case kVerbatim:
			rec.Verbatim++
		case kBroken:
			rec.Broken++
		case kProjected:
			rec.Projected++
		case kExtrapolated:
			rec.Extrapolated++
		}
		if clampF[i] {
			rec.ClampedF++
		}
		if clampP[i] {
			rec.ClampedP++
		}
	}
	for _, s := range same {
		if s.elem >= 0 {
			rec.UnchangedElements++
		}
	}
}

// Measure returns the integral figures of the Gauss-point state f on m.
func Measure(m *fem.Mesh, f *Fields, axisymmetric bool) (Measures, error) {
	if m == nil {
		return Measures{}, fmt.Errorf("transfer: measure: nil mesh")
	}
	if err := f.Check(m); err != nil {
		return Measures{}, fmt.Errorf("transfer: measure: %w", err)
	}
	x, da := gaussGeometry(m, fem.ElementRule(), 1)
	return measure(f, x, da, axisymmetric), nil
}

func measure(f *Fields, x [][2]float64, da []float64, axisymmetric bool) Measures {
	var ms Measures
	for i, s := range f.State {
		dv := da[i]
		if axisymmetric {
			dv *= 2 * math.Pi * x[i][0]
		}
		ms.Volume += dv
		ms.IntP += s.P * dv
		if f.Gauss != nil {
			ms.Work += f.Gauss[i].W * dv
		}
		if s.Broken {
			ms.Broken++
		} else if s.F > ms.MaxF {
			ms.MaxF = s.F
		}
	}
	return ms
}

// match is the old triangle an unchanged new triangle equals (elem = -1:
// none) and the rotation shift: new vertex k is old vertex (k+shift) mod 3.
type match struct{ elem, shift int }

// unchanged finds the new triangles whose corner coordinates equal those of
// an old triangle exactly, in some rotation, and the Gauss-point permutation
// of each rotation: perm[s][q] is the old point at the new point q. A
// rotation without an exact point permutation (a rule that is not
// rotation-symmetric) disables verbatim copies for that rotation.
func unchanged(old, nw *fem.Mesh, r fem.Rule) ([]match, [3][]int) {
	var perm [3][]int
	var ok [3]bool
	for s := 0; s < 3; s++ {
		perm[s] = make([]int, r.Len())
		ok[s] = true
		for q, lq := range r.L {
			var lo [3]float64
			for k := 0; k < 3; k++ {
				lo[(k+s)%3] = lq[k]
			}
			perm[s][q] = -1
			for j, lj := range r.L {
				if lj == lo {
					perm[s][q] = j
					break
				}
			}
			ok[s] = ok[s] && perm[s][q] >= 0
		}
	}
	byKey := make(map[triKey]match, len(old.Tri))
	for e := range old.Tri {
		k, rot := canonical(old, e)
		byKey[k] = match{elem: e, shift: rot}
	}
	same := make([]match, len(nw.Tri))
	for e := range nw.Tri {
		same[e] = match{elem: -1}
		k, rot := canonical(nw, e)
		if m, found := byKey[k]; found {
			s := ((m.shift-rot)%3 + 3) % 3
			if ok[s] {
				same[e] = match{elem: m.elem, shift: s}
			}
		}
	}
	return same, perm
}

// triKey is a triangle's corner coordinates (bit patterns, −0 as +0),
// starting at its lexicographically smallest vertex.
type triKey [6]uint64

func canonical(m *fem.Mesh, e int) (triKey, int) {
	t := m.Tri[e]
	v := [3][2]float64{m.X[t[0]], m.X[t[1]], m.X[t[2]]}
	rot := 0
	for k := 1; k < 3; k++ {
		if v[k][0] < v[rot][0] || (v[k][0] == v[rot][0] && v[k][1] < v[rot][1]) {
			rot = k
		}
	}
	var key triKey
	for j := 0; j < 3; j++ {
		k := pointKey(v[(j+rot)%3])
		key[2*j], key[2*j+1] = k[0], k[1]
	}
	return key, rot
}
