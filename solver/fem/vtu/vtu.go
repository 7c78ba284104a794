// Package vtu writes fem.Mesh fields as VTK XML unstructured grids (.vtu)
// and time series as VTK collections (.pvd), readable by standard viewers.
//
// Format decisions:
//
//   - Triangles are VTK quadratic triangles (cell type 22) with the node
//     order of fem.Mesh (vertices, then midside nodes of edges 0–1, 1–2,
//     2–0), which is VTK's own order.
//   - Points are written as (x, y, 0). Two-component arrays (vectors such
//     as displacement) are padded to three components with a zero third
//     component, as viewers expect for vectors; arrays of 1 or ≥ 3
//     components are written as given.
//   - Data are Float64 (coordinates, fields) and Int32 (connectivity,
//     offsets, labels), inline, base64-encoded ("binary" format, VTK file
//     version 0.1, little-endian, UInt32 block header) by default; ASCII is
//     available for inspection (Encoding ASCII).
//   - Boundary labels go into a separate file written by WriteBoundary:
//     every boundary edge is a quadratic edge (cell type 21: end, end,
//     middle) over the same node list, with the cell arrays "label" (index
//     into Mesh.Labels) and "triangle" (the owning triangle). Keeping them
//     apart means field files contain triangles only, so cell arrays need
//     no padding and volume filters behave.
//   - Label names and named points are written as field data: one Int32
//     array per label, "label:NAME" holding its index, and one per named
//     point, "point:NAME" holding its node index.
//
// Example:
//
//	err := vtu.Write(w, m, []vtu.Array{{Name: "u", Components: 2, Values: u}}, nil, nil)
package vtu

import (
	"bufio"
	"encoding/base64"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"tearline/solver/fem"
)

// VTK cell types used here (VTK file formats, cell type table).
const (
	CellQuadraticEdge     = 21
	CellQuadraticTriangle = 22
)

// Encoding selects how data arrays are stored.
type Encoding int

const (
	// Base64 stores raw little-endian values, base64-encoded inline.
	Base64 Encoding = iota
	// ASCII stores values as decimal text (shortest exact representation).
	ASCII
)

// Array is a named data array: Components values per point (point data)
// or per triangle (cell data), stored point by point.
type Array struct {
	Name       string
	Components int
	Values     []float64
}

// Options control a file. The zero value (or nil) writes base64 data in the
// reference configuration.
type Options struct {
	Encoding Encoding
	// Displacement, if not nil, holds one displacement per node: the file
	// shows the deformed configuration X + u.
	Displacement [][2]float64
}

func checkArrays(kind string, arrs []Array, n int) error {
	seen := map[string]bool{}
	for i, a := range arrs {
		if a.Name == "" {
			return fmt.Errorf("vtu: %s array %d has no name", kind, i)
		}
		if seen[a.Name] {
			return fmt.Errorf("vtu: %s array %q given twice", kind, a.Name)
		}
		seen[a.Name] = true
		if a.Components < 1 {
			return fmt.Errorf("vtu: %s array %q has %d components; must be ≥ 1", kind, a.Name, a.Components)
		}
		if len(a.Values) != n*a.Components {
			return fmt.Errorf("vtu: %s array %q has %d values; want %d (%d × %d components)", kind, a.Name, len(a.Values), n*a.Components, n, a.Components)
		}
	}
	return nil
}

// Write writes the mesh's triangles with point arrays (one tuple per node)
// and cell arrays (one tuple per triangle).
func Write(w io.Writer, m *fem.Mesh, points, cells []Array, opt *Options) error {
	if m == nil {
		return fmt.Errorf("vtu: no mesh")
	}
	if err := m.Check(); err != nil {
		return fmt.Errorf("vtu: %w", err)
	}
	if err := checkArrays("point", points, len(m.X)); err != nil {
		return err
	}
	if err := checkArrays("cell", cells, len(m.Tri)); err != nil {
		return err
	}
	conn := make([]int32, 0, 6*len(m.Tri))
	for _, t := range m.Tri {
		for _, n := range t {
			conn = append(conn, int32(n))
		}
	}
	return write(w, m, points, cells, false, conn, 6, CellQuadraticTriangle, opt)
}

// WriteBoundary writes the boundary edges of the mesh as quadratic edges
// over the full node list, with the cell arrays "label" and "triangle".
func WriteBoundary(w io.Writer, m *fem.Mesh, opt *Options) error {
	if m == nil {
		return fmt.Errorf("vtu: no mesh")
	}
	if err := m.Check(); err != nil {
		return fmt.Errorf("vtu: %w", err)
	}
	conn := make([]int32, 0, 3*len(m.Boundary))
	lab := Array{Name: "label", Components: 1, Values: make([]float64, len(m.Boundary))}
	tri := Array{Name: "triangle", Components: 1, Values: make([]float64, len(m.Boundary))}
	for i, e := range m.Boundary {
		conn = append(conn, int32(e.A), int32(e.B), int32(e.Mid))
		lab.Values[i] = float64(e.Label)
		tri.Values[i] = float64(e.Tri)
	}
	return write(w, m, nil, []Array{lab, tri}, true, conn, 3, CellQuadraticEdge, opt)
}

