package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"sort"
	"strings"
	"sync/atomic"
	"syscall"
	"time"

	"tearline/criteria"
	"tearline/remesh"
	"tearline/solver"
)

// setFlags collects repeated --set arguments.
type setFlags []string

func (s *setFlags) String() string     { return strings.Join(*s, " ") }
func (s *setFlags) Set(v string) error { *s = append(*s, v); return nil }

// parseArgs parses flags that may stand before or after the positional
// arguments (Go's flag package stops at the first positional one).
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

const runUsage = `usage: tearline run CASE.toml -o DIR [--set section.key=value ...]

Runs a case into the run folder DIR (created; it must not hold a run already):
case.toml, history.csv, remesh.csv, summary.json, report.html, fields/,
checkpoint/, plots/.
Ctrl-C stops cleanly with a checkpoint; 'tearline resume DIR' continues.
Exit status: 0 completed, 1 stopped early (results so far kept), 2 bad input.
`

func runCommand(args []string, stdout, stderr io.Writer) int {
	a, code, done := parseRunArgs("run", runUsage, "", args, stderr)
	if done {
		return code
	}
	if len(a.pos) != 1 || a.out == "" {
		fmt.Fprintf(stderr, "tearline run: need one case file and -o DIR\n%s", runUsage)
		return 2
	}
	return startRun(a.pos[0], a.out, a.sets, stdout, stderr)
}

// startRun validates a case and runs it into dir.
func startRun(casePath, dir string, sets []string, stdout, stderr io.Writer) int {
	c, src, rs, err := prepareCase(casePath, sets)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 2
	}
	// the first mesh, problem and control are made before the folder, so
	// that a control the case cannot use leaves nothing behind
	rs.cfg.Solver.Failed = retryReporter(stdout)
	cyc, err := remesh.NewCycle(rs.cfg)
	if err != nil {
		err = controlInputError(err, c, src)
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return exitFor(err)
	}
	if err := prepareRunFolder(dir); err != nil {
		fmt.Fprintf(stderr, "tearline: run folder %s: %v\n", dir, err)
		return 2
	}
	unlock, err := lockRunFolder(dir)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: run folder %s: %v\n", dir, err)
		return 2
	}
	defer unlock()
	text, err := c.encode()
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 2
	}
	if err := writeFileAtomic(filepath.Join(dir, "case.toml"), func(w io.Writer) error { _, err := w.Write(text); return err }); err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	if *c.Adapt.Enabled && !rs.cfg.Adapt && c.Material.Model == "elastic" {
		fmt.Fprintln(stdout, "tearline: adaptivity is off for an elastic body: it has no damage front to follow")
	}
	ob, err := newObserver(dir, c, rs, hashBytes(text), stdout, false)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	return ob.run(cyc, stderr)
}

// controlInputError turns the solver's refusal of a held gauge into the
// case's error: the key, and what is allowed.
func controlInputError(err error, c *caseFile, src *caseSource) error {
	if !errors.Is(err, solver.ErrHeldControl) {
		return err
	}
	key := "loading.control"
	if len(c.Loading.Gauge) > 0 {
		key = "loading.gauge"
	}
	return badInput("%s: the gauge reads a displacement held by a support or the symmetry plane, which cannot follow the load; name points, and a gauge_direction, free to move", src.where(key))
}

// exitFor maps an error to the exit status.
func exitFor(err error) int {
	if isInputError(err) {
		return 2
	}
	return 1
}

// prepareRunFolder creates dir and its sub-folders. A folder that exists
// and is not empty is refused (DESIGN.md §6), so that nothing in it — a
// run, or the user's own files — is ever written over.
func prepareRunFolder(dir string) error {
	entries, err := os.ReadDir(dir)
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	for _, f := range []string{"history.csv", "summary.json", "checkpoint"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
			return fmt.Errorf("already holds a run (%s); use 'tearline resume %s' or choose another folder", f, dir)
		}
	}
	if len(entries) > 0 {
		return fmt.Errorf("exists and is not empty (it holds %s); a run writes only into a new or empty folder, so that nothing is written over", entries[0].Name())
	}
	for _, sub := range []string{"", "fields", "checkpoint", "plots"} {
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return err
		}
	}
	return nil
}

