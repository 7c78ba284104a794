package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"tearline/remesh"
)

const resumeUsage = `usage: tearline resume DIR [--set stop.key=value|output.key=value ...]

Continues the run in DIR from its last checkpoint (DIR/checkpoint/state.gob)
with the case as run (DIR/case.toml). Rows of history.csv written after the
checkpoint are dropped and computed again, so the folder ends as if the run
had never stopped. A case whose model changed since the checkpoint is
refused; --set changes [stop] and [output] keys only (to take a completed
run further, raise a stop key) and records them in DIR/case.toml.
Exit status as for 'tearline run'.
`

func resumeCommand(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("resume", resumeUsage, stderr)
	sets := setOverrides(fs)
	dir, code, done := oneArgument(fs, args, "tearline resume: need the run folder", resumeUsage, stderr)
	if done {
		return code
	}
	for _, s := range *sets {
		if !strings.HasPrefix(s, "stop.") && !strings.HasPrefix(s, "output.") {
			fmt.Fprintf(stderr, "tearline resume: --set %s: a resumed run takes stop.* and output.* keys only (the model must stay as checkpointed)\n", s)
			return 2
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "case.toml")); err != nil {
		fmt.Fprintf(stderr, "tearline: %s is not a run folder: %v\n", dir, err)
		return 2
	}
	unlock, err := lockRunFolder(dir)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: run folder %s: %v\n", dir, err)
		return 2
	}
	defer unlock()
	casePath := filepath.Join(dir, "case.toml")
	c, _, rs, err := prepareCase(casePath, *sets)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %s is not a run folder: %v\n", dir, err)
		return 2
	}
	cpPath := filepath.Join(dir, "checkpoint", "state.gob")
	f, err := os.Open(cpPath)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %s has no checkpoint to resume from: %v\n", dir, err)
		return 2
	}
	rs.cfg.Solver.Failed = retryReporter(stdout)
	cyc, extra, err := remesh.ResumeCycle(rs.cfg, f)
	f.Close()
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %s: %v\n", cpPath, err)
		return 1
	}
	var st observerState
	if err := json.Unmarshal(extra, &st); err != nil {
		fmt.Fprintf(stderr, "tearline: %s: observer state: %v\n", cpPath, err)
		return 1
	}
	if code := checkModel(c, st, casePath, stderr); code != 0 {
		return code
	}
	text, err := c.encode()
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	if len(*sets) > 0 {
		if err := writeFileAtomic(casePath, func(w io.Writer) error { _, err := w.Write(text); return err }); err != nil {
			fmt.Fprintf(stderr, "tearline: %v\n", err)
			return 1
		}
		fmt.Fprintf(stdout, "tearline: %s records %s\n", casePath, strings.Join(*sets, ", "))
	}
	ob, err := newObserver(dir, c, rs, hashBytes(text), stdout, true)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	if err := ob.restore(st); err != nil {
		fmt.Fprintf(stderr, "tearline: %s: %v\n", dir, err)
		return 1
	}
	pr := cyc.View().Progress()
	fmt.Fprintf(stdout, "tearline: resuming %s at step %d, t = %.5g, Δa = %.4g\n", dir, pr.Steps, pr.T, pr.Da)
	return ob.run(cyc, stderr)
}

// restore reopens the run folder's tables at the checkpoint's rows and reads
// the history rows back (the E1820 J and tearing modulus need the record).
func (ob *observer) restore(st observerState) error {
	hpath := filepath.Join(ob.dir, "history.csv")
	rows, err := readHistory(hpath, st.HistoryRows)
	if err != nil {
		return err
	}
	ob.rows = rows
	if ob.history, err = reopenCSV(hpath, st.HistoryRows); err != nil {
		return err
	}
	if ob.remeshes, err = reopenCSV(filepath.Join(ob.dir, "remesh.csv"), st.RemeshRows); err != nil {
		return err
	}
	ob.nRemesh = st.RemeshRows
	ob.pvd = st.Fields
	ob.iters = st.Iters
	return nil
}

// checkModel refuses (exit 2) a case whose model — everything but [stop]
// and [output] — differs from the one the checkpoint was written under.
func checkModel(c *caseFile, st observerState, casePath string, stderr io.Writer) int {
	model, err := modelKeys(c)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	if st.Model == nil {
		fmt.Fprintf(stderr, "tearline: the checkpoint of %s records no model (written by an earlier version); start a new run\n", casePath)
		return 2
	}
	if changed := changedKeys(st.Model, model); len(changed) > 0 {
		fmt.Fprintf(stderr, "tearline: %s has changed since the checkpoint (keys outside [stop] and [output]): %s; restore it, or start a new run with the new case\n", casePath, strings.Join(changed, ", "))
		return 2
	}
	return 0
}
