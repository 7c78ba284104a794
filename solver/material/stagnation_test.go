package material

import (
	"math"
	"testing"
)

// TestGTNFlooredFlowStressAtYield: a regularised point next to a
// localisation band whose flow stress A = R + λ + r(p − ā) is pushed down
// by a strongly negative λ (captured from the V10 notched-bar run under the
// former absolute floor, where A was a few hundredths of a MPa; now held
// by the bound 0.5R), with a trial state close to the yield surface.
// Under the former floor the local residual could not fall below its
// rounding floor (∝ μ/A, above newtonTol) and the update had to accept the
// stagnated iterate; either way the update must not fail, the stress must
// equal the trial stress and Δp ≈ 0 (the trial point is on or inside the
// yield surface: Gurson 1977, Tvergaard 1981 — no plastic increment).
func TestGTNFlooredFlowStressAtYield(t *testing.T) {
	par := DefaultGTN()
	par.Hardening = PowerLaw{Sigma0: 450, Eps0: 450 / 200e3, N: 0.1}
	par.F0, par.FC, par.FF = 0.01, 0.02, 0.2
	par.Length, par.Penalty = 0.4, 450
	m, err := NewGTN(par)
	if err != nil {
		t.Fatal(err)
	}
	in := Input{E: Sym{-0.10378837889860837, 0.2466766747298728, -0.10238138019878715, -0.025803282452815133},
		Abar: 0.26962987839929636, Lambda: -852.2766242423618}
	old := State{Ep: Sym{-0.10378839502133341, 0.24667660413760287, -0.1023813945217973, -0.0258032916707967},
		P: 0.25277674210478884, F: 0.04930040578797513}
	var nw State
	var out Response
	if err := m.Update(&in, &old, &nw, &out); err != nil {
		t.Fatalf("update failed: %v", err)
	}
	lam, mu := par.Elastic.Lame()
	var ee Sym
	for i := range ee {
		ee[i] = in.E[i] - old.Ep[i]
	}
	var tTr Sym
	hookeStress(lam, mu, ee, &tTr)
	for i := range tTr {
		if d := math.Abs(out.T[i] - tTr[i]); d > 1e-6*math.Abs(tTr[0])+1e-12 {
			t.Errorf("T[%d] = %g, trial %g: the return moved a point already on the yield surface", i, out.T[i], tTr[i])
		}
	}
	if dp := nw.P - old.P; !(dp >= 0 && dp < 1e-12) {
		t.Errorf("Δp = %g, want ≈ 0", dp)
	}
}
