package meshing

import (
	"fmt"
	"math"
	"math/rand"
	"sort"
	"strings"
	"testing"

	"tearline/remesh/geom"
	"tearline/remesh/size"
	"tearline/solver/fem"
)

type meshCase struct {
	name string
	d    func() (*geom.Domain, error)
	opt  size.Options
}

func meshCases() []meshCase {
	ssyF := geom.SSY{Radius: 30, TipRadius: 0.05, Full: true}
	ctB := geom.DefaultCT()
	ctB.TipRadius = 0.1
	ctF := ctB
	ctF.Full = true
	nbF := geom.DefaultNotchedBar()
	nbF.Full = true
	tiny := geom.SSY{Radius: 10, TipRadius: 2e-3}
	collinear := func() (*geom.Domain, error) {
		// A rectangle whose lower edge is a run of 7 collinear pieces
		// (unequal lengths, two labels) and with a tip on it.
		var l geom.Loop
		xs := []float64{0, 0.3, 0.35, 1, 1.01, 2, 2.9, 3}
		for i := 0; i+1 < len(xs); i++ {
			lab := "base"
			if i%2 == 1 {
				lab = "base2"
			}
			l = append(l, geom.Piece{Kind: geom.Line, A: [2]float64{xs[i], 0}, B: [2]float64{xs[i+1], 0}, Label: lab})
		}
		l = append(l,
			geom.Piece{Kind: geom.Line, A: [2]float64{3, 0}, B: [2]float64{3, 1}, Label: "side"},
			geom.Piece{Kind: geom.Line, A: [2]float64{3, 1}, B: [2]float64{0, 1}, Label: "top"},
			geom.Piece{Kind: geom.Line, A: [2]float64{0, 1}, B: [2]float64{0, 0}, Label: "side"})
		d := &geom.Domain{Outer: l, Points: map[string]geom.Point{"tip": {X: [2]float64{1.5, 0}, Tip: true, Dir: [2]float64{0, 1}}}}
		return d, d.Validate()
	}
	poly := func() (*geom.Domain, error) {
		// an L-shaped plate with a rounded re-entrant corner and a hole
		p := geom.Polygon{Loops: []geom.LoopSpec{
			{Start: [2]float64{0, 0}, Pieces: []geom.PieceSpec{
				{To: [2]float64{20, 0}, Label: "bottom"},
				{To: [2]float64{20, 8}, Label: "free"},
				{To: [2]float64{10, 8}, Label: "free"},
				{To: [2]float64{8, 10}, Arc: true, Centre: [2]float64{10, 10}, CW: true, Label: "fillet"},
				{To: [2]float64{8, 20}, Label: "free"},
				{To: [2]float64{0, 20}, Label: "top"},
				{To: [2]float64{0, 0}, Label: "free"},
			}},
			{Start: [2]float64{4, 4}, Pieces: []geom.PieceSpec{
				{To: [2]float64{4, 6}, Arc: true, Centre: [2]float64{4, 5}, Label: "hole"},
				{To: [2]float64{4, 4}, Arc: true, Centre: [2]float64{4, 5}, Label: "hole"},
			}},
		}, Points: map[string]geom.Point{"tip": {X: [2]float64{10 - math.Sqrt2, 10 - math.Sqrt2}, Tip: true, Dir: [2]float64{-1, -1}}}}
		d, _, err := p.Domain()
		return d, err
	}
	return []meshCase{
		{"ssy half", geom.DefaultSSY().Domain, size.Options{HFine: 0.01, HFar: 5, FineRadius: 0.2}},
		{"ssy full", ssyF.Domain, size.Options{HFine: 0.02, HFar: 4, FineRadius: 0.3, Ahead: 0.3}},
		{"ssy tiny tip radius", tiny.Domain, size.Options{HFine: 0.1, HFar: 2}},
		{"ct half sharp", geom.DefaultCT().Domain, size.Options{HFine: 0.1, HFar: 4}},
		{"ct half blunt", ctB.Domain, size.Options{HFine: 0.05, HFar: 4}},
		{"ct full", ctF.Domain, size.Options{HFine: 0.05, HFar: 4}},
		{"notched bar half", geom.DefaultNotchedBar().Domain, size.Options{HFine: 0.05, HFar: 1, FineRadius: 1}},
		{"notched bar full", nbF.Domain, size.Options{HFine: 0.1, HFar: 1}},
		{"dent", geom.DefaultDENT().Domain, size.Options{HFine: 0.05, HFar: 4, Ahead: 1}},
		{"collinear run", collinear, size.Options{HFine: 0.02, HFar: 0.3}},
		{"polygon", poly, size.Options{HFine: 0.1, HFar: 2}},
	}
}

