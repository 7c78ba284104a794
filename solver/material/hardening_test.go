package material

import (
	"math"
	"strings"
	"testing"
)

// Reference: the closed forms of the laws themselves (algebra), and R′ as the
// central-difference derivative of R (definition of the derivative).
func TestHardeningValues(t *testing.T) {
	pl := PowerLaw{Sigma0: 400, Eps0: 0.002, N: 0.1}
	vo := Voce{Sigma0: 300, Q: 200, B: 10}
	tb := Tabulated{P: []float64{0, 0.1, 0.5}, Stress: []float64{300, 400, 450}}
	cases := []struct {
		name string
		h    Hardening
		p    float64
		want float64
	}{
		// (1 + p/ε₀)ⁿ = 2 at p = ε₀(2^{1/n} − 1).
		{"power doubling", pl, 0.002 * (math.Pow(2, 10) - 1), 800},
		{"power at 0", pl, 0, 400},
		{"voce at 1/b", vo, 0.1, 300 + 200*(1-1/math.E)},
		{"voce saturation", vo, 100, 500},
		{"table node", tb, 0.1, 400},
		{"table mid 1", tb, 0.05, 350},
		{"table mid 2", tb, 0.3, 425},
		{"table beyond", tb, 2, 450},
		{"perfect", PerfectlyPlastic{Sigma0: 250}, 3, 250},
	}
	for _, tc := range cases {
		if err := tc.h.Validate(); err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		r, _ := tc.h.Flow(tc.p)
		if math.Abs(r-tc.want) > 1e-9*tc.want {
			t.Errorf("%s: R(%g) = %.12g, want %.12g", tc.name, tc.p, r, tc.want)
		}
	}
	for _, h := range []Hardening{pl, vo, tb, PerfectlyPlastic{Sigma0: 250}} {
		for _, p := range []float64{0.001, 0.03, 0.2, 0.7} {
			_, dr := h.Flow(p)
			const d = 1e-7
			rp, _ := h.Flow(p + d)
			rm, _ := h.Flow(p - d)
			if fd := (rp - rm) / (2 * d); math.Abs(fd-dr) > 1e-5*math.Max(1, math.Abs(dr)) {
				t.Errorf("%T at p=%g: R′ = %g, finite difference %g", h, p, dr, fd)
			}
		}
	}
}

func TestHardeningValidate(t *testing.T) {
	cases := []struct {
		h    Hardening
		want string
	}{
		{PowerLaw{0, 0.01, 0.1}, "σ₀"},
		{PowerLaw{300, 0, 0.1}, "ε₀"},
		{PowerLaw{300, 0.01, 1.2}, "exponent"},
		{PowerLaw{300, 0.01, -0.1}, "exponent"},
		{Voce{-1, 10, 1}, "σ₀"},
		{Voce{100, -150, 1}, "σ₀ + Q"},
		{Voce{100, 10, -1}, "rate"},
		{PerfectlyPlastic{0}, "σ₀"},
		{Tabulated{P: []float64{0}, Stress: []float64{1}}, "at least 2"},
		{Tabulated{P: []float64{0, 1}, Stress: []float64{1}}, "2 strains but 1"},
		{Tabulated{P: []float64{0.1, 1}, Stress: []float64{1, 2}}, "must be 0"},
		{Tabulated{P: []float64{0, 1, 1}, Stress: []float64{1, 2, 3}}, "point 2"},
		{Tabulated{P: []float64{0, 1}, Stress: []float64{1, -2}}, "point 1: stress"},
	}
	for _, tc := range cases {
		err := tc.h.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: error %v, want one mentioning %q", tc.h, err, tc.want)
		}
	}
}
