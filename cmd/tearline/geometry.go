package main

import (
	"fmt"
	"math"

	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/remesh/tri"
)

// geometrySection is [geometry]: the specimen or a general domain. kind
// selects one of the sub-tables; only that one may be given. Lengths are in
// the case's length unit.
type geometrySection struct {
	// Kind is "ssy" (boundary-layer disk), "ct" (compact tension),
	// "notched_bar" (axisymmetric round bar), "dent" (double-edge-notched
	// plate) or "polygon" (general domain given in [geometry.polygon]).
	Kind    string       `toml:"kind"`
	SSY     *ssyKeys     `toml:"ssy,omitempty"`
	CT      *ctKeys      `toml:"ct,omitempty"`
	Bar     *barKeys     `toml:"notched_bar,omitempty"`
	DENT    *dentKeys    `toml:"dent,omitempty"`
	Polygon *polygonKeys `toml:"polygon,omitempty"`

	notes []string // orientation changes made to a polygon
}

type ssyKeys struct {
	Radius    *float64 `toml:"radius"`     // outer radius R
	TipRadius *float64 `toml:"tip_radius"` // blunt-tip radius ρ₀ (0 = sharp, half only)
	Full      *bool    `toml:"full"`       // full disk instead of the upper half
}

type ctKeys struct {
	Width      *float64 `toml:"width"`             // W, load line to back face
	CrackRatio *float64 `toml:"crack_ratio"`       // a₀/W
	NotchRatio *float64 `toml:"notch_ratio"`       // machined notch length / W
	NotchWidth *float64 `toml:"notch_width_ratio"` // machined notch width / W
	TipRadius  *float64 `toml:"tip_radius"`        // ρ₀ (0 = sharp, half only)
	Thickness  *float64 `toml:"thickness"`         // B
	Full       *bool    `toml:"full"`              // both halves
}

type barKeys struct {
	MinRadius   *float64 `toml:"min_radius"`   // radius at the notch root
	OuterRadius *float64 `toml:"outer_radius"` // radius of the bar
	NotchRadius *float64 `toml:"notch_radius"` // radius of the notch
	Length      *float64 `toml:"length"`       // modelled length of the bar
	Full        *bool    `toml:"full"`         // both halves (cup-cone)
}

type dentKeys struct {
	Width      *float64 `toml:"width"`
	Height     *float64 `toml:"height"`
	NotchDepth *float64 `toml:"notch_depth"`
	TipRadius  *float64 `toml:"tip_radius"`
}

// polygonKeys is [geometry.polygon]: loops of pieces and named points.
type polygonKeys struct {
	Axisymmetric bool        `toml:"axisymmetric"` // (r, z) coordinates, axis r = 0
	Loops        []loopKeys  `toml:"loop"`         // [[geometry.polygon.loop]]: first outer, then holes
	Points       []pointKeys `toml:"point"`        // [[geometry.polygon.point]]
}

type loopKeys struct {
	Start  []float64   `toml:"start"`  // [x, y]
	Pieces []pieceKeys `toml:"pieces"` // [{to = [x, y], label = "…"}, …]
}

type pieceKeys struct {
	To     []float64 `toml:"to"`               // end point [x, y]
	Label  string    `toml:"label"`            // boundary label
	Centre []float64 `toml:"centre,omitempty"` // arc centre: an arc when given
	Turn   string    `toml:"turn,omitempty"`   // arc direction "ccw" (default) or "cw"
}

type pointKeys struct {
	Name      string    `toml:"name"`
	At        []float64 `toml:"at"`                  // [x, y]
	Tip       bool      `toml:"tip"`                 // a crack tip (fine zone)
	Direction []float64 `toml:"direction,omitempty"` // growth direction of a tip
	Reference bool      `toml:"reference"`           // not a mesh node (e.g. a pin centre)
}

var geometryKinds = []string{"ssy", "ct", "notched_bar", "dent", "polygon"}

// fill sets *p to def when nil and returns the value.
func fill(p **float64, def float64) float64 {
	if *p == nil {
		v := def
		*p = &v
	}
	return **p
}

func fillBool(p **bool, def bool) bool {
	if *p == nil {
		v := def
		*p = &v
	}
	return **p
}

