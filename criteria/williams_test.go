package criteria

import (
	"math"
	"testing"
)

// TestWilliamsFacesTractionFree checks that the Williams displacement's own
// stress (plane-strain Hooke's law on its numerical gradient) leaves both
// crack faces traction free, σ₂₂ = σ₁₂ = 0 at θ = ±π, and that it matches
// KField.Stress at generic points (Williams 1957; Anderson, Fracture
// Mechanics, ch. 2, mode-I field).
func TestWilliamsFacesTractionFree(t *testing.T) {
	el := Elastic{E: 200e3, Nu: 0.3}
	for _, tc := range []struct {
		name string
		k    KField
	}{
		{"aligned", KField{K: 50, El: el, Dir: [2]float64{1, 0}}},
		{"T-stress and turned", KField{K: 30, T: -120, El: el, Tip: [2]float64{2, -1}, Dir: [2]float64{1, 1}}},
	} {
		if err := tc.k.Validate(); err != nil {
			t.Fatal(err)
		}
		tt, n := frame(tc.k.Dir)
		lam := el.E * el.Nu / ((1 + el.Nu) * (1 - 2*el.Nu))
		mu := el.Shear()
		// stress from the displacement gradient in the crack frame, with a
		// one-sided difference across the face (side = +1 upper, −1 lower).
		stressFD := func(x1, x2 float64, face Face) (s11, s22, s12 float64) {
			pos := func(a, b float64) [2]float64 {
				return [2]float64{tc.k.Tip[0] + a*tt[0] + b*n[0], tc.k.Tip[1] + a*tt[1] + b*n[1]}
			}
			loc := func(a, b float64) [2]float64 {
				u := tc.k.DisplacementFace(pos(a, b), face)
				return [2]float64{u[0]*tt[0] + u[1]*tt[1], u[0]*n[0] + u[1]*n[1]}
			}
			h := 1e-5 * math.Hypot(x1, x2)
			up, um := loc(x1+h, x2), loc(x1-h, x2)
			var d2 [2]float64
			if x2 == 0 {
				sg := float64(face)
				u0, u1, u2 := loc(x1, 0), loc(x1, sg*h), loc(x1, 2*sg*h)
				for i := range d2 {
					d2[i] = sg * (-3*u0[i] + 4*u1[i] - u2[i]) / (2 * h)
				}
			} else {
				vp, vm := loc(x1, x2+h), loc(x1, x2-h)
				for i := range d2 {
					d2[i] = (vp[i] - vm[i]) / (2 * h)
				}
			}
			e11, e22 := (up[0]-um[0])/(2*h), d2[1]
			e12 := 0.5 * ((up[1]-um[1])/(2*h) + d2[0])
			return lam*(e11+e22) + 2*mu*e11, lam*(e11+e22) + 2*mu*e22, 2 * mu * e12
		}
		for _, r := range []float64{0.01, 0.3, 2} {
			scale := tc.k.K / math.Sqrt(2*math.Pi*r)
			for _, face := range []Face{UpperFace, LowerFace} {
				s11, s22, s12 := stressFD(-r, 0, face)
				if math.Abs(s22) > 1e-6*scale || math.Abs(s12) > 1e-6*scale {
					t.Errorf("%s r=%g face %d: traction σ22 = %g, σ12 = %g (scale %g), want 0", tc.name, r, face, s22, s12, scale)
				}
				// on the faces σ11 is the T-stress alone.
				if math.Abs(s11-tc.k.T) > 1e-5*scale {
					t.Errorf("%s r=%g face %d: σ11 = %g, want T = %g", tc.name, r, face, s11, tc.k.T)
				}
			}
			for _, th := range []float64{-2.5, -1, 0, 0.4, 1.7, 3} {
				x1, x2 := r*math.Cos(th), r*math.Sin(th)
				s11, s22, s12 := stressFD(x1, x2, UpperFace)
				x := [2]float64{tc.k.Tip[0] + x1*tt[0] + x2*n[0], tc.k.Tip[1] + x1*tt[1] + x2*n[1]}
				g := tc.k.Stress(x)
				// rotate the analytic global stress into the crack frame
				a11 := tt[0]*tt[0]*g[0] + 2*tt[0]*tt[1]*g[3] + tt[1]*tt[1]*g[1]
				a22 := n[0]*n[0]*g[0] + 2*n[0]*n[1]*g[3] + n[1]*n[1]*g[1]
				a12 := tt[0]*n[0]*g[0] + (tt[0]*n[1]+tt[1]*n[0])*g[3] + tt[1]*n[1]*g[1]
				for _, d := range [][2]float64{{s11, a11}, {s22, a22}, {s12, a12}} {
					if math.Abs(d[0]-d[1]) > 1e-5*scale {
						t.Errorf("%s r=%g θ=%g: stress from displacement %g, KField.Stress %g", tc.name, r, th, d[0], d[1])
					}
				}
				if want := el.Nu * (a11 + a22); math.Abs(g[2]-want) > 1e-9*scale {
					t.Errorf("%s: σ33 = %g, plane strain wants ν(σ11+σ22) = %g", tc.name, g[2], want)
				}
			}
		}
	}
}

// TestFarFieldJ checks J = K²(1−ν²)/E (Irwin; Rice 1968) on a hand value:
// K = 100 MPa√mm, E = 200 GPa, ν = 0.3 → J = 10⁴·0.91/2·10⁵ = 0.0455 N/mm.
func TestFarFieldJ(t *testing.T) {
	if got := FarFieldJ(100, Elastic{E: 200e3, Nu: 0.3}); math.Abs(got-0.0455) > 1e-15 {
		t.Errorf("FarFieldJ = %.17g, want 0.0455", got)
	}
}

func TestKFieldValidate(t *testing.T) {
	for _, tc := range []struct {
		name string
		k    KField
	}{
		{"zero direction", KField{K: 1, El: Elastic{E: 1, Nu: 0.3}}},
		{"negative modulus", KField{K: 1, El: Elastic{E: -1, Nu: 0.3}, Dir: [2]float64{1, 0}}},
		{"nu 0.5", KField{K: 1, El: Elastic{E: 1, Nu: 0.5}, Dir: [2]float64{1, 0}}},
		{"NaN K", KField{K: math.NaN(), El: Elastic{E: 1, Nu: 0.3}, Dir: [2]float64{1, 0}}},
	} {
		if err := tc.k.Validate(); err == nil {
			t.Errorf("%s: no error", tc.name)
		} else {
			t.Logf("%s: %v", tc.name, err)
		}
	}
}