// observer writes the run folder as the cycle reports.
type observer struct {
	dir      string
	c        *caseFile
	rs       *runSetup
	hash     string
	model    map[string]string // modelKeys of the case, kept in every checkpoint
	stdout   io.Writer
	tty      bool
	history  *csvTable
	remeshes *csvTable
	rows     []historyRow
	nRemesh  int
	pvd      []pvdEntry
	lastCP   time.Time
	cpEvery  time.Duration
	stopping atomic.Bool
	iters    []int
	// unmeasured is the last step's list of measures that could not be
	// evaluated, logged whenever it changes.
	unmeasured string
	report     *runReport
}

// pvdEntry is one field file of the collection.
type pvdEntry struct {
	T    float64 `json:"t"`
	File string  `json:"file"`
}

// observerState is what a checkpoint carries of the observer (Extra).
type observerState struct {
	HistoryRows int        `json:"history_rows"`
	RemeshRows  int        `json:"remesh_rows"`
	Fields      []pvdEntry `json:"fields"`
	Iters       []int      `json:"iters"`
	// Model is modelKeys of the case the checkpoint was written under:
	// resume refuses a case whose model has changed since.
	Model map[string]string `json:"model"`
}

var remeshColumns = []string{
	"remesh", "step", "t", "da", "reason", "dofs_before", "dofs_after", "elements_before", "elements_after",
	"min_size", "min_angle_deg", "force_before", "force_after_transfer", "force_after_equilibrium",
	"max_porosity_before", "max_porosity_after", "int_p_before", "int_p_after",
	"work_before", "work_after", "removed_elements", "verbatim_points", "equilibrium_iters",
	"geometry_s", "mesh_s", "transfer_s", "equilibrium_s", "verbatim_share",
}

func newObserver(dir string, c *caseFile, rs *runSetup, hash string, stdout io.Writer, resume bool) (*observer, error) {
	model, err := modelKeys(c)
	if err != nil {
		return nil, err
	}
	ob := &observer{dir: dir, c: c, rs: rs, hash: hash, model: model, stdout: stdout, lastCP: time.Now(),
		cpEvery: time.Duration(c.Output.CheckpointMinutes * float64(time.Minute))}
	ob.report = newRunReport(dir, c, newPlotSetup(c, rs, c.Units.labels()))
	if f, ok := stdout.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			ob.tty = true
		}
	}
	if resume {
		return ob, nil
	}
	if ob.history, err = createCSV(filepath.Join(dir, "history.csv"), historyColumns); err != nil {
		return nil, err
	}
	if ob.remeshes, err = createCSV(filepath.Join(dir, "remesh.csv"), remeshColumns); err != nil {
		return nil, err
	}
	return ob, nil
}

// run drives the cycle to its end and writes the summary and plots.
func (ob *observer) run(cyc *remesh.Cycle, stderr io.Writer) int {
	view := cyc.View()
	sig := make(chan os.Signal, 1)
	signal.Notify(sig, os.Interrupt, syscall.SIGTERM)
	defer signal.Stop(sig)
	go func() {
		if _, ok := <-sig; ok {
			ob.stopping.Store(true)
		}
	}()
	if view.Progress().Steps == 0 {
		if err := ob.writeFields(view); err != nil {
			fmt.Fprintf(stderr, "tearline: fields: %v\n", err)
		}
	}
	outc, err := cyc.Run(ob)
	if ob.tty {
		fmt.Fprintln(ob.stdout)
	}
	status, reason := outc.Status.String(), outc.Reason
	code := 0
	switch {
	case errors.Is(err, errInterrupted):
		status, reason, code = "stopped", "interrupted (Ctrl-C or SIGTERM); resume with 'tearline resume'", 1
	case err != nil:
		status, reason, code = "stopped", err.Error(), 1
	case outc.Status == solver.Stopped:
		code = 1
	case outc.Status == solver.Completed && reason == "":
		reason = fmt.Sprintf("reached stop.t = %g", ob.c.Stop.T)
	}
	if cerr := ob.checkpoint(view); cerr != nil {
		fmt.Fprintf(stderr, "tearline: checkpoint: %v\n", cerr)
		code = 1
	}
	if ferr := ob.writeFields(view); ferr != nil {
		fmt.Fprintf(stderr, "tearline: fields: %v\n", ferr)
	}
	figs, perr := writePlots(filepath.Join(ob.dir, "plots"), ob.rows, ob.report.setup)
	if perr != nil {
		fmt.Fprintf(stderr, "tearline: plots: %v\n", perr)
	}
	pr := view.Progress()
	s := summary{Status: status, Reason: reason, Steps: pr.Steps, Remeshes: pr.Remeshes, FinalDa: pr.Da,
		FinalT: pr.T, PeakDofs: pr.PeakDofs, PeakRSSMB: peakRSSMB(), WallSeconds: pr.Wall.Seconds(),
		CaseSHA256: ob.hash, MedianIters: medianInt(ob.iters)}
	if n := len(ob.rows); n > 0 && !math.IsNaN(ob.rows[n-1].JDomain) {
		s.FinalJDomain = ob.rows[n-1].JDomain
	}
	if err := writeSummary(ob.dir, s); err != nil {
		fmt.Fprintf(stderr, "tearline: summary: %v\n", err)
		code = 1
	}
	if rerr := ob.report.write(ob.rows, figs, stateOf(s)); rerr != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", rerr)
	}
	ob.history.Close()
	ob.remeshes.Close()
	fmt.Fprintf(ob.stdout, "tearline: %s after %d steps, %d remeshes, Δa = %.4g %s, t = %.4g (%s); results in %s\n",
		status, pr.Steps, pr.Remeshes, pr.Da, ob.report.setup.units.Length, pr.T, reason, ob.dir)
	if status == "stopped" {
		fmt.Fprintf(stderr, "tearline: stopped: %s\n", reason)
	}
	return code
}

