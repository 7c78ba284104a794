package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"tearline/remesh"
)

const resumeUsage = `usage: tearline resume DIR

Continues the run in DIR from its last checkpoint (DIR/checkpoint/state.gob)
with the case as run (DIR/case.toml). Rows of history.csv written after the
checkpoint are dropped and computed again, so the folder ends as if the run
had never stopped. Exit status as for 'tearline run'.
`

func resumeCommand(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("resume", resumeUsage, stderr)
	dir, code, done := oneArgument(fs, args, "tearline resume: need the run folder", resumeUsage, stderr)
	if done {
		return code
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
	c, _, rs, err := prepareCase(casePath, nil)
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
	text, err := os.ReadFile(casePath)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
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
