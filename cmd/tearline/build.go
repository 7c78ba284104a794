package main

import (
	"fmt"
	"math"
	"strings"

	"tearline/criteria"
	"tearline/remesh"
	"tearline/remesh/carve"
	"tearline/remesh/geom"
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
	// ct is set for a C(T) specimen: the ASTM E1820 J is evaluated from the
	// force–load-line-displacement record.
	ct *criteria.CTSpecimen
	// thickness multiplies the plane-strain force per unit thickness.
	thickness float64
	sigma0    float64
	young     float64
	length    float64
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
	return c, src, rs, nil
}

// buildRun maps a validated case (from loadCase) onto the packages' typed
// options.
func buildRun(c *caseFile, src *caseSource) (*runSetup, error) {
	d, sf := c.domain, c.size // built and validated by loadCase
	mat, err := c.Material.model()
	if err != nil {
		return nil, badInput("%s: %v", src.where("material"), err)
	}
	rs := &runSetup{domain: d, thickness: 1, sigma0: c.Material.Yield, young: c.Material.Young, length: c.Material.Length}
	if d.Thickness > 0 {
		rs.thickness = d.Thickness
	}
	el := criteria.Elastic{E: c.Material.Young, Nu: c.Material.Poisson}
	cfg := remesh.CycleConfig{
		Domain:   d,
		Size:     sf.Options,
		Mesh:     c.Mesh.options(),
		Material: mat,
		F0:       c.Material.F0, Fc: c.Material.Fc, FBreak: c.Material.breakPorosity(),
		Length: c.Material.Length,
		StopDa: c.Stop.Da,
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
	so.TEnd, so.Dt, so.DtMin, so.DtMax = c.Stop.T, c.Solver.Increment, c.Solver.MinIncrement, c.Solver.MaxIncrement
	so.MaxSteps, so.MaxIter, so.RTol = c.Stop.MaxSteps, c.Solver.MaxIter, c.Solver.Tolerance
	// A quadratically converging step of a softening material takes 4–6
	// iterations; count up to 5 as easy so the increment can grow again
	// after a cut-back.
	so.EasyIter = 5
	cfg.Solver = so

	tipNames := d.Tips()
	half := strings.Contains(strings.Join(d.Labels(), ","), "symmetry")
	cfg.Symmetric = half && c.Geometry.Kind != "notched_bar"
	if err := rs.loading(c, src, &cfg, el); err != nil {
		return nil, err
	}

	// The zones and rings of a local model are measured in 2·h_fine.
	unit := c.Material.Length
	if !(unit > 0) {
		unit = 2 * c.Mesh.HFine
	}
	if len(tipNames) > 0 && !d.Axisymmetric {
		cfg.J = &remesh.JConfig{Unit: unit, Rings: []criteria.Ring{{In: 2, Out: 4}, {In: 4, Out: 8}, {In: 8, Out: 16}}}
		// Rings must stay inside the body: scale them down on small domains.
		if lim := 0.25 * d.Scale(); 16*unit > lim {
			cfg.J.Unit = lim / 16
		}
	}
	cfg.Adapt = *c.Adapt.Enabled && len(tipNames) > 0
	cfg.Trigger = trigger.DefaultOptions(unit)
	cfg.Trigger.Margin = c.Adapt.Margin
	cfg.Trigger.FrontLevel = 2 * c.Material.Fc
	cfg.Trigger.PAlert = c.Adapt.AlertP
	cfg.Trigger.MaxRemesh = c.Adapt.MaxRuns
	if cfg.Trigger.MaxRemesh == 0 {
		cfg.Trigger.MaxRemesh = 1 << 30
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
	cfg.Transfer.F0, cfg.Transfer.FBreak = c.Material.F0, cfg.FBreak
	cfg.Transfer.Axisymmetric = d.Axisymmetric
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

// loading sets the boundary conditions and the history's control and force.
func (rs *runSetup) loading(c *caseFile, src *caseSource, cfg *remesh.CycleConfig, el criteria.Elastic) error {
	d := rs.domain
	l := &c.Loading
	labels := map[string]bool{}
	for _, s := range d.Labels() {
		labels[s] = true
	}
	need := func(label, key string) error {
		if !labels[label] {
			return badInput("%s: the geometry has no boundary label %q (it has %s)", src.where(key), label, strings.Join(d.Labels(), ", "))
		}
		return nil
	}
	comp := func(def int) int {
		switch l.Component {
		case "x", "r":
			return 0
		case "y", "z":
			return 1
		}
		return def
	}
	var base fem.BCs
	if labels["symmetry"] {
		axis := 1 // the ligament y = 0 (or the minimum section z = 0)
		base.Symmetries = append(base.Symmetries, fem.Symmetry{Label: "symmetry", Comp: axis, CrackPlane: true})
	}
	if labels["axis"] {
		base.Symmetries = append(base.Symmetries, fem.Symmetry{Label: "axis", Comp: 0})
	}
	for _, f := range l.Fix {
		if err := need(f.Label, "loading.fix"); err != nil {
			return err
		}
		fix := [2]bool{f.Component == "x" || f.Component == "r" || f.Component == "both", f.Component == "y" || f.Component == "z" || f.Component == "both"}
		base.Displacements = append(base.Displacements, fem.Displacement{Label: f.Label, Fix: fix})
	}
	nan := math.NaN()
	switch l.Kind {
	case "k_field":
		if err := need("remote", "loading.kind"); err != nil {
			return err
		}
		tip, ok := d.Points["tip"]
		if !ok {
			return badInput("%s: a K-field needs a crack tip point \"tip\" in the geometry", src.where("loading.kind"))
		}
		kf := criteria.KField{K: l.K, T: l.TStress, El: el, Tip: tip.X, Dir: tip.Dir}
		if err := kf.Validate(); err != nil {
			return badInput("%s: %v", src.where("loading.k"), err)
		}
		cfg.KField = &kf
		unit := kf
		unit.K, unit.T = 1, l.TStress/l.K
		base.Displacements = append(base.Displacements, fem.Displacement{
			Label: "remote", Fix: [2]bool{true, true},
			Func: func(X [2]float64, t float64) [2]float64 {
				u := unit.Displacement(X)
				s := l.K * t
				return [2]float64{s * u[0], s * u[1]}
			},
		})
		// The force: the resultant of the reactions on the remote boundary
		// along the crack's opening direction (the model's own, per unit
		// thickness), so that remesh.csv records how a transfer and the
		// re-equilibration change it (V13).
		dl := math.Hypot(tip.Dir[0], tip.Dir[1])
		normal := [2]float64{-tip.Dir[1] / dl, tip.Dir[0] / dl}
		thick := rs.thickness
		cfg.Measure = func(p *fem.Problem) (float64, float64, error) {
			r, err := p.Reaction("remote")
			return l.K * p.TCommitted, (r[0]*normal[0] + r[1]*normal[1]) * thick, err
		}
		if l.Control == "opening" {
			cfg.Control = openingControl(tip.Dir, l.Opening)
		}
	case "pin":
		// The pin touches the hole on a narrow arc about the loading
		// direction and acts as a hinge (see fem.Pin.Contact).
		const pinContact = 10.0
		pinLabel := "pin"
		if l.Label != "" {
			pinLabel = l.Label
		}
		if err := need(pinLabel, "loading.label"); err != nil {
			return err
		}
		base.Pins = append(base.Pins, fem.Pin{Label: pinLabel, Comp: 1, Value: l.Value, Contact: pinContact})
		if labels["pin_lower"] {
			base.Pins = append(base.Pins, fem.Pin{Label: "pin_lower", Comp: 1, Value: -l.Value, Contact: pinContact})
		}
		// The body is free to slide along the crack: hold one point of the
		// load line (a rigid-body constraint, no force).
		if _, ok := d.Points["loadline"]; ok {
			base.Displacements = append(base.Displacements, fem.Displacement{Point: "loadline", Fix: [2]bool{true, false}})
		}
		if c.Geometry.Kind == "ct" {
			k := c.Geometry.CT
			w := *k.Width
			rs.ct = &criteria.CTSpecimen{W: w, B: rs.thickness, BN: rs.thickness, A0: *k.CrackRatio * w, El: el}
		}
		thick := rs.thickness
		_, lineOK := d.Points["loadline"]
		_, lowerOK := d.Points["loadline_lower"]
		cfg.Measure = func(p *fem.Problem) (float64, float64, error) {
			f, err := p.PinForce(0)
			if err != nil || !lineOK {
				// No load-line point: the pins' separation.
				return 2 * l.Value * p.TCommitted, f * thick, err
			}
			// Load-line displacement as a clip gauge on the load line
			// measures it (ASTM E1820): the opening of the notch faces at
			// the load line, free of the pin-contact deformation.
			up, _ := p.Nodal(p.Committed, p.Mesh.Points["loadline"], fem.Uy)
			down := -up // mirror image in a half model
			if lowerOK {
				down, _ = p.Nodal(p.Committed, p.Mesh.Points["loadline_lower"], fem.Uy)
			}
			return up - down, f * thick, nil
		}
	case "displacement", "pressure":
		label := l.Label
		if label == "" {
			for _, s := range []string{"end", "top"} {
				if labels[s] {
					label = s
					break
				}
			}
		}
		if label == "" {
			return badInput("%s: give the boundary label the load acts on (labels: %s)", src.where("loading.label"), strings.Join(d.Labels(), ", "))
		}
		if err := need(label, "loading.label"); err != nil {
			return err
		}
		k := comp(1)
		if l.Kind == "pressure" {
			base.Tractions = append(base.Tractions, fem.Traction{Label: label, Pressure: l.Value})
			cfg.Measure = func(p *fem.Problem) (float64, float64, error) { return l.Value * p.TCommitted, nan, nil }
			break
		}
		var v [2]float64
		var fix [2]bool
		v[k], fix[k] = l.Value, true
		if c.Geometry.Kind == "dent" {
			fix = [2]bool{true, true} // clamped grips: no sliding at the loaded edges
		}
		base.Displacements = append(base.Displacements, fem.Displacement{Label: label, Fix: fix, Value: v})
		if labels["bottom"] && label == "top" {
			base.Displacements = append(base.Displacements, fem.Displacement{Label: "bottom", Fix: fix, Value: [2]float64{-v[0], -v[1]}})
		}
		if labels["base"] && label == "end" {
			base.Displacements = append(base.Displacements, fem.Displacement{Label: "base", Fix: fix, Value: [2]float64{-v[0], -v[1]}})
		}
		thick := rs.thickness
		if d.Axisymmetric {
			thick = 1 // the ring force is already the whole bar's
		}
		cfg.Measure = func(p *fem.Problem) (float64, float64, error) {
			r, err := p.Reaction(label)
			return l.Value * p.TCommitted, r[k] * thick, err
		}
	default:
		return fmt.Errorf("loading kind %q not handled", l.Kind)
	}
	cfg.BCs = func(m *fem.Mesh) (fem.BCs, error) { return base, nil }
	return nil
}

// openingControl returns the control of the crack opening at the points
// "opening" (and "opening_lower" of a full model) that addOpeningPoints
// placed: the displacement along the crack normal n, twice the upper
// face's in a half model (mirror plane), upper minus lower otherwise; it
// reaches opening at t = 1.
func openingControl(dir [2]float64, opening float64) func(p *fem.Problem) (*solver.Control, error) {
	n := [2]float64{-dir[1], dir[0]}
	return func(p *fem.Problem) (*solver.Control, error) {
		up, ok := p.Mesh.Points["opening"]
		if !ok {
			return nil, fmt.Errorf("the mesh has no point \"opening\"")
		}
		c := &solver.Control{Rate: opening}
		add := func(node int, sign float64) {
			for k, f := range [2]fem.Field{fem.Ux, fem.Uy} {
				if n[k] != 0 {
					c.Dofs = append(c.Dofs, p.Dofs.Of(node, f))
					c.Weights = append(c.Weights, sign*n[k])
				}
			}
		}
		if lo, ok := p.Mesh.Points["opening_lower"]; ok {
			add(up, 1)
			add(lo, -1)
		} else {
			add(up, 2)
		}
		return c, nil
	}
}
