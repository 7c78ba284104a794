// Package remesh runs the adaptive cycle of tearline: the size field around
// the crack tips, the geometry left after removing broken material, and the
// glue that meshes a geom.Domain into the shared 6-node fem.Mesh.
//
// Meshing a built-in specimen:
//
//	d, _ := geom.DefaultCT().Domain()
//	h, _ := remesh.NewSizeField(d, remesh.SizeOptions{HFine: 0.05, HFar: 2})
//	m, rep, err := remesh.MeshDomain(d, h.At, remesh.MeshOptions{})
package remesh

import (
	"fmt"
	"math"

	"tearline/remesh/geom"
	"tearline/remesh/tri"
	"tearline/solver/fem"
)

// MeshOptions control MeshDomain.
type MeshOptions struct {
	// MinAngle is the minimum-angle bound in degrees (0 = the
	// triangulator's default, tri.DefaultMinAngle); at most tri.MaxMinAngle.
	MinAngle float64
	// MaxPoints limits the number of vertices the triangulator may insert
	// (0 = tri.DefaultMaxPoints).
	MaxPoints int
}

// Validate checks the options.
func (o MeshOptions) Validate() error {
	if !(o.MinAngle >= 0 && o.MinAngle <= tri.MaxMinAngle) {
		return fmt.Errorf("mesh: minimum angle %g° must lie in [0, %d] (0 = default %d°)", o.MinAngle, tri.MaxMinAngle, tri.DefaultMinAngle)
	}
	if o.MaxPoints < 0 {
		return fmt.Errorf("mesh: max points %d must be ≥ 0 (0 = default %d)", o.MaxPoints, tri.DefaultMaxPoints)
	}
	return nil
}

// MeshDomain meshes the domain to the size function and returns the 6-node
// mesh with its quality report (measured on the corner-node triangles).
//
// The mesh follows the fem.Mesh contract: corner nodes first, counter-
// clockwise vertices, midside nodes of edges 0–1, 1–2, 2–0; midside nodes of
// boundary edges on arcs lie on the arc (so do the corner nodes there);
// every boundary edge carries the label of the piece it lies on, oriented
// with the domain on its left; every named point that is not a reference
// point is a corner node, in Points under its name.
func MeshDomain(d *geom.Domain, size func(x, y float64) float64, opt MeshOptions) (*fem.Mesh, tri.Report, error) {
	if d == nil {
		return nil, tri.Report{}, fmt.Errorf("mesh: no domain")
	}
	if err := opt.Validate(); err != nil {
		return nil, tri.Report{}, err
	}
	g, err := d.Discretise(size)
	if err != nil {
		return nil, tri.Report{}, err
	}
	in := &tri.Input{Points: g.Points, Segments: g.Segments, SegmentMarks: g.SegmentMarks, Holes: g.Holes}
	tm, err := tri.Triangulate(in, &tri.Options{Size: size, MinAngle: opt.MinAngle, MaxPoints: opt.MaxPoints, Split: d.Split})
	if err != nil {
		return nil, tri.Report{}, fmt.Errorf("mesh: %w", err)
	}
	m, err := quadratic(d, g, tm)
	if err != nil {
		return nil, tri.Report{}, err
	}
	return m, tri.Quality(tm, size), nil
}

func edgeKey(a, b int) uint64 {
	if a > b {
		a, b = b, a
	}
	return uint64(a)<<32 | uint64(uint32(b))
}

