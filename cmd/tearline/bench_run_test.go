package main

import (
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// BenchmarkElasticRun100k runs the elastic cracked disk of the test data
// from case file to run folder with about 10⁵ unknowns and reports the
// unknowns, the wall time per run and the peak resident memory.
func BenchmarkElasticRun100k(b *testing.B) {
	for i := 0; i < b.N; i++ {
		out := filepath.Join(b.TempDir(), "run")
		code := dispatch([]string{"run", "../../testdata/williams-elastic.toml", "-o", out,
			"--set", "mesh.h_fine=0.02", "--set", "mesh.h_far=0.52", "--set", "mesh.fine_radius=0.5",
			"--set", "solver.increment=1", "--set", "solver.max_increment=1"}, io.Discard, io.Discard)
		if code != 0 {
			b.Fatalf("exit %d", code)
		}
		data, err := os.ReadFile(filepath.Join(out, "summary.json"))
		if err != nil {
			b.Fatal(err)
		}
		var s summary
		if err := json.Unmarshal(data, &s); err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(s.PeakDofs), "unknowns")
		b.ReportMetric(s.PeakRSSMB, "peak-MB")
	}
}

// BenchmarkSSYRun runs testdata/ssy.toml to its stop.da, on its fixed mesh
// fine along the straight path (the damage-model measure) and adaptively,
// one sub-benchmark each, and reports the wall time, the median Newton
// iterations per step (target ≤ 6), the steps, remeshes, final Δa, peak
// unknowns and peak memory. About 10 minutes per run on two cores: use
// -benchtime 1x and run the sub-benchmarks one at a time.
func BenchmarkSSYRun(b *testing.B) {
	for _, c := range []struct {
		name string
		sets []string
	}{
		{"fixed", []string{"adapt.enabled=false"}},
		{"adaptive", nil},
	} {
		b.Run(c.name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				reportRun(b, runFolder(b, "../../testdata/ssy.toml", c.sets...))
			}
		})
	}
}

// BenchmarkSSYLong is the long version of V14: ssy.toml to Δa = 30ℓ,
// adaptive and on the fixed mesh fine along 32ℓ of path (mesh.ahead),
// one sub-benchmark each; the figures go into DEVELOPERS.md. Hours on two
// cores: use -benchtime 1x and run the sub-benchmarks one at a time.
func BenchmarkSSYLong(b *testing.B) {
	long := []string{"stop.da=3.0", "mesh.ahead=3.2"}
	for _, c := range []struct {
		name string
		sets []string
	}{
		{"adaptive", long},
		{"fixed", append(append([]string(nil), long...), "adapt.enabled=false")},
	} {
		b.Run(c.name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				r := runFolder(b, "../../testdata/ssy.toml", c.sets...)
				reportRun(b, r)
				for _, n := range []float64{2, 5, 10, 20, 30} {
					b.ReportMetric(r.jAt(n*0.1), "J@"+strconv.Itoa(int(n))+"ℓ")
				}
			}
		})
	}
}

// reportRun reports a run's summary figures as benchmark metrics.
func reportRun(b *testing.B, r runRecord) {
	b.ReportMetric(r.sum.WallSeconds, "wall-s")
	b.ReportMetric(r.sum.MedianIters, "median-iters")
	b.ReportMetric(float64(r.sum.Steps), "steps")
	b.ReportMetric(float64(r.sum.Remeshes), "remeshes")
	b.ReportMetric(r.sum.FinalDa, "final-da")
	b.ReportMetric(float64(r.sum.PeakDofs), "unknowns")
	b.ReportMetric(r.sum.PeakRSSMB, "peak-MB")
	if r.sum.Status != "completed" {
		b.Logf("run %s: %s", r.sum.Status, r.sum.Reason)
	}
}
