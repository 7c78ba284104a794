package material

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Robustness of the local integration over random states and strain
// increments, from small to far beyond anything a solver takes (trial
// stresses up to ~100σ₀), porosities from 0 to f_break, with and without
// nucleation and regularisation. Every call must give either an error (the
// solver cuts back) or a finite response; the error rate must be small.
// Reference: the requirement "no NaN ever" of DESIGN.md §3 (no outside
// source: a property of the implementation).
func TestGTNRandomStepsNoNaN(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	base := DefaultGTN()
	nuc := base
	nuc.FN = 0.04
	reg := base
	reg.Length = 0.2
	close := base
	close.FBreak = base.FF - 1e-6 // break only at f* within 1e-5 of 1/q₁
	models := []*GTN{mustGTN(t, base), mustGTN(t, nuc), mustGTN(t, reg), mustGTN(t, close)}
	// Steps up to ten times the yield strain (2e-3) must always converge;
	// larger ones (up to 50×) may fail rarely, here at most 1 in 1000 (the
	// solver then cuts back).
	n, fails := 0, 0
	for trial := 0; trial < 4000; trial++ {
		m := models[trial%len(models)]
		fb := m.fBreak
		old := State{
			Ep: Sym{0.05 * rng.NormFloat64(), 0.05 * rng.NormFloat64(), 0.05 * rng.NormFloat64(), 0.05 * rng.NormFloat64()},
			P:  0.5 * rng.Float64(),
			F:  fb * math.Pow(rng.Float64(), 0.5),
		}
		mag := math.Pow(10, -4+3*rng.Float64()) // 1e-4 … 1e-1
		var E Sym
		for i := range E {
			E[i] = old.Ep[i] + mag*rng.NormFloat64()
		}
		if trial%3 == 0 { // strongly triaxial
			v := mag * math.Abs(rng.NormFloat64())
			E[0] += v
			E[1] += v
			E[2] += v
		}
		abar := old.P + 0.01*rng.NormFloat64()
		lam := 20 * rng.NormFloat64()
		nw, out, err := gtnStep(m, E, abar, lam, old)
		n++
		if err != nil {
			fails++
			if mag < 2e-2 {
				t.Errorf("model %d: %v (increment %g, E %v, f %g, ā %g, λ %g)", trial%len(models), err, mag, E, old.F, abar, lam)
			}
			continue
		}
		if !symFinite(out.T) || !mat4Finite(out.DTdE) || !symFinite(out.DTdAbar) ||
			!symFinite(out.DTdLambda) || !symFinite(out.DPdE) || !finite(out.P+out.DPdAbar+out.DPdLambda+out.Energy+out.Dissipation) ||
			!symFinite(nw.Ep) || !finite(nw.P+nw.F) {
			t.Fatalf("non-finite result for old %+v, E %v: %+v %+v", old, E, nw, out)
		}
		if nw.F < 0 || nw.F >= 1 || nw.P < old.P {
			t.Errorf("inadmissible state %+v from %+v", nw, old)
		}
		if !nw.Broken && out.Plastic {
			if r, _ := m.par.Hardening.Flow(nw.P); !(r > 0) {
				t.Errorf("flow stress %g", r)
			}
		}
	}
	t.Logf("%d random updates, %d local failures", n, fails)
	if fails > n/1000 {
		t.Errorf("%d of %d random updates failed", fails, n)
	}
}
