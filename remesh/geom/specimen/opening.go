package specimen

import (
	"fmt"

	"tearline/remesh/geom"
)

// AddOpeningPoints adds the named points of an opening control to the
// domain: where the line normal to the crack at distance behind the initial
// tip geom.PointTip crosses the crack faces (straight pieces labelled
// geom.LabelCrack), geom.PointOpening on the side the normal (−dir_y,
// dir_x) points to and geom.PointOpeningLower on the other (full models).
// The mesher keeps named points as vertices, so the controlled node
// survives every remesh. The crack opening there becomes the specimen's
// gauge.
func (s *Specimen) AddOpeningPoints(behind float64) error {
	d := s.Domain
	tip, ok := d.Points[geom.PointTip]
	if !ok {
		return fmt.Errorf("the opening control needs a crack tip point %q in the geometry", geom.PointTip)
	}
	o := [2]float64{tip.X[0] - behind*tip.Dir[0], tip.X[1] - behind*tip.Dir[1]}
	n := [2]float64{-tip.Dir[1], tip.Dir[0]}
	found := 0
	for _, loop := range d.Loops() {
		for _, pc := range loop {
			if pc.Label != geom.LabelCrack || pc.Kind != geom.Line {
				continue
			}
			// the piece A + τ(B − A) meets the line (X − o)·dir = 0 at τ
			ab := [2]float64{pc.B[0] - pc.A[0], pc.B[1] - pc.A[1]}
			den := ab[0]*tip.Dir[0] + ab[1]*tip.Dir[1]
			if den == 0 {
				continue
			}
			tau := ((o[0]-pc.A[0])*tip.Dir[0] + (o[1]-pc.A[1])*tip.Dir[1]) / den
			if !(tau > 1e-6 && tau < 1-1e-6) {
				continue
			}
			x := [2]float64{pc.A[0] + tau*ab[0], pc.A[1] + tau*ab[1]}
			name := geom.PointOpening
			if (x[0]-o[0])*n[0]+(x[1]-o[1])*n[1] < 0 {
				name = geom.PointOpeningLower
			}
			if _, dup := d.Points[name]; dup {
				return fmt.Errorf("the line %g behind the tip crosses the crack faces more than once on one side", behind)
			}
			d.Points[name] = geom.Point{X: x}
			found++
		}
	}
	if _, ok := d.Points[geom.PointOpening]; !ok || found == 0 {
		return fmt.Errorf("no straight crack face at %g behind the tip (the opening point must lie on a straight crack face, between the tip's rounding and the outer boundary)", behind)
	}
	_, full := d.Points[geom.PointOpeningLower]
	s.Gauge = crackOpening(n, full)
	return nil
}
