package remesh

import (
	"fmt"
	"math"
	"os"
	"sync"
	"testing"
	"time"

	"tearline/remesh/geom"
	"tearline/remesh/size"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
)

// The V10 mesh-objectivity case: the half model (mirror plane z = 0) of a
// round notched bar, axisymmetric, minimum radius r₀ = 2 mm, outer radius
// 3 mm, notch radius 2 mm, length 8 mm, of alloy TL-7 (E 200 GPa, ν 0.3,
// σ₀ 450 MPa, power hardening n = 0.1, q₁ 1.5, q₂ 1, f_c 0.02, f_F 0.2), the
// end pulled along the axis on a fixed mesh (no remeshing). The fine zone
// (h = h_fine) covers the whole minimum section (a capsule about the
// segment from the axis to r = 3ℓ, radius 2ℓ), where the damage band forms
// at the centre and grows; outside it h grows at a rate of 0.25 up to
// 0.5 mm. (A zone of radius 1.5ℓ reaching only 3ℓ made the ℓ/2 and ℓ/4
// curves differ by 6.6% at 10% drop: the outer ring of the section takes
// part in the drop.) Penalty r = σ₀ (the case default).
const (
	v10R0    = 2.0  // minimum radius r₀, mm
	v10Ell   = 0.4  // ℓ of the objectivity pair (r₀ = 5ℓ), mm
	v10Elong = 0.4  // end displacement at t = 1, mm (runs end earlier, see notchedBar)
	v10HFar  = 0.5  // largest element, mm
	v10F0    = 0.01 // f₀ raised from TL-7's 0.005 (see notchedBar)
)

// barCase is one run of the V10 bar: internal length Ell (0 = local GTN),
// element size H in a fine zone of height 2·Zone and reach 5·Zone from the
// axis (Zone is the ℓ the mesh is made for, so a local run can use the
// mesh of a regularised one).
type barCase struct {
	Ell, H, Zone float64
}

func (b barCase) String() string {
	if b.Ell == 0 {
		return fmt.Sprintf("local, h = %g", b.H)
	}
	return fmt.Sprintf("ℓ = %g, h = ℓ/%g", b.Ell, b.Ell/b.H)
}

// barRun is what a run of the bar records: the force–elongation curve.
type barRun struct {
	Case     barCase
	Elements int
	Status   solver.Status
	Reason   string
	Elong    []float64 // end displacement
	Force    []float64 // axial force on the end (whole ring)
	Wall     time.Duration
}

// v10Material is alloy TL-7 with internal length ell (0 = local GTN).
func v10Material(ell float64) (*material.GTN, material.GTNParams, error) {
	par := material.DefaultGTN()
	par.Hardening = material.PowerLaw{Sigma0: 450, Eps0: 450 / 200e3, N: 0.1}
	// f₀ = 0.01 instead of TL-7's 0.005: the steep load drop of the bar
	// then comes at an elongation of about 0.24 mm instead of 0.36 mm
	// (measured on the ℓ/2 mesh), which saves a third of the steps of every
	// run; the mesh question is the same.
	par.F0, par.FC, par.FF = v10F0, 0.02, 0.2
	par.Length, par.Penalty = ell, 450
	mat, err := material.NewGTN(par)
	return mat, par, err
}

