package main

import (
	"fmt"
	"sort"
	"strings"
	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
	"tearline/remesh/size"
)

// naturalControl is loading.control when the case does not say: a damage
// model on a built-in specimen tears through its load maximum and its load
// drops, which only the dissipation-driven control follows (DEVELOPERS.md);
// an elastic body and a polygon of the user's own stay under load control.
func (c *caseFile) naturalControl() string {
	if c.Material.Model == "gtn" && c.Geometry.Kind != "polygon" {
		return "dissipation"
	}
	return "load"
}

// complete fills defaults and validates every section of the case. The
// geometry is built once here so that the loading and adaptivity defaults
// can follow the specimen (a crack tip switches adaptivity on; the
// boundary labels choose the natural load).
func (c *caseFile) complete(src *caseSource) error {
	if err := c.Units.complete(src); err != nil {
		return err
	}
	if err := c.Material.complete(src); err != nil {
		return err
	}
	sp, err := c.Geometry.specimen(src)
	if err != nil {
		return err
	}
	d := sp.Domain
	sf, err := c.Mesh.sizeField(d, src, c.Material.Length)
	if err != nil {
		return err
	}
	c.specimen, c.size = sp, sf
	_, hasTip := d.Points[geom.PointTip]
	natural := loadKindName(sp.Natural)
	if err := c.Loading.complete(src, natural, c.naturalControl(), c.unit()); err != nil {
		return err
	}
	if err := c.Loading.placeGauge(sp, src); err != nil {
		return err
	}
	if err := c.Solver.complete(src); err != nil {
		return err
	}
	if err := c.Stop.complete(src); err != nil {
		return err
	}
	if err := c.Output.complete(src); err != nil {
		return err
	}
	return c.Adapt.complete(src, hasTip)
}

// unit is the length the zones, rings and adaptive distances of the case are
// measured in: the internal length ℓ, or for a local model (ℓ = 0) the ℓ
// that h_fine would be the default of, size.DefaultKappa·h_fine. It needs
// the [material] and [mesh] defaults filled in.
func (c *caseFile) unit() float64 {
	if c.Material.Length > 0 {
		return c.Material.Length
	}
	return size.DefaultKappa * c.Mesh.HFine
}

// placeGauge gives the specimen the gauge an opening control reads: the
// named points of loading.gauge, or for a K field the crack opening at
// loading.opening_at behind the tip; otherwise the specimen's own.
func (l *loadingSection) placeGauge(sp *specimen.Specimen, src *caseSource) error {
	if l.Control != "opening" {
		return nil
	}
	if len(l.Gauge) > 0 {
		dir := [2]float64{l.GaugeDirection[0], l.GaugeDirection[1]}
		g := &specimen.Gauge{Name: fmt.Sprintf("gauge %v", l.Gauge), Terms: []specimen.GaugeTerm{{Point: l.Gauge[0], Dir: dir, Weight: 1}}}
		if len(l.Gauge) == 2 {
			g.Terms = []specimen.GaugeTerm{{Point: l.Gauge[1], Dir: dir, Weight: 1}, {Point: l.Gauge[0], Dir: dir, Weight: -1}}
		}
		if err := g.Validate(sp.Domain); err != nil {
			return badInput("%s: %v (named points: %s)", src.where("loading.gauge"), err, strings.Join(pointNames(sp.Domain), ", "))
		}
		sp.Gauge = g
		return nil
	}
	if l.Kind != "k_field" {
		return nil
	}
	if err := sp.AddOpeningPoints(l.OpeningAt); err != nil {
		return badInput("%s: %v", src.where("loading.opening_at"), err)
	}
	return nil
}

// pointNames lists the named points of a domain's mesh in name order.
func pointNames(d *geom.Domain) []string {
	var names []string
	for n, p := range d.Points {
		if !p.Ref {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}
