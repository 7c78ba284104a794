package material

import (
	"math"
	"strings"
	"testing"
)

// Reference: Hooke's law in uniaxial stress, σ₁₁ = E ε₁₁ with lateral strains
// −ν ε₁₁ (Timoshenko & Goodier 1970, Theory of Elasticity, §3); pure shear
// σ₁₂ = 2G ε₁₂; hydrostatic σ = 3K ε.
func TestHenckyHookeLimits(t *testing.T) {
	el := Elastic{Young: 210e3, Poisson: 0.3}
	h, err := NewHencky(el)
	if err != nil {
		t.Fatal(err)
	}
	_, mu := el.Lame()
	cases := []struct {
		name string
		E    Sym
		want Sym
	}{
		{"uniaxial", Sym{1e-3, -0.3e-3, -0.3e-3, 0}, Sym{210, 0, 0, 0}},
		{"shear", Sym{0, 0, 0, 1e-3}, Sym{0, 0, 0, 2 * mu * 1e-3}},
		{"hydrostatic", Sym{1e-3, 1e-3, 1e-3, 0}, Sym{3 * el.Bulk() * 1e-3, 3 * el.Bulk() * 1e-3, 3 * el.Bulk() * 1e-3, 0}},
	}
	for _, tc := range cases {
		in := Input{E: tc.E}
		old := h.Initial()
		var nw State
		var out Response
		if err := h.Update(&in, &old, &nw, &out); err != nil {
			t.Fatal(err)
		}
		for i := range out.T {
			if math.Abs(out.T[i]-tc.want[i]) > 1e-9*210 {
				t.Errorf("%s: T[%d] = %g, Hooke gives %g", tc.name, i, out.T[i], tc.want[i])
			}
		}
		// ψ = ½ T:E for a quadratic energy.
		if w := 0.5 * tc.want.Ddot(tc.E); math.Abs(out.Energy-w) > 1e-12 {
			t.Errorf("%s: energy %g, want %g", tc.name, out.Energy, w)
		}
		// Tangent against a central difference of the stress (exact for a
		// linear law up to rounding).
		for j := 0; j < 4; j++ {
			ep, em := in, in
			ep.E[j] += 1e-6
			em.E[j] -= 1e-6
			var op, om Response
			_ = h.Update(&ep, &old, &nw, &op)
			_ = h.Update(&em, &old, &nw, &om)
			for i := 0; i < 4; i++ {
				fd := (op.T[i] - om.T[i]) / 2e-6
				if math.Abs(fd-out.DTdE[i][j]) > 1e-6*el.Young {
					t.Errorf("%s: dT[%d]/dE[%d] = %g, finite difference %g", tc.name, i, j, out.DTdE[i][j], fd)
				}
			}
		}
	}
}

func TestElasticValidate(t *testing.T) {
	cases := []struct {
		el   Elastic
		want string // "" = valid
	}{
		{Elastic{200e3, 0.3}, ""},
		{Elastic{200e3, -0.99}, ""},
		{Elastic{0, 0.3}, "Young"},
		{Elastic{-1, 0.3}, "Young"},
		{Elastic{math.NaN(), 0.3}, "Young"},
		{Elastic{200e3, 0.5}, "Poisson"},
		{Elastic{200e3, -1}, "Poisson"},
		{Elastic{200e3, math.NaN()}, "Poisson"},
	}
	for _, tc := range cases {
		err := tc.el.Validate()
		if tc.want == "" {
			if err != nil {
				t.Errorf("%+v: unexpected error %v", tc.el, err)
			}
			continue
		}
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: error %v, want one mentioning %q", tc.el, err, tc.want)
		}
	}
}
