package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/solver/fem"
	"tearline/solver/fem/vtu"
)

const meshUsage = `usage: tearline mesh CASE.toml -o FILE.vtu [--json] [--set section.key=value ...]

Meshes the case's [geometry] with its [mesh] settings (a fine zone of size
mesh.h_fine around each crack tip, graded to mesh.h_far) and prints the
quality report: triangles, nodes, minimum and maximum angle, and the size
conformity (largest ratio of a triangle's longest edge to h at its centroid,
and the fraction of triangles above 1.2).

Writes FILE.vtu (6-node triangles; point data h, cell data min_angle_deg and
size_ratio) and FILE-boundary.vtu (boundary edges with their label index;
the label names are in the field data as label:NAME).

  -o FILE.vtu         output file (required)
  --json              print the report as one JSON object
  --set key=value     override a case key, e.g. --set mesh.h_far=2 (repeatable)
`

// meshReport is the quality report of "tearline mesh".
type meshReport struct {
	Case             string         `json:"case"`
	Geometry         string         `json:"geometry"`
	Triangles        int            `json:"triangles"`
	Nodes            int            `json:"nodes"`   // all nodes of the 6-node mesh
	Corners          int            `json:"corners"` // vertices
	MinAngleDeg      float64        `json:"min_angle_deg"`
	MaxAngleDeg      float64        `json:"max_angle_deg"`
	SizeRatioMax     float64        `json:"size_ratio_max"`
	FractionAbove1p2 float64        `json:"fraction_above_1p2"`
	HFine            float64        `json:"h_fine"`
	HFar             float64        `json:"h_far"`
	Area             float64        `json:"area"`
	BoundaryEdges    map[string]int `json:"boundary_edges"`
	Points           map[string]int `json:"points"`
	Seconds          float64        `json:"seconds"`
	Output           string         `json:"output"`
	BoundaryOutput   string         `json:"boundary_output"`
}

// meshCommand implements "tearline mesh"; it returns the exit status.
func meshCommand(args []string, stdout, stderr io.Writer) int {
	var casePath, out string
	var sets []string
	asJSON := false
	fail := func(code int, format string, a ...any) int {
		fmt.Fprintf(stderr, "tearline mesh: "+format+"\n", a...)
		if code == 2 && casePath == "" {
			fmt.Fprint(stderr, meshUsage)
		}
		return code
	}
	for i := 0; i < len(args); i++ {
		a := args[i]
		switch {
		case a == "-h" || a == "--help" || a == "-help":
			fmt.Fprint(stdout, meshUsage)
			return 0
		case a == "--json" || a == "-json":
			asJSON = true
		case a == "-o" || a == "--output" || a == "--set" || a == "-set":
			if i+1 >= len(args) {
				return fail(2, "%s needs a value", a)
			}
			i++
			if a == "--set" || a == "-set" {
				sets = append(sets, args[i])
			} else {
				out = args[i]
			}
		case strings.HasPrefix(a, "-o=") || strings.HasPrefix(a, "--output="):
			out = a[strings.IndexByte(a, '=')+1:]
		case strings.HasPrefix(a, "--set="):
			sets = append(sets, strings.TrimPrefix(a, "--set="))
		case strings.HasPrefix(a, "-"):
			return fail(2, "unknown option %q; the options are -o FILE.vtu, --json, --set section.key=value", a)
		default:
			if casePath != "" {
				return fail(2, "one case file only (got %q and %q)", casePath, a)
			}
			casePath = a
		}
	}
	if casePath == "" {
		return fail(2, "no case file given")
	}
	if out == "" {
		return fail(2, "no output file given: use -o FILE.vtu")
	}
	if !strings.HasSuffix(out, ".vtu") {
		return fail(2, "output %q must end in .vtu", out)
	}
	// The mesh a run starts with: the run's own domain and size options
	// (an adaptive run's first fine zone follows adapt.ahead).
	c, src, rs, err := prepareCase(casePath, sets)
	if err != nil {
		code := 1
		if isInputError(err) {
			code = 2
		}
		return fail(code, "%v", err)
	}
	d := rs.cfg.Domain
	for _, n := range c.Geometry.notes {
		fmt.Fprintf(stderr, "tearline mesh: note: %s: %s\n", src.where("geometry.polygon.loop"), n)
	}
	field, err := size.NewField(d, rs.cfg.Size)
	if err != nil {
		return fail(2, "%v", err)
	}
	t0 := time.Now()
	m, q, err := meshing.Mesh(d, field.At, rs.cfg.Mesh)
	secs := time.Since(t0).Seconds()
	if err != nil {
		if strings.HasPrefix(err.Error(), "geometry:") {
			return fail(2, "%s: %v", filepath.Base(casePath), err)
		}
		return fail(1, "%s: meshing failed: %v (mesh.h_fine = %g, mesh.h_far = %g, mesh.max_points = %d)", filepath.Base(casePath), err, c.Mesh.HFine, c.Mesh.HFar, c.Mesh.MaxPoints)
	}
	bout := strings.TrimSuffix(out, ".vtu") + "-boundary.vtu"
	if err := writeMeshFiles(out, bout, m, field.At); err != nil {
		return fail(1, "%v", err)
	}
	rep := meshReport{
		Case: casePath, Geometry: c.Geometry.Kind,
		Triangles: len(m.Tri), Nodes: len(m.X), Corners: m.NumCorners,
		MinAngleDeg: q.MinAngleDeg, MaxAngleDeg: q.MaxAngleDeg,
		SizeRatioMax: q.SizeRatioMax, FractionAbove1p2: q.FractionAbove1p2,
		HFine: c.Mesh.HFine, HFar: c.Mesh.HFar, Area: d.Area(),
		BoundaryEdges: map[string]int{}, Points: m.Points,
		Seconds: secs, Output: out, BoundaryOutput: bout,
	}
	for _, e := range m.Boundary {
		rep.BoundaryEdges[m.Labels[e.Label]]++
	}
	if asJSON {
		enc := json.NewEncoder(stdout)
		if err := enc.Encode(rep); err != nil {
			return fail(1, "%v", err)
		}
		return 0
	}
	printMeshReport(stdout, &rep, m)
	return 0
}

