package main

import "tearline/remesh/geom"

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
	unit := c.Material.Length // zones of a local model are measured in 2·h_fine
	if !(unit > 0) {
		unit = 2 * c.Mesh.HFine
	}
	if err := c.Loading.complete(src, natural, unit); err != nil {
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