// notchedBar runs one case until its force has dropped v10StopDrop below
// the peak, or to the clean solver stop when the increments become too
// small: without the first limit a regularised run stops that way some
// 10–20% down the load drop, where the gradient term drives the flow
// stress at the flanks of the band to the floor and the local integration
// fails at every increment.
func notchedBar(bc barCase) (*barRun, error) {
	d, err := geom.NotchedBar{MinRadius: v10R0, OuterRadius: 1.5 * v10R0, NotchRadius: v10R0, Length: 4 * v10R0}.Domain()
	if err != nil {
		return nil, err
	}
	mat, par, err := v10Material(bc.Ell)
	if err != nil {
		return nil, err
	}
	so := solver.DefaultOptions()
	so.Dt, so.DtMax, so.DtMin = 0.1, 0.1, 1e-5
	so.EasyIter = 5
	cfg := CycleConfig{
		Domain:   d,
		Size:     size.Options{HFine: bc.H, HFar: v10HFar, FineRadius: 2 * bc.Zone, Ahead: 3 * bc.Zone},
		FE:       fem.Options{Kinematics: fem.Axisymmetric},
		Material: mat, Fc: par.FC,
		Solver: so,
	}
	cfg.BCs, cfg.Measure = pulledEdge("end", [2]bool{false, true}, v10Elong,
		fem.Symmetry{Label: "symmetry", Comp: 1}, fem.Symmetry{Label: "axis", Comp: 0})
	c, err := NewCycle(cfg)
	if err != nil {
		return nil, err
	}
	run := &barRun{Case: bc, Elements: len(c.mesh.Tri)}
	obs := &barObserver{run: run}
	out, err := c.Run(obs)
	if err != nil {
		return nil, fmt.Errorf("%v: %w", bc, err)
	}
	run.Status, run.Reason, run.Wall = out.Status, out.Reason, c.wall
	return run, nil
}

// v10StopDrop ends a bar run once its force has fallen this far below the
// peak: the comparisons stop at 8% (v10Drops), and the rest of the drop,
// with its cut-backs before the clean stop, would only cost time.
const v10StopDrop = 0.095

type barObserver struct {
	run  *barRun
	peak float64
}

func (o *barObserver) Step(r *StepRecord, v View) error {
	o.run.Elong = append(o.run.Elong, r.Control)
	o.run.Force = append(o.run.Force, r.Force)
	o.peak = math.Max(o.peak, r.Force)
	if r.Force < (1-v10StopDrop)*o.peak {
		v.RequestStop("force dropped below the stop level")
	}
	return nil
}

func (o *barObserver) Remesh(*RemeshRecord, View) error { return nil }

// bandWidth measures the band f ≥ level about the mirror plane y = 0: twice
// the area of the region within x ≤ col, y ≤ ylim divided by col (its mean
// full width over that strip, from the Gauss-point weights; ylim keeps the
// measure in the band zone, away from the loaded end).
func bandWidth(gp *fem.GaussPoints, level, col, ylim float64) float64 {
	var area float64
	for i := range gp.Points {
		p := &gp.Points[i]
		if p.X[0] <= col && p.X[1] <= ylim && p.State.F >= level {
			area += p.DA
		}
	}
	return 2 * area / col
}

// peak returns the index of the largest force.
func (r *barRun) peak() int {
	k := 0
	for i, f := range r.Force {
		if f > r.Force[k] {
			k = i
		}
	}
	return k
}

// atDrop returns the elongation past the peak at which the force has
// fallen to (1 − drop)·F_max (linear between steps); ok is false if the
// run ended before.
func (r *barRun) atDrop(drop float64) (float64, bool) {
	k := r.peak()
	lv := (1 - drop) * r.Force[k]
	for i := k + 1; i < len(r.Force); i++ {
		if r.Force[i] <= lv {
			s := (r.Force[i-1] - lv) / (r.Force[i-1] - r.Force[i])
			return r.Elong[i-1] + s*(r.Elong[i]-r.Elong[i-1]), true
		}
	}
	return 0, false
}

// forceAt returns the force at elongation x (linear between steps); ok is
// false outside the run.
func (r *barRun) forceAt(x float64) (float64, bool) {
	for i := 1; i < len(r.Elong); i++ {
		if r.Elong[i] >= x && r.Elong[i-1] <= x {
			s := (x - r.Elong[i-1]) / (r.Elong[i] - r.Elong[i-1])
			return r.Force[i-1] + s*(r.Force[i]-r.Force[i-1]), true
		}
	}
	return 0, false
}

