package main

import (
	"encoding/base64"
	"encoding/csv"
	"fmt"
	"html/template"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"tearline/remesh"
)

// runReport keeps DIR/report.html: one self-contained page (plots inlined,
// no network) that says where the run stands, for a browser on the run
// folder. It is rewritten atomically, so a browser that reloads it mid-run
// reads either the old page or the new one.
type runReport struct {
	dir   string
	c     *caseFile
	setup plotSetup
	// every is the least time between two rewrites during the run: the
	// page is a view, not the record (history.csv is), and rendering the
	// plots at every step of a fast run would cost more than the steps.
	every   time.Duration
	written time.Time
	// failed is the last write error logged, so a failing disk is said
	// once, not at every step.
	failed string
}

const reportEvery = 5 * time.Second

func newRunReport(dir string, c *caseFile, s plotSetup) *runReport {
	return &runReport{dir: dir, c: c, setup: s, every: reportEvery}
}

// runState is what the page says of the run's progress.
type runState struct {
	// State is "running", "completed" or "stopped"; Reason says why it
	// stopped or what it is doing.
	State, Reason string
	Steps         int
	Remeshes      int
	T, Da         float64
	PeakDofs      int
	PeakMemoryMB  float64
	WallSeconds   float64
}

// due reports whether a rewrite during the run is due.
func (rp *runReport) due() bool {
	return time.Since(rp.written) >= rp.every
}

// write renders the page from the history rows, the figures (nil: render
// the SVG ones now) and the run's state, and replaces report.html.
func (rp *runReport) write(rows []historyRow, figs []figure, st runState) error {
	if figs == nil {
		var err error
		if figs, err = renderPlots(rows, rp.setup, false); err != nil {
			return err
		}
	}
	page, err := rp.page(rows, figs, st)
	if err != nil {
		return err
	}
	err = writeFileAtomic(filepath.Join(rp.dir, "report.html"), func(w io.Writer) error { return reportTemplate.Execute(w, page) })
	if err != nil {
		return fmt.Errorf("report.html: %w", err)
	}
	rp.written = time.Now()
	return nil
}

// reportPage is the data of the template.
type reportPage struct {
	Title, Written, Version, Dir string
	Run                          runState
	Facts                        [][2]string // the run's progress, label and value
	Case                         [][2]string // the case's key figures
	CaseText                     string
	Figures                      []reportFigure
	Remesh                       remeshTable
	Cautions                     []string
}

type reportFigure struct {
	Title, Stem string
	Src         template.URL
}

// page gathers the page's data: the text of the case as run (case.toml)
// and the remesh record (remesh.csv) are read from the folder, so the page
// shows what the files hold.
func (rp *runReport) page(rows []historyRow, figs []figure, st runState) (*reportPage, error) {
	text, err := os.ReadFile(filepath.Join(rp.dir, "case.toml"))
	if err != nil {
		return nil, err
	}
	rt, err := readRemeshTable(filepath.Join(rp.dir, "remesh.csv"))
	if err != nil {
		return nil, err
	}
	abs, err := filepath.Abs(rp.dir)
	if err != nil {
		abs = rp.dir
	}
	p := &reportPage{Title: rp.c.Title, Written: time.Now().Format("2006-01-02 15:04:05 MST"), Version: version,
		Dir: abs, Run: st, CaseText: string(text), Remesh: rt, Cautions: rp.cautions()}
	if p.Title == "" {
		p.Title = "tearline run " + filepath.Base(abs)
	}
	p.Facts = rp.facts(rows, st)
	p.Case = rp.caseFacts(rp.c)
	for _, f := range figs {
		src := "data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString(f.svg)
		p.Figures = append(p.Figures, reportFigure{Title: f.title, Stem: f.stem, Src: template.URL(src)})
	}
	return p, nil
}

// facts are the run's progress figures, with units.
func (rp *runReport) facts(rows []historyRow, st runState) [][2]string {
	u := rp.setup.units
	f := [][2]string{
		{"steps", strconv.Itoa(st.Steps)},
		{"pseudo-time t", fmt.Sprintf("%.5g", st.T)},
		{"crack growth Δa", withUnit(st.Da, u.Length)},
		{"remeshes", strconv.Itoa(st.Remeshes)},
		{"peak unknowns", strconv.Itoa(st.PeakDofs)},
		{"peak memory", fmt.Sprintf("%.0f MB", st.PeakMemoryMB)},
		{"wall time", fmt.Sprintf("%.0f %s", st.WallSeconds, u.Time)},
	}
	if n := len(rows); n > 0 {
		last := rows[n-1]
		f = append(f,
			[2]string{rp.setup.jName + " (resistance curve)", withUnit(resistanceJ(last), u.J)},
			[2]string{rp.setup.force.name, withUnit(last.Force, rp.setup.force.unit)},
			[2]string{rp.setup.load.name, withUnit(rp.setup.load.value(last), rp.setup.load.unit)})
	}
	return f
}

