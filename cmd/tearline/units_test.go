package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"tearline/solver/fem"
)

// TestCaseRefusals: a case without E or ν, with an unknown unit system or
// with a first mesh above mesh.max_triangles is refused by run, check and
// mesh with exit status 2 and the key to change (DESIGN.md §6); a mesh far
// too fine is refused within a second, before any meshing.
func TestCaseRefusals(t *testing.T) {
	cases := []struct {
		name string
		text string
		sets []string
		want []string
	}{
		{"no Young's modulus", strings.Replace(goodElastic, "young = 200000.0\n", "", 1), nil,
			[]string{"material.young is missing", "material.poisson"}},
		{"no Poisson's ratio", strings.Replace(goodElastic, "poisson = 0.3\n", "", 1), nil,
			[]string{"material.poisson is missing", "(−1, 0.5)"}},
		{"unknown unit system", goodElastic, []string{"units.system=cm-g-s"},
			[]string{"units.system", "mm-N-MPa", "m-N-Pa", "m-MN-MPa"}},
		{"mesh far too fine", goodElastic, []string{"mesh.h_fine=1e-5"},
			[]string{"mesh.max_triangles", "mesh.h_fine", "mesh.h_far", "mesh.grading"}},
		{"mesh above a set limit", goodElastic, []string{"mesh.max_triangles=100"},
			[]string{"--set mesh.max_triangles=100", "above the limit 100"}},
		{"written zero limit", goodElastic, []string{"mesh.max_triangles=0"},
			[]string{"mesh.max_triangles", "positive"}},
	}
	for _, tc := range cases {
		for _, cmd := range []string{"run", "check", "mesh"} {
			t.Run(tc.name+"/"+cmd, func(t *testing.T) {
				args := []string{cmd, writeCase(t, tc.text)}
				switch cmd {
				case "run":
					args = append(args, "-o", t.TempDir()+"/run")
				case "mesh":
					args = append(args, "-o", t.TempDir()+"/m.vtu")
				}
				for _, s := range tc.sets {
					args = append(args, "--set", s)
				}
				var stdout, stderr bytes.Buffer
				start := time.Now()
				code := dispatch(args, &stdout, &stderr)
				if code != 2 {
					t.Fatalf("exit %d, want 2; stderr %q", code, stderr.String())
				}
				if d := time.Since(start); d > time.Second {
					t.Errorf("took %v to refuse, want under a second", d)
				}
				for _, w := range tc.want {
					if !strings.Contains(stderr.String(), w) {
						t.Errorf("message %q lacks %q", stderr.String(), w)
					}
				}
			})
		}
	}
}

// TestUnitLabels: the unit system of the case names the units of the
// plots, the report and check (a consistent set; common practice), and
// sets the millimetre of ASTM E1820's fixed lengths.
func TestUnitLabels(t *testing.T) {
	for _, c := range []struct {
		system       string
		length, j, k string
		mm           float64
	}{
		{"", "mm", "N/mm", "MPa√mm", 1},
		{"mm-N-MPa", "mm", "N/mm", "MPa√mm", 1},
		{"m-N-Pa", "m", "N/m", "Pa√m", 1e-3},
		{"m-MN-MPa", "m", "MN/m", "MPa√m", 1e-3},
	} {
		sets := []string{}
		if c.system != "" {
			sets = append(sets, "units.system="+c.system)
		}
		cf, _, rs, err := prepareCase(writeCase(t, goodElastic), sets)
		if err != nil {
			t.Fatal(err)
		}
		s := newPlotSetup(cf, rs, cf.Units.labels())
		if u := s.units; u.Length != c.length || u.J != c.j || u.k() != c.k || u.MM != c.mm {
			t.Errorf("%q: units %+v, want length %s, J %s, K %s, mm %g", c.system, u, c.length, c.j, c.k, c.mm)
		}
		if s.load.unit != c.k {
			t.Errorf("%q: the K-field load axis is in %q, want %q", c.system, s.load.unit, c.k)
		}
		var out bytes.Buffer
		args := []string{"check", writeCase(t, goodElastic)}
		for _, x := range sets {
			args = append(args, "--set", x)
		}
		if code := dispatch(args, &out, &out); code != 0 {
			t.Fatalf("check: exit %d: %s", code, out.String())
		}
		if !strings.Contains(out.String(), "area") || !strings.Contains(out.String(), " "+c.length+"²") {
			t.Errorf("%q: check does not give the area in %s²: %s", c.system, c.length, out.String())
		}
	}
}

