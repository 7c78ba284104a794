package vtu

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"tearline/solver/fem"
)

// gridMesh returns fem.Structured's 6-node mesh of [0, 2]×[0, 1] with
// nx×ny cells; the midside nodes between grid lines are lifted by up to 1 %
// (curved edges) so that positions are not all midpoints.
func gridMesh(nx, ny int) *fem.Mesh {
	m, err := fem.Structured(nx, ny, func(s, t float64) [2]float64 {
		w := math.Sin(math.Pi * float64(nx) * s)
		return [2]float64{2 * s, t * (1 + 0.01*w*w)}
	})
	if err != nil {
		panic(err) // programming error in the test
	}
	return m
}

const readerScript = `
import json, sys, vtk
from vtk.util.numpy_support import vtk_to_numpy
def arrays(d):
    out = {}
    for i in range(d.GetNumberOfArrays()):
        a = d.GetAbstractArray(i)
        v = vtk_to_numpy(a)
        out[a.GetName()] = [a.GetNumberOfComponents(), [float(x) for x in v.reshape(-1)]]
    return out
res = []
for f in sys.argv[1:]:
    r = vtk.vtkXMLUnstructuredGridReader()
    r.SetFileName(f)
    r.Update()
    g = r.GetOutput()
    cells, types = [], []
    for c in range(g.GetNumberOfCells()):
        cell = g.GetCell(c)
        types.append(cell.GetCellType())
        cells.append([cell.GetPointId(k) for k in range(cell.GetNumberOfPoints())])
    pts = vtk_to_numpy(g.GetPoints().GetData()).reshape(-1).tolist() if g.GetNumberOfPoints() else []
    res.append({"points": g.GetNumberOfPoints(), "cells": g.GetNumberOfCells(), "types": types, "conn": cells,
                "xyz": pts, "pointdata": arrays(g.GetPointData()), "celldata": arrays(g.GetCellData()),
                "fielddata": arrays(g.GetFieldData())})
json.dump(res, sys.stdout)
`

type vtkRead struct {
	Points, Cells int
	Types         []int
	Conn          [][]int
	XYZ           []float64
	PointData     map[string][2]json.RawMessage `json:"pointdata"`
	CellData      map[string][2]json.RawMessage `json:"celldata"`
	FieldData     map[string][2]json.RawMessage `json:"fielddata"`
}

func (r *vtkRead) array(t *testing.T, set map[string][2]json.RawMessage, name string) (int, []float64) {
	a, ok := set[name]
	if !ok {
		t.Fatalf("VTK read no array %q", name)
	}
	var n int
	var v []float64
	if err := json.Unmarshal(a[0], &n); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(a[1], &v); err != nil {
		t.Fatal(err)
	}
	return n, v
}

// readVTK reads files with VTK's own XML reader (python3-vtk9), the
// independent reference for the format, in one Python run; it skips when
// VTK is absent.
func readVTK(t *testing.T, paths ...string) []*vtkRead {
	t.Helper()
	py := "/usr/bin/python3"
	cmd := exec.Command(py, append([]string{"-c", readerScript}, paths...)...)
	out, err := cmd.Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		if strings.Contains(msg, "No module named") || errors.Is(err, exec.ErrNotFound) || errors.Is(err, os.ErrNotExist) {
			t.Skipf("VTK's Python reader is not available (%v); install python3-vtk9", err)
		}
		t.Fatalf("VTK reader failed: %v %s", err, msg)
	}
	var r []*vtkRead
	if err := json.Unmarshal(out, &r); err != nil {
		t.Fatalf("VTK reader output: %v", err)
	}
	return r
}

