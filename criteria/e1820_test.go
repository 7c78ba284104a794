package criteria

import (
	"math"
	"strings"
	"testing"
)

// TestCTGeometryFactor checks the C(T) K-calibration against the tabulated
// f(a/W) of ASTM E399 (table of f(a/W) for C(T) specimens; values from
// memory, rounded to two decimals in the table).
func TestCTGeometryFactor(t *testing.T) {
	for _, tc := range []struct{ aw, f float64 }{
		{0.450, 8.34}, {0.500, 9.66}, {0.550, 11.36},
	} {
		got, err := CTGeometryFactor(tc.aw)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-tc.f) > 0.006 {
			t.Errorf("f(%g) = %.4f, table (from memory) %.2f", tc.aw, got, tc.f)
		}
	}
}

// TestCTComplianceIrwinKies checks the compliance calibration against the
// K-calibration through the energy release rate G = P²/(2B) dC/da (Irwin &
// Kies 1954, Welding J. 33): d(E'BC)/dα = 2 f(α)². Both are fits to
// numerical results (Srawley 1976; Saxena & Hudak 1978), so they agree to
// about a per cent, not to round-off; 2% is the bound here.
func TestCTComplianceIrwinKies(t *testing.T) {
	for _, aw := range []float64{0.4, 0.45, 0.5, 0.6, 0.7, 0.8} {
		const h = 1e-5
		cp, err1 := CTComplianceFactor(aw + h)
		cm, err2 := CTComplianceFactor(aw - h)
		f, err3 := CTGeometryFactor(aw)
		if err1 != nil || err2 != nil || err3 != nil {
			t.Fatal(err1, err2, err3)
		}
		lhs := (cp - cm) / (2 * h)
		if rel := lhs/(2*f*f) - 1; math.Abs(rel) > 0.02 {
			t.Errorf("a/W = %g: d(E'BC)/dα = %g, 2f² = %g (rel. %.3g)", aw, lhs, 2*f*f, rel)
		}
	}
}

var testCT = CTSpecimen{W: 50, B: 25, A0: 25, El: Elastic{E: 200e3, Nu: 0.3}}

// TestE1820Elastic checks that a linear-elastic record gives J = J_el
// exactly (no plastic area; ASTM E1820 A1), with the compliance fitted
// from the record and with the calibrated one.
func TestE1820Elastic(t *testing.T) {
	c, err := testCT.Compliance(testCT.A0)
	if err != nil {
		t.Fatal(err)
	}
	var rec []CTRecord
	for i := 0; i <= 20; i++ {
		p := 1000 * float64(i)
		rec = append(rec, CTRecord{P: p, V: c * p})
	}
	for _, mode := range []ComplianceMode{ComplianceFit, ComplianceCrack} {
		out, err := E1820J(testCT, rec, E1820Options{Mode: mode})
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range out {
			f, _ := CTGeometryFactor(0.5)
			k := rec[i].P / math.Sqrt(25*25*50) * f
			jel := k * k * (1 - 0.09) / 200e3
			if math.Abs(p.Jel-jel) > 1e-12*(jel+1e-30) || math.Abs(p.J-jel) > 1e-9*(jel+1e-6) {
				t.Errorf("mode %d point %d: J = %g, J_el = %g, want J = K²(1−ν²)/E = %g", mode, i, p.J, p.Jel, jel)
			}
		}
	}
}