// v10Drops are the force drops below the peak of the finer run at whose
// elongations the two curves are compared: all after the onset of
// softening, where f ≥ f_c at the centre. The regularised runs end some
// 10–20% down (see notchedBar), so the comparison stops at 8%.
var v10Drops = []float64{0.02, 0.04, 0.06, 0.08}

// softening returns the elongation the run needs to go from 2% to 8% force
// drop (the post-peak branch; a run that localises in one row of elements
// falls faster on a finer mesh).
func (r *barRun) softening() (float64, error) {
	a, okA := r.atDrop(0.02)
	b, okB := r.atDrop(0.08)
	if !okA || !okB {
		return 0, fmt.Errorf("%v: the run ended (%s) before an 8%% force drop", r.Case, r.Reason)
	}
	return b - a, nil
}

// softeningDifference returns |s_coarse/s_fine − 1| of the softening
// elongations and the two values.
func softeningDifference(coarse, fine *barRun) (rel, sc, sf float64, err error) {
	if sc, err = coarse.softening(); err != nil {
		return 0, 0, 0, err
	}
	if sf, err = fine.softening(); err != nil {
		return 0, 0, 0, err
	}
	return math.Abs(sc/sf - 1), sc, sf, nil
}

// curveDifference compares the coarse run with the fine one at the
// elongations where the fine one's force has dropped by v10Drops: the
// largest |F_coarse/F_fine − 1| and the values at each drop.
func curveDifference(coarse, fine *barRun) (worst float64, at []float64, err error) {
	for _, d := range v10Drops {
		x, ok := fine.atDrop(d)
		if !ok {
			return 0, nil, fmt.Errorf("%v: the run ended (%s) before a %.0f%% force drop", fine.Case, fine.Reason, 100*d)
		}
		fc, ok := coarse.forceAt(x)
		if !ok {
			return 0, nil, fmt.Errorf("%v: the run ended (%s) before the elongation %.4g of the %.0f%% drop of %v", coarse.Case, coarse.Reason, x, 100*d, fine.Case)
		}
		rel := fc/((1-d)*fine.Force[fine.peak()]) - 1
		at = append(at, rel)
		worst = math.Max(worst, math.Abs(rel))
	}
	return worst, at, nil
}

// runBars runs the cases concurrently (each on its own mesh and problem).
func runBars(t *testing.T, cases []barCase) map[barCase]*barRun {
	t.Helper()
	out := make([]*barRun, len(cases))
	errs := make([]error, len(cases))
	var wg sync.WaitGroup
	for i, bc := range cases {
		wg.Add(1)
		go func(i int, bc barCase) {
			defer wg.Done()
			out[i], errs[i] = notchedBar(bc)
		}(i, bc)
	}
	wg.Wait()
	runs := map[barCase]*barRun{}
	for i, r := range out {
		if errs[i] != nil {
			t.Fatal(errs[i])
		}
		k := r.peak()
		t.Logf("%-18v %5d elements, %3d steps, peak %.5g N at %.4g mm, end %.5g N at %.4g mm (%.1f%% down, %v: %.60s…), wall %v",
			r.Case, r.Elements, len(r.Force), r.Force[k], r.Elong[k], r.Force[len(r.Force)-1], r.Elong[len(r.Elong)-1],
			100*(1-r.Force[len(r.Force)-1]/r.Force[k]), r.Status, r.Reason, r.Wall.Round(time.Second))
		runs[r.Case] = r
	}
	return runs
}