// caseFacts are the case's key figures; the whole case follows as text.
func (rp *runReport) caseFacts(c *caseFile) [][2]string {
	u := rp.setup.units
	m := c.Material
	f := [][2]string{
		{"geometry", c.Geometry.Kind},
		{"material model", m.Model},
		{"Young's modulus E", withUnit(m.Young, u.Stress)},
		{"Poisson's ratio ν", fmt.Sprintf("%g", m.Poisson)},
	}
	if m.Model != "elastic" {
		f = append(f, [2]string{"yield stress σ₀", withUnit(m.Yield, u.Stress)},
			[2]string{"internal length ℓ", withUnit(m.Length, u.Length)})
	}
	if rp.setup.sigmaY > 0 {
		f = append(f, [2]string{"σ_Y of ASTM E1820 (mean of σ₀ and the tensile strength of the flow curve)", withUnit(rp.setup.sigmaY, u.Stress)})
	}
	f = append(f, [2]string{"loading", fmt.Sprintf("%s, %s control", c.Loading.Kind, c.Loading.Control)},
		[2]string{"J of the resistance curve", rp.setup.jName},
		[2]string{"units", fmt.Sprintf("length %s, force %s, stress %s, J %s, time %s", u.Length, u.Force, u.Stress, u.j(), u.Time)})
	return f
}

// cautions are the page's standing cautions (README's, in short), and
// the ones that apply to this run's kind of J.
func (rp *runReport) cautions() []string {
	c := []string{
		"These are model predictions from calibrated material parameters (GTN porosities, hardening, internal length). Fracture predictions feed safety decisions: they are no substitute for the applicable assessment codes and standards, and do not by themselves establish the integrity of any component.",
		"Engineering decisions rest with qualified engineers who have checked the model, its calibration and its limits for the case at hand.",
		"The domain-integral J loses path independence once the crack grows through unloading material; read it beside the resistance-curve J.",
	}
	if rp.setup.sigmaY > 0 {
		c = append(c, "The ASTM E1820 construction is drawn on a plane model with constants and clause numbers recalled from the standard: J_Q is provisional; check it against the printed standard before quoting it.")
	}
	return c
}

// withUnit formats a value with its unit; "–" for a value the run does
// not have.
func withUnit(v float64, unit string) string {
	if !finite(v) {
		return "–"
	}
	return fmt.Sprintf("%.6g %s", v, unit)
}

// remeshTable is remesh.csv as the page shows it: the mesh change and the
// transfer record of every remesh.
type remeshTable struct {
	Rows [][]string
}

// remeshShown are the remesh.csv columns of the page, in its order; the
// relative force changes are computed from the forces.
var remeshShown = []string{
	"remesh", "step", "da", "reason", "dofs_before", "dofs_after", "elements_before", "elements_after", "min_angle_deg",
	"force_before", "force_after_transfer", "force_after_equilibrium",
	"max_porosity_before", "max_porosity_after", "int_p_before", "int_p_after", "work_before", "work_after",
	"verbatim_points", "removed_elements", "equilibrium_iters",
	"geometry_s", "mesh_s", "transfer_s", "equilibrium_s",
}

