package main

import (
	"tearline/remesh/geom"
	"tearline/remesh/size"
)

// complete fills defaults and validates every section of the case. The
// geometry is built once here so that the loading and adaptivity defaults
// can follow the specimen (a crack tip switches adaptivity on; the
// boundary labels choose the natural load).
func (c *caseFile) complete(src *caseSource) error {
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
	if err := c.Loading.complete(src, natural, c.unit()); err != nil {
		return err
	}
	if c.Loading.Control == "opening" {
		if err := sp.AddOpeningPoints(c.Loading.OpeningAt); err != nil {
			return badInput("%s: %v", src.where("loading.opening_at"), err)
		}
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