var errInterrupted = errors.New("interrupted")

// Step records a converged step: history row, fields, checkpoint, progress.
func (ob *observer) Step(r *remesh.StepRecord, view remesh.View) error {
	row := historyRow{Step: r.Step, T: r.T, Control: r.Control, Force: r.Force, JFar: r.JFar, JDomain: r.JDomain,
		Da: r.Da, DaProj: r.DaProj, CTOD: r.CTOD, Dofs: r.Dofs, Elements: r.Elements, Remeshes: r.Remeshes,
		Iters: r.Iters, Wall: r.CumWall.Seconds(), RSS: peakRSSMB(), JE1820: math.NaN(), Tearing: math.NaN(),
		MaxPorosity: r.MaxPorosity, Cutbacks: r.Cutbacks, LoadFactor: r.Load, Gauge: r.Gauge,
		JDomainFlag: ob.jDomainFlag(r, view), DaFront: r.DaFront}
	if !view.Progress().Tracked {
		row.Da, row.DaProj = math.NaN(), math.NaN()
	}
	ob.rows = append(ob.rows, row)
	ob.iters = append(ob.iters, r.Iters)
	ob.fracture()
	if err := ob.history.write(ob.rows[len(ob.rows)-1].fields()); err != nil {
		return fmt.Errorf("history.csv: %w", err)
	}
	if r.Step%ob.c.Output.FieldsEvery == 0 {
		if err := ob.writeFields(view); err != nil {
			return err
		}
	}
	if time.Since(ob.lastCP) >= ob.cpEvery {
		if err := ob.checkpoint(view); err != nil {
			return err
		}
	}
	ob.progress(r)
	ob.noteUnmeasured(r)
	ob.updateReport(view)
	if ob.stopping.Load() {
		return errInterrupted
	}
	return nil
}

// noteUnmeasured logs the measures the cycle could not evaluate at this
// step (their history cells are empty) whenever that list changes.
func (ob *observer) noteUnmeasured(r *remesh.StepRecord) {
	var msgs []string
	for _, err := range r.Unmeasured {
		msgs = append(msgs, err.Error())
	}
	text := strings.Join(msgs, "; ")
	if text == ob.unmeasured {
		return
	}
	ob.unmeasured = text
	if text == "" {
		ob.logf("  step %d: all measures evaluated again", r.Step)
		return
	}
	ob.logf("  step %d: not evaluated (left empty in history.csv): %s", r.Step, text)
}