// specimen builds the specimen, filling the defaults of the chosen kind into
// the section. Errors name the file, line and key.
func (g *geometrySection) specimen(src *caseSource) (*specimen.Specimen, error) {
	if g.Kind == "" {
		return nil, badInput("%s: missing; set geometry.kind to one of ssy, ct, notched_bar, dent, polygon", src.where("geometry.kind"))
	}
	if err := choice(g.Kind, geometryKinds, src, "geometry.kind"); err != nil {
		return nil, err
	}
	given := map[string]bool{"ssy": g.SSY != nil, "ct": g.CT != nil, "notched_bar": g.Bar != nil, "dent": g.DENT != nil, "polygon": g.Polygon != nil}
	for _, k := range geometryKinds {
		if given[k] && k != g.Kind {
			return nil, badInput("%s: a [geometry.%s] table is given but geometry.kind is %q; give only the table of the chosen kind", src.where("geometry."+k), k, g.Kind)
		}
	}
	var s *specimen.Specimen
	var err error
	var key string // the sub-table for error messages
	switch g.Kind {
	case "ssy":
		if g.SSY == nil {
			g.SSY = &ssyKeys{}
		}
		k, def := g.SSY, geom.DefaultSSY()
		p := geom.SSY{Radius: fill(&k.Radius, def.Radius), TipRadius: fill(&k.TipRadius, def.TipRadius), Full: fillBool(&k.Full, def.Full)}
		key = "geometry.ssy"
		if e := checkKeys(src, key, []keyVal{{"radius", p.Radius, 1}, {"tip_radius", p.TipRadius, 0}}); e != nil {
			return nil, e
		}
		if e := p.Validate(); e != nil {
			return nil, badInput("%s: %v", src.where(key), e)
		}
		s, err = specimen.NewSSY(p)
	case "ct":
		if g.CT == nil {
			g.CT = &ctKeys{}
		}
		k, def := g.CT, geom.DefaultCT()
		w := fill(&k.Width, def.W)
		p := geom.CT{W: w, AOverW: fill(&k.CrackRatio, def.AOverW), NotchOverW: fill(&k.NotchRatio, def.NotchOverW),
			NotchWidthOverW: fill(&k.NotchWidth, def.NotchWidthOverW), TipRadius: fill(&k.TipRadius, def.TipRadius),
			Full: fillBool(&k.Full, def.Full)}
		p.BOverW = fill(&k.Thickness, def.BOverW*w) / w
		key = "geometry.ct"
		if e := checkKeys(src, key, []keyVal{{"width", p.W, 1}, {"crack_ratio", p.AOverW, 2}, {"notch_ratio", p.NotchOverW, 2},
			{"notch_width_ratio", p.NotchWidthOverW, 2}, {"tip_radius", p.TipRadius, 0}, {"thickness", *k.Thickness, 1}}); e != nil {
			return nil, e
		}
		if e := p.Validate(); e != nil {
			return nil, badInput("%s: %v", src.where(key), e)
		}
		s, err = specimen.NewCT(p)
	case "notched_bar":
		if g.Bar == nil {
			g.Bar = &barKeys{}
		}
		k, def := g.Bar, geom.DefaultNotchedBar()
		p := geom.NotchedBar{MinRadius: fill(&k.MinRadius, def.MinRadius), OuterRadius: fill(&k.OuterRadius, def.OuterRadius),
			NotchRadius: fill(&k.NotchRadius, def.NotchRadius), Length: fill(&k.Length, def.Length), Full: fillBool(&k.Full, def.Full)}
		key = "geometry.notched_bar"
		if e := checkKeys(src, key, []keyVal{{"min_radius", p.MinRadius, 1}, {"outer_radius", p.OuterRadius, 1},
			{"notch_radius", p.NotchRadius, 1}, {"length", p.Length, 1}}); e != nil {
			return nil, e
		}
		if e := p.Validate(); e != nil {
			return nil, badInput("%s: %v", src.where(key), e)
		}
		s, err = specimen.NewNotchedBar(p)
	case "dent":
		if g.DENT == nil {
			g.DENT = &dentKeys{}
		}
		k, def := g.DENT, geom.DefaultDENT()
		p := geom.DENT{Width: fill(&k.Width, def.Width), Height: fill(&k.Height, def.Height),
			NotchDepth: fill(&k.NotchDepth, def.NotchDepth), TipRadius: fill(&k.TipRadius, def.TipRadius)}
		key = "geometry.dent"
		if e := checkKeys(src, key, []keyVal{{"width", p.Width, 1}, {"height", p.Height, 1},
			{"notch_depth", p.NotchDepth, 1}, {"tip_radius", p.TipRadius, 1}}); e != nil {
			return nil, e
		}
		if e := p.Validate(); e != nil {
			return nil, badInput("%s: %v", src.where(key), e)
		}
		s, err = specimen.NewDENT(p)
	case "polygon":
		key = "geometry.polygon"
		if g.Polygon == nil {
			return nil, badInput("%s: geometry.kind is polygon but no [[geometry.polygon.loop]] is given", src.where("geometry.kind"))
		}
		var p geom.Polygon
		p, err = g.Polygon.polygon(src)
		if err != nil {
			return nil, err
		}
		s, g.notes, err = specimen.NewPolygon(p)
	}
	if err != nil {
		return nil, badInput("%s: %v", src.where(key), err)
	}
	return s, nil
}