// checkMesh verifies a mesh against its domain and size function; it
// returns the first violation. The checks are V15 of DESIGN.md (Ruppert
// 1995; Shewchuk 2002): angles, size conformity, boundary conformity and
// labels, exact area up to the arcs' circular segments, midside nodes on
// arcs, named points as nodes, no duplicate triangles.
func checkMesh(d *geom.Domain, size func(x, y float64) float64, m *fem.Mesh, minAngle float64) error {
	if err := m.Check(); err != nil {
		return err
	}
	scale := d.Scale()
	tol := 1e-9 * scale
	// no duplicate triangles, every corner used
	seen := map[[3]int]bool{}
	used := make([]bool, m.NumCorners)
	var area, worstAngle, worstRatio float64 = 0, 180, 0
	for e, t := range m.Tri {
		k := [3]int{t[0], t[1], t[2]}
		sort.Ints(k[:])
		if seen[k] {
			return fmt.Errorf("triangle %d duplicates another", e)
		}
		seen[k] = true
		var p [3][2]float64
		for j := 0; j < 3; j++ {
			p[j] = m.X[t[j]]
			used[t[j]] = true
		}
		area += 0.5 * ((p[1][0]-p[0][0])*(p[2][1]-p[0][1]) - (p[2][0]-p[0][0])*(p[1][1]-p[0][1]))
		var l [3]float64
		for j := 0; j < 3; j++ {
			a, b := p[(j+1)%3], p[(j+2)%3]
			l[j] = math.Hypot(a[0]-b[0], a[1]-b[1])
		}
		for j := 0; j < 3; j++ {
			// law of cosines for the angle opposite edge j
			a, b, c := l[j], l[(j+1)%3], l[(j+2)%3]
			ang := math.Acos(math.Max(-1, math.Min(1, (b*b+c*c-a*a)/(2*b*c)))) * 180 / math.Pi
			worstAngle = math.Min(worstAngle, ang)
		}
		cx, cy := (p[0][0]+p[1][0]+p[2][0])/3, (p[0][1]+p[1][1]+p[2][1])/3
		worstRatio = math.Max(worstRatio, math.Max(l[0], math.Max(l[1], l[2]))/size(cx, cy))
		// interior midside nodes at the chord midpoints
		for j := 0; j < 3; j++ {
			a, b, mid := m.X[t[j]], m.X[t[(j+1)%3]], m.X[t[3+j]]
			if math.Hypot(mid[0]-(a[0]+b[0])/2, mid[1]-(a[1]+b[1])/2) > 0.2*math.Hypot(a[0]-b[0], a[1]-b[1]) {
				return fmt.Errorf("triangle %d: midside node %d far from its edge", e, j)
			}
		}
	}
	for i, u := range used {
		if !u {
			return fmt.Errorf("corner node %d belongs to no triangle", i)
		}
	}
	if worstAngle < minAngle {
		return fmt.Errorf("minimum angle %.2f° below %g°", worstAngle, minAngle)
	}
	if worstRatio > 1.5 {
		return fmt.Errorf("size ratio %.3f above 1.5", worstRatio)
	}
	// Boundary: each edge lies on a piece with its label, arc nodes on the
	// arc, and the edges cover every piece exactly.
	var pieces []*geom.Piece
	for _, l := range d.Loops() {
		for i := range l {
			pieces = append(pieces, &l[i])
		}
	}
	covered := make([]float64, len(pieces))
	var segArea float64
	labelCount := map[string]int{}
	for i, ed := range m.Boundary {
		a, b, mid := m.X[ed.A], m.X[ed.B], m.X[ed.Mid]
		lab := m.Labels[ed.Label]
		labelCount[lab]++
		t := m.Tri[ed.Tri]
		inTri := false
		for j := 0; j < 3; j++ {
			if t[j] == ed.A && t[(j+1)%3] == ed.B && t[3+j] == ed.Mid {
				inTri = true
			}
		}
		if !inTri {
			return fmt.Errorf("boundary edge %d is not edge A→B of its triangle %d (domain on the left)", i, ed.Tri)
		}
		found := -1
		for k, p := range pieces {
			if p.Label == lab && p.Distance(a) <= tol && p.Distance(b) <= tol && p.Distance(mid) <= tol {
				found = k
				break
			}
		}
		if found < 0 {
			return fmt.Errorf("boundary edge %d (%q) from (%g, %g) to (%g, %g) lies on no piece with its label", i, lab, a[0], a[1], b[0], b[1])
		}
		p := pieces[found]
		ch := math.Hypot(a[0]-b[0], a[1]-b[1])
		if p.Kind == geom.Arc {
			for _, x := range [][2]float64{a, b, mid} {
				if r := math.Hypot(x[0]-p.Centre[0], x[1]-p.Centre[1]); math.Abs(r-p.Radius) > 1e-12*p.Radius {
					return fmt.Errorf("boundary edge %d (%q): node at radius %.17g of arc radius %.17g", i, lab, r, p.Radius)
				}
			}
			th := 2 * math.Asin(math.Min(1, ch/(2*p.Radius)))
			covered[found] += th * p.Radius
			s := 0.5 * p.Radius * p.Radius * (th - math.Sin(th))
			if p.CW {
				s = -s
			}
			segArea += s
		} else {
			covered[found] += ch
		}
	}
	for k, p := range pieces {
		if math.Abs(covered[k]-p.Length()) > 1e-9*p.Length() {
			return fmt.Errorf("piece %d (%q) covered %.12g of its length %.12g", k, p.Label, covered[k], p.Length())
		}
	}
	for _, l := range d.Labels() {
		if labelCount[l] == 0 {
			return fmt.Errorf("label %q on no boundary edge", l)
		}
	}
	// Area: the straight-sided mesh plus the circular segments between the
	// boundary chords and the arcs is the domain's exact area (elementary
	// geometry); the difference to the mesh area alone is bounded by the
	// chordal error, the segments' total.
	if want := d.Area(); math.Abs(area+segArea-want) > 1e-10*want {
		return fmt.Errorf("mesh area %.15g + arc segments %.3g ≠ domain area %.15g", area, segArea, want)
	}
	for name, p := range d.Points {
		n, ok := m.Points[name]
		if p.Ref {
			continue
		}
		if !ok || m.X[n] != p.X {
			return fmt.Errorf("named point %q is not a node at its place", name)
		}
	}
	return nil
}

