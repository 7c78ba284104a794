package main

import (
	"reflect"
	"regexp"
	"strings"
	"testing"

	"tearline/criteria"
	"tearline/remesh/carve"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/remesh/tri"
	"tearline/remesh/trigger"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/transfer"
)

// bareCase gives only what has no default: the geometry, E and ν (those
// of material.DefaultGTN), the internal length (for h_fine) and the load.
const bareCase = `
[geometry]
kind = "ssy"
[material]
young = 200000.0
poisson = 0.3
length = 0.1
[loading]
k = 1000.0
`

// TestCaseDefaults: a case that leaves every key out runs with the
// packages' own defaults (material.DefaultGTN, solver.DefaultOptions,
// fem.Options, trigger.DefaultOptions, size.DefaultFollowOptions and the
// size constants, carve.DefaultOptions, transfer.DefaultOptions, the tri
// constants) except for the named case choices of defaults.go. Reference:
// the packages' defaults themselves, so the two cannot drift apart.
func TestCaseDefaults(t *testing.T) {
	c, _, rs, err := prepareCase(writeCase(t, bareCase), nil)
	if err != nil {
		t.Fatal(err)
	}
	cfg := rs.cfg
	const ell = 0.1
	hFine := ell / size.DefaultKappa

	gtn := material.DefaultGTN()
	gtn.FC, gtn.FF = caseFc, caseFf
	gtn.SN, gtn.EpsN = 0, 0 // nucleation off, nothing kept ready
	gtn.Length = ell

	so := solver.DefaultOptions()
	so.Dt, so.DtMax, so.EasyIter = caseIncrement, caseMaxIncrement, caseEasyIter
	so.ProcessZone = caseFc // the natural control of a GTN specimen is dissipation-driven

	fe := fem.Options{Kinematics: fem.PlaneStrain, ReleaseSteps: caseReleaseSteps, FlapPorosity: caseFc}

	to := trigger.DefaultOptions(ell)
	to.Margin, to.MaxRemesh = caseMargin, caseNoRemeshLimit
	to.FrontLevel = criteria.FrontLevel(caseFc)

	fo := size.DefaultFollowOptions(ell, c.Mesh.HFar)

	sz := size.Options{HFine: hFine, HFar: c.Mesh.HFar}.WithDefaults()
	sz.Ahead = fo.Ahead * ell // an adaptive run's first fine zone is the follow zone

	co := carve.DefaultOptions()
	co.Simplify = caseSimplify

	tr := transfer.DefaultOptions()
	tr.F0, tr.FBreak = gtn.F0, gtn.BreakPorosity()

	for _, x := range []struct {
		name      string
		got, want any
	}{
		{"material", c.Material.gtnParams(), gtn},
		{"solver", cfg.Solver, so},
		{"fem", cfg.FE, fe},
		{"trigger", cfg.Trigger, to},
		{"follow", cfg.Follow, fo},
		{"size", cfg.Size, sz},
		{"mesh", cfg.Mesh, meshing.Options{MinAngle: tri.DefaultMinAngle, MaxPoints: tri.DefaultMaxPoints}},
		{"carve", cfg.Carve, co},
		{"transfer", cfg.Transfer, tr},
		{"adaptive", cfg.Adapt, true},
	} {
		if !reflect.DeepEqual(x.got, x.want) {
			t.Errorf("%s: the case's defaults\n\t%+v\nare not the package's\n\t%+v", x.name, x.got, x.want)
		}
	}
	if sf := size.DefaultFarFactor * hFine; c.Mesh.HFar != sf {
		t.Errorf("mesh.h_far = %g, want size.DefaultFarFactor·h_fine = %g", c.Mesh.HFar, sf)
	}
}

// TestCaseHelpDefaults: `tearline help case` prints the defaults the case
// takes; every placeholder is filled, and the numbers are those of
// defaults.go (by definition).
func TestCaseHelpDefaults(t *testing.T) {
	h := caseHelp()
	if p := regexp.MustCompile(`\{[a-z_0-9]+\}`).FindString(h); p != "" {
		t.Fatalf("placeholder %s left in the help", p)
	}
	s, a := solverDefaults(), adaptDefaults()
	for _, want := range []string{
		"(defaults " + helpNumber(s.Increment) + ", " + helpNumber(s.MinIncrement) + ", " + helpNumber(s.MaxIncrement) + ")",
		"alert_plastic_strain (" + helpNumber(a.AlertP) + ")",
		"margin (" + helpNumber(a.Margin) + "ℓ)",
		"max_iterations (" + helpNumber(float64(s.MaxIter)) + ")",
	} {
		if !strings.Contains(h, want) {
			t.Errorf("the help lacks %q", want)
		}
	}
	for _, c := range []struct {
		v    float64
		want string
	}{{1e-6, "1e-6"}, {0.25, "0.25"}, {200000, "200000"}, {1e21, "1e+21"}} {
		if got := helpNumber(c.v); got != c.want {
			t.Errorf("helpNumber(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}