// quadratic converts the linear triangulation to the 6-node fem.Mesh.
func quadratic(d *geom.Domain, g *geom.PSLG, tm *tri.Mesh) (*fem.Mesh, error) {
	if len(tm.Triangles) == 0 {
		return nil, fmt.Errorf("mesh: the triangulation has no triangles")
	}
	// Corner nodes: the vertices used by triangles, in the triangulator's order.
	renum := make([]int, len(tm.Points))
	for i := range renum {
		renum[i] = -1
	}
	for _, t := range tm.Triangles {
		for _, v := range t {
			renum[v] = 0
		}
	}
	nc := 0
	for i := range renum {
		if renum[i] == 0 {
			renum[i] = nc
			nc++
		}
	}
	// Guard against degenerate output: no edge may be shorter than the
	// geometric tolerance (the input has no feature that small).
	tiny := geom.RelTol * d.Scale()
	for e, t := range tm.Triangles {
		for k := 0; k < 3; k++ {
			a, b := tm.Points[t[k]], tm.Points[t[(k+1)%3]]
			if l := math.Hypot(a[0]-b[0], a[1]-b[1]); l <= tiny {
				return nil, fmt.Errorf("mesh: the triangulation has a degenerate triangle %d with an edge of length %g at (%g, %g), below the geometric tolerance %g; a small input angle near there may be the cause", e, l, a[0], a[1], tiny)
			}
		}
	}
	ne := 3 * len(tm.Triangles) / 2
	m := &fem.Mesh{
		X:          make([][2]float64, nc, nc+ne+len(tm.Segments)),
		NumCorners: nc,
		Tri:        make([][6]int, len(tm.Triangles)),
		Labels:     d.Labels(),
		Points:     map[string]int{},
	}
	for i, p := range tm.Points {
		if renum[i] >= 0 {
			m.X[renum[i]] = p
		}
	}
	labelOf := map[string]int{}
	for i, l := range m.Labels {
		labelOf[l] = i
	}
	mark := make(map[uint64]int, len(tm.Segments))
	for i, s := range tm.Segments {
		mark[edgeKey(s[0], s[1])] = tm.SegmentMarks[i]
	}
	type edgeInfo struct {
		mid, count, tri, a, b int
	}
	edges := make(map[uint64]*edgeInfo, ne+len(tm.Segments))
	order := make([]uint64, 0, ne+len(tm.Segments))
	for e, t := range tm.Triangles {
		var tt [6]int
		for k := 0; k < 3; k++ {
			tt[k] = renum[t[k]]
		}
		for k := 0; k < 3; k++ {
			a, b := t[k], t[(k+1)%3]
			key := edgeKey(a, b)
			info, ok := edges[key]
			if !ok {
				x := [2]float64{0.5 * (tm.Points[a][0] + tm.Points[b][0]), 0.5 * (tm.Points[a][1] + tm.Points[b][1])}
				if mk, on := mark[key]; on {
					if p := d.PieceOfMark(mk); p != nil && p.Kind == geom.Arc {
						x = p.Split(tm.Points[a], tm.Points[b])
					}
				}
				info = &edgeInfo{mid: len(m.X), tri: e, a: a, b: b}
				m.X = append(m.X, x)
				edges[key] = info
				order = append(order, key)
			}
			info.count++
			tt[3+k] = info.mid
		}
		m.Tri[e] = tt
	}
	for _, key := range order {
		info := edges[key]
		if info.count > 2 {
			return nil, fmt.Errorf("mesh: edge (%g, %g)–(%g, %g) belongs to %d triangles", tm.Points[info.a][0], tm.Points[info.a][1], tm.Points[info.b][0], tm.Points[info.b][1], info.count)
		}
		if info.count != 1 {
			continue
		}
		mk, on := mark[key]
		if !on {
			return nil, fmt.Errorf("mesh: boundary edge (%g, %g)–(%g, %g) lies on no boundary piece", tm.Points[info.a][0], tm.Points[info.a][1], tm.Points[info.b][0], tm.Points[info.b][1])
		}
		p := d.PieceOfMark(mk)
		if p == nil {
			return nil, fmt.Errorf("mesh: boundary edge with mark %d of no piece", mk)
		}
		// a→b is the triangle's own counter-clockwise edge: domain on its left.
		m.Boundary = append(m.Boundary, fem.Edge{A: renum[info.a], B: renum[info.b], Mid: info.mid, Label: labelOf[p.Label], Tri: info.tri})
	}
	for name, i := range g.Named {
		if i >= len(renum) || renum[i] < 0 {
			return nil, fmt.Errorf("mesh: named point %q is not a vertex of the mesh", name)
		}
		m.Points[name] = renum[i]
	}
	if err := m.Check(); err != nil {
		return nil, err
	}
	return m, nil
}
