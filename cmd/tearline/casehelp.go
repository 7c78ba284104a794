package main

// caseHelp lists the case-file keys (tearline help case).
const caseHelp = `tearline case file (TOML). Every key has a default except the geometry.
Unknown keys and invalid values are errors that name the file, line and key.
Override any key on the command line with --set section.key=value.

title = "…"                      free text

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
h_fine       size in the fine zone at each crack tip (default material.length/2)
h_far        largest size; fine_radius, ahead, grading (0, 1], min_angle [20, 34], max_points

[material]
model        "gtn" (default) or "elastic"
young, poisson                         E > 0, ν in (−1, 0.5)
yield_stress                           σ₀ (default 400)
hardening    "power" σ₀(1 + p/ε₀)ⁿ (hardening_exponent n, reference_strain ε₀ = σ₀/E by default),
             "voce" σ₀ + Q(1 − e^(−bp)) (voce_saturation Q, voce_rate b),
             "table" (flow_table = [[p, σ], …] from p = 0), "perfect"
q1, q2, f0, fc, ff                     GTN (defaults 1.5, 1, 0.002, 0.02, 0.2); 0 ≤ f0 < fc < ff < 1/q1
f_break                                porosity of a broken point (default: f* = 0.95/q1)
nucleation_fraction, nucleation_strain, nucleation_spread   Chu–Needleman (off by default)
length                                 internal length ℓ (0 = local GTN)
penalty                                augmentation penalty r, in units of σ₀ (default 1)

[loading]
kind         "k_field" (remote Williams field: k, t_stress), "pin" (C(T) pin: value),
             "displacement" (label, component, value), "pressure" (label, value);
             default: the specimen's natural load. Magnitudes are those at t = 1.
control      "load" (t scales the load) or "opening" (k_field only: t drives the crack
             opening at opening_at behind the initial tip (default 5ℓ), which reaches
             opening at t = 1; the load factor K/k is solved for — for tearing at
             nearly constant K, where load control stalls)
[[loading.fix]]  label, component ("x", "y", "r", "z", "both") — extra supports

[solver]
increment, min_increment, max_increment   of the pseudo-time t (defaults 0.02, 1e-6, 0.1)
max_iterations (15), tolerance (1e-6, relative to each field's force scale), mixed (true: u–θ–P element), workers (0 = all cores)
release_steps (5): converged steps over which an element with a broken point gives up its force
             (element vanish); 0 = an element leaves only once all its points are broken

[stop]
t (1), da (0 = no limit), max_steps, hours (0 = no limit)

[output]
fields_every (10 steps), checkpoint_minutes (15)

[adapt]
enabled (true when the geometry has a crack tip), margin (ℓ), ahead (ℓ), wake (× h_fine),
alert_plastic_strain (0.1), max_remeshes (0 = no limit), coarsen_wake, simplify (× local size)
`