// keyVal is a numeric key of a specimen table and its allowed range:
// 0 = zero or positive, 1 = positive, 2 = a ratio in (0, 1).
type keyVal struct {
	key  string
	v    float64
	kind int
}

// checkKeys checks each key on its own, so that the error points at it.
func checkKeys(src *caseSource, table string, kv []keyVal) error {
	for _, k := range kv {
		key := table + "." + k.key
		var err error
		switch k.kind {
		case 0:
			err = nonNegative(k.v, src, key)
		case 1:
			err = positive(k.v, src, key)
		default:
			if !(k.v > 0 && k.v < 1) {
				err = badInput("%s: %g must be a ratio between 0 and 1", src.where(key), k.v)
			}
		}
		if err != nil {
			return err
		}
	}
	return nil
}

func pair(v []float64, what string, src *caseSource, key string) ([2]float64, error) {
	if len(v) != 2 {
		return [2]float64{}, badInput("%s: %s has %d numbers; give [x, y]", src.where(key), what, len(v))
	}
	return [2]float64{v[0], v[1]}, nil
}

// polygon converts the keys to the geom data form.
func (pk *polygonKeys) polygon(src *caseSource) (geom.Polygon, error) {
	p := geom.Polygon{Axisymmetric: pk.Axisymmetric, Points: map[string]geom.Point{}}
	lk := "geometry.polygon.loop"
	if len(pk.Loops) == 0 {
		return p, badInput("%s: no [[geometry.polygon.loop]] given; the first loop is the outer boundary, further loops are holes", src.where("geometry.polygon"))
	}
	for k, l := range pk.Loops {
		start, err := pair(l.Start, fmt.Sprintf("loop %d start", k), src, lk)
		if err != nil {
			return p, err
		}
		ls := geom.LoopSpec{Start: start}
		for i, pc := range l.Pieces {
			what := fmt.Sprintf("loop %d piece %d", k, i)
			to, err := pair(pc.To, what+" to", src, lk)
			if err != nil {
				return p, err
			}
			ps := geom.PieceSpec{To: to, Label: pc.Label}
			if pc.Label == "" {
				return p, badInput("%s: %s has no label; every piece needs a label (e.g. \"free\", \"crack\")", src.where(lk), what)
			}
			if pc.Centre != nil {
				c, err := pair(pc.Centre, what+" centre", src, lk)
				if err != nil {
					return p, err
				}
				ps.Arc, ps.Centre = true, c
				switch pc.Turn {
				case "", "ccw":
				case "cw":
					ps.CW = true
				default:
					return p, badInput("%s: %s turn %q is not allowed; use \"ccw\" or \"cw\"", src.where(lk), what, pc.Turn)
				}
			} else if pc.Turn != "" {
				return p, badInput("%s: %s has a turn but no centre; an arc needs centre = [x, y]", src.where(lk), what)
			}
			ls.Pieces = append(ls.Pieces, ps)
		}
		p.Loops = append(p.Loops, ls)
	}
	pkey := "geometry.polygon.point"
	for i, pt := range pk.Points {
		if pt.Name == "" {
			return p, badInput("%s: point %d has no name", src.where(pkey), i)
		}
		if _, dup := p.Points[pt.Name]; dup {
			return p, badInput("%s: point %q given twice", src.where(pkey), pt.Name)
		}
		at, err := pair(pt.At, fmt.Sprintf("point %q at", pt.Name), src, pkey)
		if err != nil {
			return p, err
		}
		gp := geom.Point{X: at, Tip: pt.Tip, Ref: pt.Reference}
		if pt.Tip {
			dir, err := pair(pt.Direction, fmt.Sprintf("point %q direction", pt.Name), src, pkey)
			if err != nil {
				return p, err
			}
			gp.Dir = dir
		}
		p.Points[pt.Name] = gp
	}
	return p, nil
}

