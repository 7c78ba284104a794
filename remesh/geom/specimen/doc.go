// Package specimen says what a specimen means mechanically: the natural
// supports and loads of its geometry and what is measured on it — the
// force, the control quantity, the opening points, the route to J and
// whether it is a half model.
//
// Package geom builds the geometry of a specimen (a geom.Domain with
// labelled boundaries and named points) and imports nothing of ours; the
// supports, loads and measures are boundary conditions (solver/fem), far-field
// and ASTM E1820 J (criteria) and an opening control (solver), so they live
// in this sub-package, which may import them. Keeping the meaning beside the
// geometry, typed, means a caller asks a specimen for its conditions instead
// of recognising it by its label strings.
//
// A Specimen is built from the parameters of a built-in specimen or from a
// general polygon:
//
//	s, err := specimen.NewCT(geom.DefaultCT())
//	if err != nil { … }
//	su, err := s.Apply(specimen.Load{Kind: s.Natural, Value: 0.5}, el)
//	// su.BCs for fem.NewProblem, su.Measure after each converged step,
//	// su.JRoute() for the J of the resistance curve.
//
// # Natural supports and loads
//
// Supports follow the labels (geom.Label…): a piece labelled
// geom.LabelSymmetry is a mirror plane y = 0 (z = 0 for a round bar) on
// which the crack grows (fem.Symmetry.CrackPlane), one labelled
// geom.LabelAxis the axis of revolution r = 0. The loads are
//
//   - KField: the Williams displacement of a remote K-field (with T-stress)
//     on geom.LabelRemote about the point geom.PointTip (Williams 1957,
//     J. Appl. Mech. 24); force = the resultant of the reactions on the
//     remote boundary along the crack normal; control = K·t. Under an
//     opening control (Load.Opening) t drives the crack opening at the
//     points AddOpeningPoints places, and K is solved for.
//   - Pin: a rigid pin on a 10° contact arc of geom.LabelPin (and −u on
//     geom.LabelPinLower of a full model), acting as a hinge; the point
//     geom.PointLoadLine is held against rigid sliding along the crack;
//     force = pin force × thickness; control = the opening of the notch
//     faces at the load line, as a clip gauge measures it (ASTM E1820), or
//     the pins' separation without a load-line point.
//   - Displacement: a prescribed displacement on geom.LabelEnd or
//     geom.LabelTop (−u on geom.LabelBase or geom.LabelBottom when present),
//     both components held on the grips of a Clamped specimen; force = the
//     reaction × thickness (the ring force in axisymmetry); control = u.
//   - Pressure: a dead pressure on the loaded label; control = the pressure,
//     no force (NaN).
//
// # J
//
// The J of the resistance curve (Setup.JRoute) is the applied far-field J
// K²(1−ν²)/E under a K-field (small-scale yielding, Rice 1968), the ASTM
// E1820 J from the force–load-line-displacement record of a pin-loaded
// C(T), and the domain integral around the current tip otherwise.
package specimen
