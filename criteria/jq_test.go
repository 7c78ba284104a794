package criteria

import (
	"math"
	"strings"
	"testing"
)

// TestE1820JQHandWorked checks the J_Q construction against an example
// worked by hand (ASTM E1820 Annex A9 construction, from memory):
// σ_Y = 500 MPa, so the construction line is J = 1000·Δa (N/mm, Δa in mm).
// The points at Δa = 0.4, 0.6, 1.0 and 1.5 mm lie on J = 200·√Δa and
// between the exclusion lines (for J = 200·√1.5 = 244.9 the 1.5 mm line
// is at Δa = 1.745 mm); the point at Δa = 0.1 mm lies left of the 0.15 mm
// line (it would need Δa ≥ 0.30 mm) and the one at Δa = 2.0 mm right of
// the 1.5 mm line (it would need Δa ≤ 1.80 mm), both off the power law, so
// a fit that took them would not give C1 = 200, C2 = 0.5. On the offset
// line 200√x = 1000(x − 0.2): with s = √x, 5s² − s − 1 = 0, s = (1+√21)/10,
// Δa_Q = s² = 0.311652 mm and J_Q = 200·s = 111.652 N/mm. Capacity with
// b₀ = 25, B = 12.5 mm: Δa_max = 6.25 mm, J_max = 12.5·500/20 = 312.5 N/mm.
func TestE1820JQHandWorked(t *testing.T) {
	da := []float64{0.1, 0.4, 0.6, 1.0, 1.5, 2.0}
	J := []float64{150, 200 * math.Sqrt(0.4), 200 * math.Sqrt(0.6), 200, 200 * math.Sqrt(1.5), 300}
	opt := JQOptions{SigmaY: 500, B0: 25, B: 12.5, MM: 1}
	q, err := E1820JQ(da, J, opt)
	if err != nil {
		t.Fatal(err)
	}
	s := (1 + math.Sqrt(21)) / 10
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"slope M·σ_Y", q.Slope, 1000},
		{"first exclusion line", q.ExcludeLow, 0.15},
		{"second exclusion line", q.ExcludeTop, 1.5},
		{"offset line", q.Offset, 0.2},
		{"Δa_max", q.DaMax, 6.25},
		{"J_max", q.JMax, 312.5},
		{"C1", q.C1, 200},
		{"C2", q.C2, 0.5},
		{"Δa_Q", q.DaQ, s * s},
		{"J_Q", q.JQ, 200 * s},
	} {
		if math.Abs(c.got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %.12g, hand-worked %.12g", c.name, c.got, c.want)
		}
	}
	if got := q.Qualified; len(got) != 4 || got[0] != 1 || got[3] != 4 {
		t.Errorf("qualified points %v, want [1 2 3 4]", got)
	}
	// The lines themselves: the offset line passes through (Δa_Q, J_Q).
	if d := q.Line(q.Offset, q.DaQ) - q.JQ; math.Abs(d) > 1e-9 {
		t.Errorf("offset line at Δa_Q misses J_Q by %g", d)
	}
}

// TestE1820JQUnits: the same record in metres and N/m (J in N/m, σ_Y in
// Pa) gives the same construction scaled by 1000 (the standard's offsets
// are millimetres whatever the unit).
func TestE1820JQUnits(t *testing.T) {
	mm := []float64{0.4, 0.6, 1.0, 1.5}
	var daM, jM []float64
	for _, x := range mm {
		daM = append(daM, x*1e-3)
		jM = append(jM, 200*math.Sqrt(x)*1e3)
	}
	q, err := E1820JQ(daM, jM, JQOptions{SigmaY: 500e6, B0: 25e-3, B: 12.5e-3, MM: 1e-3})
	if err != nil {
		t.Fatal(err)
	}
	s := (1 + math.Sqrt(21)) / 10
	if math.Abs(q.DaQ-s*s*1e-3) > 1e-12 || math.Abs(q.JQ-200*s*1e3) > 1e-6 {
		t.Errorf("Δa_Q %g m, J_Q %g N/m; want %g m, %g N/m", q.DaQ, q.JQ, s*s*1e-3, 200*s*1e3)
	}
}

// TestE1820JQWithoutFit: fewer than two qualified points, or a fit that
// rises faster than the offset line (C2 ≥ 1), leave the fit or J_Q NaN
// while the lines stay defined (common practice: no J_Q is reported).
func TestE1820JQWithoutFit(t *testing.T) {
	opt := JQOptions{SigmaY: 500, B0: 25, B: 12.5, MM: 1}
	for _, c := range []struct {
		name      string
		da, J     []float64
		fit, jq   bool
		qualified int
	}{
		{"no growth", []float64{0, 0, 0}, []float64{10, 20, 30}, false, false, 0},
		{"one qualified point", []float64{0.1, 0.5}, []float64{90, 200}, false, false, 1},
		{"fit steeper than the line", []float64{0.5, 1.0}, []float64{100, 400}, true, false, 2},
	} {
		q, err := E1820JQ(c.da, c.J, opt)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if len(q.Qualified) != c.qualified || !math.IsNaN(q.C2) != c.fit || !math.IsNaN(q.JQ) != c.jq {
			t.Errorf("%s: %d qualified, C2 %g, J_Q %g; want %d qualified, fit %v, J_Q %v", c.name, len(q.Qualified), q.C2, q.JQ, c.qualified, c.fit, c.jq)
		}
		if q.Slope != 1000 || q.JMax != 312.5 {
			t.Errorf("%s: lines not set: slope %g, J_max %g", c.name, q.Slope, q.JMax)
		}
	}
}

// TestE1820JQBadInput: mismatched lengths and non-positive figures are
// errors that name the figure.
func TestE1820JQBadInput(t *testing.T) {
	for _, c := range []struct {
		da, J []float64
		opt   JQOptions
		want  string
	}{
		{[]float64{1}, nil, JQOptions{SigmaY: 500, B0: 25, B: 25, MM: 1}, "1 Δa values but 0 J"},
		{nil, nil, JQOptions{SigmaY: 0, B0: 25, B: 25, MM: 1}, "σ_Y = 0"},
		{nil, nil, JQOptions{SigmaY: 500, B0: -1, B: 25, MM: 1}, "b₀ = -1"},
		{nil, nil, JQOptions{SigmaY: 500, B0: 25, B: 25}, "one millimetre = 0"},
	} {
		if _, err := E1820JQ(c.da, c.J, c.opt); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("error %v, want it to contain %q", err, c.want)
		}
	}
}
