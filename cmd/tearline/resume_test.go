package main

import (
	"encoding/json"
	"errors"
	"io"
	"math"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// plasticCase is a small boundary-layer disk of regularised GTN material
// loaded into the plastic range: a few steps with real history.
const plasticCase = `
[geometry]
kind = "ssy"
[geometry.ssy]
radius = 8.0
tip_radius = 0.05
[mesh]
h_fine = 0.1
h_far = 1.5
fine_radius = 0.6
[material]
young = 200000.0
poisson = 0.3
yield_stress = 450.0
f0 = 0.005
length = 0.2
[loading]
kind = "k_field"
k = 2500.0
[solver]
increment = 0.1
max_increment = 0.1
[stop]
t = 1.0
[output]
fields_every = 100
checkpoint_minutes = 0.0001
[adapt]
enabled = false
`

// buildBinary compiles the command once for the tests that kill it.
func buildBinary(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "tearline")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// comparableRows drops the columns that measure the machine (wall time,
// memory) and returns the rest as numbers.
func comparableRows(t *testing.T, path string) [][]float64 {
	t.Helper()
	header, rows := readCSV(t, path)
	skip := map[int]bool{column(t, header, "wall_s"): true, column(t, header, "rss_mb"): true}
	var out [][]float64
	for _, r := range rows {
		var v []float64
		for i, s := range r {
			if skip[i] {
				continue
			}
			x := math.NaN()
			if s != "" {
				var err error
				if x, err = strconv.ParseFloat(s, 64); err != nil {
					t.Fatalf("%s: field %q: %v", path, s, err)
				}
			}
			v = append(v, x)
		}
		out = append(out, v)
	}
	return out
}

// TestResumeAfterKill: a run killed with SIGKILL at a random moment and
// resumed ends with the same history.csv rows as an uninterrupted run, to
// 1e-10 relative (issue: checkpoint and resume; DESIGN.md §4).
func TestResumeAfterKill(t *testing.T) {
	bin := buildBinary(t)
	casePath := writeCase(t, plasticCase)
	ref := filepath.Join(t.TempDir(), "ref")
	start := time.Now()
	if out, err := exec.Command(bin, "run", casePath, "-o", ref).CombinedOutput(); err != nil {
		t.Fatalf("uninterrupted run: %v\n%s", err, out)
	}
	full := time.Since(start)
	want := comparableRows(t, filepath.Join(ref, "history.csv"))
	if len(want) < 5 {
		t.Fatalf("reference run has %d steps, want at least 5", len(want))
	}
	rng := rand.New(rand.NewSource(time.Now().UnixNano()))
	for trial := 0; trial < 2; trial++ {
		dir := filepath.Join(t.TempDir(), "killed")
		cmd := exec.Command(bin, "run", casePath, "-o", dir)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		// Kill somewhere between the first checkpoint and the end.
		delay := time.Duration((0.3 + 0.6*rng.Float64()) * float64(full))
		time.Sleep(delay)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		if _, err := os.Stat(filepath.Join(dir, "checkpoint", "state.gob")); err != nil {
			t.Logf("trial %d: killed after %v before the first checkpoint; skipping this trial", trial, delay)
			continue
		}
		if out, err := exec.Command(bin, "resume", dir).CombinedOutput(); err != nil {
			t.Fatalf("trial %d (killed after %v): resume: %v\n%s", trial, delay, err, out)
		}
		got := comparableRows(t, filepath.Join(dir, "history.csv"))
		if len(got) != len(want) {
			t.Fatalf("trial %d (killed after %v): %d rows after resume, want %d", trial, delay, len(got), len(want))
		}
		for i := range got {
			for j := range got[i] {
				a, b := got[i][j], want[i][j]
				if math.IsNaN(a) != math.IsNaN(b) || math.Abs(a-b) > 1e-10*math.Max(math.Abs(b), 1e-300) && math.Abs(a-b) > 1e-14 {
					t.Errorf("trial %d row %d column %d: resumed %.15g, uninterrupted %.15g", trial, i+1, j, a, b)
				}
			}
		}
	}
}

// TestInterruptStopsCleanly: SIGINT (Ctrl-C) ends a run at the end of the
// step in progress with exit status 1, a checkpoint and summary.json status
// "stopped"; resume then completes it (DESIGN.md §3 clean stops, §6).
func TestInterruptStopsCleanly(t *testing.T) {
	bin := buildBinary(t)
	casePath := writeCase(t, plasticCase)
	dir := filepath.Join(t.TempDir(), "run")
	cmd := exec.Command(bin, "run", casePath, "-o", dir)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// Wait for the first step, then interrupt.
	deadline := time.Now().Add(2 * time.Minute)
	for {
		_, rows := func() ([]string, [][]string) {
			if _, err := os.Stat(filepath.Join(dir, "history.csv")); err != nil {
				return nil, nil
			}
			return readCSV(t, filepath.Join(dir, "history.csv"))
		}()
		if len(rows) >= 1 || time.Now().After(deadline) {
			break
		}
		time.Sleep(50 * time.Millisecond)
	}
	cmd.Process.Signal(os.Interrupt)
	err := cmd.Wait()
	var exit *exec.ExitError
	if !errors.As(err, &exit) || exit.ExitCode() != 1 {
		t.Fatalf("interrupted run: %v, want exit status 1", err)
	}
	var s summary
	data, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	if s.Status != "stopped" || !strings.Contains(s.Reason, "interrupted") {
		t.Errorf("summary status %q reason %q, want stopped / interrupted", s.Status, s.Reason)
	}
	if _, err := os.Stat(filepath.Join(dir, "checkpoint", "state.gob")); err != nil {
		t.Fatalf("no checkpoint after Ctrl-C: %v", err)
	}
	if out, err := exec.Command(bin, "resume", dir).CombinedOutput(); err != nil {
		t.Fatalf("resume after Ctrl-C: %v\n%s", err, out)
	}
}

// TestResumeGuardsTheModel: a resumed run must be the checkpointed model.
// After case.toml is edited (Young's modulus) resume refuses with exit 2
// and leaves history.csv as it was; `resume --set` takes stop.* and
// output.* keys only, and raising stop.t continues a completed run to the
// new end, recording the key in case.toml (common practice: a restart
// continues the same analysis).
func TestResumeGuardsTheModel(t *testing.T) {
	casePath := writeCase(t, plasticCase)
	dir := filepath.Join(t.TempDir(), "run")
	if code := dispatch([]string{"run", casePath, "-o", dir, "--set", "stop.t=0.3"}, io.Discard, os.Stderr); code != 0 {
		t.Fatalf("run: exit %d", code)
	}
	hist := filepath.Join(dir, "history.csv")
	before, _ := os.ReadFile(hist)
	caseFile := filepath.Join(dir, "case.toml")
	orig, _ := os.ReadFile(caseFile)
	edited := strings.Replace(string(orig), "young = 200000.0", "young = 210000.0", 1)
	if edited == string(orig) {
		t.Fatalf("case.toml has no young = 200000.0 line:\n%s", orig)
	}
	os.WriteFile(caseFile, []byte(edited), 0o644)
	var stderr strings.Builder
	if code := dispatch([]string{"resume", dir}, io.Discard, &stderr); code != 2 || !strings.Contains(stderr.String(), "has changed since the checkpoint") || !strings.Contains(stderr.String(), "material.young (was 200000, now 210000)") {
		t.Fatalf("resume of an edited case: exit %d, %q; want exit 2", code, stderr.String())
	}
	if after, _ := os.ReadFile(hist); string(after) != string(before) {
		t.Error("the refused resume changed history.csv")
	}
	os.WriteFile(caseFile, orig, 0o644)
	stderr.Reset()
	if code := dispatch([]string{"resume", dir, "--set", "material.young=1"}, io.Discard, &stderr); code != 2 || !strings.Contains(stderr.String(), "stop.* and output.*") {
		t.Fatalf("resume --set material.young: exit %d, %q; want exit 2", code, stderr.String())
	}
	if code := dispatch([]string{"resume", dir, "--set", "stop.t=0.5"}, io.Discard, os.Stderr); code != 0 {
		t.Fatalf("resume --set stop.t=0.5: exit %d", code)
	}
	_, rows := readCSV(t, hist)
	if got := rows[len(rows)-1][1]; got != "0.5" {
		t.Errorf("the continued run ends at t = %s, want 0.5", got)
	}
	if text, _ := os.ReadFile(caseFile); !strings.Contains(string(text), "t = 0.5") {
		t.Errorf("case.toml does not record stop.t = 0.5:\n%s", text)
	}
}

// TestResumeUnderDissipationControl: a run stopped by its step limit while
// the dissipation-driven control is in use and resumed with a higher limit
// ends with the same history.csv rows as an uninterrupted run, to 1e-10
// relative (the control's rate and pseudo-time are part of the checkpoint);
// and the control did take over (the pseudo-time and the load factor part).
func TestResumeUnderDissipationControl(t *testing.T) {
	casePath := writeCase(t, plasticCase)
	sets := []string{"--set", `loading.control="dissipation"`, "--set", "stop.t=1.5"}
	ref := filepath.Join(t.TempDir(), "ref")
	if code := dispatch(append([]string{"run", casePath, "-o", ref}, sets...), io.Discard, os.Stderr); code != 0 {
		t.Fatalf("uninterrupted run: exit %d", code)
	}
	dir := filepath.Join(t.TempDir(), "stopped")
	// a run stopped before its end exits with status 1
	if code := dispatch(append([]string{"run", casePath, "-o", dir, "--set", "stop.max_steps=14"}, sets...), io.Discard, io.Discard); code != 1 {
		t.Fatalf("run to 14 steps: exit %d, want 1 (stopped by the step limit)", code)
	}
	if code := dispatch([]string{"resume", dir, "--set", "stop.max_steps=100000"}, io.Discard, os.Stderr); code != 0 {
		t.Fatalf("resume: exit %d", code)
	}
	want := comparableRows(t, filepath.Join(ref, "history.csv"))
	got := comparableRows(t, filepath.Join(dir, "history.csv"))
	if len(got) != len(want) || len(want) < 16 {
		t.Fatalf("%d rows after resume, %d uninterrupted; want equal and at least 16", len(got), len(want))
	}
	header, _ := readCSV(t, filepath.Join(ref, "history.csv"))
	tc, lc := column(t, header, "t"), column(t, header, "load_factor")
	// comparableRows drops wall_s and rss_mb, which come after t and before load_factor
	lc -= 2
	last := want[len(want)-1]
	if !(last[tc] > last[lc]*1.05) {
		t.Errorf("last row: t = %g, load factor %g; the dissipation-driven control never took over", last[tc], last[lc])
	}
	for i := range got {
		for j := range got[i] {
			a, b := got[i][j], want[i][j]
			if math.IsNaN(a) != math.IsNaN(b) || math.Abs(a-b) > 1e-10*math.Max(math.Abs(b), 1e-300) && math.Abs(a-b) > 1e-14 {
				t.Errorf("row %d column %d: resumed %.15g, uninterrupted %.15g", i+1, j, a, b)
			}
		}
	}
}

// TestChangedKeys: resume compares the model key by key — a changed or
// removed key is named with both values, a key only the newer program
// writes (a default it added) does not count.
func TestChangedKeys(t *testing.T) {
	was := map[string]string{"material.young": "200000", "mesh.h_fine": "0.1", "loading.fix.1.label": "left"}
	for _, tc := range []struct {
		name string
		now  map[string]string
		want []string
	}{
		{"same", map[string]string{"material.young": "200000", "mesh.h_fine": "0.1", "loading.fix.1.label": "left"}, nil},
		{"a key added by a later version", map[string]string{"material.young": "200000", "mesh.h_fine": "0.1", "loading.fix.1.label": "left", "units.system": "mm-N-MPa"}, nil},
		{"changed and removed", map[string]string{"material.young": "210000", "mesh.h_fine": "0.1"},
			[]string{"loading.fix.1.label (was left, now absent)", "material.young (was 200000, now 210000)"}},
	} {
		got := changedKeys(was, tc.now)
		if strings.Join(got, "|") != strings.Join(tc.want, "|") {
			t.Errorf("%s: %q, want %q", tc.name, got, tc.want)
		}
	}
}
