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
		{"mixed mode, turned", KField{K: 40, KII: 25, T: 60, El: el, Tip: [2]float64{-1, 3}, Dir: [2]float64{-1, 2}}},
		{"pure mode II", KField{KII: 35, El: el, Dir: [2]float64{0, 1}}},
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
			scale := math.Hypot(tc.k.K, tc.k.KII) / math.Sqrt(2*math.Pi*r)
			for _, face := range []Face{UpperFace, LowerFace} {
				s11, s22, s12 := stressFD(-r, 0, face)
				if math.Abs(s22) > 1e-6*scale || math.Abs(s12) > 1e-6*scale {
					t.Errorf("%s r=%g face %d: traction σ22 = %g, σ12 = %g (scale %g), want 0", tc.name, r, face, s22, s12, scale)
				}
				// on the faces σ11 is the T-stress plus the mode-II
				// term −2K_II sin(θ/2)/√(2πr) at θ = ±π (Anderson,
				// Fracture Mechanics, ch. 2).
				want := tc.k.T - 2*float64(face)*tc.k.KII/math.Sqrt(2*math.Pi*r)
				if math.Abs(s11-want) > 1e-5*scale {
					t.Errorf("%s r=%g face %d: σ11 = %g, want %g", tc.name, r, face, s11, want)
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
		{"infinite K_II", KField{K: 1, KII: math.Inf(1), El: Elastic{E: 1, Nu: 0.3}, Dir: [2]float64{1, 0}}},
	} {
		if err := tc.k.Validate(); err == nil {
			t.Errorf("%s: no error", tc.name)
		} else {
			t.Logf("%s: %v", tc.name, err)
		}
	}
}

// TestModeIIField checks the mode-II term of KField against the closed form
// of Anderson, Fracture Mechanics, ch. 2 (Williams 1957): on the crack line
// ahead of the tip the stress is pure shear σ₁₂ = K_II/√(2πr) (σ₁₁ = σ₂₂ = 0);
// behind the tip the faces slide without opening, the jump of the
// displacement being tangential, [u₁] = (κ+1)(K_II/μ)√(r/2π), [u₂] = 0.
func TestModeIIField(t *testing.T) {
	el := Elastic{E: 200e3, Nu: 0.3}
	for _, tc := range []struct {
		name string
		k    KField
	}{
		{"aligned", KField{KII: 50, El: el, Dir: [2]float64{1, 0}}},
		{"turned, negative K_II", KField{KII: -20, El: el, Tip: [2]float64{3, 1}, Dir: [2]float64{-2, 1}}},
	} {
		tt, n := frame(tc.k.Dir)
		kappa := 3 - 4*el.Nu
		for _, r := range []float64{0.02, 1, 7} {
			ahead := [2]float64{tc.k.Tip[0] + r*tt[0], tc.k.Tip[1] + r*tt[1]}
			g := tc.k.Stress(ahead)
			tau := tc.k.KII / math.Sqrt(2*math.Pi*r)
			s11 := tt[0]*tt[0]*g[0] + 2*tt[0]*tt[1]*g[3] + tt[1]*tt[1]*g[1]
			s22 := n[0]*n[0]*g[0] + 2*n[0]*n[1]*g[3] + n[1]*n[1]*g[1]
			s12 := tt[0]*n[0]*g[0] + (tt[0]*n[1]+tt[1]*n[0])*g[3] + tt[1]*n[1]*g[1]
			tol := 1e-12 * math.Abs(tau)
			if math.Abs(s11) > tol || math.Abs(s22) > tol || math.Abs(s12-tau) > tol {
				t.Errorf("%s r=%g ahead: σ11 = %g, σ22 = %g, σ12 = %g; want 0, 0, %g", tc.name, r, s11, s22, s12, tau)
			}
			behind := [2]float64{tc.k.Tip[0] - r*tt[0], tc.k.Tip[1] - r*tt[1]}
			up, lo := tc.k.DisplacementFace(behind, UpperFace), tc.k.DisplacementFace(behind, LowerFace)
			d := [2]float64{up[0] - lo[0], up[1] - lo[1]}
			j1, j2 := d[0]*tt[0]+d[1]*tt[1], d[0]*n[0]+d[1]*n[1]
			want := (kappa + 1) * tc.k.KII / el.Shear() * math.Sqrt(r/(2*math.Pi))
			if math.Abs(j2) > 1e-12*math.Abs(want) || math.Abs(j1-want) > 1e-12*math.Abs(want) {
				t.Errorf("%s r=%g behind: jump (tangential %g, normal %g), want (%g, 0)", tc.name, r, j1, j2, want)
			}
		}
	}
}