// meshSection is [mesh]: the size field and the mesher's settings.
type meshSection struct {
	HFine      float64 `toml:"h_fine"`      // size in the fine zone at each crack tip (default ℓ/size.DefaultKappa)
	HFar       float64 `toml:"h_far"`       // largest size (default size.DefaultFarFactor·h_fine, at most domain size/farScaleFraction)
	FineRadius float64 `toml:"fine_radius"` // radius of the fine zone (default size.DefaultFineRadiusFactor·h_fine)
	Ahead      float64 `toml:"ahead"`       // extra length of the fine zone ahead of each tip (default 0)
	Grading    float64 `toml:"grading"`     // growth of h per unit distance, (0, 1] (default size.DefaultGrading)
	MinAngle   float64 `toml:"min_angle"`   // minimum-angle bound in degrees (default tri.DefaultMinAngle)
	MaxPoints  int     `toml:"max_points"`  // limit on inserted vertices (default tri.DefaultMaxPoints)
	// MaxTriangles: the largest first mesh, estimated from the size field
	// before meshing (default defaultMaxTriangles).
	MaxTriangles int `toml:"max_triangles"`
}

// sizeField fills the defaults of the section and returns the size field.
// length is material.length (ℓ), which sets the default h_fine =
// ℓ/size.DefaultKappa, the size the tip-following field keeps.
func (m *meshSection) sizeField(d *geom.Domain, src *caseSource, length float64) (*size.Field, error) {
	if m.HFine == 0 {
		if !(length > 0) {
			return nil, badInput("%s: missing; it defaults to material.length/%d, but material.length is %g (a local model): give mesh.h_fine", src.where("mesh.h_fine"), size.DefaultKappa, length)
		}
		m.HFine = length / size.DefaultKappa
	}
	if err := positive(m.HFine, src, "mesh.h_fine"); err != nil {
		return nil, err
	}
	if m.HFar == 0 {
		m.HFar = size.DefaultFarFactor * m.HFine
		if d != nil {
			m.HFar = math.Max(m.HFine, math.Min(m.HFar, d.Scale()/farScaleFraction))
		}
	}
	if err := positive(m.HFar, src, "mesh.h_far"); err != nil {
		return nil, err
	}
	if m.HFar < m.HFine {
		return nil, badInput("%s: %g must be ≥ mesh.h_fine = %g", src.where("mesh.h_far"), m.HFar, m.HFine)
	}
	if m.FineRadius == 0 {
		m.FineRadius = size.DefaultFineRadiusFactor * m.HFine
	}
	if err := positive(m.FineRadius, src, "mesh.fine_radius"); err != nil {
		return nil, err
	}
	if err := nonNegative(m.Ahead, src, "mesh.ahead"); err != nil {
		return nil, err
	}
	if m.Grading == 0 {
		m.Grading = size.DefaultGrading
	}
	if !(m.Grading > 0 && m.Grading <= 1) {
		return nil, badInput("%s: %g must lie in (0, 1] (growth of the element size per unit distance)", src.where("mesh.grading"), m.Grading)
	}
	if m.MinAngle == 0 {
		m.MinAngle = tri.DefaultMinAngle
	}
	if !(m.MinAngle >= lowestMinAngle && m.MinAngle <= tri.MaxMinAngle) {
		return nil, badInput("%s: %g° must lie in [%d, %d] degrees", src.where("mesh.min_angle"), m.MinAngle, lowestMinAngle, tri.MaxMinAngle)
	}
	if m.MaxPoints == 0 {
		m.MaxPoints = tri.DefaultMaxPoints
	}
	if m.MaxPoints < 0 {
		return nil, badInput("%s: %d must be positive", src.where("mesh.max_points"), m.MaxPoints)
	}
	if !src.given("mesh.max_triangles") {
		m.MaxTriangles = defaultMaxTriangles
	}
	if m.MaxTriangles < 1 {
		return nil, badInput("%s: %d must be positive", src.where("mesh.max_triangles"), m.MaxTriangles)
	}
	s, err := size.NewField(d, size.Options{HFine: m.HFine, HFar: m.HFar, FineRadius: m.FineRadius, Ahead: m.Ahead, Grading: m.Grading})
	if err != nil {
		return nil, badInput("%s: %v", src.where("mesh"), err)
	}
	return s, nil
}

// options returns the mesher's options (after sizeField filled defaults).
func (m *meshSection) options() meshing.Options {
	return meshing.Options{MinAngle: m.MinAngle, MaxPoints: m.MaxPoints}
}
