package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// demoCase is the built-in example: crack growth in small-scale yielding
// (a boundary-layer disk under a remote K field) in the invented alloy
// TL-7, with the adaptive mesh following the tip. Lengths in mm, stresses
// in MPa, K in MPa√mm.
const demoCase = `# tearline demo: ductile crack growth under small-scale yielding in alloy
# TL-7, a fictional pressure-vessel steel. Upper half of a boundary-layer
# disk; the remote boundary carries the Williams K field; the mesh is fine
# (h = ℓ/2) only around the growing tip.
title = "demo: adaptive small-scale-yielding crack growth, alloy TL-7"

[geometry]
kind = "ssy"
[geometry.ssy]
radius = 20.0
tip_radius = 0.05
full = false

[mesh]
h_fine = 0.05
h_far = 2.0
fine_radius = 0.15
grading = 0.3

[material]
model = "gtn"
young = 200000.0
poisson = 0.3
yield_stress = 450.0
hardening = "power"
hardening_exponent = 0.1
q1 = 1.5
q2 = 1.0
f0 = 0.005
fc = 0.02
ff = 0.2
length = 0.1
penalty = 1.0

[loading]
kind = "k_field"
k = 8000.0
control = "opening"   # t drives the crack opening 5ℓ behind the initial tip; K is solved for
opening = 1.0

[solver]
increment = 0.02
max_increment = 0.05
min_increment = 1e-5
max_iterations = 25

[stop]
t = 1.0
da = 0.3              # 3ℓ of crack growth

[output]
fields_every = 10
checkpoint_minutes = 5

[adapt]
enabled = true
ahead = 2             # the first fine zone reaches 2ℓ ahead: the mesh follows the tip after about 2.5ℓ
`

const demoUsage = `usage: tearline demo [-o DIR]

Runs the built-in example (adaptive crack growth under small-scale yielding
in an invented steel) into DIR (default demo-run). Its case file is written
to DIR/case.toml; change it and use 'tearline run' to explore.
`

func demoCommand(args []string, stdout, stderr io.Writer) int {
	a, code, done := parseRunArgs("demo", demoUsage, "demo-run", args, stderr)
	if done {
		return code
	}
	if len(a.pos) != 0 {
		fmt.Fprintf(stderr, "tearline demo: unexpected argument %q\n%s", a.pos[0], demoUsage)
		return 2
	}
	tmp, err := os.MkdirTemp("", "tearline-demo-")
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	defer os.RemoveAll(tmp)
	path := filepath.Join(tmp, "demo.toml")
	if err := os.WriteFile(path, []byte(demoCase), 0o644); err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	fmt.Fprintf(stdout, "tearline demo: adaptive crack growth in small-scale yielding, into %s\n", a.out)
	fmt.Fprintln(stdout, "  "+caution)
	return startRun(path, a.out, a.sets, stdout, stderr)
}
