package main

import (
	"strconv"
	"strings"

	"tearline/remesh/size"
	"tearline/remesh/tri"
)

// caseHelpText lists the case-file keys (tearline help case); caseHelp
// fills in the {defaults}.
const caseHelpText = `tearline case file (TOML). Every key has a default except the geometry and material.young, material.poisson.
Unknown keys and invalid values are errors that name the file, line and key.
Override any key on the command line with --set section.key=value.

title = "…"                      free text

[units]
system       {unit_systems}
             (default "{unit_default}"); names the units of labels and messages, and the
             millimetre of ASTM E1820's fixed lengths — the numbers are taken as written

[geometry]
kind = "ssy" | "ct" | "notched_bar" | "dent" | "polygon"
[geometry.ssy]          radius, tip_radius (ρ₀; 0 = sharp), full (false = upper half)
[geometry.ct]           width (W), crack_ratio (a₀/W), notch_ratio, notch_width_ratio,
                        tip_radius, thickness (B), full
[geometry.notched_bar]  min_radius, outer_radius, notch_radius, length, full
[geometry.dent]         width, height, notch_depth, tip_radius
[geometry.polygon]      axisymmetric; [[geometry.polygon.loop]] start = [x, y],
                        pieces = [{to = [x, y], label = "…", centre = [x, y], turn = "ccw"|"cw"}, …]
                        (first loop outer, then holes); [[geometry.polygon.point]] name, at,
                        tip, direction, reference

[mesh]
h_fine       size in the fine zone at each crack tip (default material.length/{kappa})
h_far        largest size (default {far_factor} h_fine, at most the domain's size/{far_scale})
fine_radius ({fine_radius} h_fine), ahead (0), grading (0, 1] ({grading}),
min_angle [{min_angle_lo}, {min_angle_hi}] ({min_angle}), max_points ({max_points}),
max_triangles ({max_triangles}): the largest first mesh, estimated from the size field before meshing

[material]
model        "gtn" (default) or "elastic"
young, poisson                         E > 0, ν in (−1, 0.5) (required: no default)
yield_stress                           σ₀ (default {yield})
hardening    "power" σ₀(1 + p/ε₀)ⁿ (hardening_exponent n, reference_strain ε₀; defaults {exponent}, {ref_strain}),
             "voce" σ₀ + Q(1 − e^(−bp)) (voce_saturation Q, voce_rate b),
             "table" (flow_table = [[p, σ], …] from p = 0), "perfect"
q1, q2, f0, fc, ff                     GTN (defaults {q1}, {q2}, {f0}, {fc}, {ff}); 0 ≤ f0 < fc < ff < 1/q1
f_break                                porosity of a broken point (default: f* = 0.95/q1)
nucleation_fraction, nucleation_strain, nucleation_spread   Chu–Needleman (off by default)
length                                 internal length ℓ (0 = local GTN)
penalty                                augmentation penalty r, in units of σ₀ (default {penalty})

[loading]
kind         "k_field" (remote Williams field: k, t_stress), "pin" (C(T) pin: value),
             "displacement" (label, component, value), "pressure" (label, value);
             default: the specimen's natural load. Magnitudes are those at t = 1.
control      default "dissipation" for a GTN material on a built-in specimen (ssy, ct,
             notched_bar, dent), else "load" (and always under a pressure);
             "load" (t scales the load) or "opening": t drives the specimen's gauge, which
             opens by "opening" at t = 1, and the load factor is solved for — for tearing
             past the maximum load and through load drops, where load control stalls.
             Natural gauges: ssy/k_field the crack opening at opening_at behind the initial
             tip (default {opening_at}ℓ); ct the load-line opening (clip gauge); notched_bar the
             reduction of the minimum diameter; dent the mean notch-mouth opening;
             gauge = ["a"] or ["a", "b"] with gauge_direction = [x, y] reads named points
             instead (one point's displacement, or b's relative to a, along the direction).
             "dissipation": load control until the process zone exists (points past fc),
             then each increment prescribes how much the zone strains plastically and the
             load factor is solved for, falling where the body snaps back (a long bar whose
             neck breaks, a crack that runs); the run ends at stop.t in the load factor, at
             stop.da or when the increments stall at final fracture.
             history.csv records the gauge reading (column gauge) and the load factor.
[[loading.fix]]  label, component ("x", "y", "r", "z", "both") — extra supports

[solver]
increment, min_increment, max_increment   of the pseudo-time t (defaults {increment}, {min_increment}, {max_increment})
max_iterations ({max_iterations}), tolerance ({tolerance}, relative to each field's force scale), mixed ({mixed}: u–θ–P element), workers (0 = all cores)
release_steps ({release_steps}): converged steps over which an element with a broken point gives up its force
             (element vanish); 0 = an element leaves only once all its points are broken
porosity_step (0 = off): the largest porosity growth of a point per increment that the next
             increment aims at; with control = "dissipation" the growth follows the increment

[stop]
t ({t}), da (0 = no limit), max_steps ({max_steps}), hours (0 = no limit)

[output]
fields_every ({fields_every} steps), checkpoint_minutes ({checkpoint_minutes})

[adapt]
enabled (true when the geometry has a crack tip), margin ({margin}ℓ), ahead ({ahead}ℓ),
wake ({wake} × h_fine), alert_plastic_strain ({alert_plastic_strain}), max_remeshes (0 = no limit),
coarsen_wake ({coarsen_wake}), simplify ({simplify} × local size),
local (false): rebuild only a patch around the changes, keeping the rest of the mesh and
its state verbatim (remesh.csv column verbatim_share)
`