// TestV10MeshObjectivity is V10 of DESIGN.md §5. Force–elongation on the
// notched bar; band width on the uniaxial-strain column.
//
// Default run: the regularised bar (ℓ = 0.4 mm) on h = ℓ/2 and ℓ/4, and the
// column band of ℓ = 0.2 and 0.4 mm at h = ℓ/2 and at h = ℓ/4.
// TEARLINE_LONG=1 adds the local bar (material.length = 0: GTN without the
// ā, λ fields) on the same two meshes.
//
// Checks:
//   - the regularised force–elongation curves at h = ℓ/2 and ℓ/4 agree
//     within 5% at the elongations of 2–8% force drop (common practice:
//     h ≤ ℓ/2 gives a converged curve);
//   - the local model on the same two meshes needs elongations from 2% to
//     8% drop that differ by more than twice as much as the regularised
//     model's (the mesh dependence of local softening:
//     Needleman & Tvergaard 1984; Pijaudier-Cabot & Bažant 1987, from
//     memory);
//   - the band f ≥ 2f_c when the first point breaks has a width of order
//     ℓ (accepted 0.5ℓ–4ℓ; common practice: about 1.3–1.5ℓ) and doubles
//     when ℓ doubles at the same h/ℓ, within ±20% (common practice).
func TestV10MeshObjectivity(t *testing.T) {
	long := os.Getenv("TEARLINE_LONG") == "1"
	ell := v10Ell
	reg2 := barCase{Ell: ell, H: ell / 2, Zone: ell}
	reg4 := barCase{Ell: ell, H: ell / 4, Zone: ell}
	loc2 := barCase{H: ell / 2, Zone: ell}
	loc4 := barCase{H: ell / 4, Zone: ell}
	cases := []barCase{reg4, reg2}
	if long {
		cases = append(cases, loc4, loc2)
	}
	// Column bands: ℓ and 2ℓ at h/ℓ = 1/2 and 1/4, run beside the bars.
	type colCase struct{ ell, h float64 }
	cols := []colCase{{0.2, 0.1}, {0.4, 0.2}, {0.2, 0.05}, {0.4, 0.1}}
	colW := make([]float64, len(cols))
	colErr := make([]error, len(cols))
	colLog := make([]string, len(cols))
	var wg sync.WaitGroup
	for i, c := range cols {
		wg.Add(1)
		go func(i int, c colCase) {
			defer wg.Done()
			t0 := time.Now()
			w, n, at, err := columnBand(c.ell, c.h)
			colW[i], colErr[i] = w, err
			colLog[i] = fmt.Sprintf("column ℓ = %g, h = ℓ/%g: %d elements, first break at u = %.4g mm, band %.4g mm = %.3fℓ, wall %v",
				c.ell, c.ell/c.h, n, at, w, w/c.ell, time.Since(t0).Round(time.Second))
		}(i, c)
	}
	runs := runBars(t, cases)
	wg.Wait()
	for i := range cols {
		if colErr[i] != nil {
			t.Fatal(colErr[i])
		}
		t.Log(colLog[i])
	}

	regDiff, regAt, err := curveDifference(runs[reg2], runs[reg4])
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("regularised ℓ/2 vs ℓ/4 at %s drop: %s; largest %.2f%%", pct(v10Drops), pct(regAt), 100*regDiff)
	regSoft, sc, sf, err := softeningDifference(runs[reg2], runs[reg4])
	if err != nil {
		t.Fatal(err)
	}
	// The elongation from 2% to 8% drop is logged here and compared with
	// the local model's below; it magnifies small force differences where
	// the curve is still flat (2% drop), so the 5% limit is on the force.
	t.Logf("regularised elongation from 2%% to 8%% drop: ℓ/2 %.4g mm, ℓ/4 %.4g mm (%.2f%%)", sc, sf, 100*regSoft)
	// Common practice: h ≤ ℓ/2 gives a mesh-converged curve (5%: the tolerance).
	if regDiff > 0.05 {
		t.Errorf("regularised model: h = ℓ/2 and ℓ/4 differ by %.2f%% in force after the onset of softening, allowed 5%%", 100*regDiff)
	}

	for k := 0; k < len(cols); k += 2 {
		a, b := cols[k], cols[k+1]
		ratio := colW[k+1] / colW[k]
		t.Logf("band at h = ℓ/%g: ℓ = %g: %.2fℓ, ℓ = %g: %.2fℓ, ratio %.3f", a.ell/a.h, a.ell, colW[k]/a.ell, b.ell, colW[k+1]/b.ell, ratio)
		// Common practice: the band of a regularised model scales with ℓ.
		if ratio < 1.6 || ratio > 2.4 {
			t.Errorf("h = ℓ/%g: band width ratio %.3f for doubled ℓ, want 2 ± 20%%", a.ell/a.h, ratio)
		}
		// Common practice: band width about 1.3–1.5ℓ; accepted as "of order ℓ": 0.5ℓ–4ℓ.
		for _, i := range []int{k, k + 1} {
			if w := colW[i] / cols[i].ell; w < 0.5 || w > 4 {
				t.Errorf("column ℓ = %g, h = %g: band width %.2fℓ, want of order ℓ (0.5ℓ–4ℓ)", cols[i].ell, cols[i].h, w)
			}
		}
	}

	if !long {
		return
	}
	locDiff, locAt, err := curveDifference(runs[loc2], runs[loc4])
	if err != nil {
		t.Fatal(err)
	}
	locSoft, lc, lf, err := softeningDifference(runs[loc2], runs[loc4])
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("local ℓ/2 vs ℓ/4 at %s drop: %s; largest %.2f%% (regularised %.2f%%)", pct(v10Drops), pct(locAt), 100*locDiff, 100*regDiff)
	t.Logf("local elongation from 2%% to 8%% drop: ℓ/2 %.4g mm, ℓ/4 %.4g mm (%.1f%%; %.0f× the regularised %.2f%%)", lc, lf, 100*locSoft, locSoft/regSoft, 100*regSoft)
	// Needleman & Tvergaard 1984; Pijaudier-Cabot & Bažant 1987 (from
	// memory): local softening localises in one row of elements, so the
	// load drop depends on h: the post-peak branch must differ clearly
	// more between the meshes than the regularised one does.
	if locSoft < 2*regSoft {
		t.Errorf("local model: softening elongations of h = ℓ/2 and ℓ/4 differ by %.2f%%, want clearly more than the regularised %.2f%% (> 2×)", 100*locSoft, 100*regSoft)
	}
}

