package specimen

import (
	"fmt"
	"math"

	"tearline/remesh/geom"
	"tearline/solver"
	"tearline/solver/fem"
)

// Gauge is a displacement measured on the specimen, the way an extensometer
// or clip gauge measures it: Σ Weight·(u(Point)·Dir) over its terms, with
// u the displacement of named points (the mesher keeps named points as
// nodes, so a gauge reads the same material points on every mesh). Under
// an opening control the pseudo-time drives a gauge and the load factor is
// solved for, which follows tearing past the load maximum and through
// load drops that a prescribed load or displacement cannot (displacement
// control of a single combination, Batoz & Dhatt 1979; see solver.Control).
type Gauge struct {
	// Name says what the gauge measures ("load-line opening", …).
	Name  string
	Terms []GaugeTerm
}

// GaugeTerm is one named point's displacement along Dir, times Weight.
type GaugeTerm struct {
	Point  string
	Dir    [2]float64
	Weight float64
}

// Validate checks that the gauge reads named points of domain d along
// finite, non-zero directions.
func (g *Gauge) Validate(d *geom.Domain) error {
	if len(g.Terms) == 0 {
		return fmt.Errorf("gauge %q reads no point", g.Name)
	}
	seen := map[string]bool{}
	for _, t := range g.Terms {
		p, ok := d.Points[t.Point]
		if !ok {
			return fmt.Errorf("gauge %q: the geometry has no named point %q", g.Name, t.Point)
		}
		if p.Ref {
			return fmt.Errorf("gauge %q: %q is a reference point, not a point of the body's mesh", g.Name, t.Point)
		}
		if seen[t.Point] {
			return fmt.Errorf("gauge %q reads point %q twice (a relative displacement needs two different points)", g.Name, t.Point)
		}
		seen[t.Point] = true
		if n := math.Hypot(t.Dir[0], t.Dir[1]); !(n > 0) || math.IsInf(n, 0) || !(t.Weight != 0) || math.IsInf(t.Weight, 0) {
			return fmt.Errorf("gauge %q at %q: direction %v and weight %g must be finite and non-zero", g.Name, t.Point, t.Dir, t.Weight)
		}
	}
	return nil
}

// Reading returns the gauge's value in the committed unknowns of p.
func (g *Gauge) Reading(p *fem.Problem) (float64, error) {
	c, err := g.control(p, 1)
	if err != nil {
		return 0, err
	}
	return c.Value(p.Committed), nil
}

// Control returns the opening control that makes the gauge reach opening
// at pseudo-time 1 (from its reading at the start of the control).
func (g *Gauge) Control(opening float64) func(p *fem.Problem) (*solver.Control, error) {
	return func(p *fem.Problem) (*solver.Control, error) { return g.control(p, opening) }
}

// control lists the gauge's unknowns and weights on problem p, point by
// point, x before y.
func (g *Gauge) control(p *fem.Problem, rate float64) (*solver.Control, error) {
	c := &solver.Control{Rate: rate}
	for _, t := range g.Terms {
		node, ok := p.Mesh.Points[t.Point]
		if !ok {
			return nil, fmt.Errorf("gauge %q: the mesh has no point %q", g.Name, t.Point)
		}
		for k, f := range [2]fem.Field{fem.Ux, fem.Uy} {
			if t.Dir[k] == 0 {
				continue
			}
			d := p.Dofs.Of(node, f)
			if d < 0 {
				return nil, fmt.Errorf("gauge %q: point %q carries no displacement %v", g.Name, t.Point, f)
			}
			c.Dofs = append(c.Dofs, d)
			c.Weights = append(c.Weights, t.Weight*t.Dir[k])
		}
	}
	return c, nil
}

// crackOpening is the opening of the crack faces at the points that
// AddOpeningPoints placed, along the crack normal n: twice the upper
// face's displacement in a half model (mirror plane), upper minus lower
// otherwise.
func crackOpening(n [2]float64, full bool) *Gauge {
	g := &Gauge{Name: "crack opening"}
	if full {
		g.Terms = []GaugeTerm{{geom.PointOpening, n, 1}, {geom.PointOpeningLower, n, -1}}
	} else {
		g.Terms = []GaugeTerm{{geom.PointOpening, n, 2}}
	}
	return g
}

// pairOpening is the opening between a point and its mirror image across
// the crack plane along dir: twice the point's displacement in a half
// model, upper minus lower otherwise.
func pairOpening(name, upper, lower string, dir [2]float64, full bool) *Gauge {
	if full {
		return &Gauge{Name: name, Terms: []GaugeTerm{{upper, dir, 1}, {lower, dir, -1}}}
	}
	return &Gauge{Name: name, Terms: []GaugeTerm{{upper, dir, 2}}}
}