// xmlAttr escapes a string for an XML attribute value.
func xmlAttr(s string) string {
	r := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&quot;", "'", "&apos;")
	return r.Replace(s)
}

type writer struct {
	w   *bufio.Writer
	enc Encoding
	err error
}

func (x *writer) printf(format string, args ...any) {
	if x.err == nil {
		_, x.err = fmt.Fprintf(x.w, format, args...)
	}
}

func (x *writer) format() string {
	if x.enc == ASCII {
		return "ascii"
	}
	return "binary"
}

// base64 block: UInt32 byte count, then the data, encoded separately.
func (x *writer) block(data []byte) {
	if x.err != nil {
		return
	}
	var hdr [4]byte
	binary.LittleEndian.PutUint32(hdr[:], uint32(len(data)))
	x.w.WriteString(base64.StdEncoding.EncodeToString(hdr[:]))
	enc := base64.NewEncoder(base64.StdEncoding, x.w)
	_, x.err = enc.Write(data)
	if x.err == nil {
		x.err = enc.Close()
	}
}

// text writes n values in ASCII on a new line: value i as appendValue
// appends it to a buffer, followed by a line break where lineEnd(i) says
// so and by a space elsewhere.
func (x *writer) text(n int, appendValue func(buf []byte, i int) []byte, lineEnd func(i int) bool) {
	x.printf("\n")
	buf := make([]byte, 0, 32)
	for i := 0; i < n; i++ {
		buf = appendValue(buf[:0], i)
		if lineEnd(i) {
			buf = append(buf, '\n')
		} else {
			buf = append(buf, ' ')
		}
		if x.err == nil {
			_, x.err = x.w.Write(buf)
		}
	}
}

func (x *writer) floats(name string, comps int, v []float64) {
	nameAttr := ""
	if name != "" {
		nameAttr = fmt.Sprintf(` Name="%s"`, xmlAttr(name))
	}
	x.printf(`<DataArray type="Float64"%s NumberOfComponents="%d" format="%s">`, nameAttr, comps, x.format())
	if x.enc == ASCII {
		x.text(len(v), func(buf []byte, i int) []byte {
			return strconv.AppendFloat(buf, v[i], 'g', -1, 64)
		}, func(i int) bool { return (i+1)%comps == 0 })
	} else {
		b := make([]byte, 8*len(v))
		for i, f := range v {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(f))
		}
		x.block(b)
	}
	x.printf("</DataArray>\n")
}

func (x *writer) ints(typ, name string, v []int64, tuples int) {
	extra := ""
	if tuples > 0 {
		extra = fmt.Sprintf(` NumberOfTuples="%d"`, tuples)
	}
	x.printf(`<DataArray type="%s" Name="%s"%s format="%s">`, typ, xmlAttr(name), extra, x.format())
	if x.enc == ASCII {
		x.text(len(v), func(buf []byte, i int) []byte {
			return strconv.AppendInt(buf, v[i], 10)
		}, func(i int) bool { return i%12 == 11 || i == len(v)-1 })
	} else {
		var b []byte
		switch typ {
		case "UInt8":
			b = make([]byte, len(v))
			for i, n := range v {
				b[i] = byte(n)
			}
		default: // Int32
			b = make([]byte, 4*len(v))
			for i, n := range v {
				binary.LittleEndian.PutUint32(b[4*i:], uint32(int32(n)))
			}
		}
		x.block(b)
	}
	x.printf("</DataArray>\n")
}

// padded returns the array with 2-component tuples padded to 3.
func padded(a Array) (int, []float64) {
	if a.Components != 2 {
		return a.Components, a.Values
	}
	n := len(a.Values) / 2
	v := make([]float64, 3*n)
	for i := 0; i < n; i++ {
		v[3*i], v[3*i+1] = a.Values[2*i], a.Values[2*i+1]
	}
	return 3, v
}

