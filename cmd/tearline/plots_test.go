package main

import (
	"bytes"
	"fmt"
	"html"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"tearline/criteria"
	"tearline/solver/material"
)

// TestTensileStrength checks the tensile strength of a flow curve against
// Considère's condition R′(p) = R(p) solved by hand (Considère 1885):
// power law σ₀(1 + p/ε₀)ⁿ: p_u = n − ε₀, σ_TS = σ₀(n/ε₀)ⁿ·e^(−p_u);
// Voce σ₀ + Q(1 − e^(−bp)): e^(−b·p_u) = (σ₀ + Q)/(Q(1 + b)); a perfectly
// plastic or a barely hardening law necks at once: σ_TS = σ₀.
func TestTensileStrength(t *testing.T) {
	powerUTS := func(s0, e0, n float64) float64 { return s0 * math.Pow(n/e0, n) * math.Exp(-(n - e0)) }
	voceUTS := func(s0, q, b float64) float64 {
		e := (s0 + q) / (q * (1 + b))
		return (s0 + q*(1-e)) * math.Exp(math.Log(e)/b)
	}
	for _, c := range []struct {
		name string
		h    material.Hardening
		want float64
	}{
		{"power law, n = 0.1, ε₀ = σ₀/E", material.PowerLaw{Sigma0: 450, Eps0: 450 / 200e3, N: 0.1}, powerUTS(450, 450/200e3, 0.1)},
		{"power law, n = 0.2, ε₀ = 0.002", material.PowerLaw{Sigma0: 300, Eps0: 0.002, N: 0.2}, powerUTS(300, 0.002, 0.2)},
		{"Voce", material.Voce{Sigma0: 300, Q: 200, B: 10}, voceUTS(300, 200, 10)},
		{"perfectly plastic", material.PerfectlyPlastic{Sigma0: 450}, 450},
		{"Voce saturating below necking", material.Voce{Sigma0: 300, Q: 10, B: 1}, 300},
	} {
		if got := tensileStrength(c.h); math.Abs(got-c.want) > 1e-6*c.want {
			t.Errorf("%s: σ_TS = %.8g, Considère by hand %.8g", c.name, got, c.want)
		}
	}
}

// svgText is one text element of an SVG: its text, unescaped, and its y
// attribute (the tick labels of the horizontal axis share one).
type svgText struct{ text, y string }

// svgTexts returns the text elements of an SVG: axis labels, ticks,
// legend, title.
func svgTexts(svg []byte) []svgText {
	var out []svgText
	for _, m := range regexp.MustCompile(`<text x="[^"]*" y="([^"]*)"[^>]*>([^<]*)</text>`).FindAllSubmatch(svg, -1) {
		out = append(out, svgText{html.UnescapeString(string(m[2])), string(m[1])})
	}
	return out
}

// repeatedTicks returns the tick labels that appear more than once on one
// axis: the horizontal axis's labels are the numbers on the most common
// baseline, the vertical axis's the other numbers.
func repeatedTicks(texts []svgText) []string {
	rows := map[string]int{}
	for _, s := range texts {
		if numeric.MatchString(s.text) {
			rows[s.y]++
		}
	}
	base, most := "", 0
	for y, n := range rows {
		if n > most {
			base, most = y, n
		}
	}
	seen := map[[2]string]int{}
	var out []string
	for _, s := range texts {
		if !numeric.MatchString(s.text) {
			continue
		}
		axis := "vertical"
		if s.y == base {
			axis = "horizontal"
		}
		k := [2]string{axis, s.text}
		if seen[k]++; seen[k] == 2 {
			out = append(out, axis+" "+s.text)
		}
	}
	return out
}

// figureTexts reads plots/STEM.svg of a run folder and checks that
// plots/STEM.png is a picture.
func figureTexts(t *testing.T, dir, stem string) []svgText {
	t.Helper()
	svg, err := os.ReadFile(filepath.Join(dir, "plots", stem+".svg"))
	if err != nil {
		t.Fatalf("%v", err)
	}
	data, err := os.ReadFile(filepath.Join(dir, "plots", stem+".png"))
	if err != nil {
		t.Fatalf("%v", err)
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(data))
	if err != nil || cfg.Width < 300 || cfg.Height < 200 {
		t.Errorf("%s.png: %dx%d, %v; want a decodable picture of at least 300x200", stem, cfg.Width, cfg.Height, err)
	}
	return svgTexts(svg)
}

// plotWant is what one figure of a run folder must say.
type plotWant struct {
	stem string
	// texts must each be one text element of the SVG (axis labels with
	// their units, legend entries, title); absent names figures that must
	// not be drawn.
	texts  []string
	absent bool
}