// TestSupportGap: the rigid motions left free by the supports (elementary
// mechanics: a plane body needs both translations and the rotation held,
// an axisymmetric one its axial translation).
func TestSupportGap(t *testing.T) {
	m := &fem.Mesh{X: [][2]float64{{0, 0}, {1, 0}, {0, 1}}, Points: map[string]int{"a": 0, "b": 1, "c": 2}}
	fix := func(point string, x, y bool) fem.Displacement {
		return fem.Displacement{Point: point, Fix: [2]bool{x, y}}
	}
	for _, c := range []struct {
		name  string
		fixes []fem.Displacement
		axi   bool
		want  string
	}{
		{"nothing held", nil, false, "both translations and the rotation"},
		{"one point held", []fem.Displacement{fix("a", true, true)}, false, "the rotation"},
		{"x held only", []fem.Displacement{fix("a", true, false), fix("c", true, false)}, false, "the y translation"},
		{"y held only", []fem.Displacement{fix("a", false, true), fix("b", false, true)}, false, "the x translation"},
		{"point and roller along x", []fem.Displacement{fix("a", true, true), fix("b", false, true)}, false, ""},
		{"point and roller along y", []fem.Displacement{fix("a", true, true), fix("c", true, false)}, false, ""},
		{"roller about one point", []fem.Displacement{fix("a", true, true), fix("b", true, false)}, false, "the rotation"},
		{"axisymmetric, radial only", []fem.Displacement{fix("a", true, false)}, true, "the axial (z) translation"},
		{"axisymmetric, axial held", []fem.Displacement{fix("b", false, true)}, true, ""},
	} {
		if got := supportGap(m, fem.BCs{Displacements: c.fixes}, c.axi); got != c.want {
			t.Errorf("%s: free %q, want %q", c.name, got, c.want)
		}
	}
}

// TestCheckWarnsOfSupports: check warns, with exit status 0, of a body
// whose supports leave a rigid motion free, and is silent on the supported
// cases of testdata/.
func TestCheckWarnsOfSupports(t *testing.T) {
	for _, c := range []struct {
		name string
		sets []string
		warn string
	}{
		{"K field on the half model", nil, ""},
		{"pressure on the half model", []string{"loading.kind=pressure", "loading.label=remote", "loading.value=10"}, "the x translation"},
		{"pressure on the full disk", []string{"geometry.ssy.full=true", "loading.kind=pressure", "loading.label=remote", "loading.value=10"}, "both translations and the rotation"},
		{"pressure on the half model with a support", []string{"loading.kind=pressure", "loading.label=remote", "loading.value=10", `loading.fix=[{label = "symmetry", component = "x"}]`}, ""},
	} {
		args := []string{"check", "../../testdata/williams-elastic.toml"}
		for _, s := range c.sets {
			args = append(args, "--set", s)
		}
		var stdout, stderr bytes.Buffer
		if code := dispatch(args, &stdout, &stderr); code != 0 {
			t.Fatalf("%s: exit %d: %s", c.name, code, stderr.String())
		}
		out := stdout.String()
		switch {
		case c.warn == "" && strings.Contains(out, "warning"):
			t.Errorf("%s: unexpected warning: %s", c.name, out)
		case c.warn != "" && !(strings.Contains(out, "warning") && strings.Contains(out, c.warn) && strings.Contains(out, "loading.fix")):
			t.Errorf("%s: no warning of %s: %s", c.name, c.warn, out)
		}
	}
}

// TestCheckMemoryEstimate: check's memory figure lies within ±30% of the
// peak resident memory (summary.json peak_memory_mb) of a real run of the
// same case, run as its own process (the elastic cracked disk of
// testdata/: two steps, a few seconds). Reference: the measurement itself.
func TestCheckMemoryEstimate(t *testing.T) {
	bin := buildBinary(t)
	const casePath = "../../testdata/williams-elastic.toml"
	out, err := exec.Command(bin, "check", casePath).CombinedOutput()
	if err != nil {
		t.Fatalf("check: %v\n%s", err, out)
	}
	m := regexp.MustCompile(`memory\s+about (\d+) MB`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("check printed no memory figure: %s", out)
	}
	est, _ := strconv.ParseFloat(string(m[1]), 64)
	dir := filepath.Join(t.TempDir(), "run")
	if out, err := exec.Command(bin, "run", casePath, "-o", dir).CombinedOutput(); err != nil {
		t.Fatalf("run: %v\n%s", err, out)
	}
	data, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		PeakMB float64 `json:"peak_memory_mb"`
	}
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	t.Logf("check %.0f MB, run %.1f MB (ratio %.3f)", est, s.PeakMB, est/s.PeakMB)
	if est < 0.7*s.PeakMB || est > 1.3*s.PeakMB {
		t.Errorf("check estimates %.0f MB, the run's peak was %.1f MB: outside ±30%%", est, s.PeakMB)
	}
}
