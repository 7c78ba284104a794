package main

import (
	"path/filepath"
	"testing"

	"tearline/remesh/meshing"
	"tearline/remesh/size"
)

// TestTriangleEstimate: the triangle count estimated from the size field
// lies within ±30% of the first mesh's (the mesh `tearline mesh` and `run`
// start with) on every case of testdata/. Reference: a triangle of size h
// has the area (√3/4)·(2h/3)² of the equilateral triangle of the mean edge
// (elementary geometry; the mean edge of a refinement to longest edge ≤ h,
// common practice).
func TestTriangleEstimate(t *testing.T) {
	files, err := filepath.Glob("../../testdata/*.toml")
	if err != nil || len(files) == 0 {
		t.Fatalf("no test cases: %v", err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			_, _, rs, err := prepareCase(f, nil)
			if err != nil {
				t.Fatal(err)
			}
			sf, err := size.NewField(rs.domain, rs.cfg.Size)
			if err != nil {
				t.Fatal(err)
			}
			m, _, err := meshing.Mesh(rs.domain, sf.At, rs.cfg.Mesh)
			if err != nil {
				t.Fatal(err)
			}
			got, want := rs.triangles, float64(len(m.Tri))
			t.Logf("estimate %.0f, mesh %.0f triangles (ratio %.3f)", got, want, got/want)
			if got < 0.7*want || got > 1.3*want {
				t.Errorf("estimate %.0f triangles, the mesh has %.0f: outside ±30%%", got, want)
			}
		})
	}
}