// checkPlots checks the figures of a run folder: every axis label named
// with its unit, and tick labels that read as distinct numbers.
func checkPlots(t *testing.T, dir string, want []plotWant) {
	t.Helper()
	for _, w := range want {
		if w.absent {
			if _, err := os.Stat(filepath.Join(dir, "plots", w.stem+".svg")); err == nil {
				t.Errorf("plots/%s.svg drawn, but it does not apply to this run", w.stem)
			}
			continue
		}
		texts := figureTexts(t, dir, w.stem)
		have := map[string]bool{}
		for _, s := range texts {
			have[s.text] = true
		}
		for _, s := range w.texts {
			if !have[s] {
				t.Errorf("plots/%s.svg lacks the text %q; it has %q", w.stem, s, texts)
			}
		}
		if rep := repeatedTicks(texts); len(rep) > 0 {
			t.Errorf("plots/%s.svg: tick labels %q repeat on one axis (ticks must read as distinct numbers)", w.stem, rep)
		}
	}
}

var numeric = regexp.MustCompile(`^[-−+0-9.eE]+$`)

// TestPlotAxes draws the figures of three histories shaped like an
// elastic run, a C(T) run with growth and a small-scale-yielding run with
// growth (the setups are those of the cases of testdata/, the rows made
// here) and checks their axis labels with units (the units of the
// examples: mm, N, MPa; J in N/mm = kJ/m², K in MPa√mm). Real runs are
// checked the same way where the run tests make them (checkPlots).
func TestPlotAxes(t *testing.T) {
	for _, c := range []struct {
		name, casePath string
		rows           []historyRow
		want           []plotWant
	}{
		{"elastic K field", "../../testdata/williams-elastic.toml", syntheticRows(6, false, false), elasticPlots},
		{"C(T) with growth", "../../testdata/ct.toml", syntheticRows(40, true, true), append([]plotWant{
			{stem: "J-da", texts: []string{"Resistance curve", "Δa, crack growth (mm)"}},
			{stem: "J-da-E1820", texts: []string{"Δa, projected on the crack plane (mm)", "J, ASTM E1820 (N/mm = kJ/m²)",
				"exclusion lines at 0.15 and 1.5 mm", "offset line at 0.2 mm", "Δa_max = 0.25·b₀ = 5.62 mm (beyond the axis)"}},
		}, ctPlots...)},
		{"small-scale yielding with growth", "../../testdata/golden-ssy.toml", syntheticRows(30, true, false), ssyPlots},
	} {
		t.Run(c.name, func(t *testing.T) {
			cf, _, rs, err := prepareCase(c.casePath, nil)
			if err != nil {
				t.Fatal(err)
			}
			dir := t.TempDir()
			if _, err := writePlots(filepath.Join(dir, "plots"), c.rows, newPlotSetup(cf, rs, defaultUnits())); err != nil {
				t.Fatal(err)
			}
			checkPlots(t, dir, c.want)
		})
	}
}

// What the figures of the three kinds of run must say, on their axes and
// in their legends; the run tests check their real runs against these too.
var (
	elasticPlots = []plotWant{
		{stem: "J-da", texts: []string{"J versus load (no crack growth)", "remote K (MPa√mm)", "J (N/mm = kJ/m²)", "J, far field", "J, domain integral at the current tip"}},
		{stem: "force-load", texts: []string{"remote K (MPa√mm)", "force per unit thickness (N/mm)"}},
		{stem: "memory-da", texts: []string{"remote K (MPa√mm)", "peak resident memory (MB)"}},
		{stem: "unknowns-da", texts: []string{"remote K (MPa√mm)", "unknowns (count)"}},
		{stem: "J-da-normalised", absent: true},
		{stem: "J-da-E1820", absent: true},
	}
	ctPlots = []plotWant{
		{stem: "J-da", texts: []string{"J (N/mm = kJ/m²)", "J, ASTM E1820", "J, domain integral at the current tip"}},
		{stem: "force-load", texts: []string{"Force versus load-line displacement", "load-line displacement (mm)", "force (N)"}},
		{stem: "unknowns-da", texts: []string{"unknowns (count)"}},
		{stem: "J-da-normalised", absent: true},
	}
	ssyPlots = []plotWant{
		{stem: "J-da", texts: []string{"Resistance curve", "Δa, crack growth (mm)", "J (N/mm = kJ/m²)", "J, far field"}},
		{stem: "J-da-normalised", texts: []string{"Δa/ℓ (–), ℓ = 0.1 mm", "J/(σ₀ℓ) (–), σ₀ = 450 MPa"}},
		{stem: "force-load", texts: []string{"remote K (MPa√mm)", "force per unit thickness (N/mm)"}},
		{stem: "memory-da", texts: []string{"Δa, crack growth (mm)", "peak resident memory (MB)"}},
		{stem: "unknowns-da", texts: []string{"Δa, crack growth (mm)", "unknowns (count)"}},
		{stem: "J-da-E1820", absent: true},
	}
)

