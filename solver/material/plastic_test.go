package material

import (
	"math"
	"testing"
)

// TestScaleToYield: a transferred point whose elastic strain gives a
// trial stress outside the GTN yield surface (Gurson 1977 with Tvergaard's
// q₁, q₂, 1981) is scaled back onto it, σ*(τ) = R(p) to 1e-9, keeping the
// total strain (Eᵖ takes up the difference); a point inside is left alone.
func TestScaleToYield(t *testing.T) {
	par := DefaultGTN()
	m := mustGTN(t, par)
	sigmaStar := func(ee Sym, f float64) float64 {
		s, err := m.EffectiveStress(par.Elastic.Stress(ee), f)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	E := Sym{0.05, -0.01, 0.02, 0.03}
	for _, c := range []struct {
		name   string
		ee     Sym // elastic strain before
		change bool
	}{
		{"far outside (mean stress ~ 13 GPa)", Sym{0.03, 0.03, 0.02, 0.001}, true},
		{"outside in shear", Sym{0.001, -0.001, 0, 0.01}, true},
		{"inside", Sym{0.0005, 0.0002, 0.0001, 0.0001}, false},
	} {
		s := State{F: 0.03, P: 0.3}
		for k := 0; k < 4; k++ {
			s.Ep[k] = E[k] - c.ee[k]
		}
		before := s.Ep
		r, _ := par.Hardening.Flow(s.P)
		changed, err := m.ScaleToYield(&s, E, r)
		if err != nil {
			t.Fatal(err)
		}
		if changed != c.change {
			t.Errorf("%s: changed = %v, want %v", c.name, changed, c.change)
			continue
		}
		var ee Sym
		for k := 0; k < 4; k++ {
			ee[k] = E[k] - s.Ep[k]
		}
		got := sigmaStar(ee, s.F)
		if c.change {
			if math.Abs(got-r) > 1e-9*r {
				t.Errorf("%s: σ* = %.10g after scaling, want R(p) = %.10g", c.name, got, r)
			}
		} else if s.Ep != before {
			t.Errorf("%s: plastic strain changed", c.name)
		}
	}
}
