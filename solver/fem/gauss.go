package fem

import "tearline/solver/material"

// GaussPoint is what the post-processing (J integral, damage front, crack
// tip, field output) sees of one integration point. Tensors of a 2D problem
// are stored as [5]float64 with components 11, 12, 21, 22, 33 (unsymmetric
// in general: the deformation gradient and the first Piola–Kirchhoff stress).
type GaussPoint struct {
	X  [2]float64 // reference position (x, y) or (r, z)
	DA float64    // area weight: triangle area × rule weight (no 2πr factor)
	F  [5]float64 // deformation gradient, reference → current
	P  [5]float64 // first Piola–Kirchhoff stress
	// W is the stress-work density per reference volume, ∫ P:dF accumulated
	// over the loading history (the elastic energy for an elastic material),
	// as the J integral needs it (Rice 1968; for plasticity the deformation-
	// theory reading, common practice).
	W     float64
	State material.State
}

// GaussPoints is the Gauss-point data of a whole mesh: point i of triangle e
// (in the order of ElementRule) is at index e*PerElement + i.
type GaussPoints struct {
	PerElement int
	Points     []GaussPoint
}

// At returns the data of point i of triangle e.
func (g *GaussPoints) At(e, i int) *GaussPoint { return &g.Points[e*g.PerElement+i] }
