package carve

import (
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/remesh/internal/testmesh"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/remesh/tri"
	"tearline/solver/fem"
	"tearline/solver/plane"
)

// squareDomain is the original domain of testmesh.Rectangle(0, 0, a, a, …): four
// line pieces with the mesh's labels.
func squareDomain(a float64) *geom.Domain {
	c := [][2]float64{{0, 0}, {a, 0}, {a, a}, {0, a}}
	labels := []string{"bottom", "right", "top", "left"}
	d := &geom.Domain{Points: map[string]geom.Point{}}
	for k := 0; k < 4; k++ {
		d.Outer = append(d.Outer, geom.Piece{Kind: geom.Line, A: c[k], B: c[(k+1)%4], Label: labels[k]})
	}
	return d
}

// cellTris returns the two triangles of cell (i, j) of testmesh.Rectangle with nx
// cells per row.
func cellTris(i, j, nx int) [2]int { return [2]int{2 * (j*nx + i), 2*(j*nx+i) + 1} }

// lengthByLabel sums the piece lengths per label.
func lengthByLabel(d *geom.Domain) map[string]float64 {
	out := map[string]float64{}
	for _, l := range d.Loops() {
		for i := range l {
			out[l[i].Label] += l[i].Length()
		}
	}
	return out
}

// onLabel reports whether x lies on a piece of d with the given label.
func onLabel(d *geom.Domain, x [2]float64, label string) bool {
	for _, l := range d.Loops() {
		for i := range l {
			if l[i].Label == label && l[i].Distance(x) < 1e-12 {
				return true
			}
		}
	}
	return false
}

func constSize(h float64) func(x, y float64) float64 { return func(x, y float64) float64 { return h } }