func pct(v []float64) string {
	s := ""
	for i, x := range v {
		if i > 0 {
			s += ", "
		}
		s += fmt.Sprintf("%.2f%%", 100*x)
	}
	return s
}

// The V10 band-width case: a plane-strain column in uniaxial strain (sides
// held in x, the end pulled in y), the half above the mirror plane y = 0,
// width v10ColW and height v10ColH, of the same TL-7 GTN material. The
// high triaxiality of uniaxial strain grows the voids and the column
// softens; a smooth porosity imperfection at y = 0 (f₀ raised by 10% with a
// Gaussian profile of width v10ColB, below ℓ/4) puts the band there. The
// only other length is the half height (≥ 3ℓ), so the band width is the
// model's own. Measured while building this test: on the notched bar the
// region f ≥ 2f_c at the first broken point was about 0.36 mm wide for
// ℓ = 0.2 and 0.4 mm alike (h = ℓ/2), set by the triaxiality field of the
// 2 mm section, so the bar cannot show the scaling at an affordable r₀/ℓ;
// a column 4 mm high snapped back after the peak (the solver stalled
// before any point broke), hence the short one.
const (
	v10ColW  = 0.2  // column width, mm (the problem is one-dimensional)
	v10ColH  = 1.2  // half height, mm
	v10ColB  = 0.04 // width of the imperfection, mm
	v10ColUy = 0.2  // end displacement at t = 1, mm
)

