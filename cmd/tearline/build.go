package main

import (
	"errors"

	"tearline/criteria"
	"tearline/remesh"
	"tearline/remesh/carve"
	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
	"tearline/remesh/size"
	"tearline/remesh/trigger"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
	"tearline/transfer"
)

// runSetup is a case turned into the adaptive cycle's configuration, plus
// what the command line needs to report it.
type runSetup struct {
	cfg    remesh.CycleConfig
	domain *geom.Domain
	// ct is set for a pin-loaded C(T) specimen: the ASTM E1820 J is
	// evaluated from the force–load-line-displacement record.
	ct     *criteria.CTSpecimen
	sigma0 float64
	young  float64
	length float64
	// triangles is the first mesh's size estimated from the size field
	// (estimateTriangles).
	triangles float64
}

// prepareCase loads, validates and maps a case: what run, check and
// resume share. Every error is an input error.
func prepareCase(path string, sets []string) (*caseFile, *caseSource, *runSetup, error) {
	c, src, err := loadCase(path, sets)
	if err != nil {
		return nil, nil, nil, err
	}
	rs, err := buildRun(c, src)
	if err != nil {
		return nil, nil, nil, err
	}
	if err := rs.checkMeshSize(c, src); err != nil {
		return nil, nil, nil, err
	}
	return c, src, rs, nil
}

// checkMeshSize estimates the first mesh from the run's size field and
// refuses a case whose mesh would exceed mesh.max_triangles, before any
// meshing: a size field far too fine would otherwise mesh for minutes.
func (rs *runSetup) checkMeshSize(c *caseFile, src *caseSource) error {
	sf, err := size.NewField(rs.domain, rs.cfg.Size)
	if err != nil {
		return badInput("%s: %v", src.where("mesh"), err)
	}
	limit := float64(c.Mesh.MaxTriangles)
	rs.triangles = estimateTriangles(rs.domain, sf.At, sf.Options.Grading, 2*limit)
	if rs.triangles <= limit {
		return nil
	}
	more := "about %.3g"
	if rs.triangles > 2*limit {
		more = "more than %.3g"
	}
	return badInput("%s: the first mesh would have "+more+" triangles (estimated from the size field), above the limit %d; make it coarser with a larger mesh.h_fine (%g), mesh.h_far (%g) or mesh.grading (%g), or raise mesh.max_triangles",
		src.where("mesh.max_triangles"), rs.triangles, c.Mesh.MaxTriangles, c.Mesh.HFine, c.Mesh.HFar, c.Mesh.Grading)
}