// caseHelp returns the case-file help with the defaults the case takes
// (defaults.go), so that the help cannot disagree with them.
func caseHelp() string {
	m, s, st, o, a := materialDefaults(), solverDefaults(), stopDefaults(), outputDefaults(), adaptDefaults()
	g, d := helpNumber, strconv.Itoa
	return strings.NewReplacer(
		"{kappa}", d(size.DefaultKappa), "{far_factor}", d(size.DefaultFarFactor), "{far_scale}", d(farScaleFraction),
		"{fine_radius}", d(size.DefaultFineRadiusFactor), "{grading}", g(size.DefaultGrading),
		"{min_angle_lo}", d(lowestMinAngle), "{min_angle_hi}", d(tri.MaxMinAngle), "{min_angle}", d(tri.DefaultMinAngle),
		"{max_points}", d(tri.DefaultMaxPoints), "{max_triangles}", d(defaultMaxTriangles),
		"{unit_systems}", unitSystemHelp(), "{unit_default}", defaultUnitSystem, "{yield}", g(m.Yield),
		"{exponent}", g(m.Exponent), "{ref_strain}", g(m.RefStrain),
		"{q1}", g(m.Q1), "{q2}", g(m.Q2), "{f0}", g(m.F0), "{fc}", g(m.Fc), "{ff}", g(m.Ff), "{penalty}", g(m.Penalty),
		"{opening_at}", d(defaultOpeningAt),
		"{increment}", g(s.Increment), "{min_increment}", g(s.MinIncrement), "{max_increment}", g(s.MaxIncrement),
		"{max_iterations}", d(s.MaxIter), "{tolerance}", g(s.Tolerance), "{mixed}", strconv.FormatBool(*s.Mixed),
		"{release_steps}", d(*s.ReleaseSteps),
		"{t}", g(st.T), "{max_steps}", d(st.MaxSteps),
		"{fields_every}", d(o.FieldsEvery), "{checkpoint_minutes}", g(o.CheckpointMinutes),
		"{margin}", g(a.Margin), "{ahead}", g(a.Ahead), "{wake}", g(a.Wake), "{alert_plastic_strain}", g(a.AlertP),
		"{coarsen_wake}", strconv.FormatBool(*a.Coarsen), "{simplify}", g(a.Simplify),
	).Replace(caseHelpText)
}

// helpNumber writes v as a case file would: the shortest form, exponents
// without padding (1e-6, not 1e-06).
func helpNumber(v float64) string {
	t := strconv.FormatFloat(v, 'g', -1, 64)
	return strings.NewReplacer("e-0", "e-", "e+0", "e+").Replace(t)
}