// columnBand runs the column with internal length ell on elements of size h
// in the band zone (|y| ≤ 3ℓ) until the first Gauss point breaks, and
// returns the full width of the region f ≥ 2f_c there (both halves) and the
// number of elements.
func columnBand(ell, h float64) (w float64, elems int, at float64, err error) {
	W, H := v10ColW, v10ColH
	d, _, err := geom.Polygon{
		Loops: []geom.LoopSpec{{Start: [2]float64{0, 0}, Pieces: []geom.PieceSpec{
			{To: [2]float64{W, 0}, Label: "symmetry"},
			{To: [2]float64{W, H}, Label: "right"},
			{To: [2]float64{0, H}, Label: "top"},
			{To: [2]float64{0, 0}, Label: "left"},
		}}},
		// The fine zone of the size field sits about this point and
		// reaches across the column.
		Points: map[string]geom.Point{"band": {X: [2]float64{0, 0}, Tip: true, Dir: [2]float64{1, 0}}},
	}.Domain()
	if err != nil {
		return 0, 0, 0, err
	}
	mat, par, err := v10Material(ell)
	if err != nil {
		return 0, 0, 0, err
	}
	so := solver.DefaultOptions()
	so.Dt, so.DtMax, so.DtMin = 0.02, 0.02, 1e-6
	so.EasyIter = 5
	cfg := CycleConfig{
		Domain:   d,
		Size:     size.Options{HFine: h, HFar: 0.5, FineRadius: 3 * ell, Ahead: W},
		Material: mat, Fc: par.FC,
		Solver: so,
	}
	cfg.BCs, cfg.Measure = pulledEdge("top", [2]bool{true, true}, v10ColUy,
		fem.Symmetry{Label: "symmetry", Comp: 1}, fem.Symmetry{Label: "left", Comp: 0}, fem.Symmetry{Label: "right", Comp: 0})
	c, err := NewCycle(cfg)
	if err != nil {
		return 0, 0, 0, err
	}
	gp := c.GaussPoints()
	st := c.prob.State()
	for e := range st {
		for g := range st[e] {
			y := gp.At(e, g).X[1]
			st[e][g].F = par.F0 * (1 + 0.1*math.Exp(-(y*y)/(v10ColB*v10ColB)))
		}
	}
	if err := c.prob.SetState(st); err != nil {
		return 0, 0, 0, err
	}
	obs := &columnObserver{level: 2 * par.FC, fBreak: par.BreakPorosity(), width: W, ylim: 3 * ell, w: math.NaN()}
	out, err := c.Run(obs)
	if err != nil {
		return 0, 0, 0, err
	}
	if math.IsNaN(obs.w) {
		return 0, 0, 0, fmt.Errorf("column ℓ = %g, h = %g: no point broke (%v %s)", ell, h, out.Status, out.Reason)
	}
	return obs.w, len(c.mesh.Tri), obs.at, nil
}

type columnObserver struct {
	level, fBreak, width float64
	ylim                 float64
	w, at                float64
}

func (o *columnObserver) Step(r *StepRecord, v View) error {
	c := v.c
	if r.MaxPorosity < o.fBreak {
		return nil
	}
	o.w = bandWidth(c.GaussPoints(), o.level, o.width, o.ylim)
	o.at = r.Control
	v.RequestStop("the band has broken")
	return nil
}

func (o *columnObserver) Remesh(*RemeshRecord, View) error { return nil }

// pulledEdge returns the boundary conditions and the measure of a specimen
// whose edge label is displaced by uy·t in y (fix says which components
// are prescribed), with the given symmetry planes: the measure is the
// edge displacement and its y reaction.
func pulledEdge(label string, fix [2]bool, uy float64, syms ...fem.Symmetry) (func(*fem.Mesh) (fem.BCs, error), func(*fem.Problem) (float64, float64, error)) {
	bcs := func(*fem.Mesh) (fem.BCs, error) {
		return fem.BCs{
			Symmetries:    syms,
			Displacements: []fem.Displacement{{Label: label, Fix: fix, Value: [2]float64{0, uy}}},
		}, nil
	}
	measure := func(p *fem.Problem) (float64, float64, error) {
		r, err := p.Reaction(label)
		return uy * p.TCommitted, r[1], err
	}
	return bcs, measure
}