func printMeshReport(w io.Writer, r *meshReport, m *fem.Mesh) {
	fmt.Fprintf(w, "mesh of %s (geometry %s)\n", r.Case, r.Geometry)
	fmt.Fprintf(w, "  triangles        %d (6-node)\n", r.Triangles)
	fmt.Fprintf(w, "  nodes            %d (%d vertices)\n", r.Nodes, r.Corners)
	fmt.Fprintf(w, "  angles           %.1f° to %.1f°\n", r.MinAngleDeg, r.MaxAngleDeg)
	fmt.Fprintf(w, "  size ratio       %.2f at most, %.1f%% of triangles above 1.2 (edge / h at centroid)\n", r.SizeRatioMax, 100*r.FractionAbove1p2)
	fmt.Fprintf(w, "  size field       h_fine %g, h_far %g\n", r.HFine, r.HFar)
	fmt.Fprintf(w, "  area             %.6g\n", r.Area)
	labels := make([]string, 0, len(r.BoundaryEdges))
	for l := range r.BoundaryEdges {
		labels = append(labels, l)
	}
	sort.Strings(labels)
	var parts []string
	for _, l := range labels {
		parts = append(parts, fmt.Sprintf("%s %d", l, r.BoundaryEdges[l]))
	}
	fmt.Fprintf(w, "  boundary edges   %s\n", strings.Join(parts, ", "))
	names := make([]string, 0, len(r.Points))
	for n := range r.Points {
		names = append(names, n)
	}
	sort.Strings(names)
	parts = parts[:0]
	for _, n := range names {
		x := m.X[r.Points[n]]
		parts = append(parts, fmt.Sprintf("%s (%g, %g)", n, x[0], x[1]))
	}
	if len(parts) > 0 {
		fmt.Fprintf(w, "  points           %s\n", strings.Join(parts, ", "))
	}
	fmt.Fprintf(w, "  seconds          %.3f\n", r.Seconds)
	fmt.Fprintf(w, "  wrote            %s, %s\n", r.Output, r.BoundaryOutput)
}

// writeMeshFiles writes the mesh with its size field and element quality,
// and the labelled boundary.
func writeMeshFiles(out, bout string, m *fem.Mesh, size func(x, y float64) float64) error {
	h := vtu.Array{Name: "h", Components: 1, Values: make([]float64, len(m.X))}
	for i, p := range m.X {
		h.Values[i] = size(p[0], p[1])
	}
	ang := vtu.Array{Name: "min_angle_deg", Components: 1, Values: make([]float64, len(m.Tri))}
	ratio := vtu.Array{Name: "size_ratio", Components: 1, Values: make([]float64, len(m.Tri))}
	for e, t := range m.Tri {
		var l [3]float64
		var p [3][2]float64
		for k := 0; k < 3; k++ {
			p[k] = m.X[t[k]]
		}
		for k := 0; k < 3; k++ {
			a, b := p[(k+1)%3], p[(k+2)%3]
			l[k] = math.Hypot(a[0]-b[0], a[1]-b[1])
		}
		mn := 180.0
		for k := 0; k < 3; k++ {
			a, b, c := l[k], l[(k+1)%3], l[(k+2)%3]
			mn = math.Min(mn, math.Acos(math.Max(-1, math.Min(1, (b*b+c*c-a*a)/(2*b*c))))*180/math.Pi)
		}
		ang.Values[e] = mn
		cx, cy := (p[0][0]+p[1][0]+p[2][0])/3, (p[0][1]+p[1][1]+p[2][1])/3
		ratio.Values[e] = math.Max(l[0], math.Max(l[1], l[2])) / size(cx, cy)
	}
	if err := vtu.WriteFile(out, func(w io.Writer) error {
		return vtu.Write(w, m, []vtu.Array{h}, []vtu.Array{ang, ratio}, nil)
	}); err != nil {
		return err
	}
	return vtu.WriteFile(bout, func(w io.Writer) error { return vtu.WriteBoundary(w, m, nil) })
}