// buildRun maps a validated case (from loadCase) onto the packages' typed
// options.
func buildRun(c *caseFile, src *caseSource) (*runSetup, error) {
	d, sf := c.specimen.Domain, c.size // built and validated by loadCase
	mat, err := c.Material.model()
	if err != nil {
		return nil, badInput("%s: %v", src.where("material"), err)
	}
	rs := &runSetup{domain: d, sigma0: c.Material.Yield, young: c.Material.Young, length: c.Material.Length}
	el := criteria.Elastic{E: c.Material.Young, Nu: c.Material.Poisson}
	cfg := remesh.CycleConfig{
		Domain:   d,
		Size:     sf.Options,
		Mesh:     c.Mesh.options(),
		Material: mat,
		Fc:       c.Material.Fc,
		StopDa:   c.Stop.Da,
	}
	if c.Material.Model == "elastic" {
		cfg.Fc = 0 // no porosity: the cycle locates no damage front
	}
	cfg.FE.Kinematics = fem.PlaneStrain
	if d.Axisymmetric {
		cfg.FE.Kinematics = fem.Axisymmetric
	}
	cfg.FE.DisplacementOnly = !*c.Solver.Mixed
	cfg.FE.Workers = c.Solver.Workers
	cfg.FE.ReleaseSteps = *c.Solver.ReleaseSteps
	if c.Material.Model != "elastic" {
		// a flap past the onset of coalescence carries next to nothing
		cfg.FE.FlapPorosity = c.Material.Fc
	}

	so := solver.DefaultOptions()
	so.EasyIter = caseEasyIter
	so.TEnd, so.Dt, so.DtMin, so.DtMax = c.Stop.T, c.Solver.Increment, c.Solver.MinIncrement, c.Solver.MaxIncrement
	so.MaxSteps, so.MaxIter, so.RTol = c.Stop.MaxSteps, c.Solver.MaxIter, c.Solver.Tolerance
	so.PorosityStep = c.Solver.PorosityStep
	if c.Loading.Control == "dissipation" {
		if c.Material.Model == "elastic" {
			return nil, badInput("%s: control = \"dissipation\" follows the process zone of a damage model; material.model = \"elastic\" has none (use \"load\" or \"opening\")", src.where("loading.control"))
		}
		// the process zone: points past the onset of coalescence
		so.ProcessZone = c.Material.Fc
	}
	cfg.Solver = so

	tipNames := d.Tips()
	if err := rs.loading(c, src, &cfg, el); err != nil {
		return nil, err
	}

	unit := c.unit()
	if len(tipNames) > 0 && !d.Axisymmetric {
		rings := []criteria.Ring{{In: 2, Out: 4}, {In: 4, Out: 8}, {In: 8, Out: 16}}
		cfg.J = &remesh.JConfig{Unit: unit, Rings: rings}
		// Rings must stay inside the body: scale them down on small domains.
		if lim, out := 0.25*d.Scale(), rings[len(rings)-1].Out; out*unit > lim {
			cfg.J.Unit = lim / out
		}
	}
	// An elastic body has no damage front to follow: its mesh stays.
	cfg.Adapt = *c.Adapt.Enabled && len(tipNames) > 0 && c.Material.Model != "elastic"
	cfg.Trigger = trigger.DefaultOptions(unit)
	cfg.Trigger.Margin = c.Adapt.Margin
	// the level the cycle locates the front at (criteria.FrontOptions' 2·f_c)
	cfg.Trigger.FrontLevel = criteria.FrontLevel(c.Material.Fc)
	cfg.Trigger.PAlert = c.Adapt.AlertP
	cfg.Trigger.MaxRemesh = c.Adapt.MaxRuns
	if cfg.Trigger.MaxRemesh == 0 {
		cfg.Trigger.MaxRemesh = caseNoRemeshLimit
	}
	cfg.Follow = size.DefaultFollowOptions(unit, c.Mesh.HFar)
	cfg.Follow.Kappa = unit / c.Mesh.HFine
	cfg.Follow.Ahead = c.Adapt.Ahead
	cfg.Follow.Wake = c.Adapt.Wake
	if !*c.Adapt.Coarsen {
		cfg.Follow.Wake = 1
	}
	if cfg.Adapt {
		// The first mesh of an adaptive run has the fine zone the
		// tip-following field will give it (mesh.ahead is for fixed meshes,
		// which must be fine along the whole presumed path).
		cfg.Size.Ahead = cfg.Follow.Ahead * unit
	}
	cfg.Carve = carve.DefaultOptions()
	cfg.Carve.Simplify = c.Adapt.Simplify
	cfg.Transfer = transfer.DefaultOptions()
	cfg.Transfer.F0, cfg.Transfer.FBreak = c.Material.F0, c.Material.breakPorosity()
	cfg.Transfer.Axisymmetric = d.Axisymmetric
	cfg.Local = c.Adapt.Local
	if cfg.Adapt {
		for _, v := range []interface{ Validate() error }{&cfg.Trigger, &cfg.Follow, &cfg.Carve} {
			if err := v.Validate(); err != nil {
				return nil, badInput("%s: %v", src.where("adapt"), err)
			}
		}
	}
	if err := cfg.Solver.Validate(); err != nil {
		return nil, badInput("%s: %v", src.where("solver"), err)
	}
	rs.cfg = cfg
	return rs, nil
}

// model builds the constitutive law of [material].
func (m *materialSection) model() (material.Model, error) {
	el := material.Elastic{Young: m.Young, Poisson: m.Poisson}
	if m.Model == "elastic" {
		return material.NewHencky(el)
	}
	return material.NewGTN(m.gtnParams())
}

