package main

import (
	"tearline/remesh/size"
	"tearline/remesh/trigger"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
)

// The defaults of the case file. A key that maps onto a package's option
// takes that package's default (material.DefaultGTN, solver.DefaultOptions,
// fem.Options, trigger.DefaultOptions, size.DefaultFollowOptions,
// carve.DefaultOptions, and the size and tri constants for [mesh]), so the
// case and the packages cannot drift apart. The case choices below are the
// only exceptions; `tearline help case` prints the values of this file and
// TestCaseDefaults holds the case to them.

// Case choices: defaults of the case that differ from the package default
// on purpose.
const (
	// caseFc and caseFf are f_c and f_F, lower than material.DefaultGTN's:
	// the damage front at 2·f_c (DESIGN.md §4) must lie well below
	// f_break; with DefaultGTN's f_c = 0.15 the front level 0.3 would
	// exceed f_break ≈ 0.24.
	caseFc = 0.02
	caseFf = 0.2
	// caseIncrement and caseMaxIncrement are the first and the largest
	// increment of t, smaller than solver.DefaultOptions': plastic flow is
	// path dependent, and a case follows its load in no fewer than ten
	// increments to t = 1 (common practice).
	caseIncrement    = 0.02
	caseMaxIncrement = 0.1
	// caseEasyIter is solver.Options.EasyIter of a case, more than
	// solver.DefaultOptions': a quadratically converging step of a
	// softening material takes 4–6 iterations; counting up to 5 as easy
	// lets the increment grow again after a cut-back.
	caseEasyIter = 5
	// caseReleaseSteps is solver.release_steps (fem.Options' zero value
	// lets an element leave once all its points are broken): an element
	// whose points break one by one loses rank until Newton throws its
	// free nodes far, and one that leaves at once drops its whole force on
	// its neighbours in one step; releasing the force over 5 converged
	// steps avoids both (DEVELOPERS.md, element vanish).
	caseReleaseSteps = 5
	// caseMargin is adapt.margin in ℓ, smaller than trigger.DefaultOptions':
	// a remesh is due when a tip or a front point comes within 1ℓ of the
	// fine zone's edge.
	caseMargin = 1
	// caseSimplify is adapt.simplify, × the local size, smaller than
	// carve.DefaultOptions': crack faces are simplified within a quarter of
	// the local size.
	caseSimplify = 0.25
	// caseNoRemeshLimit is the remesh limit of adapt.max_remeshes = 0, "no
	// limit" (trigger.DefaultOptions has a finite one).
	caseNoRemeshLimit = 1 << 30
)

// Defaults of the case that no package owns: how the command line writes
// the run folder, and the sizes it derives from the specimen.
const (
	defaultFieldsEvery       = 10 // output.fields_every, steps
	defaultCheckpointMinutes = 15 // output.checkpoint_minutes
	// defaultOpeningAt is loading.opening_at behind the initial tip, in ℓ
	// (caseFile.unit for a local model).
	defaultOpeningAt = 5
	// farScaleFraction: the default h_far is at most the domain's size over
	// this, so that even the coarsest elements are some 20 across the body.
	farScaleFraction = 20
	// lowestMinAngle is the smallest mesh.min_angle accepted, in degrees.
	lowestMinAngle = 20
)

// materialDefaults is [material] with every default filled in: those of
// material.DefaultGTN but for f_c and f_F (caseFc, caseFf). Nucleation is
// off, and its spread and strain default to 0 (DefaultGTN keeps s_N and
// ε_N ready): a case that switches it on gives its own.
func materialDefaults() materialSection {
	p := material.DefaultGTN()
	h, ok := p.Hardening.(material.PowerLaw)
	if !ok {
		panic("material.DefaultGTN: the case's default hardening must be a power law")
	}
	return materialSection{
		Model: "gtn", Young: p.Elastic.Young, Poisson: p.Elastic.Poisson,
		Yield: h.Sigma0, Hardening: "power", Exponent: h.N, RefStrain: h.Eps0,
		Q1: p.Q1, Q2: p.Q2, F0: p.F0, Fc: caseFc, Ff: caseFf, FBreak: p.FBreak,
		NuclF: p.FN, Length: p.Length, Penalty: p.Penalty / h.Sigma0,
	}
}

// solverDefaults is [solver] with every default filled in: those of
// solver.DefaultOptions and fem.Options but for the case choices.
func solverDefaults() solverSection {
	so, fo := solver.DefaultOptions(), fem.Options{}
	mixed, release := !fo.DisplacementOnly, caseReleaseSteps
	return solverSection{
		Increment: caseIncrement, MinIncrement: so.DtMin, MaxIncrement: caseMaxIncrement,
		MaxIter: so.MaxIter, Tolerance: so.RTol, Mixed: &mixed, Workers: fo.Workers,
		ReleaseSteps: &release,
	}
}

// stopDefaults is [stop] with every default filled in (solver.DefaultOptions).
func stopDefaults() stopSection {
	so := solver.DefaultOptions()
	return stopSection{T: so.TEnd, MaxSteps: so.MaxSteps}
}

// outputDefaults is [output] with every default filled in.
func outputDefaults() outputSection {
	return outputSection{FieldsEvery: defaultFieldsEvery, CheckpointMinutes: defaultCheckpointMinutes}
}

// adaptDefaults is [adapt] with every default but enabled filled in: those
// of trigger.DefaultOptions, size.DefaultFollowOptions and
// carve.DefaultOptions but for the case choices. The ratios do not depend
// on ℓ and h_far; 1 stands for both.
func adaptDefaults() adaptSection {
	to, fo := trigger.DefaultOptions(1), size.DefaultFollowOptions(1, 1)
	coarsen := true
	return adaptSection{
		Margin: caseMargin, Ahead: fo.Ahead, Wake: fo.Wake, AlertP: to.PAlert,
		Coarsen: &coarsen, Simplify: caseSimplify,
	}
}