// readRemeshTable reads remesh.csv (absent: no remesh yet) into the
// page's table, numbers rounded to five figures, with the force change of
// the transfer and of the re-equilibration in per cent after the forces.
func readRemeshTable(path string) (remeshTable, error) {
	f, err := os.Open(path)
	if os.IsNotExist(err) {
		return remeshTable{}, nil
	}
	if err != nil {
		return remeshTable{}, err
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		return remeshTable{}, fmt.Errorf("%s: %w", path, err)
	}
	if len(recs) < 2 {
		return remeshTable{}, nil
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	var t remeshTable
	for _, rec := range recs[1:] {
		row := make([]string, 0, len(remeshShown)+2)
		for _, name := range remeshShown {
			i, ok := col[name]
			if !ok || i >= len(rec) {
				row = append(row, "")
				continue
			}
			row = append(row, roundCell(rec[i]))
			if name == "force_after_equilibrium" {
				before, _ := strconv.ParseFloat(rec[col["force_before"]], 64)
				tr, _ := strconv.ParseFloat(rec[col["force_after_transfer"]], 64)
				eq, _ := strconv.ParseFloat(rec[i], 64)
				row = append(row, percent(tr, before), percent(eq, before))
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return t, nil
}

// roundCell rounds a numeric cell to five significant figures; text stays.
func roundCell(s string) string {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return s
	}
	return strconv.FormatFloat(v, 'g', 5, 64)
}

// percent is the change of v from ref in per cent, "–" without a reference.
func percent(v, ref float64) string {
	if ref == 0 || !finite(v) || !finite(ref) {
		return "–"
	}
	return fmt.Sprintf("%+.3f%%", 100*(v-ref)/math.Abs(ref))
}

// stateClass is the CSS class of a run state.
func stateClass(s string) string {
	switch s {
	case "completed", "running":
		return s
	}
	return "stopped"
}

var reportTemplate = template.Must(template.New("report").Funcs(template.FuncMap{"stateClass": stateClass}).Parse(reportHTML))

// reportHTML is the page. It needs no network: the plots are data URIs and
// the style and the script are inline. The script, first in the page so
// that it hears every script error, checks once the page has loaded that
// every plot was drawn: it lists each image's sizes and the errors in
// #render-check, and says on the page when a plot could not be shown. A
// running run's page reloads itself.
const reportHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
{{if eq .Run.State "running"}}<meta http-equiv="refresh" content="20">
{{end}}<title>{{.Title}} — tearline</title>
<style>
body { font-family: system-ui, "Liberation Sans", Arial, sans-serif; color: #1d2430; margin: 0; background: #f6f7f4; }
main { max-width: 74rem; margin: 0 auto; padding: 1rem 1.5rem 3rem; }
h1 { font-size: 1.5rem; margin: 0.6rem 0 0.2rem; }
h2 { font-size: 1.15rem; border-bottom: 2px solid #c9cfc2; padding-bottom: 0.2rem; margin-top: 2rem; }
.state { display: inline-block; padding: 0.15rem 0.6rem; border-radius: 0.3rem; font-weight: 600; color: #fff; }
.state.running { background: #2c5d9e; } .state.completed { background: #2f7a47; } .state.stopped { background: #a5601a; }
.meta { color: #5a6270; font-size: 0.85rem; }
.caution { background: #fff7e3; border-left: 5px solid #d29a1c; padding: 0.5rem 1rem; }
.caution p { margin: 0.4rem 0; }
dl.facts { display: grid; grid-template-columns: max-content auto; gap: 0.2rem 1.2rem; }
dl.facts dt { color: #5a6270; } dl.facts dd { margin: 0; font-variant-numeric: tabular-nums; }
.plots { display: grid; grid-template-columns: repeat(auto-fill, minmax(28rem, 1fr)); gap: 1rem; }
figure { margin: 0; background: #fff; border: 1px solid #dde1d8; padding: 0.5rem; }
figure img { width: 100%; height: auto; display: block; }
figcaption { font-size: 0.85rem; color: #5a6270; margin-top: 0.3rem; }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; font-size: 0.8rem; font-variant-numeric: tabular-nums; background: #fff; }
th, td { border: 1px solid #dde1d8; padding: 0.2rem 0.4rem; text-align: right; white-space: nowrap; }
th { background: #eef0ea; } td.text { text-align: left; white-space: normal; min-width: 12rem; }
pre.case { background: #fff; border: 1px solid #dde1d8; padding: 0.6rem; overflow-x: auto; font-size: 0.8rem; }
#plot-warning { display: none; background: #fde8e6; border-left: 5px solid #b3261e; padding: 0.5rem 1rem; }
</style>
<script>
(function () {
  var errors = [];
  window.onerror = function (msg) { errors.push(String(msg)); };
  window.addEventListener("load", function () {
    var lines = [], bad = 0;
    var imgs = document.querySelectorAll("img[data-plot]");
    for (var i = 0; i < imgs.length; i++) {
      var im = imgs[i], r = im.getBoundingClientRect();
      if (!(im.naturalWidth > 0 && r.width > 0 && r.height > 0)) { bad++; }
      lines.push("plot " + im.getAttribute("data-plot") + " natural " + im.naturalWidth + "x" + im.naturalHeight +
        " shown " + Math.round(r.width) + "x" + Math.round(r.height));
    }
    for (var j = 0; j < errors.length; j++) { lines.push("error " + errors[j]); }
    lines.push("done " + imgs.length + " plots, " + bad + " not shown, " + errors.length + " errors");
    document.getElementById("render-check").textContent = lines.join("\n");
    if (bad > 0) { document.getElementById("plot-warning").style.display = "block"; }
  });
})();
</script>
</head>
<body>
<main>
<h1>{{.Title}}</h1>
<p><span class="state {{stateClass .Run.State}}">{{.Run.State}}</span> {{.Run.Reason}}</p>
<p class="meta">Page written {{.Written}} by tearline {{.Version}} in {{.Dir}}{{if eq .Run.State "running"}}; it is rewritten as the run goes and reloads itself every 20 s{{end}}.</p>

<section class="caution">
{{range .Cautions}}<p>{{.}}</p>
{{end}}</section>

<h2>Where the run stands</h2>
<dl class="facts">
{{range .Facts}}<dt>{{index . 0}}</dt><dd>{{index . 1}}</dd>
{{end}}</dl>

<h2>Plots</h2>
<p id="plot-warning">Some plots could not be shown by this browser; the same figures are in plots/ as SVG and PNG files.</p>
{{if .Figures}}<div class="plots">
{{range .Figures}}<figure><img src="{{.Src}}" alt="{{.Title}}" data-plot="{{.Stem}}"><figcaption>plots/{{.Stem}}.svg and .png</figcaption></figure>
{{end}}</div>{{else}}<p>No converged step yet.</p>{{end}}

<h2>Remeshes and the state transfer</h2>
{{if .Remesh.Rows}}<p class="meta">From remesh.csv. Forces are the history's force; "transfer" is right after the state was mapped onto the new mesh, "equilibrium" after re-equilibration at the same load. ∫p is the plastic strain integrated over the body, work the stress work.</p>
<div class="scroll"><table>
<tr><th colspan="4">remesh</th><th colspan="5">mesh (before → after)</th><th colspan="5">force</th><th colspan="6">transfer record</th><th colspan="3">points and iterations</th><th colspan="4">time (s)</th></tr>
<tr><th>#</th><th>step</th><th>Δa</th><th>reason</th><th>unknowns</th><th>→</th><th>elements</th><th>→</th><th>min angle (°)</th>
<th>before</th><th>transfer</th><th>equilibrium</th><th>Δ transfer</th><th>Δ equilibrium</th>
<th>max f</th><th>→</th><th>∫p</th><th>→</th><th>work</th><th>→</th>
<th>verbatim</th><th>removed elements</th><th>equilibrium iterations</th>
<th>geometry</th><th>mesh</th><th>transfer</th><th>equilibrium</th></tr>
{{range .Remesh.Rows}}<tr>{{range $i, $c := .}}<td{{if eq $i 3}} class="text"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table></div>{{else}}<p>No remesh so far.</p>{{end}}

<h2>The case</h2>
<dl class="facts">
{{range .Case}}<dt>{{index . 0}}</dt><dd>{{index . 1}}</dd>
{{end}}</dl>
<p class="meta">The case as run (case.toml), defaults filled in:</p>
<pre class="case">{{.CaseText}}</pre>

<h2>This folder</h2>
<p class="meta">history.csv (one row per converged step), remesh.csv, summary.json, case.toml, fields/ (VTK files; open fields.pvd), plots/ (the figures above as SVG and PNG), checkpoint/ (for tearline resume). README.md describes every file and column.</p>
</main>
<pre id="render-check" hidden></pre>
</body>
</html>
`

// updateReport rewrites the page during the run when it is due. A page
// that cannot be written does not stop the run (history.csv is the
// record); the error is logged when it first appears or changes.
func (ob *observer) updateReport(view remesh.View) {
	if !ob.report.due() {
		return
	}
	pr := view.Progress()
	st := runState{State: "running", Reason: fmt.Sprintf("at step %d", pr.Steps), Steps: pr.Steps, Remeshes: pr.Remeshes,
		T: pr.T, Da: pr.Da, PeakDofs: pr.PeakDofs, PeakMemoryMB: peakRSSMB(), WallSeconds: pr.Wall.Seconds()}
	if !pr.Tracked {
		st.Da = math.NaN()
	}
	err := ob.report.write(ob.rows, nil, st)
	if msg := fmt.Sprint(err); err != nil && msg != ob.report.failed {
		ob.logf("  report.html not updated (the run goes on): %v", err)
		ob.report.failed = msg
	}
}

// stateOf is the page's state of a finished run.
func stateOf(s summary) runState {
	return runState{State: s.Status, Reason: s.Reason, Steps: s.Steps, Remeshes: s.Remeshes, T: s.FinalT, Da: s.FinalDa,
		PeakDofs: s.PeakDofs, PeakMemoryMB: s.PeakRSSMB, WallSeconds: s.WallSeconds}
}
