package main

import (
	"math"
	"path/filepath"
	"strconv"
	"testing"
)

// ctPathCase is a coarse half C(T) of regularised GTN material loaded into
// the plastic range before any crack growth (fixed mesh, ten steps).
const ctPathCase = `
[geometry]
kind = "ct"
[geometry.ct]
width = 50.0
crack_ratio = 0.55
notch_ratio = 0.45
notch_width_ratio = 0.03
thickness = 25.0
[mesh]
h_fine = 0.4
h_far = 5.0
fine_radius = 2.0
[material]
young = 200000.0
poisson = 0.3
yield_stress = 450.0
hardening = "power"
hardening_exponent = 0.1
f0 = 0.005
length = 0.8
[loading]
kind = "pin"
value = 0.3
[solver]
increment = 0.1
max_increment = 0.1
[adapt]
enabled = false
`

// forceCurve runs a case and returns its history's control and force
// columns.
func forceCurve(t *testing.T, casePath string, sets ...string) (x, f []float64) {
	t.Helper()
	out := runCase(t, casePath, sets...)
	h, rows := readCSV(t, filepath.Join(out, "history.csv"))
	ic, ifo := column(t, h, "control"), column(t, h, "force")
	for _, r := range rows {
		c, err1 := strconv.ParseFloat(r[ic], 64)
		v, err2 := strconv.ParseFloat(r[ifo], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("row %v: %v %v", r, err1, err2)
		}
		x, f = append(x, c), append(f, v)
	}
	return x, f
}

// interpolate returns f at x on the piecewise-linear curve (xs, fs), and
// false outside its range.
func interpolate(xs, fs []float64, x float64) (float64, bool) {
	for i := 1; i < len(xs); i++ {
		if xs[i-1] <= x && x <= xs[i] && xs[i] > xs[i-1] {
			s := (x - xs[i-1]) / (xs[i] - xs[i-1])
			return fs[i-1] + s*(fs[i]-fs[i-1]), true
		}
	}
	return 0, false
}

// TestPathIndependentOfControl (V16): the same C(T) run under its pin
// displacement (load control) and under an opening control of its
// load-line gauge gives the same force against load-line opening, within
// 1% wherever both runs pass: equilibrium states do not depend on the
// quantity that drives the loading (DESIGN.md V16). The opening run's
// points fall between the load-control run's, so the comparison also
// carries the interpolation error of a 10-step curve.
func TestPathIndependentOfControl(t *testing.T) {
	path := writeCase(t, ctPathCase)
	xl, fl := forceCurve(t, path)
	xo, fo := forceCurve(t, path, `loading.control="opening"`, "loading.opening=0.5")
	compared := 0
	for i, x := range xo {
		fref, ok := interpolate(xl, fl, x)
		if !ok {
			continue
		}
		compared++
		if d := math.Abs(fo[i]-fref) / fref; d > 0.01 {
			t.Errorf("load-line opening %.4g mm: force %.6g N under opening control, %.6g N under load control (%.2f%%)", x, fo[i], fref, 100*d)
		}
	}
	if compared < 5 {
		t.Fatalf("only %d points overlap (load control to %.3g mm, opening control to %.3g mm)", compared, xl[len(xl)-1], xo[len(xo)-1])
	}
	t.Logf("%d points compared; load control reached %.4g mm at %.6g N (plastic: %.0f%% below the initial stiffness)",
		compared, xl[len(xl)-1], fl[len(fl)-1], 100*(1-(fl[len(fl)-1]/xl[len(xl)-1])/(fl[0]/xl[0])))
}