func TestMeshSpecimens(t *testing.T) {
	for _, c := range meshCases() {
		d, err := c.d()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		h, err := size.NewField(d, c.opt)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		m, rep, err := Mesh(d, h.At, Options{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		// 20° away from small input angles (V15; Ruppert 1995 guarantees
		// about 20.7°, Shewchuk 2002); these specimens have none below 90°.
		if err := checkMesh(d, h.At, m, 20); err != nil {
			t.Errorf("%s: %v", c.name, err)
		}
		if rep.Triangles != len(m.Tri) || rep.Nodes != m.NumCorners {
			t.Errorf("%s: report %+v for %d triangles, %d corners", c.name, rep, len(m.Tri), m.NumCorners)
		}
		t.Logf("%s: %d triangles, %d nodes (%d corners), min angle %.1f°, max %.1f°, size ratio max %.2f, above 1.2: %.3f",
			c.name, len(m.Tri), len(m.X), m.NumCorners, rep.MinAngleDeg, rep.MaxAngleDeg, rep.SizeRatioMax, rep.FractionAbove1p2)
	}
}

func TestSizeField(t *testing.T) {
	d, err := geom.DefaultSSY().Domain()
	if err != nil {
		t.Fatal(err)
	}
	s, err := size.NewField(d, size.Options{HFine: 0.1, HFar: 2, FineRadius: 1, Grading: 0.5, Ahead: 1})
	if err != nil {
		t.Fatal(err)
	}
	// Closed form of the definition: h = h_fine + g (dist − R), capped.
	cases := []struct{ x, y, want float64 }{
		{0, 0, 0.1}, {1.5, 0.8, 0.1}, {0, 2, 0.1 + 0.5*1}, {-3, 0, 0.1 + 0.5*2}, {40, 0, 2},
	}
	for _, c := range cases {
		if got := s.At(c.x, c.y); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("h(%g, %g) = %g, want %g", c.x, c.y, got, c.want)
		}
	}
	// Bounded grading: |h(p) − h(q)| ≤ g |p − q| on random pairs.
	rng := rand.New(rand.NewSource(1))
	for i := 0; i < 1000; i++ {
		px, py, qx, qy := 20*rng.NormFloat64(), 20*rng.NormFloat64(), 20*rng.NormFloat64(), 20*rng.NormFloat64()
		if math.Abs(s.At(px, py)-s.At(qx, qy)) > 0.5*math.Hypot(px-qx, py-qy)+1e-12 {
			t.Fatalf("grading exceeded between (%g, %g) and (%g, %g)", px, py, qx, qy)
		}
	}
	bad := []size.Options{{HFine: 0}, {HFine: 1, HFar: 0.5}, {HFine: 1, Grading: 2}, {HFine: 1, Ahead: -1}, {HFine: math.NaN()}}
	for _, o := range bad {
		if _, err := size.NewField(d, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
}

func TestMeshDegenerate(t *testing.T) {
	sq := func(eps float64) *geom.Domain {
		l := geom.Loop{
			{Kind: geom.Line, A: [2]float64{0, 0}, B: [2]float64{1, 0}, Label: "e"},
			{Kind: geom.Line, A: [2]float64{1, 0}, B: [2]float64{1 + eps, eps}, Label: "e"},
			{Kind: geom.Line, A: [2]float64{1 + eps, eps}, B: [2]float64{1, 1}, Label: "e"},
			{Kind: geom.Line, A: [2]float64{1, 1}, B: [2]float64{0, 1}, Label: "e"},
			{Kind: geom.Line, A: [2]float64{0, 1}, B: [2]float64{0, 0}, Label: "e"},
		}
		return &geom.Domain{Outer: l}
	}
	h := func(x, y float64) float64 { return 0.1 }
	// Nearly coincident vertices: a clear error, no mesh (common practice).
	if _, _, err := Mesh(sq(1e-7), h, Options{}); err == nil || !strings.Contains(err.Error(), "smaller than") {
		t.Errorf("nearly coincident vertices: error %v", err)
	}
	if _, _, err := Mesh(sq(1e-13), h, Options{}); err == nil || !strings.Contains(err.Error(), "zero length") {
		t.Errorf("coincident vertices: error %v", err)
	}
	if _, _, err := Mesh(nil, h, Options{}); err == nil {
		t.Errorf("nil domain accepted")
	}
	if _, _, err := Mesh(sq(0.01), h, Options{MinAngle: 50}); err == nil || !strings.Contains(err.Error(), "minimum angle") {
		t.Errorf("min angle 50: error %v", err)
	}
	// A mesh that would need too many points stops with an error.
	d, _ := geom.DefaultSSY().Domain()
	if _, _, err := Mesh(d, func(x, y float64) float64 { return 0.05 }, Options{MaxPoints: 1000}); err == nil {
		t.Errorf("point limit not enforced")
	}
}

// randomPolygon returns a star-shaped polygon about the origin (valid) or,
// when scramble is set, the same vertices in a random order (usually
// self-intersecting), with some edges replaced by arcs. The bits of extra
// add: 1 a round hole at the origin, 2 collinear vertices on some edges,
// 4 a vertex 1e-7 from its neighbour (nearly coincident).
func randomPolygon(rng *rand.Rand, n int, scramble, arcs bool, extra uint8) *geom.Domain {
	pts := make([][2]float64, n)
	for i := range pts {
		a := 2 * math.Pi * (float64(i) + 0.8*rng.Float64()) / float64(n)
		r := 0.3 + rng.Float64()
		pts[i] = [2]float64{r * math.Cos(a), r * math.Sin(a)}
	}
	if scramble {
		rng.Shuffle(n, func(i, j int) { pts[i], pts[j] = pts[j], pts[i] })
	}
	if extra&4 != 0 {
		k := rng.Intn(n)
		q := pts[k]
		pts = append(pts[:k+1], append([][2]float64{{q[0] * (1 + 1e-7), q[1] * (1 + 1e-7)}}, pts[k+1:]...)...)
		n++
	}
	var l geom.Loop
	for i := range pts {
		a, b := pts[i], pts[(i+1)%n]
		lab := fmt.Sprintf("e%d", i%3)
		if extra&2 != 0 && rng.Intn(2) == 0 {
			// a run of collinear pieces
			m := [2]float64{a[0] + 0.37*(b[0]-a[0]), a[1] + 0.37*(b[1]-a[1])}
			l = append(l, geom.Piece{Kind: geom.Line, A: a, B: m, Label: lab})
			a = m
		}
		p := geom.Piece{Kind: geom.Line, A: a, B: b, Label: lab}
		if arcs && rng.Intn(3) == 0 {
			// a shallow arc bulging outwards: centre on the inner side
			m := [2]float64{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2}
			dx, dy := b[0]-a[0], b[1]-a[1]
			L := math.Hypot(dx, dy)
			k := 1 + 2*rng.Float64()
			c := [2]float64{m[0] - k*L*dy/L, m[1] + k*L*dx/L}
			p = geom.Piece{Kind: geom.Arc, A: a, B: b, Centre: c, Radius: math.Hypot(a[0]-c[0], a[1]-c[1]), Label: "arc"}
		}
		l = append(l, p)
	}
	d := &geom.Domain{Outer: l}
	if extra&1 != 0 {
		r := 0.05 + 0.1*rng.Float64()
		d.Holes = []geom.Loop{{
			{Kind: geom.Arc, A: [2]float64{0, r}, B: [2]float64{0, -r}, Radius: r, CW: true, Label: "hole"},
			{Kind: geom.Arc, A: [2]float64{0, -r}, B: [2]float64{0, r}, Radius: r, CW: true, Label: "hole"},
		}}
	}
	return d
}

// FuzzDomain meshes random polygons: each ends in a valid mesh or a clear
// error, never a panic or an endless loop (MaxPoints bounds the work).
func FuzzDomain(f *testing.F) {
	for s := int64(0); s < 16; s++ {
		f.Add(s, uint8(3+s), s%3 == 0, s%2 == 0, uint8(s), uint8(s%8))
	}
	f.Fuzz(func(t *testing.T, seed int64, n uint8, scramble, arcs bool, hk uint8, extra uint8) {
		rng := rand.New(rand.NewSource(seed))
		d := randomPolygon(rng, 3+int(n%20), scramble, arcs, extra)
		hv := 0.02 + 0.3*float64(hk)/255
		size := func(x, y float64) float64 { return hv * (1 + math.Abs(x)) }
		d.Orient()
		m, _, err := Mesh(d, size, Options{MaxPoints: 200_000})
		if err != nil {
			if !strings.Contains(err.Error(), "geometry:") && !strings.Contains(err.Error(), "mesh:") {
				t.Fatalf("error without context: %v", err)
			}
			return
		}
		// Random polygons may have small input angles: check everything
		// except the angle bound.
		if err := checkMesh(d, size, m, 0); err != nil {
			t.Fatalf("invalid mesh: %v", err)
		}
	})
}

// BenchmarkMeshDomain meshes a full boundary-layer disk graded from
// h_fine at the tip to h_far = 2, the whole path: discretisation,
// triangulation and refinement, 6-node mesh. h_fine = 0.003 gives about
// 3.7·10⁵ triangles; the coarser runs show that memory grows linearly.
func BenchmarkMeshDomain(b *testing.B) {
	d, err := geom.SSY{Radius: 20, TipRadius: 0.01, Full: true}.Domain()
	if err != nil {
		b.Fatal(err)
	}
	for _, hf := range []float64{0.012, 0.006, 0.003} {
		b.Run(fmt.Sprintf("h_fine=%g", hf), func(b *testing.B) {
			s, err := size.NewField(d, size.Options{HFine: hf, HFar: 2, FineRadius: 0.45, Grading: 0.25})
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			var tris int
			for i := 0; i < b.N; i++ {
				m, _, err := Mesh(d, s.At, Options{})
				if err != nil {
					b.Fatal(err)
				}
				tris = len(m.Tri)
			}
			b.ReportMetric(float64(tris), "triangles")
			b.ReportMetric(float64(tris)*float64(b.N)/b.Elapsed().Seconds(), "triangles/s")
		})
	}
}

// TestMeshDeterministic: the same domain and size field give the same mesh
// bit for bit (a resumed run must remesh exactly as an uninterrupted one).
func TestMeshDeterministic(t *testing.T) {
	d, err := geom.DefaultCT().Domain()
	if err != nil {
		t.Fatal(err)
	}
	h, err := size.NewField(d, size.Options{HFine: 0.1, HFar: 4})
	if err != nil {
		t.Fatal(err)
	}
	a, _, err := Mesh(d, h.At, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 3; i++ {
		b, _, err := Mesh(d, h.At, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if fmt.Sprint(a.X, a.Tri, a.Boundary, a.Points) != fmt.Sprint(b.X, b.Tri, b.Boundary, b.Points) {
			t.Fatal("two meshes of the same input differ")
		}
	}
}
