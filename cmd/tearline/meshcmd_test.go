package main

import (
	"bytes"
	"encoding/json"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// loadSets completes the sections the mesh command does not use but the
// case loader validates.
var loadSets = map[string][]string{
	"ssy.toml": {"--set", "loading.k=30"},
	"ct.toml":  {"--set", "loading.value=0.5"},
}

func TestMeshCommandJSON(t *testing.T) {
	for _, file := range []string{"ct.toml", "ssy.toml"} {
		out := filepath.Join(t.TempDir(), "m.vtu")
		args := append([]string{filepath.Join("..", "..", "testdata", file), "-o", out, "--json", "--set", "mesh.h_far=3"}, loadSets[file]...)
		var stdout, stderr bytes.Buffer
		if code := meshCommand(args, &stdout, &stderr); code != 0 {
			t.Fatalf("%s: exit %d: %s", file, code, stderr.String())
		}
		var rep struct {
			Triangles    int     `json:"triangles"`
			Nodes        int     `json:"nodes"`
			MinAngleDeg  float64 `json:"min_angle_deg"`
			SizeRatioMax float64 `json:"size_ratio_max"`
			Seconds      float64 `json:"seconds"`
			HFar         float64 `json:"h_far"`
		}
		if err := json.Unmarshal(stdout.Bytes(), &rep); err != nil {
			t.Fatalf("%s: output is not one JSON object: %v\n%s", file, err, stdout.String())
		}
		if rep.Triangles == 0 || rep.Nodes <= rep.Triangles || !(rep.Seconds > 0) || rep.HFar != 3 {
			t.Errorf("%s: report %+v", file, rep)
		}
		// V15 (Ruppert 1995; Shewchuk 2002).
		if rep.MinAngleDeg < 20 || rep.SizeRatioMax > 1.5 {
			t.Errorf("%s: min angle %.1f°, size ratio %.2f", file, rep.MinAngleDeg, rep.SizeRatioMax)
		}
		// VTK's own reader (python3-vtk9) sees the reported mesh.
		if err := exec.Command("/usr/bin/python3", "-c", "import vtk").Run(); err != nil {
			t.Logf("VTK's Python reader not available: %v", err)
			continue
		}
		script := `
import sys, vtk
for f in sys.argv[1:]:
    r = vtk.vtkXMLUnstructuredGridReader(); r.SetFileName(f); r.Update()
    g = r.GetOutput()
    print(g.GetNumberOfPoints(), g.GetNumberOfCells())
`
		bout := strings.TrimSuffix(out, ".vtu") + "-boundary.vtu"
		got, err := exec.Command("/usr/bin/python3", "-c", script, out, bout).CombinedOutput()
		if err != nil {
			t.Fatalf("%s: %v: %s", file, err, got)
		}
		lines := strings.Fields(string(got))
		if len(lines) != 4 || lines[0] != itoa(rep.Nodes) || lines[1] != itoa(rep.Triangles) || lines[2] != itoa(rep.Nodes) {
			t.Errorf("%s: VTK read %q; report has %d nodes, %d triangles", file, got, rep.Nodes, rep.Triangles)
		}
	}
}

func itoa(n int) string {
	b, _ := json.Marshal(n)
	return string(b)
}

func TestMeshCommandText(t *testing.T) {
	out := filepath.Join(t.TempDir(), "m.vtu")
	var stdout, stderr bytes.Buffer
	args := append([]string{filepath.Join("..", "..", "testdata", "ct.toml"), "-o", out}, loadSets["ct.toml"]...)
	if code := meshCommand(args, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, want := range []string{"triangles", "nodes", "angles", "size ratio", "seconds", "symmetry", "tip ("} {
		if !strings.Contains(stdout.String(), want) {
			t.Errorf("report lacks %q:\n%s", want, stdout.String())
		}
	}
}

func TestMeshCommandBadInput(t *testing.T) {
	ct := filepath.Join("..", "..", "testdata", "ct.toml")
	out := filepath.Join(t.TempDir(), "m.vtu")
	// Exit status 2 and a message naming what, where and what is allowed
	// (DESIGN.md §6).
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no case", []string{"-o", out}, "no case file"},
		{"no output", []string{ct}, "-o FILE.vtu"},
		{"not vtu", []string{ct, "-o", "m.txt"}, "must end in .vtu"},
		{"unknown option", []string{ct, "-o", out, "--fast"}, "unknown option"},
		{"missing file", []string{"nowhere.toml", "-o", out}, "nowhere.toml"},
		{"bad set", []string{ct, "-o", out, "--set", "geometry.ct.width=-5", "--set", "loading.value=0.5"}, "--set geometry.ct.width=-5: -5 must be a positive number"},
		{"bad mesh key", []string{ct, "-o", out, "--set", "mesh.grading=3", "--set", "loading.value=0.5"}, "--set mesh.grading=3"},
	}
	for _, c := range cases {
		var stdout, stderr bytes.Buffer
		if code := meshCommand(c.args, &stdout, &stderr); code != 2 || !strings.Contains(stderr.String(), c.want) {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", c.name, code, stderr.String(), c.want)
		}
	}
	var stdout, stderr bytes.Buffer
	if code := meshCommand([]string{"--help"}, &stdout, &stderr); code != 0 || !strings.Contains(stdout.String(), "usage: tearline mesh") {
		t.Errorf("--help: exit %d, %q", code, stdout.String())
	}
}
