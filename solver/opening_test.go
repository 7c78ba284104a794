package solver

import (
	"math"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// boreControl is the radial displacement of the plate-with-hole's bore on
// the symmetry line y = 0, the controlled quantity of the tests below.
func boreControl(t *testing.T, p *fem.Problem) (int, *Control) {
	t.Helper()
	for n, x := range p.Mesh.X {
		if math.Hypot(x[0]-1, x[1]) < 1e-9 {
			d := p.Dofs.Of(n, fem.Ux)
			return d, &Control{Dofs: []int{d}, Weights: []float64{1}, Rate: 1}
		}
	}
	t.Fatal("no node at (1, 0)")
	return 0, nil
}

// TestOpeningControlPath: displacement control of one unknown traces the
// same equilibrium path as load control. On a hyperelastic (Hencky) plate
// with a hole the state is path independent, so the controlled run's final
// state (opening u₀ at τ = 1, load factor λ*) must equal the load-controlled
// state at λ* (common practice: both controls solve the same equilibrium
// equations; Batoz & Dhatt 1979 for the bordered form) — to 1e-7 of the
// largest displacement — and the constraint must hold to 1e-9. On the GTN
// plate (plastic, path dependent only through the increments) the opening
// reached at each controlled step matches the load-controlled curve within
// 1%, and the bordered Newton iterations converge quadratically (order of
// the last iterations ≥ 1.6; Simo & Taylor 1985 for the consistent tangent
// the bordered system inherits).
func TestOpeningControlPath(t *testing.T) {
	t.Run("hencky", func(t *testing.T) {
		pl, sl := plateWithHole(t, hencky(t, 0.3), 0.04)
		d, ctl := boreControl(t, pl)
		if _, err := sl.Run(nil); err != nil {
			t.Fatal(err)
		}
		ctl.Rate = pl.Committed[d] // τ = 1 reaches the load-controlled opening at λ = 1
		pc, sc := plateWithHole(t, hencky(t, 0.3), 0.04)
		if err := sc.SetControl(ctl, 0); err != nil {
			t.Fatal(err)
		}
		res, err := sc.Run(nil)
		if err != nil || res.Status != Completed {
			t.Fatalf("controlled run: %v %v %s", err, res.Status, res.Reason)
		}
		if g := math.Abs(pc.Committed[d] - ctl.Rate); g > 1e-9*ctl.Rate {
			t.Errorf("controlled opening %.12g, want %.12g", pc.Committed[d], ctl.Rate)
		}
		lam := pc.TCommitted
		t.Logf("λ* = %.10g after %d steps", lam, res.Steps)
		if math.Abs(lam-1) > 1e-6 {
			t.Errorf("λ* = %.10g; the load-controlled opening at λ = 1 must need λ = 1", lam)
		}
		var umax, diff float64
		for i := range pl.Committed {
			umax = math.Max(umax, math.Abs(pl.Committed[i]))
			diff = math.Max(diff, math.Abs(pl.Committed[i]-pc.Committed[i]))
		}
		if diff > 1e-7*umax {
			t.Errorf("states differ by %.3g (largest displacement %.3g)", diff, umax)
		}
	})
	t.Run("gtn", func(t *testing.T) {
		par := material.DefaultGTN()
		par.F0 = 0.01
		pl, sl := gtnPlateWithHole(t, par, 0.04)
		d, ctl := boreControl(t, pl)
		lams, opens := []float64{0}, []float64{0}
		if _, err := sl.Run(func(st Step) error {
			lams, opens = append(lams, pl.TCommitted), append(opens, pl.Committed[d])
			return nil
		}); err != nil {
			t.Fatal(err)
		}
		ctl.Rate = opens[len(opens)-1]
		pc, sc := gtnPlateWithHole(t, par, 0.04)
		if err := sc.SetControl(ctl, 0); err != nil {
			t.Fatal(err)
		}
		worst, orders := 0.0, 0
		res, err := sc.Run(func(st Step) error {
			if q, ok := convergenceOrder(st.Residuals); ok && len(st.Residuals) >= 4 {
				orders++
				if q < 1.6 {
					t.Errorf("step %d: convergence order %.2g, residuals %.3g", st.Index, q, st.Residuals)
				}
			}
			// the load-controlled opening at the same load factor
			want := interpolate(lams, opens, st.Load)
			worst = math.Max(worst, math.Abs(pc.Committed[d]-want)/ctl.Rate)
			return nil
		})
		if err != nil || res.Status != Completed {
			t.Fatalf("controlled run: %v %v %s", err, res.Status, res.Reason)
		}
		t.Logf("%d steps, %d iterations, final λ %.6g, worst opening difference %.3g%% of the final opening, %d steps with an order estimate", res.Steps, res.Iterations, pc.TCommitted, 100*worst, orders)
		if worst > 0.01 {
			t.Errorf("opening differs from the load-controlled curve by %.3g%%, want ≤ 1%%", 100*worst)
		}
		if orders == 0 {
			t.Error("no step had enough iterations to estimate the convergence order")
		}
	})
}

// interpolate is piecewise-linear interpolation of y(x) at v, x increasing.
func interpolate(x, y []float64, v float64) float64 {
	for i := 1; i < len(x); i++ {
		if v <= x[i] {
			s := (v - x[i-1]) / (x[i] - x[i-1])
			return y[i-1] + s*(y[i]-y[i-1])
		}
	}
	return y[len(y)-1]
}

// TestSetControlErrors: a control on a prescribed unknown, with a zero rate
// or mismatched weights is refused with a message.
func TestSetControlErrors(t *testing.T) {
	p, s := plateWithHole(t, hencky(t, 0.3), 0.04)
	d, _ := boreControl(t, p)
	var fixed int
	for n, x := range p.Mesh.X {
		if math.Abs(math.Hypot(x[0], x[1])-4) < 1e-9 {
			fixed = p.Dofs.Of(n, fem.Ux)
			break
		}
	}
	for _, c := range []*Control{
		{Dofs: []int{d}, Weights: []float64{1, 2}, Rate: 1},
		{Dofs: []int{d}, Weights: []float64{1}, Rate: 0},
		{Dofs: []int{fixed}, Weights: []float64{1}, Rate: 1},
		{Dofs: []int{-1}, Weights: []float64{1}, Rate: 1},
	} {
		if err := s.SetControl(c, 0); err == nil {
			t.Errorf("control %+v accepted", c)
		} else {
			t.Log(err)
		}
	}
}