func TestWriteReadByVTK(t *testing.T) {
	m := gridMesh(5, 3)
	nn, nt := len(m.X), len(m.Tri)
	temp := Array{Name: "temperature", Components: 1, Values: make([]float64, nn)}
	disp := Array{Name: "u", Components: 2, Values: make([]float64, 2*nn)}
	stress := Array{Name: "stress", Components: 4, Values: make([]float64, 4*nt)}
	area := Array{Name: "area ratio", Components: 1, Values: make([]float64, nt)}
	u := make([][2]float64, nn)
	for i, p := range m.X {
		temp.Values[i] = math.Sin(p[0]) * math.Exp(p[1]) / 3
		disp.Values[2*i], disp.Values[2*i+1] = 1e-3*p[1], -2e-17*p[0]
		u[i] = [2]float64{0.1 * p[1], 0.05 * p[0]}
	}
	for e := range m.Tri {
		for k := 0; k < 4; k++ {
			stress.Values[4*e+k] = float64(e) + 0.1*float64(k) + 1.0/3
		}
		area.Values[e] = 1 / float64(e+7)
	}
	dir := t.TempDir()
	cases := []struct {
		name string
		opt  *Options
	}{
		{"base64", nil},
		{"ascii", &Options{Encoding: ASCII}},
		{"deformed", &Options{Displacement: u}},
	}
	var paths []string
	for _, c := range cases {
		path := filepath.Join(dir, c.name+".vtu")
		err := WriteFile(path, func(w io.Writer) error {
			return Write(w, m, []Array{temp, disp}, []Array{stress, area}, c.opt)
		})
		if err != nil {
			t.Fatal(err)
		}
		paths = append(paths, path)
	}
	reads := readVTK(t, paths...)
	for ci, c := range cases {
		r := reads[ci]
		// VTK's reader must see the same counts, cell types, connectivity,
		// coordinates and array values (VTK file formats: type 22).
		if r.Points != nn || r.Cells != nt {
			t.Fatalf("%s: VTK read %d points, %d cells; wrote %d, %d", c.name, r.Points, r.Cells, nn, nt)
		}
		for e, tt := range m.Tri {
			if r.Types[e] != CellQuadraticTriangle {
				t.Fatalf("%s: cell %d type %d", c.name, e, r.Types[e])
			}
			for k := 0; k < 6; k++ {
				if r.Conn[e][k] != tt[k] {
					t.Fatalf("%s: cell %d node %d is %d, wrote %d", c.name, e, k, r.Conn[e][k], tt[k])
				}
			}
		}
		for i, p := range m.X {
			if c.opt != nil && c.opt.Displacement != nil {
				p[0] += u[i][0]
				p[1] += u[i][1]
			}
			if r.XYZ[3*i] != p[0] || r.XYZ[3*i+1] != p[1] || r.XYZ[3*i+2] != 0 {
				t.Fatalf("%s: point %d read (%g, %g, %g), wrote (%g, %g)", c.name, i, r.XYZ[3*i], r.XYZ[3*i+1], r.XYZ[3*i+2], p[0], p[1])
			}
		}
		if n, v := r.array(t, r.PointData, "temperature"); n != 1 || !equal(v, temp.Values) {
			t.Errorf("%s: temperature differs", c.name)
		}
		n, v := r.array(t, r.PointData, "u")
		if n != 3 || len(v) != 3*nn {
			t.Fatalf("%s: u has %d components, %d values", c.name, n, len(v))
		}
		for i := 0; i < nn; i++ {
			if v[3*i] != disp.Values[2*i] || v[3*i+1] != disp.Values[2*i+1] || v[3*i+2] != 0 {
				t.Fatalf("%s: u[%d] differs", c.name, i)
			}
		}
		if n, v := r.array(t, r.CellData, "stress"); n != 4 || !equal(v, stress.Values) {
			t.Errorf("%s: stress differs", c.name)
		}
		if n, v := r.array(t, r.CellData, "area ratio"); n != 1 || !equal(v, area.Values) {
			t.Errorf("%s: area ratio differs", c.name)
		}
		for i, l := range m.Labels {
			if _, v := r.array(t, r.FieldData, "label:"+l); len(v) != 1 || v[0] != float64(i) {
				t.Errorf("%s: label %q read %v", c.name, l, v)
			}
		}
		if _, v := r.array(t, r.FieldData, "point:s1t1"); len(v) != 1 || v[0] != float64(m.Points["s1t1"]) {
			t.Errorf("%s: point s1t1 read %v", c.name, v)
		}
	}
}

func equal(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestBoundaryReadByVTK(t *testing.T) {
	m := gridMesh(4, 2)
	var paths []string
	for i, enc := range []Encoding{Base64, ASCII} {
		path := filepath.Join(t.TempDir(), fmt.Sprintf("b%d.vtu", i))
		if err := WriteFile(path, func(w io.Writer) error { return WriteBoundary(w, m, &Options{Encoding: enc}) }); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, path)
	}
	for _, r := range readVTK(t, paths...) {
		if r.Points != len(m.X) || r.Cells != len(m.Boundary) {
			t.Fatalf("VTK read %d points, %d cells; wrote %d, %d", r.Points, r.Cells, len(m.X), len(m.Boundary))
		}
		_, lab := r.array(t, r.CellData, "label")
		_, tri := r.array(t, r.CellData, "triangle")
		for i, e := range m.Boundary {
			// VTK quadratic edge (type 21): end, end, middle.
			if r.Types[i] != CellQuadraticEdge || r.Conn[i][0] != e.A || r.Conn[i][1] != e.B || r.Conn[i][2] != e.Mid {
				t.Fatalf("edge %d read as type %d %v", i, r.Types[i], r.Conn[i])
			}
			if lab[i] != float64(e.Label) || tri[i] != float64(e.Tri) {
				t.Fatalf("edge %d label %g triangle %g; wrote %d, %d", i, lab[i], tri[i], e.Label, e.Tri)
			}
		}
	}
}

