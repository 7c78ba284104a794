// Package criteria holds the fracture-mechanics measures of tearline: the
// remote Williams mode-I field and its far-field J, the domain-integral J,
// the damage front and the crack tip(s) with the crack extension Δa, the
// crack-tip opening displacement by the 90° intercept, and the ASTM E1820
// J–R evaluation of a compact-tension C(T) record with the tearing modulus
// and the J_Q construction.
//
// Everything works on the reference configuration of a fem.Mesh and on the
// Gauss-point data fem.GaussPoints the solver produces; nodal displacements
// are [][2]float64 over all nodes (current position X + u).
//
// The measures:
//
//   - KField / WilliamsDisplacement: the leading terms of the
//     mode-I crack-tip field (Williams 1957, J. Appl. Mech. 24), in plane
//     strain, with an optional T-stress; FarFieldJ = K²(1−ν²)/E (Irwin; Rice
//     1968, J. Appl. Mech. 35).
//   - DomainJ: J by the equivalent domain integral (Li, Shih & Needleman 1985,
//     Eng. Fract. Mech. 21; Moran & Shih 1987, Eng. Fract. Mech. 27) on rings
//     around a tip, in the finite-strain form with the first Piola–Kirchhoff
//     stress, in plane strain and in axisymmetry (Shih, Moran & Nakamura
//     1986, Int. J. Fract. 30, reduced to a circular crack front).
//   - LocateFront: the contour f = f_front of the recovered porosity, and the
//     crack tip(s) as the points of {f ≥ f_tip} farthest along the crack path
//     from each initial tip, with Δa along the path and projected.
//   - CTOD: the crack-tip opening displacement by the 90° intercept (Shih 1981,
//     J. Mech. Phys. Solids 29).
//   - E1820: J = J_el + J_pl from force versus load-line displacement of a C(T)
//     specimen with the incremental crack-growth correction (ASTM E1820,
//     Annex A1), and TearingModulus T = (E/σ₀²) dJ/da (Paris, Tada, Zahoor &
//     Ernst 1979, ASTM STP 668).
//   - E1820JQ: the J_Q construction on a J–Δa record (ASTM E1820 Annex A9):
//     construction and exclusion lines, power-law fit, the 0.2 mm offset
//     line, and the specimen's measurement capacity. It lives here, beside
//     the J it is made on, so that plots and reports draw one algorithm.
//
// Bad input gives an error value that says what, where and what is allowed;
// nothing here panics on input.
package criteria