// TestE1820GrowthCorrection checks the incremental J_pl with crack growth
// against a hand calculation of ASTM E1820 A1 (W = 50, B = B_N = 25,
// a0 = 25, C = 1e-5 mm/N):
//
//	v_pl = 0.4, 0.88, 1.39;  ΔA_pl = 8000, 19680, 21165 N·mm
//	J_pl(1) = 2.261/25 · 8000/25                            = 28.9408
//	J_pl(2) = (28.9408 + 2.261/25 · 19680/25)(1 − 1.38·0.5/25) = 97.37143736
//	J_pl(3) = (97.3714 + 2.25578/24.5 · 21165/25)(1 − 1.3724·0.7/24.5) = 168.4455921
func TestE1820GrowthCorrection(t *testing.T) {
	rec := []CTRecord{{0, 0, 25}, {40000, 0.8, 25}, {42000, 1.3, 25.5}, {41000, 1.8, 26.2}}
	out, err := E1820J(testCT, rec, E1820Options{Mode: ComplianceGiven, C: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{0, 28.9408, 97.37143736, 168.4455921} {
		if math.Abs(out[i].Jpl-want) > 1e-7*math.Max(want, 1) {
			t.Errorf("J_pl(%d) = %.10g, hand calculation %.10g", i, out[i].Jpl, want)
		}
		if math.Abs(out[i].J-out[i].Jel-out[i].Jpl) > 1e-12*out[i].J {
			t.Errorf("point %d: J ≠ J_el + J_pl", i)
		}
	}
}

// TestE1820BasicWithoutGrowth checks that without crack growth the
// incremental formula equals the basic method J_pl = η A_pl/(B_N b₀),
// η = 2 + 0.522 b₀/W (ASTM E1820 A1), on a non-linear record whose plastic
// area is integrated here in closed form: P = P₀ tanh(v/v₀), v_pl = v − CP.
func TestE1820BasicWithoutGrowth(t *testing.T) {
	const p0, v0, c = 50000.0, 0.5, 1e-5
	var rec []CTRecord
	n := 4000
	vmax := 3.0
	for i := 0; i <= n; i++ {
		v := vmax * float64(i) / float64(n)
		rec = append(rec, CTRecord{P: p0 * math.Tanh(v/v0), V: v})
	}
	out, err := E1820J(testCT, rec, E1820Options{Mode: ComplianceGiven, C: c})
	if err != nil {
		t.Fatal(err)
	}
	// A_pl = ∫P dv − ∫P d(CP) = P₀v₀ ln cosh(v/v₀) − C P²/2.
	pm := p0 * math.Tanh(vmax/v0)
	apl := p0*v0*math.Log(math.Cosh(vmax/v0)) - c*pm*pm/2
	b0 := testCT.W - testCT.A0
	want := (2 + 0.522*b0/testCT.W) * apl / (testCT.B * b0)
	got := out[len(out)-1].Jpl
	if math.Abs(got/want-1) > 1e-5 {
		t.Errorf("J_pl = %.8g, basic method η A_pl/(B_N b0) = %.8g", got, want)
	}
}

// TestTearingModulus checks T = (E/σ₀²) dJ/da (Paris et al. 1979) on a
// linear J–Δa record (constant slope) and on a quadratic one, where the
// least-squares slope over a centred window of equally spaced points is the
// exact derivative 2cΔa at the centre (symmetry of the normal equations).
func TestTearingModulus(t *testing.T) {
	const E, s0 = 200e3, 400.0
	var da, jl, jq []float64
	for i := 0; i <= 20; i++ {
		a := 0.1 * float64(i)
		da = append(da, a)
		jl = append(jl, 150+220*a)
		jq = append(jq, 80*a*a)
	}
	tl, err := TearingModulus(da, jl, E, s0, 0.45)
	if err != nil {
		t.Fatal(err)
	}
	tq, err := TearingModulus(da, jq, E, s0, 0.45)
	if err != nil {
		t.Fatal(err)
	}
	for i := range da {
		if want := E / (s0 * s0) * 220; math.Abs(tl[i]-want) > 1e-9*want {
			t.Errorf("linear: T(%g) = %g, want %g", da[i], tl[i], want)
		}
		if i < 2 || i > len(da)-3 {
			continue // asymmetric window at the ends
		}
		if want := E / (s0 * s0) * 160 * da[i]; math.Abs(tq[i]-want) > 1e-9*math.Max(want, 1) {
			t.Errorf("quadratic: T(%g) = %g, want %g", da[i], tq[i], want)
		}
	}
	one, err := TearingModulus([]float64{0, 1}, []float64{1, 2}, E, s0, 0.5)
	if err != nil || !math.IsNaN(one[0]) {
		t.Errorf("a window with one point gives %v, %v; want NaN", one, err)
	}
}

// TestE1820BadInput checks the error messages of bad input.
func TestE1820BadInput(t *testing.T) {
	good := []CTRecord{{0, 0, 0}, {100, 0.001, 0}, {200, 0.002, 0}}
	for _, tc := range []struct {
		name string
		s    CTSpecimen
		rec  []CTRecord
		opt  E1820Options
		want string
	}{
		{"zero width", CTSpecimen{B: 1, A0: 0.5, El: testCT.El}, good, E1820Options{}, "width W"},
		{"short crack", CTSpecimen{W: 50, B: 25, A0: 5, El: testCT.El}, good, E1820Options{}, "a0/W"},
		{"net thickness above B", CTSpecimen{W: 50, B: 25, BN: 30, A0: 25, El: testCT.El}, good, E1820Options{}, "net thickness"},
		{"bad nu", CTSpecimen{W: 50, B: 25, A0: 25, El: Elastic{E: 1, Nu: 0.6}}, good, E1820Options{}, "Poisson"},
		{"empty record", testCT, nil, E1820Options{}, "empty record"},
		{"crack through", testCT, []CTRecord{{0, 0, 0}, {1, 1, 50}}, E1820Options{Mode: ComplianceGiven, C: 1}, "record point 1"},
		{"NaN force", testCT, []CTRecord{{math.NaN(), 0, 0}}, E1820Options{}, "not finite"},
		{"no compliance", testCT, good, E1820Options{Mode: ComplianceGiven}, "given compliance"},
		{"unknown mode", testCT, good, E1820Options{Mode: 7}, "unknown compliance mode"},
		{"too few fit points", testCT, []CTRecord{{0, 0, 0}, {100, 1, 0}}, E1820Options{}, "too few"},
	} {
		_, err := E1820J(tc.s, tc.rec, tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
	if _, err := CTGeometryFactor(0.1); err == nil {
		t.Error("a/W = 0.1: no error")
	}
	if _, err := TearingModulus([]float64{0}, []float64{1, 2}, 1, 1, 1); err == nil {
		t.Error("length mismatch: no error")
	}
	if _, err := TearingModulus([]float64{0}, []float64{1}, 1, 1, 0); err == nil {
		t.Error("zero window: no error")
	}
}
