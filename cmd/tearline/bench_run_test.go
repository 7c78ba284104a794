package main

import (
	"encoding/json"
	"io"
	"os"
	"path/filepath"
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