// syntheticRows makes a history: K or displacement rising, J ∝ load², and
// with growth Δa rising after the first third; ct fills the E1820 J on a
// power law J = 250·Δa^0.45 plus a part that grows with the load. The
// memory is nearly constant (96.6 MB and a few kB), the case whose ticks
// used to read "96.6, 96.6, 96.6".
func syntheticRows(n int, growth, ct bool) []historyRow {
	var rows []historyRow
	for i := 1; i <= n; i++ {
		s := float64(i) / float64(n)
		r := historyRow{Step: i, T: s, Control: 100 * s, Force: 350 * s, JFar: 0.05 * s * s, JDomain: 0.049 * s * s,
			Da: math.NaN(), DaProj: math.NaN(), Dofs: 13050, RSS: 96.6 + 1e-3*s, JE1820: math.NaN(), Gauge: 0.01 * s}
		if growth {
			r.Da = math.Max(0, 3*(s-1.0/3))
			r.DaProj = r.Da
			r.JFar = 40 + 200*r.Da
		}
		if ct {
			r.JFar = math.NaN()
			r.JE1820 = 250*math.Pow(r.Da, 0.45) + 20*s
		}
		rows = append(rows, r)
	}
	return rows
}

// TestPlotsNoData: quantities a run does not have (no force under a
// pressure load, no J before the first step) leave their figure out
// instead of drawing an empty frame.
func TestPlotsNoData(t *testing.T) {
	cf, _, rs, err := prepareCase("../../testdata/williams-elastic.toml", nil)
	if err != nil {
		t.Fatal(err)
	}
	figs, err := renderPlots(nil, newPlotSetup(cf, rs, defaultUnits()), false)
	if err != nil || len(figs) != 0 {
		t.Errorf("no rows: %d figures, %v; want none", len(figs), err)
	}
	rows := syntheticRows(3, false, false)
	for i := range rows {
		rows[i].Force = math.NaN()
	}
	figs, err = renderPlots(rows, newPlotSetup(cf, rs, defaultUnits()), false)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range figs {
		if f.stem == "force-load" {
			t.Errorf("force-load drawn without a force")
		}
	}
	if len(figs) != 3 {
		t.Errorf("%d figures, want J, unknowns and memory", len(figs))
	}
}

// jqLegend finds the J_Q legend entry of an E1820 figure.
func jqLegend(texts []svgText) string {
	for _, s := range texts {
		if strings.HasPrefix(s.text, "J_Q = ") || strings.HasPrefix(s.text, "no J_Q") || strings.HasPrefix(s.text, "no power-law fit") {
			return s.text
		}
	}
	return ""
}

// TestE1820Figure: the C(T) figure shows the J_Q of criteria.E1820JQ on
// the same record (one construction, in one place), with σ_Y the mean of
// the yield stress and the tensile strength of the case's flow curve.
func TestE1820Figure(t *testing.T) {
	cf, _, rs, err := prepareCase("../../testdata/ct.toml", nil)
	if err != nil {
		t.Fatal(err)
	}
	s := newPlotSetup(cf, rs, defaultUnits())
	m := cf.Material
	h := material.PowerLaw{Sigma0: m.Yield, Eps0: m.RefStrain, N: m.Exponent}
	if want := 0.5 * (m.Yield + tensileStrength(h)); math.Abs(s.sigmaY-want) > 1e-9*want {
		t.Errorf("σ_Y = %g, want (σ₀ + σ_TS)/2 = %g", s.sigmaY, want)
	}
	rows := syntheticRows(40, true, true)
	var da, J []float64
	for _, r := range rows {
		da, J = append(da, r.DaProj), append(J, r.JE1820)
	}
	q, err := criteria.E1820JQ(da, J, criteria.JQOptions{SigmaY: s.sigmaY, B0: rs.ct.W - rs.ct.A0, B: rs.ct.B, MM: 1})
	if err != nil || !finite(q.JQ) {
		t.Fatalf("J_Q %g, %v: the record must give one", q.JQ, err)
	}
	dir := t.TempDir()
	if _, err := writePlots(filepath.Join(dir, "plots"), rows, s); err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprintf("J_Q = %.4g N/mm at Δa = %.3g mm", q.JQ, q.DaQ)
	if got := jqLegend(figureTexts(t, dir, "J-da-E1820")); got != want {
		t.Errorf("legend %q, want %q", got, want)
	}
}
