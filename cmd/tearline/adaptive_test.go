package main

import (
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// runRecord is what the adaptive-versus-fixed comparison reads back from a
// run folder.
type runRecord struct {
	da, jFar, dofs []float64 // per step, from history.csv
	remeshDofs     []float64 // unknowns after each remesh, from remesh.csv
	sum            summary
}

// runFolder runs a case through the command line into a fresh run folder
// and reads its tables back.
func runFolder(tb testing.TB, casePath string, sets ...string) runRecord {
	tb.Helper()
	out := runCase(tb, casePath, sets...)
	var r runRecord
	data, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		tb.Fatal(err)
	}
	if err := json.Unmarshal(data, &r.sum); err != nil {
		tb.Fatal(err)
	}
	num := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	h, rows := readCSV(tb, filepath.Join(out, "history.csv"))
	ida, ij, id := column(tb, h, "da"), column(tb, h, "J_far"), column(tb, h, "dofs")
	for _, row := range rows {
		r.da = append(r.da, num(row[ida]))
		r.jFar = append(r.jFar, num(row[ij]))
		r.dofs = append(r.dofs, num(row[id]))
	}
	if _, err := os.Stat(filepath.Join(out, "remesh.csv")); err == nil {
		h, rows := readCSV(tb, filepath.Join(out, "remesh.csv"))
		ia := column(tb, h, "dofs_after")
		for _, row := range rows {
			r.remeshDofs = append(r.remeshDofs, num(row[ia]))
		}
	}
	return r
}

// runCase runs a case through the command line into a fresh run folder
// and returns the folder.
func runCase(tb testing.TB, casePath string, sets ...string) string {
	tb.Helper()
	out := filepath.Join(tb.TempDir(), "run")
	args := []string{"run", casePath, "-o", out}
	for _, s := range sets {
		args = append(args, "--set", s)
	}
	if code := dispatch(args, io.Discard, os.Stderr); code != 0 {
		tb.Fatalf("%v: exit %d", args, code)
	}
	return out
}

// jAt is J_far where the crack first reaches Δa = a (linear interpolation
// between the steps around it), NaN if it never does.
func (r runRecord) jAt(a float64) float64 {
	for i := 1; i < len(r.da); i++ {
		if r.da[i] >= a && r.da[i-1] < a {
			s := (a - r.da[i-1]) / (r.da[i] - r.da[i-1])
			return r.jFar[i-1] + s*(r.jFar[i]-r.jFar[i-1])
		}
	}
	return math.NaN()
}

// TestAdaptiveVersusFixed is V14 (long: TEARLINE_LONG=1, about an hour on
// two cores): testdata/ssy.toml run adaptively and on its fixed mesh, fine
// along the whole straight path (--set adapt.enabled=false), both to
// Δa = 10ℓ. The adaptive run must reproduce the fixed mesh's resistance
// curve — J_far at Δa = 2ℓ, 5ℓ and 10ℓ within 5% — with at least 4 times
// fewer peak unknowns, in at most half the wall time, and with its
// unknowns after the last remesh within 30% of those after the first (the
// problem size stays about constant however far the crack grows). The
// reference is the fixed fine mesh itself (common practice: a remeshing
// scheme is judged against the converged fixed-mesh solution of the same
// model).
func TestAdaptiveVersusFixed(t *testing.T) {
	if os.Getenv("TEARLINE_LONG") != "1" {
		t.Skip("long test (about an hour): set TEARLINE_LONG=1")
	}
	const ell = 0.1 // material.length of ssy.toml
	sets := []string{"stop.da=1.0"}
	ad := runFolder(t, "../../testdata/ssy.toml", sets...)
	fx := runFolder(t, "../../testdata/ssy.toml", append(sets, "adapt.enabled=false")...)
	for _, r := range []struct {
		name string
		r    runRecord
	}{{"adaptive", ad}, {"fixed", fx}} {
		t.Logf("%s: %s (%s), %d steps, %d remeshes, Δa %.4g, peak unknowns %d, wall %.0f s, median %.0f iterations, peak %.0f MB",
			r.name, r.r.sum.Status, r.r.sum.Reason, r.r.sum.Steps, r.r.sum.Remeshes, r.r.sum.FinalDa, r.r.sum.PeakDofs, r.r.sum.WallSeconds, r.r.sum.MedianIters, r.r.sum.PeakRSSMB)
		if r.r.sum.Status != "completed" || r.r.sum.FinalDa < 10*ell {
			t.Fatalf("%s run did not reach Δa = 10ℓ", r.name)
		}
	}
	for _, n := range []float64{2, 5, 10} {
		ja, jf := ad.jAt(n*ell), fx.jAt(n*ell)
		d := (ja - jf) / jf
		t.Logf("Δa = %gℓ: J_far %.4g (adaptive) vs %.4g N/mm (fixed), %+.2f%%", n, ja, jf, 100*d)
		if !(math.Abs(d) <= 0.05) {
			t.Errorf("Δa = %gℓ: J differs by %.2f%%, want ≤ 5%%", n, 100*d)
		}
	}
	ratio := float64(fx.sum.PeakDofs) / float64(ad.sum.PeakDofs)
	speed := fx.sum.WallSeconds / ad.sum.WallSeconds
	t.Logf("peak unknowns %d vs %d (%.2f×), wall %.0f vs %.0f s (%.2f×)", ad.sum.PeakDofs, fx.sum.PeakDofs, ratio, ad.sum.WallSeconds, fx.sum.WallSeconds, speed)
	if ratio < 4 {
		t.Errorf("adaptive peak unknowns only %.2f× fewer, want ≥ 4×", ratio)
	}
	if speed < 2 {
		t.Errorf("adaptive run only %.2f× faster, want ≥ 2×", speed)
	}
	if n := len(ad.remeshDofs); n < 2 {
		t.Errorf("adaptive run remeshed %d times; the size comparison needs at least 2", n)
	} else {
		first, last := ad.remeshDofs[0], ad.remeshDofs[n-1]
		t.Logf("unknowns after remesh 1: %.0f, after remesh %d: %.0f (%+.1f%%)", first, n, last, 100*(last-first)/first)
		if math.Abs(last-first) > 0.3*first {
			t.Errorf("unknowns after the last remesh differ from the first by %.1f%%, want ≤ 30%%", 100*(last-first)/first)
		}
	}
}