func (m *materialSection) gtnParams() material.GTNParams {
	var h material.Hardening
	switch m.Hardening {
	case "power":
		h = material.PowerLaw{Sigma0: m.Yield, Eps0: m.RefStrain, N: m.Exponent}
	case "voce":
		h = material.Voce{Sigma0: m.Yield, Q: m.VoceQ, B: m.VoceB}
	case "table":
		t := material.Tabulated{}
		for _, row := range m.FlowTable {
			t.P = append(t.P, row[0])
			t.Stress = append(t.Stress, row[1])
		}
		h = t
	default:
		h = material.PerfectlyPlastic{Sigma0: m.Yield}
	}
	return material.GTNParams{
		Elastic:   material.Elastic{Young: m.Young, Poisson: m.Poisson},
		Hardening: h,
		Q1:        m.Q1, Q2: m.Q2, F0: m.F0, FC: m.Fc, FF: m.Ff,
		FN: m.NuclF, SN: m.NuclSpread, EpsN: m.NuclStrain,
		FBreak: m.FBreak, Length: m.Length, Penalty: m.Penalty * m.Yield,
	}
}

// breakPorosity is f_break of the material (the model's default when the
// case leaves it out); for an elastic case it is 1 (nothing breaks).
func (m *materialSection) breakPorosity() float64 {
	if m.Model == "elastic" {
		return 1
	}
	p := m.gtnParams()
	return p.BreakPorosity()
}

// loading maps [loading] onto the specimen's load and sets what the
// specimen gives under it: the boundary conditions, the history's control
// and force, the opening control, the J route (the far-field K of a
// K-field, the E1820 record of a pin-loaded C(T)) and whether J and CTOD
// mirror a half model.
func (rs *runSetup) loading(c *caseFile, src *caseSource, cfg *remesh.CycleConfig, el criteria.Elastic) error {
	l := &c.Loading
	ld := specimen.Load{Kind: loadKind(l.Kind), K: l.K, T: l.TStress, Value: l.Value, Label: l.Label, Comp: 1}
	if l.Component == "x" || l.Component == "r" {
		ld.Comp = 0
	}
	for _, f := range l.Fix {
		fix := [2]bool{f.Component == "x" || f.Component == "r" || f.Component == "both", f.Component == "y" || f.Component == "z" || f.Component == "both"}
		ld.Fix = append(ld.Fix, fem.Displacement{Label: f.Label, Fix: fix})
	}
	if l.Control == "opening" {
		ld.Opening = l.Opening
	}
	su, err := c.specimen.Apply(ld, el)
	var le *specimen.LoadError
	if errors.As(err, &le) {
		return badInput("%s: %v", src.where(loadingKey(le.Field)), le.Err)
	}
	if err != nil {
		return err
	}
	bcs := su.BCs
	cfg.BCs = func(m *fem.Mesh) (fem.BCs, error) { return bcs, nil }
	cfg.Measure, cfg.Control, cfg.KField = su.Measure, su.Control, su.KField
	cfg.Symmetric = c.specimen.Symmetric
	if g := c.specimen.Gauge; g != nil { // checked where it was placed
		cfg.Gauge = g.Reading
	}
	rs.ct = su.CT
	return nil
}

// loadingKey is the key of [loading] a field of the specimen's load comes
// from.
func loadingKey(f specimen.Field) string {
	keys := map[specimen.Field]string{
		specimen.FieldKind: "kind", specimen.FieldK: "k", specimen.FieldLabel: "label",
		specimen.FieldComp: "component", specimen.FieldFix: "fix", specimen.FieldOpening: "opening",
	}
	if k, ok := keys[f]; ok {
		return "loading." + k
	}
	return "loading"
}

// loadKindName is the loading.kind of a specimen's load kind.
func loadKindName(k specimen.LoadKind) string {
	switch k {
	case specimen.KField:
		return "k_field"
	case specimen.Pin:
		return "pin"
	case specimen.Displacement:
		return "displacement"
	case specimen.Pressure:
		return "pressure"
	}
	return ""
}

// loadKind is the specimen's load kind of a loading.kind (0 for none).
func loadKind(name string) specimen.LoadKind {
	for _, k := range []specimen.LoadKind{specimen.KField, specimen.Pin, specimen.Displacement, specimen.Pressure} {
		if loadKindName(k) == name {
			return k
		}
	}
	return 0
}