// TestKinkAngle checks the maximum-hoop-stress direction of Erdogan & Sih
// (1963, J. Basic Eng. 85): pure mode II kinks by −70.53° (arccos(1/3) from
// the closed form, the textbook figure 70.5°), pure mode I does not kink,
// and for mixed loading the angle is where KField's own hoop stress σ_θθ
// peaks (checked on a fine sweep of θ at a fixed r).
func TestKinkAngle(t *testing.T) {
	if got, want := KinkAngle(0, 1), -math.Acos(1.0/3); math.Abs(got-want) > 1e-12 {
		t.Errorf("pure mode II: θ₀ = %.6f rad, want −arccos(1/3) = %.6f rad (−70.53°)", got, want)
	}
	if got := KinkAngle(1, 0); got != 0 {
		t.Errorf("pure mode I: θ₀ = %g, want 0", got)
	}
	el := Elastic{E: 200e3, Nu: 0.3}
	for _, ratio := range []float64{0.25, 0.5, 1, -0.75, 3} {
		k := KField{K: 10, KII: 10 * ratio, El: el, Dir: [2]float64{1, 0}}
		th0 := KinkAngle(k.K, k.KII)
		if res := k.K*math.Sin(th0) + k.KII*(3*math.Cos(th0)-1); math.Abs(res) > 1e-12*k.K {
			t.Errorf("K_II/K_I = %g: θ₀ = %g does not solve K_I sin θ + K_II(3cos θ − 1) = 0 (residual %g)", ratio, th0, res)
		}
		hoop := func(th float64) float64 {
			s, c := math.Sincos(th)
			g := k.Stress([2]float64{0.5 * c, 0.5 * s})
			return s*s*g[0] + c*c*g[1] - 2*s*c*g[3]
		}
		best, bestTh := math.Inf(-1), 0.0
		for i := -3000; i <= 3000; i++ {
			th := float64(i) / 3000 * 0.999 * math.Pi
			if h := hoop(th); h > best {
				best, bestTh = h, th
			}
		}
		if math.Abs(bestTh-th0) > 2e-3 {
			t.Errorf("K_II/K_I = %g: hoop stress peaks at %.4f rad, KinkAngle %.4f rad", ratio, bestTh, th0)
		}
		t.Logf("K_II/K_I = %5.2f: θ₀ = %7.2f°", ratio, th0*180/math.Pi)
	}
}

// TestFarFieldJMixed checks J = (K_I² + K_II²)(1−ν²)/E (Irwin 1957) on a hand
// value: K_I = 60, K_II = 80 MPa√mm (K² = 10⁴), E = 200 GPa, ν = 0.3 →
// 0.0455 N/mm, and that K_II = 0 gives FarFieldJ.
func TestFarFieldJMixed(t *testing.T) {
	el := Elastic{E: 200e3, Nu: 0.3}
	if got := FarFieldJMixed(60, 80, el); math.Abs(got-0.0455) > 1e-15 {
		t.Errorf("FarFieldJMixed = %.17g, want 0.0455", got)
	}
	if a, b := FarFieldJMixed(37, 0, el), FarFieldJ(37, el); a != b {
		t.Errorf("FarFieldJMixed(K, 0) = %g, FarFieldJ(K) = %g", a, b)
	}
}