func TestCollection(t *testing.T) {
	dir := t.TempDir()
	m := gridMesh(2, 2)
	var c Collection
	for i, tm := range []float64{0, 0.5, 1.25} {
		name := fmt.Sprintf("step%04d.vtu", i)
		if err := WriteFile(filepath.Join(dir, name), func(w io.Writer) error { return Write(w, m, nil, nil, nil) }); err != nil {
			t.Fatal(err)
		}
		c.Add(tm, name)
	}
	pvd := filepath.Join(dir, "fields.pvd")
	if err := c.WriteFile(pvd); err != nil {
		t.Fatal(err)
	}
	// An independent XML parser (Python's ElementTree) reads the
	// collection, and VTK reads every file it names.
	script := `
import sys, os, vtk, xml.etree.ElementTree as ET
root = ET.parse(sys.argv[1]).getroot()
assert root.get("type") == "Collection"
for d in root.find("Collection").findall("DataSet"):
    r = vtk.vtkXMLUnstructuredGridReader()
    r.SetFileName(os.path.join(os.path.dirname(sys.argv[1]), d.get("file")))
    r.Update()
    print(d.get("timestep"), r.GetOutput().GetNumberOfCells())
`
	out, err := exec.Command("/usr/bin/python3", "-c", script, pvd).CombinedOutput()
	if err != nil {
		if strings.Contains(string(out), "No module named") || errors.Is(err, exec.ErrNotFound) || errors.Is(err, os.ErrNotExist) {
			t.Skipf("VTK's Python reader is not available: %v", err)
		}
		t.Fatalf("%v: %s", err, out)
	}
	want := fmt.Sprintf("0 %d\n0.5 %d\n1.25 %d\n", len(m.Tri), len(m.Tri), len(m.Tri))
	if string(out) != want {
		t.Errorf("collection read as\n%s\nwant\n%s", out, want)
	}
}

func TestWriteErrors(t *testing.T) {
	m := gridMesh(2, 1)
	var buf bytes.Buffer
	cases := []struct {
		name string
		err  error
		want string
	}{
		{"short point array", Write(&buf, m, []Array{{Name: "a", Components: 1, Values: []float64{1}}}, nil, nil), "want"},
		{"duplicate", Write(&buf, m, nil, []Array{{Name: "a", Components: 1, Values: make([]float64, len(m.Tri))}, {Name: "a", Components: 1, Values: make([]float64, len(m.Tri))}}, nil), "twice"},
		{"no name", Write(&buf, m, nil, []Array{{Components: 1, Values: make([]float64, len(m.Tri))}}, nil), "no name"},
		{"displacements", Write(&buf, m, nil, nil, &Options{Displacement: make([][2]float64, 3)}), "displacements"},
		{"nil mesh", Write(&buf, nil, nil, nil, nil), "no mesh"},
		{"bad mesh", Write(&buf, &fem.Mesh{X: [][2]float64{{0, 0}}, NumCorners: 1, Tri: [][6]int{{0, 0, 0, 0, 0, 0}}}, nil, nil, nil), "wrong side of NumCorners"},
	}
	var c Collection
	c.Add(1, "a.vtu")
	c.Add(0.5, "b.vtu")
	cases = append(cases, struct {
		name string
		err  error
		want string
	}{"decreasing time", c.Write(&buf), "must not decrease"})
	for _, cs := range cases {
		if cs.err == nil || !strings.Contains(cs.err.Error(), cs.want) {
			t.Errorf("%s: error %v, want one containing %q", cs.name, cs.err, cs.want)
		}
	}
	// A failed write leaves no file behind.
	path := filepath.Join(t.TempDir(), "x.vtu")
	if err := WriteFile(path, func(w io.Writer) error { return Write(w, nil, nil, nil, nil) }); err == nil {
		t.Fatal("WriteFile succeeded on a nil mesh")
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("failed WriteFile left %s", path)
	}
}