// fracture fills the E1820 J and the tearing modulus of the last row.
func (ob *observer) fracture() {
	n := len(ob.rows)
	last := &ob.rows[n-1]
	if ct := ob.rs.ct; ct != nil {
		rec := make([]criteria.CTRecord, 0, n+1)
		rec = append(rec, criteria.CTRecord{P: 0, V: 0, A: ct.A0})
		for _, r := range ob.rows {
			da := r.DaProj
			if math.IsNaN(da) {
				da = 0
			}
			rec = append(rec, criteria.CTRecord{P: r.Force, V: r.Control, A: ct.A0 + da})
		}
		// The elastic compliance is the model's own, from the first
		// (elastic) step, as a test uses the measured initial compliance
		// (common practice): the load-point displacement of the model
		// includes the pin contact, which the calibration does not.
		opt := criteria.E1820Options{Mode: criteria.ComplianceGiven, C: ob.rows[0].Control / ob.rows[0].Force}
		if js, err := criteria.E1820J(*ct, rec, opt); err == nil && len(js) == len(rec) {
			last.JE1820 = js[len(js)-1].J
		}
	}
	if ob.rs.sigma0 > 0 && ob.rs.length > 0 {
		var da, j []float64
		for _, r := range ob.rows {
			jv := resistanceJ(r)
			if !math.IsNaN(r.Da) && !math.IsNaN(jv) {
				da, j = append(da, r.Da), append(j, jv)
			}
		}
		// The slope at the last point uses only the points of its centred
		// window, so only those are passed (no re-evaluation of the whole
		// record at every step).
		window := 2 * ob.rs.length
		first := len(da)
		for first > 0 && math.Abs(da[first-1]-da[len(da)-1]) <= window/2 {
			first--
		}
		if len(da)-first >= 2 {
			if tm, err := criteria.TearingModulus(da[first:], j[first:], ob.rs.young, ob.rs.sigma0, window); err == nil {
				last.Tearing = tm[len(tm)-1]
			}
		}
	}
}

// Remesh records a remesh and checkpoints right after it.
func (ob *observer) Remesh(r *remesh.RemeshRecord, view remesh.View) error {
	f := func(v float64) string { return fmt.Sprintf("%.10g", v) }
	s := func(d time.Duration) string { return fmt.Sprintf("%.4f", d.Seconds()) }
	fields := []string{fmt.Sprint(r.Index), fmt.Sprint(r.Step), f(r.T), f(r.Da), r.Reason,
		fmt.Sprint(r.DofsBefore), fmt.Sprint(r.DofsAfter), fmt.Sprint(r.ElemsBefore), fmt.Sprint(r.ElemsAfter),
		f(r.MinSize), f(r.MinAngle), f(r.ForceBefore), f(r.ForceTransfer), f(r.ForceAfter),
		f(r.MaxFBefore), f(r.MaxFAfter), f(r.IntPBefore), f(r.IntPAfter), f(r.WorkBefore), f(r.WorkAfter),
		fmt.Sprint(r.Removed), fmt.Sprint(r.Verbatim), fmt.Sprint(r.Iterations),
		s(r.GeomWall), s(r.MeshWall), s(r.MapWall), s(r.EquilWall), f(r.VerbatimShare)}
	if err := ob.remeshes.write(fields); err != nil {
		return fmt.Errorf("remesh.csv: %w", err)
	}
	ob.nRemesh++
	ob.logf("remesh %d at step %d (Δa = %.4g %s): %s; unknowns %d → %d, elements %d → %d, min angle %.1f°",
		r.Index, r.Step, r.Da, ob.report.setup.units.Length, r.Reason, r.DofsBefore, r.DofsAfter, r.ElemsBefore, r.ElemsAfter, r.MinAngle)
	if err := ob.writeFields(view); err != nil {
		return err
	}
	return ob.checkpoint(view)
}

// RemeshFailed logs a remesh that failed and was put off; the run goes on
// with the old mesh (remesh.csv holds the remeshes that took place).
func (ob *observer) RemeshFailed(index, step int, err error) error {
	ob.logf("remesh %d at step %d failed, going on with the old mesh and trying again after the next step: %v", index, step, err)
	return nil
}

// checkpoint writes the committed state atomically.
func (ob *observer) checkpoint(view remesh.View) error {
	extra, err := json.Marshal(observerState{HistoryRows: len(ob.rows), RemeshRows: ob.nRemesh, Fields: ob.pvd, Iters: ob.iters, Model: ob.model})
	if err != nil {
		return err
	}
	path := filepath.Join(ob.dir, "checkpoint", "state.gob")
	if err := writeFileAtomic(path, func(w io.Writer) error { return view.WriteCheckpoint(w, extra) }); err != nil {
		return err
	}
	ob.lastCP = time.Now()
	return nil
}

// jDomainFlag is the J_domain_flag of a step: 1 when the outermost ring,
// whose J the history reports, holds process-zone material; NaN without a
// domain J.
func (ob *observer) jDomainFlag(r *remesh.StepRecord, view remesh.View) float64 {
	jc := ob.rs.cfg.J
	if math.IsNaN(r.JDomain) || jc == nil || len(jc.Rings) == 0 {
		return math.NaN()
	}
	if !(ob.rs.cfg.Fc > 0) {
		return 0 // an elastic body has no process zone
	}
	ring := jc.Rings[len(jc.Rings)-1]
	if ringsInProcessZone(view.GaussPoints(), r.TipX, ring.In*jc.Unit, ring.Out*jc.Unit, ob.rs.cfg.Fc) {
		return 1
	}
	return 0
}