func write(w io.Writer, m *fem.Mesh, points, cells []Array, intCells bool, conn []int32, nper int, ctype int64, opt *Options) error {
	if opt == nil {
		opt = &Options{}
	}
	if opt.Encoding != Base64 && opt.Encoding != ASCII {
		return fmt.Errorf("vtu: unknown encoding %d; use Base64 or ASCII", int(opt.Encoding))
	}
	if opt.Displacement != nil && len(opt.Displacement) != len(m.X) {
		return fmt.Errorf("vtu: %d displacements for %d nodes", len(opt.Displacement), len(m.X))
	}
	x := &writer{w: bufio.NewWriterSize(w, 1<<16), enc: opt.Encoding}
	ncell := len(conn) / nper
	x.printf("<?xml version=\"1.0\"?>\n")
	x.printf("<VTKFile type=\"UnstructuredGrid\" version=\"0.1\" byte_order=\"LittleEndian\" header_type=\"UInt32\">\n<UnstructuredGrid>\n")
	// Field data: label names and named points.
	names := make([]string, 0, len(m.Points))
	for n := range m.Points {
		names = append(names, n)
	}
	sort.Strings(names)
	if len(m.Labels)+len(names) > 0 {
		x.printf("<FieldData>\n")
		for i, l := range m.Labels {
			x.ints("Int32", "label:"+l, []int64{int64(i)}, 1)
		}
		for _, n := range names {
			x.ints("Int32", "point:"+n, []int64{int64(m.Points[n])}, 1)
		}
		x.printf("</FieldData>\n")
	}
	x.printf("<Piece NumberOfPoints=\"%d\" NumberOfCells=\"%d\">\n", len(m.X), ncell)
	if len(points) > 0 {
		x.printf("<PointData>\n")
		for _, a := range points {
			c, v := padded(a)
			x.floats(a.Name, c, v)
		}
		x.printf("</PointData>\n")
	}
	if len(cells) > 0 {
		x.printf("<CellData>\n")
		for _, a := range cells {
			if intCells {
				iv := make([]int64, len(a.Values))
				for i, f := range a.Values {
					iv[i] = int64(f)
				}
				x.ints("Int32", a.Name, iv, 0)
				continue
			}
			c, v := padded(a)
			x.floats(a.Name, c, v)
		}
		x.printf("</CellData>\n")
	}
	xyz := make([]float64, 3*len(m.X))
	for i, p := range m.X {
		if opt.Displacement != nil {
			p[0] += opt.Displacement[i][0]
			p[1] += opt.Displacement[i][1]
		}
		xyz[3*i], xyz[3*i+1] = p[0], p[1]
	}
	x.printf("<Points>\n")
	x.floats("", 3, xyz)
	x.printf("</Points>\n<Cells>\n")
	ci := make([]int64, len(conn))
	for i, c := range conn {
		ci[i] = int64(c)
	}
	x.ints("Int32", "connectivity", ci, 0)
	off := make([]int64, ncell)
	types := make([]int64, ncell)
	for i := range off {
		off[i] = int64(nper * (i + 1))
		types[i] = ctype
	}
	x.ints("Int32", "offsets", off, 0)
	x.ints("UInt8", "types", types, 0)
	x.printf("</Cells>\n</Piece>\n</UnstructuredGrid>\n</VTKFile>\n")
	if x.err != nil {
		return fmt.Errorf("vtu: %w", x.err)
	}
	if err := x.w.Flush(); err != nil {
		return fmt.Errorf("vtu: %w", err)
	}
	return nil
}

// WriteFile writes a file atomically: fn writes into a temporary file in
// the same folder, which is synced and renamed to path.
func WriteFile(path string, fn func(io.Writer) error) error {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*")
	if err != nil {
		return fmt.Errorf("vtu: %w", err)
	}
	tmp := f.Name()
	fail := func(err error) error {
		f.Close()
		os.Remove(tmp)
		return err
	}
	if err := fn(f); err != nil {
		return fail(err)
	}
	if err := f.Chmod(0o644); err != nil { // CreateTemp makes 0600
		return fail(fmt.Errorf("vtu: %w", err))
	}
	if err := f.Sync(); err != nil {
		return fail(fmt.Errorf("vtu: %w", err))
	}
	if err := f.Close(); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("vtu: %w", err)
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("vtu: %w", err)
	}
	return nil
}

// Collection is a VTK collection (.pvd): a time series of data files.
type Collection struct {
	entries []entry
}

type entry struct {
	time float64
	file string
}

// Add appends a data file (a path relative to the .pvd file) at time t.
func (c *Collection) Add(t float64, file string) {
	c.entries = append(c.entries, entry{t, file})
}

// Len returns the number of files.
func (c *Collection) Len() int { return len(c.entries) }

// Write writes the collection; times must be finite and non-decreasing
// and files non-empty.
func (c *Collection) Write(w io.Writer) error {
	for i, e := range c.entries {
		if math.IsNaN(e.time) || math.IsInf(e.time, 0) {
			return fmt.Errorf("vtu: collection entry %d (%s) has time %g; times must be finite", i, e.file, e.time)
		}
		if i > 0 && e.time < c.entries[i-1].time {
			return fmt.Errorf("vtu: collection entry %d (%s) at time %g comes before the previous time %g; times must not decrease", i, e.file, e.time, c.entries[i-1].time)
		}
		if e.file == "" {
			return fmt.Errorf("vtu: collection entry %d has no file", i)
		}
	}
	b := bufio.NewWriter(w)
	fmt.Fprintf(b, "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"0.1\" byte_order=\"LittleEndian\">\n<Collection>\n")
	for _, e := range c.entries {
		fmt.Fprintf(b, "<DataSet timestep=\"%s\" group=\"\" part=\"0\" file=\"%s\"/>\n", strconv.FormatFloat(e.time, 'g', -1, 64), xmlAttr(filepath.ToSlash(e.file)))
	}
	fmt.Fprintf(b, "</Collection>\n</VTKFile>\n")
	if err := b.Flush(); err != nil {
		return fmt.Errorf("vtu: %w", err)
	}
	return nil
}

// WriteFile writes the collection atomically to path.
func (c *Collection) WriteFile(path string) error {
	return WriteFile(path, c.Write)
}
