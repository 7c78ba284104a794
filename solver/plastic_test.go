package solver

import (
	"math"
	"os"
	"sort"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// misesModel returns the material package's GTN model with no porosity and
// no nucleation — von Mises plasticity (f stays 0 because the plastic flow
// is then isochoric) — elastic-perfectly plastic with yield stress s0.
func misesModel(t *testing.T, s0 float64) material.Model {
	t.Helper()
	par := material.DefaultGTN()
	par.Hardening = material.PerfectlyPlastic{Sigma0: s0}
	par.F0, par.FN = 0, 0
	m, err := material.NewGTN(par)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// convergenceOrder estimates the order q of the last Newton iterations
// from the scaled residuals, q ≈ log(r_{k+1}/r_k)/log(r_k/r_{k−1}), using
// the last three residuals above round-off (1e-10 of the first).
func convergenceOrder(r []float64) (float64, bool) {
	var s []float64
	for _, v := range r {
		if v > 1e-10*r[0] {
			s = append(s, v)
		}
	}
	if len(s) < 3 {
		return 0, false
	}
	n := len(s)
	return math.Log(s[n-1]/s[n-2]) / math.Log(s[n-2]/s[n-3]), true
}

// borePressure returns the pressure on the quarter bore of radius a from
// the reactions of its prescribed displacement: the resultant of a
// pressure q is (q a, q a). The corner nodes also carry the reaction of
// the symmetry lines in the component those fix, so that component is
// left out there (by symmetry the bore's own share of it vanishes).
func borePressure(t *testing.T, p *fem.Problem, a float64) float64 {
	t.Helper()
	nodes, err := p.LabelNodes("left")
	if err != nil {
		t.Fatal(err)
	}
	var fx, fy float64
	for _, n := range nodes {
		f, _ := p.NodeReaction(n)
		X := p.Mesh.X[n]
		if X[0] > 1e-9*a {
			fx += f[0]
		}
		if X[1] > 1e-9*a {
			fy += f[1]
		}
	}
	return 0.5 * math.Abs(fx+fy) / a
}

// TestThickCylinderCollapse is V7: a thick cylinder b/a = 2 of
// elastic-perfectly plastic von Mises material in plane strain, expanded
// by a prescribed bore displacement of 2.7 times the one at which the
// plastic zone reaches the outer surface, carries the
// collapse pressure (2/√3)σ₀ ln(b/a) within 1% (Hill 1950, The
// Mathematical Theory of Plasticity, ch. V). The same run shows the
// quadratic convergence of Newton's method on plastic steps (consistent
// tangent; Simo & Taylor 1985, CMAME 48): the estimated order of the last
// iterations of the steps with at least three iterations is ≥ 1.6.
func TestThickCylinderCollapse(t *testing.T) {
	const a, b, s0, delta = 1.0, 2.0, 100.0, 0.004
	m, err := fem.Structured(8, 3, fem.AnnularSector(a, b, 0, math.Pi/2, 1))
	if err != nil {
		t.Fatal(err)
	}
	bcs := fem.BCs{
		Symmetries: []fem.Symmetry{{Label: "bottom", Comp: 1}, {Label: "top", Comp: 0}},
		Displacements: []fem.Displacement{{Label: "left", Fix: [2]bool{true, true}, Func: func(X [2]float64, t float64) [2]float64 {
			r := math.Hypot(X[0], X[1])
			return [2]float64{delta * t * X[0] / r, delta * t * X[1] / r}
		}}},
	}
	p, err := fem.NewProblem(m, misesModel(t, s0), fem.Options{}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	o := DefaultOptions()
	o.Dt, o.DtMax = 0.05, 0.2
	s, err := New(p, o)
	if err != nil {
		t.Fatal(err)
	}
	var pressure []float64
	var orders []float64
	res, err := s.Run(func(st Step) error {
		pressure = append(pressure, borePressure(t, p, a))
		if q, ok := convergenceOrder(st.Residuals); ok && st.Iterations >= 3 {
			orders = append(orders, q)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != Completed {
		t.Fatalf("run stopped: %s", res.Reason)
	}
	want := 2 / math.Sqrt(3) * s0 * math.Log(b/a)
	got := pressure[len(pressure)-1]
	t.Logf("collapse pressure %.4g, Hill %.4g (ratio %.4f); %d steps, %d iterations, orders %.2f", got, want, got/want, res.Steps, res.Iterations, orders)
	if prev := pressure[len(pressure)-2]; math.Abs(got/prev-1) > 0.003 {
		t.Errorf("pressure still changing at the end (%.4g then %.4g): not collapsed", prev, got)
	}
	if math.Abs(got/want-1) > 0.01 {
		t.Errorf("collapse pressure %.4g, want %.4g within 1%%", got, want)
	}
	if len(orders) == 0 {
		t.Errorf("no plastic step took three iterations: cannot show the convergence order")
	}
	for _, q := range orders {
		if q < 1.6 {
			t.Errorf("Newton convergence order %.2f on a plastic step, want ≈ 2 (≥ 1.6)", q)
		}
	}
}

// punchProblem solves the smooth flat punch of half-width B = 1 on an
// elastic-perfectly plastic von Mises block (half model, 6B × 5B, mesh
// graded towards the punch edge) pushed down by delta; it returns the mean
// punch pressure at each converged step.
func punchProblem(t *testing.T, nx, ny int, disp bool, delta float64) []float64 {
	t.Helper()
	const B, L, H, s0 = 1.0, 6.0, 5.0, 100.0
	place := func(s, tt float64) [2]float64 {
		var x float64
		if s <= 0.5 {
			x = B * (1 - (1-2*s)*(1-2*s))
		} else {
			x = B + (L-B)*(2*s-1)*(2*s-1)
		}
		return [2]float64{x, -H * (1 - tt) * (1 - tt)}
	}
	m, err := fem.Structured(nx, ny, place)
	if err != nil {
		t.Fatal(err)
	}
	// the top edges under the punch get their own label
	m.Labels = append(m.Labels, "punch")
	top := m.Label("top")
	for i, e := range m.Boundary {
		if e.Label == top && m.X[e.A][0] <= B+1e-12 && m.X[e.B][0] <= B+1e-12 {
			m.Boundary[i].Label = len(m.Labels) - 1
		}
	}
	bcs := fem.BCs{
		Symmetries: []fem.Symmetry{{Label: "left", Comp: 0}, {Label: "right", Comp: 0}, {Label: "bottom", Comp: 1}},
		// smooth (frictionless) punch: vertical displacement only
		Displacements: []fem.Displacement{{Label: "punch", Fix: [2]bool{false, true}, Value: [2]float64{0, -delta}}},
	}
	p, err := fem.NewProblem(m, misesModel(t, s0), fem.Options{DisplacementOnly: disp}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	o := DefaultOptions()
	o.Dt, o.DtMax = 0.05, 0.1
	s, err := New(p, o)
	if err != nil {
		t.Fatal(err)
	}
	var pressure []float64
	res, err := s.Run(func(st Step) error {
		f, err := p.Reaction("punch")
		if err != nil {
			return err
		}
		pressure = append(pressure, math.Abs(f[1])/B)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != Completed {
		t.Fatalf("punch run stopped: %s", res.Reason)
	}
	t.Logf("punch %dx%d displacement-only %v: %d steps, %d iterations, %d cut-backs", nx, ny, disp, res.Steps, res.Iterations, res.Cutbacks)
	return pressure
}

// TestPrandtlPunch is V6: the plane-strain smooth flat punch on a
// perfectly plastic (von Mises, k = σ₀/√3) half-space reaches the limit
// pressure (2+π)k (Prandtl 1920, Z. angew. Math. Mech. 1; Hill 1950,
// ch. VIII) within 2% with the mixed element, while the displacement-only
// element of the same mesh overshoots it (volumetric locking of
// incompressible plastic flow; Nagtegaal, Parks & Rice 1974, CMAME 4).
func TestPrandtlPunch(t *testing.T) {
	const s0 = 100.0
	want := (2 + math.Pi) * s0 / math.Sqrt(3)
	mixed := punchProblem(t, 16, 12, false, 0.03)
	got := mixed[len(mixed)-1]
	t.Logf("mixed: pressures %.4g; limit %.4g (ratio %.4f)", mixed, want, got/want)
	if math.Abs(got/want-1) > 0.02 {
		t.Errorf("mixed punch pressure %.4g, want (2+π)k = %.4g within 2%%", got, want)
	}
	disp := punchProblem(t, 16, 12, true, 0.03)
	gd := disp[len(disp)-1]
	t.Logf("displacement-only: pressures %.4g (ratio %.4f)", disp, gd/want)
	if gd < 1.05*want {
		t.Errorf("displacement-only punch pressure %.4g: expected an overshoot of the limit %.4g by more than 5%%", gd, want)
	}
}

// TestRegularisedHomogeneous: under homogeneous plastic straining the
// gradient-regularised GTN model must give ā = p everywhere with λ = 0
// (the strong form c Δā = −λ, λ = r(ā − p) + … has the uniform solution;
// Forest 2009, J. Eng. Mech. 135), i.e. reduce to the local model, and the
// force must equal the local model's. A plane-strain square is stretched
// with free lateral contraction, in three increments.
func TestRegularisedHomogeneous(t *testing.T) {
	force := func(length float64) (float64, *fem.Problem) {
		par := material.DefaultGTN()
		par.Length = length
		mat, err := material.NewGTN(par)
		if err != nil {
			t.Fatal(err)
		}
		p := barProblem(t, mat)
		o := DefaultOptions()
		o.Dt, o.DtMax = 0.34, 0.34
		s, _ := New(p, o)
		res, err := s.Run(nil)
		if err != nil || res.Status != Completed {
			t.Fatalf("ℓ = %g: %v %v", length, res, err)
		}
		f, _ := p.Reaction("top")
		return f[1], p
	}
	fl, _ := force(0)
	fr, p := force(0.5)
	if !p.Regularised() {
		t.Fatal("ℓ > 0 did not switch the ā, λ fields on")
	}
	if math.Abs(fr/fl-1) > 1e-6 {
		t.Errorf("regularised force %.8g, local %.8g", fr, fl)
	}
	st := p.State()
	pp := st[0][0].P
	if !(pp > 1e-3) {
		t.Fatalf("plastic strain %g: the test would not exercise the regularisation", pp)
	}
	ab := make([]float64, len(p.Mesh.X))
	lm := make([]float64, len(p.Mesh.X))
	if err := p.NodalField(fem.Abar, ab); err != nil {
		t.Fatal(err)
	}
	if err := p.NodalField(fem.Lambda, lm); err != nil {
		t.Fatal(err)
	}
	for n := 0; n < p.Mesh.NumCorners; n++ {
		if math.Abs(ab[n]-pp) > 1e-6*pp || math.Abs(lm[n]) > 1e-6*400 {
			t.Fatalf("node %d: ā = %g, λ = %g; want ā = p = %g, λ = 0", n, ab[n], lm[n], pp)
		}
	}
}

// TestGTNPlateWithHole: a robustness check of the whole chain on the real
// damage model. A quarter plate with a hole (1 ≤ r ≤ 4) of porous GTN
// material (f₀ = 0.01) is stretched to 4%, local and regularised
// (ℓ = 0.2): the run completes without a clean stop and the median
// number of Newton iterations per step stays at most 5 (issue 5 targets
// ≤ 6 on the small-scale-yielding case; common practice for a consistent
// tangent).
func TestGTNPlateWithHole(t *testing.T) {
	for _, length := range []float64{0, 0.2} {
		par := material.DefaultGTN()
		par.Length, par.F0 = length, 0.01
		p, s := gtnPlateWithHole(t, par, 0.04)
		var its []int
		res, err := s.Run(func(st Step) error { its = append(its, st.Iterations); return nil })
		if err != nil {
			t.Fatal(err)
		}
		if res.Status != Completed {
			t.Fatalf("ℓ = %g: stopped: %s", length, res.Reason)
		}
		sort.Ints(its)
		var pmax float64
		for _, e := range p.State() {
			for _, g := range e {
				pmax = math.Max(pmax, g.P)
			}
		}
		t.Logf("ℓ = %g: %d steps, %d iterations (median %d), %d cut-backs, largest p %.3g", length, res.Steps, res.Iterations, its[len(its)/2], res.Cutbacks, pmax)
		if med := its[len(its)/2]; med > 5 {
			t.Errorf("ℓ = %g: median %d Newton iterations per step, want ≤ 5", length, med)
		}
		if pmax < 0.1 {
			t.Errorf("ℓ = %g: largest plastic strain %g, the run did not reach the plastic regime it tests", length, pmax)
		}
	}
}

// TestGTNBreakingRun (long: TEARLINE_LONG=1): the plate with a hole of
// porous GTN material (f₀ = 0.03) stretched to 12% until material at the
// hole breaks. Broken elements leave the assembly during the run, the run
// completes, and the force softens (common practice: ductile failure
// shows as a falling load–displacement curve).
func TestGTNBreakingRun(t *testing.T) {
	if os.Getenv("TEARLINE_LONG") != "1" {
		t.Skip("long test: set TEARLINE_LONG=1")
	}
	par := material.DefaultGTN()
	par.F0 = 0.03
	p, s := gtnPlateWithHole(t, par, 0.12)
	var force []float64
	res, err := s.Run(func(st Step) error {
		f, err := p.Reaction("right")
		force = append(force, f[0])
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	broken := 0
	for e := range p.Mesh.Tri {
		if p.Released(e) {
			broken++
		}
	}
	peak := 0.0
	for _, f := range force {
		peak = math.Max(peak, f)
	}
	t.Logf("%v %s: %d steps, %d cut-backs, %d broken elements, peak force %.4g, final %.4g", res.Status, res.Reason, res.Steps, res.Cutbacks, broken, peak, force[len(force)-1])
	if res.Status != Completed || broken == 0 || force[len(force)-1] > 0.9*peak {
		t.Errorf("want a completed run with broken elements and a softened force")
	}
}

// gtnPlateWithHole sets up a quarter of a plate with a hole (10 × 12 graded
// annular sector, radii 1 to 4) of GTN material, its outer edge stretched
// radially to strain·t, with the solver's defaults and increments of 0.02 to
// 0.05.
func gtnPlateWithHole(t *testing.T, par material.GTNParams, strain float64) (*fem.Problem, *Solver) {
	t.Helper()
	mat, err := material.NewGTN(par)
	if err != nil {
		t.Fatal(err)
	}
	return plateWithHole(t, mat, strain)
}

// plateWithHole is gtnPlateWithHole for any material.
func plateWithHole(t *testing.T, mat material.Model, strain float64) (*fem.Problem, *Solver) {
	t.Helper()
	m, err := fem.Structured(10, 12, fem.AnnularSector(1, 4, 0, math.Pi/2, 4))
	if err != nil {
		t.Fatal(err)
	}
	bcs := fem.BCs{
		Symmetries: []fem.Symmetry{{Label: "bottom", Comp: 1}, {Label: "top", Comp: 0}},
		Displacements: []fem.Displacement{{Label: "right", Fix: [2]bool{true, false},
			Func: func(X [2]float64, t float64) [2]float64 { return [2]float64{strain * t * X[0], 0} }}},
	}
	p, err := fem.NewProblem(m, mat, fem.Options{}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	o := DefaultOptions()
	o.Dt, o.DtMax = 0.02, 0.05
	s, err := New(p, o)
	if err != nil {
		t.Fatal(err)
	}
	return p, s
}