// progress prints one line per step: rewritten in place on a terminal,
// plain log lines otherwise, with the case's units.
// The J is that of the resistance curve (resistanceJ: far field, ASTM
// E1820, else the domain integral; a flagged domain J is not shown), the
// force that of the history; the time to go is toward the stop criterion
// that comes first.
func (ob *observer) progress(r *remesh.StepRecord) {
	n := len(ob.rows)
	row := ob.rows[n-1]
	s := ob.report.setup
	u := s.units
	dt := row.T
	if n > 1 {
		dt -= ob.rows[n-2].T
	}
	da := fmt.Sprintf("Δa %8.4g %s", nanZero(r.Da), u.Length)
	if ob.rs.length > 0 {
		da += fmt.Sprintf(" (%.3gℓ)", nanZero(r.Da)/ob.rs.length)
	}
	j := fmt.Sprintf("J %10.4g %s", nanZero(resistanceJ(row)), u.J)
	if math.IsNaN(row.JFar) && math.IsNaN(row.JE1820) && row.JDomainFlag == 1 {
		j = "J (rings in the process zone)"
	}
	line := fmt.Sprintf("step %5d  t %.5f (+%.3g)  unknowns %7d  iters %2d  cuts %d  %s  %s  F %10.4g %s  %7.1f %s",
		r.Step, r.T, dt, r.Dofs, r.Iters, r.Cutbacks, da, j, nanZero(r.Force), s.force.unit, r.CumWall.Seconds(), u.Time)
	if secs, key, ok := timeToGo(ob.rows, ob.c.Stop); ok {
		line += fmt.Sprintf("  about %s to %s", duration(secs), key)
	}
	if ob.tty {
		fmt.Fprintf(ob.stdout, "\r%s", line)
		return
	}
	fmt.Fprintln(ob.stdout, line)
}

func (ob *observer) logf(format string, args ...any) {
	if ob.tty {
		fmt.Fprintln(ob.stdout)
	}
	fmt.Fprintf(ob.stdout, format+"\n", args...)
}

func nanZero(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

func medianInt(v []int) float64 {
	if len(v) == 0 {
		return 0
	}
	s := append([]int(nil), v...)
	sort.Ints(s)
	n := len(s)
	if n%2 == 1 {
		return float64(s[n/2])
	}
	return 0.5 * float64(s[n/2-1]+s[n/2])
}

// resistanceJ is the J of the resistance curve: the applied far-field J in
// small-scale yielding, the ASTM E1820 J of a C(T) record, else the domain
// integral (which loses path independence once the crack grows through
// unloading material, so it is the last choice; common practice).
func resistanceJ(r historyRow) float64 {
	switch {
	case !math.IsNaN(r.JFar):
		return r.JFar
	case !math.IsNaN(r.JE1820):
		return r.JE1820
	}
	return r.JDomain
}

// newFlags returns the flag set of a subcommand; -h prints its usage.
func newFlags(name, usage string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(flagMessages{stderr})
	fs.Usage = func() { fmt.Fprint(stderr, usage) }
	return fs
}

// flagMessages writes the flag package's messages in the command line's
// own words and spelling (--name).
type flagMessages struct{ w io.Writer }

func (f flagMessages) Write(p []byte) (int, error) {
	s := strings.Replace(string(p), "flag provided but not defined: -", "unknown option --", 1)
	s = strings.Replace(s, "flag needs an argument: -", "option needs a value: --", 1)
	if _, err := io.WriteString(f.w, s); err != nil {
		return 0, err
	}
	return len(p), nil
}

// setOverrides registers the repeatable --set flag.
func setOverrides(fs *flag.FlagSet) *setFlags {
	var sets setFlags
	fs.Var(&sets, "set", "override section.key=value (repeatable)")
	return &sets
}

// parseCommand parses a subcommand's arguments; done is true when the
// caller should return code at once (help asked for, or a flag error).
func parseCommand(fs *flag.FlagSet, args []string) (pos []string, code int, done bool) {
	pos, err := parseArgs(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil, 0, true
		}
		return nil, 2, true
	}
	return pos, 0, false
}

// retryReporter prints why an increment failed before it is cut back, so
// that a run that slows down says what troubles it.
func retryReporter(w io.Writer) func(t, dt float64, err error) {
	return func(t, dt float64, err error) {
		fmt.Fprintf(w, "  retry: increment %.3g from t %.6g failed: %v\n", dt, t, err)
	}
}