func TestCarveStrip(t *testing.T) {
	// A 10 × 10 square, 20 × 20 cells of 0.5; a slit one cell high is cut
	// from the left edge to x = 4 in row 10 (y from 5 to 5.5). Areas and
	// lengths of the result follow from the cell counts (elementary
	// geometry): area 100 − 8 × 0.25, crack faces 4 + 4 + 0.5 long, the
	// left side 10 − 0.5.
	const nx = 20
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	m.Points["load"] = 20*(nx+1) + 20 // corner (10, 10)
	m.Points["mid"] = 4*(nx+1) + 16   // interior node (8, 2)
	m.Points["face"] = 10*(nx+1) + 3  // node (1.5, 5): on the new crack face
	orig := squareDomain(10)
	broken := make([]bool, len(m.Tri))
	removedArea := 0.0
	for i := 0; i < 8; i++ {
		for _, e := range cellTris(i, 10, nx) {
			broken[e] = true
			removedArea += triArea(m, e)
		}
	}
	meshArea := 0.0
	for e := range m.Tri {
		meshArea += triArea(m, e)
	}
	tips := []criteria.Tip{{Name: "tip", X: [2]float64{4.1, 5.3}, Dir: [2]float64{2, 0}}}
	c, err := Domain(m, broken, orig, tips, constSize(0.5), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	d := c.Domain
	if got, want := d.Area(), meshArea-removedArea; math.Abs(got-want) > 1e-12 {
		t.Errorf("domain area %.15g, want mesh area − removed = %.15g", got, want)
	}
	if math.Abs(c.Area-(meshArea-removedArea)) > 1e-12 || c.Slivers != 0 || len(d.Holes) != 0 {
		t.Errorf("kept area %g, slivers %d, holes %d; want %g, 0, 0", c.Area, c.Slivers, len(d.Holes), meshArea-removedArea)
	}
	ls := lengthByLabel(d)
	for lab, want := range map[string]float64{"bottom": 10, "right": 10, "top": 10, "left": 9.5, CrackLabel: 8.5} {
		if math.Abs(ls[lab]-want) > 1e-12 {
			t.Errorf("label %q: length %g, want %g", lab, ls[lab], want)
		}
	}
	// every newly exposed edge lies on a crack piece, every kept old
	// boundary edge on a piece with its label
	exposed := 0
	for e, tri := range m.Tri {
		if broken[e] {
			continue
		}
		for k := 0; k < 3; k++ {
			mid := m.X[tri[3+k]]
			a, b := tri[k], tri[(k+1)%3]
			oldLab := ""
			for _, ed := range m.Boundary {
				if ukey(ed.A, ed.B) == ukey(a, b) {
					oldLab = m.Labels[ed.Label]
				}
			}
			nb := -1
			for o, ot := range m.Tri {
				if o != e && !broken[o] {
					for q := 0; q < 3; q++ {
						if ukey(ot[q], ot[(q+1)%3]) == ukey(a, b) {
							nb = o
						}
					}
				}
			}
			switch {
			case nb >= 0: // interior edge: on no piece
				for _, l := range d.Loops() {
					for i := range l {
						if l[i].Distance(mid) < 1e-12 {
							t.Fatalf("interior edge at %v lies on piece %q", mid, l[i].Label)
						}
					}
				}
			case oldLab != "":
				if !onLabel(d, mid, oldLab) {
					t.Errorf("old boundary edge at %v lost its label %q", mid, oldLab)
				}
			default:
				exposed++
				if !onLabel(d, mid, CrackLabel) {
					t.Errorf("exposed edge at %v is not on a crack face", mid)
				}
			}
		}
	}
	if exposed != 17 { // 8 + 8 cell faces + 1 end face
		t.Errorf("%d exposed edges, want 17", exposed)
	}
	// named points
	if p, ok := d.Points["load"]; !ok || p.X != [2]float64{10, 10} {
		t.Errorf("load point %+v, %v; want kept at (10, 10)", p, ok)
	}
	if p, ok := d.Points["mid"]; !ok || p.X != [2]float64{8, 2} {
		t.Errorf("interior point %+v, %v; want kept at (8, 2)", p, ok)
	}
	// a point on the new crack face stays, as a vertex of the boundary
	if p, ok := d.Points["face"]; !ok || p.X != [2]float64{1.5, 5} || !onLabel(d, p.X, CrackLabel) {
		t.Errorf("point on the crack face %+v, %v; want kept at (1.5, 5) on a crack piece", p, ok)
	}
	vertex := false
	for _, l := range d.Loops() {
		for i := range l {
			vertex = vertex || l[i].A == [2]float64{1.5, 5}
		}
	}
	if !vertex || len(c.Dropped) != 0 {
		t.Errorf("crack-face point is a vertex: %v; dropped %v (want none)", vertex, c.Dropped)
	}
	tp, ok := d.Points["tip"]
	if !ok || !tp.Tip || tp.Dir != [2]float64{1, 0} {
		t.Fatalf("tip %+v, %v; want a tip with unit direction (1, 0)", tp, ok)
	}
	// the tip at (4.1, 5.3) lies within Simplify·h = 0.25 of the slit's
	// end (x = 4): it snaps to the nearest end vertex, (4, 5.5)
	if tp.X != [2]float64{4, 5.5} {
		t.Errorf("tip at %v, want snapped to (4, 5.5)", tp.X)
	}
}

// TestCarveSplitBody: removing a full row splits the square in two; the
// larger part is kept, and a named node in the other part is reported
// dropped.
func TestCarveSplitBody(t *testing.T) {
	const nx = 20
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	m.Points["load"] = 20*(nx+1) + 20 // (10, 10), in the upper part
	broken := make([]bool, len(m.Tri))
	for i := 0; i < nx; i++ {
		for _, e := range cellTris(i, 10, nx) {
			broken[e] = true
		}
	}
	// the row y ∈ [5, 5.5] is removed: the body splits into a lower part
	// (area 50) and an upper part (45); the larger is kept
	c, err := Domain(m, broken, squareDomain(10), nil, constSize(0.5), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if got := c.Domain.Area(); math.Abs(got-50) > 1e-12 {
		t.Errorf("area %g, want the lower part's 50", got)
	}
	if c.Slivers != 2*nx*9 {
		t.Errorf("%d slivers, want the upper part's %d triangles", c.Slivers, 2*nx*9)
	}
	if len(c.Dropped) != 1 || c.Dropped[0] != "load" {
		t.Errorf("dropped %v, want [load]", c.Dropped)
	}
	if ls := lengthByLabel(c.Domain); math.Abs(ls[CrackLabel]-10) > 1e-12 || math.Abs(ls["left"]-5) > 1e-12 {
		t.Errorf("lengths %v, want crack 10, left 5", ls)
	}
}

func TestCarvePinch(t *testing.T) {
	// A slit over rows 10 and 11 to x = 8 leaves, around node N = (5, 5.5),
	// the triangles T1, T3 below and T4 above that touch only at N (and T4
	// touches the upper body only at a vertex): T4 is dropped (smaller
	// fan), T1 and T3 stay. Area 100 − 32 × 0.25 + 2 × 0.125.
	const nx = 20
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	broken := make([]bool, len(m.Tri))
	for j := 10; j <= 11; j++ {
		for i := 0; i < 16; i++ {
			for _, e := range cellTris(i, j, nx) {
				broken[e] = true
			}
		}
	}
	t1, t3, t4 := cellTris(9, 10, nx)[0], cellTris(10, 10, nx)[1], cellTris(9, 11, nx)[0]
	broken[t1], broken[t3], broken[t4] = false, false, false
	opt := DefaultOptions()
	opt.Simplify = 0 // keep the staircase: the area is then exact
	c, err := Domain(m, broken, squareDomain(10), nil, nil, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !c.Removed[t4] || c.Removed[t1] || c.Removed[t3] || c.Slivers != 1 {
		t.Errorf("removed T1 %v T3 %v T4 %v, slivers %d; want only T4 dropped", c.Removed[t1], c.Removed[t3], c.Removed[t4], c.Slivers)
	}
	if got, want := c.Domain.Area(), 100-32*0.25+2*0.125; math.Abs(got-want) > 1e-12 {
		t.Errorf("area %g, want %g", got, want)
	}
	// each boundary node appears once: the loops are simple
	seen := map[[2]float64]bool{}
	for _, l := range c.Vertices {
		for _, x := range l {
			if seen[x] {
				t.Fatalf("boundary node %v appears twice", x)
			}
			seen[x] = true
		}
	}
}

// polylineDistance is the distance from x to the pieces of d.
func domainDistance(d *geom.Domain, x [2]float64) float64 {
	best := math.Inf(1)
	for _, l := range d.Loops() {
		for i := range l {
			best = math.Min(best, l[i].Distance(x))
		}
	}
	return best
}

// breakWhere marks the triangles of m whose centroid satisfies in.
func breakWhere(m *fem.Mesh, in func(x, y float64) bool) []bool {
	broken := make([]bool, len(m.Tri))
	for e, t := range m.Tri {
		a, b, c := m.X[t[0]], m.X[t[1]], m.X[t[2]]
		broken[e] = in((a[0]+b[0]+c[0])/3, (a[1]+b[1]+c[1])/3)
	}
	return broken
}

func TestCarveSimplify(t *testing.T) {
	// A wavy crack: the triangles whose centroid lies in the band
	// |y − 5 − 0.8 sin x| < 0.45, x < 7, are removed from a 10 × 10 square
	// of 40 × 40 cells; the crack faces come out as zigzags. Douglas–
	// Peucker must keep every dropped vertex within Simplify·h(x) of the
	// simplified boundary (its defining property, Douglas & Peucker 1973,
	// Cartographica 10), keep the tip and label changes, and give a valid
	// domain.
	const nx = 40
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	broken := breakWhere(m, func(x, y float64) bool { return x < 7 && math.Abs(y-5-0.8*math.Sin(x)) < 0.45 })
	base := -1 // vertices dropped without simplification (collinear ones)
	for _, sc := range []struct {
		name     string
		simplify float64
		size     func(x, y float64) float64
	}{
		{"no simplification", 0, nil},
		{"constant size, 0.5", 0.5, constSize(0.25)},
		{"constant size, 1.5", 1.5, constSize(0.25)},
		{"graded size", 0.5, func(x, y float64) float64 { return 0.05 + 0.1*math.Abs(x-7) }},
	} {
		t.Run(sc.name, func(t *testing.T) {
			opt := DefaultOptions()
			opt.Simplify = sc.simplify
			tips := []criteria.Tip{{Name: "tip", X: [2]float64{7, 5 + 0.8*math.Sin(7)}, Dir: [2]float64{1, 0}}}
			c, err := Domain(m, broken, squareDomain(10), tips, sc.size, opt)
			if err != nil {
				t.Fatal(err)
			}
			if err := c.Domain.Validate(); err != nil {
				t.Fatal(err)
			}
			dropped, total := 0, 0
			for li, l := range c.Vertices {
				for k, x := range l {
					total++
					if c.Kept[li][k] {
						continue
					}
					dropped++
					tol := 1e-12
					if sc.size != nil {
						tol += sc.simplify * sc.size(x[0], x[1])
					}
					if d := domainDistance(c.Domain, x); d > tol {
						t.Errorf("dropped vertex %v is %g from the simplified boundary, tolerance %g", x, d, tol)
					}
				}
			}
			// One-sided: the simplified boundary never brings removed
			// material back (our rule, see Options.Simplify), so no
			// removed triangle's centroid is inside and the area does not
			// exceed that of the kept triangles.
			for e, r := range c.Removed {
				tr := m.Tri[e]
				x := [2]float64{(m.X[tr[0]][0] + m.X[tr[1]][0] + m.X[tr[2]][0]) / 3, (m.X[tr[0]][1] + m.X[tr[1]][1] + m.X[tr[2]][1]) / 3}
				if r && c.Domain.Contains(x) {
					t.Errorf("removed triangle %d (centroid %v) is inside the simplified domain", e, x)
				}
			}
			if a := c.Domain.Area(); a > c.Area*(1+1e-12) {
				t.Errorf("simplified area %.15g exceeds the kept triangles' %.15g", a, c.Area)
			}
			if sc.simplify > 0 && dropped <= base {
				t.Errorf("%d of %d boundary vertices dropped, no more than the %d collinear ones", dropped, total, base)
			}
			if sc.simplify == 0 {
				base = dropped
				// only collinear vertices go: the area is that of the kept triangles
				if math.Abs(c.Domain.Area()-c.Area) > 1e-12 {
					t.Errorf("unsimplified area %.15g, kept triangles %.15g", c.Domain.Area(), c.Area)
				}
			}
			tp := c.Domain.Points["tip"]
			if domainDistance(c.Domain, tp.X) > 1e-12 && !c.Domain.Contains(tp.X) {
				t.Errorf("tip %v is outside the new domain", tp.X)
			}
			t.Logf("%s: %d of %d boundary vertices dropped, %d pieces, area %.6g (kept triangles %.6g)", sc.name, dropped, total, c.Domain.NumPieces(), c.Domain.Area(), c.Area)
		})
	}
}

func TestCarveTwoFacesClose(t *testing.T) {
	// A slit one cell (0.25) wide with a large tolerance (2 × 0.25 > the
	// slit width): simplification alone would let the faces cross; the
	// topology check keeps them apart and the domain stays valid.
	const nx = 40
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	broken := breakWhere(m, func(x, y float64) bool { return x < 8 && math.Abs(y-5-1.5*math.Sin(0.9*x)) < 0.15 })
	opt := DefaultOptions()
	opt.Simplify = 2
	c, err := Domain(m, broken, squareDomain(10), nil, constSize(0.25), opt)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.Domain.Validate(); err != nil {
		t.Fatalf("the simplified geometry is invalid: %v", err)
	}
	// every kept triangle's centroid stays inside the new domain's closure
	// or within the tolerance of its boundary
	for e, tri := range m.Tri {
		if c.Removed[e] {
			continue
		}
		a, b, cc := m.X[tri[0]], m.X[tri[1]], m.X[tri[2]]
		x := [2]float64{(a[0] + b[0] + cc[0]) / 3, (a[1] + b[1] + cc[1]) / 3}
		if !c.Domain.Contains(x) && domainDistance(c.Domain, x) > 2*0.25 {
			t.Fatalf("kept triangle %d's centroid %v is outside the new domain", e, x)
		}
	}
}

func TestCarveArcs(t *testing.T) {
	// A quarter ring 1 ≤ r ≤ 2, 0 ≤ θ ≤ π/2 meshed on a polar grid; the
	// elements touching the inner arc for 30° < θ < 45° are removed. The
	// outer arc must come back whole (same centre, radius, sweep π/2), the
	// inner arc as two sub-arcs on the same circle whose sweeps add up to
	// π/2 less the cut (exact geometry of the grid).
	const nr, nt = 8, 24
	m := &fem.Mesh{Labels: []string{"cut", "outer", "hole"}, Points: map[string]int{}}
	id := func(i, j int) int { return j*(nr+1) + i }
	pos := func(r, th float64) [2]float64 { return [2]float64{r * math.Cos(th), r * math.Sin(th)} }
	for j := 0; j <= nt; j++ {
		for i := 0; i <= nr; i++ {
			m.X = append(m.X, pos(1+float64(i)/nr, math.Pi/2*float64(j)/nt))
		}
	}
	m.NumCorners = len(m.X)
	mids := map[[2]int]int{}
	midOf := func(a, b int, onArc bool) int {
		k := ukey(a, b)
		if n, ok := mids[k]; ok {
			return n
		}
		pa, pb := m.X[a], m.X[b]
		x := [2]float64{0.5 * (pa[0] + pb[0]), 0.5 * (pa[1] + pb[1])}
		if onArc { // midside node on the circle
			r := math.Hypot(pa[0], pa[1])
			th := 0.5 * (math.Atan2(pa[1], pa[0]) + math.Atan2(pb[1], pb[0]))
			x = pos(r, th)
		}
		m.X = append(m.X, x)
		mids[k] = len(m.X) - 1
		return len(m.X) - 1
	}
	for j := 0; j < nt; j++ {
		for i := 0; i < nr; i++ {
			a, b, cc, dd := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			// counter-clockwise: a (r_i, θ_j), b (r_i+1, θ_j), c (r_i+1, θ_j+1), d (r_i, θ_j+1)
			m.Tri = append(m.Tri, [6]int{a, b, cc, midOf(a, b, false), midOf(b, cc, i+1 == nr), midOf(cc, a, false)})
			m.Tri = append(m.Tri, [6]int{a, cc, dd, midOf(a, cc, false), midOf(cc, dd, false), midOf(dd, a, i == 0)})
		}
	}
	for e, tri := range m.Tri {
		for k := 0; k < 3; k++ {
			a, b := tri[k], tri[(k+1)%3]
			ia, ja, ib, jb := a%(nr+1), a/(nr+1), b%(nr+1), b/(nr+1)
			lab := -1
			switch {
			case ja == 0 && jb == 0, ja == nt && jb == nt:
				lab = 0
			case ia == nr && ib == nr:
				lab = 1
			case ia == 0 && ib == 0:
				lab = 2
			}
			if lab >= 0 {
				m.Boundary = append(m.Boundary, fem.Edge{A: a, B: b, Mid: tri[3+k], Label: lab, Tri: e})
			}
		}
	}
	if err := m.Check(); err != nil {
		t.Fatal(err)
	}
	orig := &geom.Domain{Outer: geom.Loop{
		{Kind: geom.Line, A: [2]float64{1, 0}, B: [2]float64{2, 0}, Label: "cut"},
		{Kind: geom.Arc, A: [2]float64{2, 0}, B: pos(2, math.Pi/2), Radius: 2, Label: "outer"},
		{Kind: geom.Line, A: pos(2, math.Pi/2), B: pos(1, math.Pi/2), Label: "cut"},
		{Kind: geom.Arc, A: pos(1, math.Pi/2), B: [2]float64{1, 0}, Radius: 1, CW: true, Label: "hole"},
	}}
	if err := orig.Validate(); err != nil {
		t.Fatal(err)
	}
	broken := make([]bool, len(m.Tri))
	for j := 8; j < 12; j++ { // θ from 30° to 45°
		for k := 0; k < 2; k++ {
			broken[2*(j*nr)+k] = true // the inner-most cell's two triangles
		}
	}
	c, err := Domain(m, broken, orig, nil, constSize(0.1), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	sweep := map[string]float64{}
	arcs := map[string]int{}
	for _, p := range c.Domain.Outer {
		if p.Kind != geom.Arc {
			continue
		}
		arcs[p.Label]++
		sweep[p.Label] += math.Abs(p.Sweep())
		want := map[string]float64{"outer": 2, "hole": 1}[p.Label]
		if p.Centre != [2]float64{} || p.Radius != want {
			t.Errorf("arc %q: centre %v radius %g, want the original (0, 0), %g", p.Label, p.Centre, p.Radius, want)
		}
	}
	if arcs["outer"] != 1 || math.Abs(sweep["outer"]-math.Pi/2) > 1e-12 {
		t.Errorf("outer arc: %d pieces, sweep %g; want 1 of π/2", arcs["outer"], sweep["outer"])
	}
	if arcs["hole"] != 2 || math.Abs(sweep["hole"]-(math.Pi/2-math.Pi/12)) > 1e-12 {
		t.Errorf("inner arc: %d pieces, sweep %g; want 2 of total %g", arcs["hole"], sweep["hole"], math.Pi/2-math.Pi/12)
	}
}

func TestCarveErrors(t *testing.T) {
	m := testmesh.Rectangle(0, 0, 1, 1, 2, 2)
	all := make([]bool, len(m.Tri))
	for i := range all {
		all[i] = true
	}
	for _, c := range []struct {
		name   string
		broken []bool
		size   func(x, y float64) float64
		opt    func(*Options)
		tips   []criteria.Tip
		want   string
	}{
		{"flags mismatch", make([]bool, 3), constSize(1), nil, nil, "broken flags"},
		{"all broken", all, constSize(1), nil, nil, "no material"},
		{"no size", make([]bool, len(m.Tri)), nil, nil, nil, "size function"},
		{"negative simplify", make([]bool, len(m.Tri)), constSize(1), func(o *Options) { o.Simplify = -1 }, nil, "Simplify"},
		{"bad tip", make([]bool, len(m.Tri)), constSize(1), nil, []criteria.Tip{{Name: "tip"}}, "direction"},
	} {
		t.Run(c.name, func(t *testing.T) {
			o := DefaultOptions()
			if c.opt != nil {
				c.opt(&o)
			}
			_, err := Domain(m, c.broken, nil, c.tips, c.size, o)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one naming %q", err, c.want)
			}
		})
	}
}

// ssyCycle meshes the half SSY disk (sharp crack, radius R) with the tip
// field at the origin, breaks the elements whose centroid lies in the strip
// 0 < x < grow, y < band, and carves and remeshes with the tip moved to
// (grow, 0). It returns the old mesh, the broken flags, the carve result,
// the new field and the new mesh.
type cycleOut struct {
	m0, m1 *fem.Mesh
	broken []bool
	c      *Result
	f1     *size.TipField
	rep    tri.Report
}

// ssySetup meshes the half SSY disk (sharp crack, radius R, far size
// hFar) with the tip field at the origin and breaks the elements whose
// centroid lies in the strip 0 < x < grow, y < band; the centroids within
// ℓ of the strip are the damaged points. The moved tip is at (grow, 0).
type ssySetup struct {
	d       *geom.Domain
	fo      size.FollowOptions
	m0      *fem.Mesh
	broken  []bool
	damaged [][2]float64
	tip     criteria.Tip
}

func newSSYSetup(tb testing.TB, R, hFar, ell, grow, band float64) ssySetup {
	tb.Helper()
	d, err := geom.SSY{Radius: R}.Domain()
	if err != nil {
		tb.Fatal(err)
	}
	fo := size.DefaultFollowOptions(ell, hFar)
	f0, err := size.NewTipField([]criteria.Tip{{Name: "tip", Dir: [2]float64{1, 0}}}, nil, nil, fo)
	if err != nil {
		tb.Fatal(err)
	}
	m0, _, err := meshing.Mesh(d, f0.At, meshing.Options{})
	if err != nil {
		tb.Fatal(err)
	}
	s := ssySetup{d: d, fo: fo, m0: m0, broken: make([]bool, len(m0.Tri)),
		tip: criteria.Tip{Name: "tip", X: [2]float64{grow, 0}, Dir: [2]float64{1, 0}}}
	for e, t := range m0.Tri {
		a, b, c := m0.X[t[0]], m0.X[t[1]], m0.X[t[2]]
		x := [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
		switch {
		case x[0] > 0 && x[0] < grow && x[1] < band:
			s.broken[e] = true
		case x[0] > -ell && x[0] < grow+ell && x[1] < band+ell:
			s.damaged = append(s.damaged, x) // the flanks of the crack
		}
	}
	return s
}

// ssyCycle carves and remeshes an ssySetup with the tip field of the moved
// tip and the damaged points.
func ssyCycle(tb testing.TB, R, ell, grow, band float64) cycleOut {
	tb.Helper()
	s := newSSYSetup(tb, R, R/10, ell, grow, band)
	f1, err := size.NewTipField([]criteria.Tip{s.tip}, s.damaged, nil, s.fo)
	if err != nil {
		tb.Fatal(err)
	}
	c, err := Domain(s.m0, s.broken, s.d, []criteria.Tip{s.tip}, f1.At, DefaultOptions())
	if err != nil {
		tb.Fatal(err)
	}
	m1, rep, err := meshing.Mesh(c.Domain, f1.At, meshing.Options{})
	if err != nil {
		tb.Fatal(err)
	}
	return cycleOut{s.m0, m1, s.broken, c, f1, rep}
}

// insideMesh reports whether x lies in a triangle of m (closed, straight
// sides).
func insideMesh(m *fem.Mesh, x [2]float64) bool {
	for _, t := range m.Tri {
		l := fem.Barycentric(x, m.X[t[0]], m.X[t[1]], m.X[t[2]])
		if l[0] >= 0 && l[1] >= 0 && l[2] >= 0 {
			return true
		}
	}
	return false
}

func TestCarveRemeshSSY(t *testing.T) {
	// End to end: carve → meshing.Mesh gives a valid mesh (fem.Mesh.Check),
	// minimum angle ≥ 20° (the mesher's bound, Shewchuk 2002, Comput.
	// Geom. 22), crack faces labelled, and no removed material inside the
	// new mesh beyond the simplification tolerance.
	const R, ell, grow, band = 10, 0.2, 1.0, 0.12
	o := ssyCycle(t, R, ell, grow, band)
	if err := o.m1.Check(); err != nil {
		t.Fatal(err)
	}
	if o.rep.MinAngleDeg < 20 {
		t.Errorf("minimum angle %.2f° < 20°", o.rep.MinAngleDeg)
	}
	nb := 0
	for e := range o.broken {
		if !o.broken[e] {
			continue
		}
		nb++
		t0 := o.m0.Tri[e]
		a, b, c := o.m0.X[t0[0]], o.m0.X[t0[1]], o.m0.X[t0[2]]
		x := [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
		if !insideMesh(o.m1, x) {
			continue
		}
		// allowed only within the simplification tolerance of the crack face
		tol := DefaultOptions().Simplify * o.f1.At(x[0], x[1])
		if dd := domainDistance(o.c.Domain, x); dd > tol {
			t.Errorf("removed element %d's centroid %v is inside the new mesh, %g from its boundary (tolerance %g)", e, x, dd, tol)
		}
	}
	if nb == 0 {
		t.Fatal("no element broken: the test set-up is wrong")
	}
	// labels: crack faces along the new faces, the symmetry plane only
	// ahead of the new tip, the tip a node at (grow, 0) or on the face end
	crack, sym := o.m1.Label(CrackLabel), o.m1.Label(geom.LabelSymmetry)
	if crack < 0 || sym < 0 {
		t.Fatalf("labels %v lack crack or symmetry", o.m1.Labels)
	}
	for _, ed := range o.m1.Boundary {
		a, b := o.m1.X[ed.A], o.m1.X[ed.B]
		if ed.Label == sym && (a[0] < grow-ell || b[0] < grow-ell || a[1] != 0 || b[1] != 0) {
			t.Errorf("symmetry edge %v–%v is not on the ligament ahead of the new tip", a, b)
		}
	}
	n, ok := o.m1.Points["tip"]
	if !ok {
		t.Fatal("the new mesh has no tip point")
	}
	if tp := o.m1.X[n]; math.Hypot(tp[0]-grow, tp[1]) > 2*band {
		t.Errorf("tip node at %v, want near (%g, 0)", tp, grow)
	}
	t.Logf("old mesh %d triangles, %d broken; carved domain %d pieces (%d slivers); new mesh %d triangles, min angle %.1f°",
		len(o.m0.Tri), nb, o.c.Domain.NumPieces(), o.c.Slivers, len(o.m1.Tri), o.rep.MinAngleDeg)
}

func TestCarveRemeshTwice(t *testing.T) {
	// A second cycle on the carved-and-remeshed mesh: earlier crack faces
	// (not pieces of the original domain) are re-simplified; the remote arc
	// survives as arcs on the original circle.
	const R, ell = 10, 0.2
	o := ssyCycle(t, R, ell, 1.0, 0.12)
	d, _ := geom.SSY{Radius: R}.Domain()
	m := o.m1
	broken := make([]bool, len(m.Tri))
	for e, tr := range m.Tri {
		a, b, c := m.X[tr[0]], m.X[tr[1]], m.X[tr[2]]
		x := [2]float64{(a[0] + b[0] + c[0]) / 3, (a[1] + b[1] + c[1]) / 3}
		broken[e] = x[0] > 0.9 && x[0] < 2.2 && x[1] < 0.12
	}
	tip := criteria.Tip{Name: "tip", X: [2]float64{2.2, 0}, Dir: [2]float64{1, 0}}
	f, err := size.NewTipField([]criteria.Tip{tip}, nil, nil, size.DefaultFollowOptions(ell, R/10))
	if err != nil {
		t.Fatal(err)
	}
	c, err := Domain(m, broken, d, []criteria.Tip{tip}, f.At, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	m2, rep, err := meshing.Mesh(c.Domain, f.At, meshing.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := m2.Check(); err != nil || rep.MinAngleDeg < 20 {
		t.Fatalf("second mesh: %v, min angle %.2f°", err, rep.MinAngleDeg)
	}
	sweep := 0.0
	for _, p := range c.Domain.Outer {
		if p.Kind == geom.Arc && p.Label == geom.LabelRemote {
			if p.Radius != R || p.Centre != [2]float64{} {
				t.Errorf("remote arc on centre %v radius %g, want the original circle", p.Centre, p.Radius)
			}
			sweep += math.Abs(p.Sweep())
		}
	}
	if math.Abs(sweep-math.Pi) > 1e-9 { // the half disk's arc, untouched
		t.Errorf("remote arc sweep %g, want π", sweep)
	}
	// midside nodes of the remote edges lie on the circle (DESIGN.md §4)
	rl := m2.Label(geom.LabelRemote)
	for _, ed := range m2.Boundary {
		if ed.Label == rl {
			x := m2.X[ed.Mid]
			if math.Abs(math.Hypot(x[0], x[1])-R) > 1e-9*R {
				t.Fatalf("remote midside node %v off the circle", x)
			}
		}
	}
}

func TestCarveTwoTips(t *testing.T) {
	// Two slits, from the left and from the right edge, each with its own
	// tip; both tips move to the slits' ends (snapped to the end vertices,
	// which lie within Simplify·h of the tips).
	const nx = 20
	m := testmesh.Rectangle(0, 0, 10, 10, nx, nx)
	broken := make([]bool, len(m.Tri))
	for i := 0; i < 6; i++ {
		for _, e := range cellTris(i, 6, nx) { // y 3–3.5, x 0–3
			broken[e] = true
		}
		for _, e := range cellTris(nx-1-i, 13, nx) { // y 6.5–7, x 7–10
			broken[e] = true
		}
	}
	tips := []criteria.Tip{
		{Name: "tip_left", X: [2]float64{3, 3.25}, Dir: [2]float64{1, 0}},
		{Name: "tip_right", X: [2]float64{7, 6.75}, Dir: [2]float64{-1, 0.1}},
	}
	c, err := Domain(m, broken, squareDomain(10), tips, constSize(0.5), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		ends [][2]float64
	}{{"tip_left", [][2]float64{{3, 3}, {3, 3.5}}}, {"tip_right", [][2]float64{{7, 6.5}, {7, 7}}}} {
		p, ok := c.Domain.Points[tc.name]
		if !ok || !p.Tip || math.Abs(math.Hypot(p.Dir[0], p.Dir[1])-1) > 1e-15 {
			t.Fatalf("%s: %+v, %v; want a tip with a unit direction", tc.name, p, ok)
		}
		if p.X != tc.ends[0] && p.X != tc.ends[1] {
			t.Errorf("%s at %v, want one of the slit's end vertices %v", tc.name, p.X, tc.ends)
		}
	}
	if got, want := c.Domain.Area(), 100-12*0.25; math.Abs(got-want) > 1e-12 {
		t.Errorf("area %g, want %g", got, want)
	}
	if got := lengthByLabel(c.Domain)[CrackLabel]; math.Abs(got-2*(3+3+0.5)) > 1e-12 {
		t.Errorf("crack length %g, want 13", got)
	}
}

// BenchmarkCarveRemesh times one carve + meshing.Mesh of the SSY disk meshed
// to about 10⁴ triangles (ℓ = 0.1, h_far = 0.3, R = 10), the old mesh built
// outside the timer.
func BenchmarkCarveRemesh(b *testing.B) {
	s := newSSYSetup(b, 10, 0.3, 0.1, 0.8, 0.06)
	f1, err := size.NewTipField([]criteria.Tip{s.tip}, s.damaged, nil, s.fo)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	var n1 int
	for i := 0; i < b.N; i++ {
		c, err := Domain(s.m0, s.broken, s.d, []criteria.Tip{s.tip}, f1.At, DefaultOptions())
		if err != nil {
			b.Fatal(err)
		}
		m1, _, err := meshing.Mesh(c.Domain, f1.At, meshing.Options{})
		if err != nil {
			b.Fatal(err)
		}
		n1 = len(m1.Tri)
	}
	b.ReportMetric(float64(len(s.m0.Tri)), "old-triangles")
	b.ReportMetric(float64(n1), "new-triangles")
}

// BenchmarkCarve times Domain alone on the same mesh.
func BenchmarkCarve(b *testing.B) {
	s := newSSYSetup(b, 10, 0.3, 0.1, 0.8, 0.06)
	f1, err := size.NewTipField([]criteria.Tip{s.tip}, s.damaged, nil, s.fo)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Domain(s.m0, s.broken, s.d, []criteria.Tip{s.tip}, f1.At, DefaultOptions()); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(s.m0.Tri)), "old-triangles")
}

func TestCarveRandomDamage(t *testing.T) {
	// Random clusters of broken elements around the tip of the SSY disk
	// (blobs, isolated elements, clusters touching the symmetry plane and
	// the crack faces): every carve must give a valid domain that meshes
	// into a valid mesh with the mesher's angle bound (Shewchuk 2002,
	// Comput. Geom. 22: ≥ 20° away from small input angles).
	s := newSSYSetup(t, 10, 1, 0.2, 0, 0)
	rng := rand.New(rand.NewPCG(11, 12))
	n := 12
	if v := os.Getenv("TEARLINE_CARVE_TRIALS"); v != "" {
		n, _ = strconv.Atoi(v)
	}
	if testing.Short() {
		n = 4
	}
	for trial := 0; trial < n; trial++ {
		type disc struct{ x, y, r float64 }
		var ds []disc
		for k := 0; k < 1+rng.IntN(4); k++ {
			ds = append(ds, disc{rng.Float64()*2 - 0.5, rng.Float64() * 0.6, 0.05 + 0.25*rng.Float64()})
		}
		broken := breakWhere(s.m0, func(x, y float64) bool {
			for _, d := range ds {
				if math.Hypot(x-d.x, y-d.y) < d.r {
					return true
				}
			}
			return false
		})
		for k := 0; k < 5; k++ { // isolated broken elements near the tip
			broken[rng.IntN(len(broken))] = true
		}
		tip := criteria.Tip{Name: "tip", X: [2]float64{ds[0].x + ds[0].r, ds[0].y}, Dir: [2]float64{1, 0.2}}
		f, err := size.NewTipField([]criteria.Tip{tip}, nil, nil, s.fo)
		if err != nil {
			t.Fatal(err)
		}
		c, err := Domain(s.m0, broken, s.d, []criteria.Tip{tip}, f.At, DefaultOptions())
		if err != nil {
			t.Fatalf("trial %d (discs %v): %v", trial, ds, err)
		}
		m, rep, err := meshing.Mesh(c.Domain, f.At, meshing.Options{})
		if err != nil {
			t.Fatalf("trial %d (discs %v): mesh: %v", trial, ds, err)
		}
		if err := m.Check(); err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if rep.MinAngleDeg < 20 {
			t.Errorf("trial %d (discs %v): minimum angle %.2f°", trial, ds, rep.MinAngleDeg)
		}
		if math.Abs(c.Domain.Area()-c.Area) > 0.05*c.Area {
			t.Errorf("trial %d: carved area %g differs from the kept triangles' %g by more than 5%%", trial, c.Domain.Area(), c.Area)
		}
	}
}

func TestCarveTurningPaths(t *testing.T) {
	// Cracks that leave the symmetry plane: from every tip of a domain a
	// band of broken elements follows a path that turns at a random rate;
	// the tips move to the ends of the paths, turned. Domains: the full SSY
	// disk with a blunt tip (one tip) and the DENT plate (two tips growing
	// towards each other). Every carve must mesh into a valid mesh with
	// the angle bound, and the fine zone must contain each new tip.
	ssy, err := geom.SSY{Radius: 10, TipRadius: 0.05, Full: true}.Domain()
	if err != nil {
		t.Fatal(err)
	}
	dent, err := geom.DENT{Width: 10, Height: 20, NotchDepth: 2, TipRadius: 0.1}.Domain()
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(13, 14))
	n := 6
	if v := os.Getenv("TEARLINE_CARVE_TRIALS"); v != "" {
		n, _ = strconv.Atoi(v)
	}
	for _, dc := range []struct {
		name string
		d    *geom.Domain
		ell  float64
	}{{"ssy", ssy, 0.2}, {"dent", dent, 0.2}} {
		fo := size.DefaultFollowOptions(dc.ell, 1)
		var tips0 []criteria.Tip
		for _, name := range dc.d.Tips() {
			p := dc.d.Points[name]
			tips0 = append(tips0, criteria.Tip{Name: name, X: p.X, Dir: p.Dir})
		}
		f0, err := size.NewTipField(tips0, nil, nil, fo)
		if err != nil {
			t.Fatal(err)
		}
		m0, _, err := meshing.Mesh(dc.d, f0.At, meshing.Options{})
		if err != nil {
			t.Fatal(err)
		}
		for trial := 0; trial < n; trial++ {
			var paths [][][2]float64
			var tips []criteria.Tip
			for _, t0 := range tips0 {
				ang := math.Atan2(t0.Dir[1], t0.Dir[0])
				rate := (rng.Float64()*2 - 1) * 1.2 // turning rate, rad per unit length
				x := t0.X
				path := [][2]float64{x}
				for s := 0.0; s < 1.5; s += 0.02 {
					ang += rate * 0.02
					x = [2]float64{x[0] + 0.02*math.Cos(ang), x[1] + 0.02*math.Sin(ang)}
					path = append(path, x)
				}
				paths = append(paths, path)
				tips = append(tips, criteria.Tip{Name: t0.Name, X: x, Dir: [2]float64{math.Cos(ang), math.Sin(ang)}})
			}
			half := 0.05 + 0.1*rng.Float64()
			broken := breakWhere(m0, func(x, y float64) bool {
				for _, p := range paths {
					for i := 1; i < len(p); i++ {
						if plane.SegDist([2]float64{x, y}, p[i-1], p[i]) < half {
							return true
						}
					}
				}
				return false
			})
			f, err := size.NewTipField(tips, nil, nil, fo)
			if err != nil {
				t.Fatal(err)
			}
			c, err := Domain(m0, broken, dc.d, tips, f.At, DefaultOptions())
			if err != nil {
				t.Fatalf("%s trial %d: %v", dc.name, trial, err)
			}
			m, rep, err := meshing.Mesh(c.Domain, f.At, meshing.Options{})
			if err != nil {
				t.Fatalf("%s trial %d: mesh: %v", dc.name, trial, err)
			}
			if err := m.Check(); err != nil {
				t.Fatalf("%s trial %d: %v", dc.name, trial, err)
			}
			if rep.MinAngleDeg < 20 {
				t.Errorf("%s trial %d: minimum angle %.2f°", dc.name, trial, rep.MinAngleDeg)
			}
			z := f.Zone()
			for _, tp := range tips {
				p, ok := c.Domain.Points[tp.Name]
				if !ok || !p.Tip {
					t.Fatalf("%s trial %d: tip %q lost", dc.name, trial, tp.Name)
				}
				if z.Depth(p.X) < fo.Width*dc.ell-2*half {
					t.Errorf("%s trial %d: tip %q at %v only %g inside the new zone", dc.name, trial, tp.Name, p.X, z.Depth(p.X))
				}
			}
		}
	}
}

func TestCornerDeg(t *testing.T) {
	// Corners of a counter-clockwise square (90° inside) and of its
	// clockwise hole reading (270°), a 45° wedge (elementary geometry).
	for _, c := range []struct {
		u, v [2]float64
		want float64
	}{
		{[2]float64{-1, 0}, [2]float64{0, 1}, 90},
		{[2]float64{0, 1}, [2]float64{-1, 0}, 270},
		{[2]float64{1, 1}, [2]float64{1, 0}, 45},
		{[2]float64{-1, 0}, [2]float64{1, 0}, 180},
	} {
		if got := cornerDeg(c.u, c.v); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("corner of u %v, v %v: %g°, want %g°", c.u, c.v, got, c.want)
		}
	}
}
