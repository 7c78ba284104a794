package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

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
	pos, code, done := parseCommand(fs, args)
	if done {
		return code
	}
	if len(pos) != 1 {
		fmt.Fprintf(stderr, "tearline resume: need the run folder\n%s", resumeUsage)
		return 2
	}
	dir := pos[0]
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

// readHistory reads the first n data rows of history.csv.
func readHistory(path string, n int) ([]historyRow, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	lines := strings.Split(string(data), "\n")
	if len(lines) < n+1 {
		return nil, fmt.Errorf("%s holds %d rows, the checkpoint expects at least %d", path, len(lines)-1, n)
	}
	var rows []historyRow
	for i := 1; i <= n; i++ {
		r, err := parseHistoryRow(lines[i])
		if err != nil {
			return nil, fmt.Errorf("%s line %d: %w", path, i+1, err)
		}
		rows = append(rows, r)
	}
	return rows, nil
}

func parseHistoryRow(line string) (historyRow, error) {
	f := strings.Split(line, ",")
	if len(f) != len(historyColumns) {
		return historyRow{}, fmt.Errorf("%d fields, want %d", len(f), len(historyColumns))
	}
	num := func(s string) float64 {
		if s == "" {
			return math.NaN()
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	in := func(s string) int { v, _ := strconv.Atoi(s); return v }
	return historyRow{Step: in(f[0]), T: num(f[1]), Control: num(f[2]), Force: num(f[3]), JFar: num(f[4]),
		JDomain: num(f[5]), Da: num(f[6]), DaProj: num(f[7]), CTOD: num(f[8]), Dofs: in(f[9]), Elements: in(f[10]),
		Remeshes: in(f[11]), Iters: in(f[12]), Wall: num(f[13]), RSS: num(f[14]), JE1820: num(f[15]),
		Tearing: num(f[16]), MaxPorosity: num(f[17])}, nil
}
