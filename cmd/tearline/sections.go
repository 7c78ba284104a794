package main

import (
	"fmt"
	"math"
	"strings"
)

// materialSection is [material]: the constitutive model and its parameters.
type materialSection struct {
	Model       string       `toml:"model"`        // "gtn" (default) or "elastic"
	Young       float64      `toml:"young"`        // Young's modulus E
	Poisson     float64      `toml:"poisson"`      // Poisson's ratio ν, in (−1, 0.5)
	Yield       float64      `toml:"yield_stress"` // initial yield stress σ₀
	Hardening   string       `toml:"hardening"`    // "power", "voce", "table" or "perfect"
	Exponent    float64      `toml:"hardening_exponent"`
	RefStrain   float64      `toml:"reference_strain"`
	VoceQ       float64      `toml:"voce_saturation"`
	VoceB       float64      `toml:"voce_rate"`
	FlowTable   [][2]float64 `toml:"flow_table"` // [[p, σ], …], p increasing from 0
	Q1          float64      `toml:"q1"`
	Q2          float64      `toml:"q2"`
	F0          float64      `toml:"f0"`
	Fc          float64      `toml:"fc"`
	Ff          float64      `toml:"ff"`
	FBreak      float64      `toml:"f_break"`
	NuclF       float64      `toml:"nucleation_fraction"`
	NuclStrain  float64      `toml:"nucleation_strain"`
	NuclSpread  float64      `toml:"nucleation_spread"`
	Length      float64      `toml:"length"`  // internal length ℓ; 0 = local model
	Penalty     float64      `toml:"penalty"` // augmentation penalty r (relative to σ₀)
	setDefaults bool
}

// loadingSection is [loading]: what drives the pseudo-time t.
type loadingSection struct {
	// Kind is "k_field" (remote Williams field, boundary-layer disk),
	// "displacement" (prescribed displacement on a label), "pin" (C(T) pin
	// displacement) or "pressure"; empty chooses the specimen's natural load.
	Kind      string     `toml:"kind"`
	K         float64    `toml:"k"`        // K at t = 1 (MPa√mm in the example unit set)
	TStress   float64    `toml:"t_stress"` // T-stress of the remote field
	Label     string     `toml:"label"`    // boundary label the load acts on
	Component string     `toml:"component"`
	Value     float64    `toml:"value"` // displacement or pressure at t = 1
	Fix       []fixEntry `toml:"fix"`   // extra supports
	// Control is "load" (t is the load factor), "opening" (t drives the
	// specimen's gauge, which opens by Opening at t = 1; the load factor
	// is solved for) or "dissipation" (load control until the process
	// zone exists, then each increment prescribes its plastic straining
	// and the load factor is solved for). The gauge is the specimen's natural one (K field:
	// the crack opening OpeningAt behind the initial tip), or Gauge: the
	// displacement of one named point along GaugeDirection, or of the
	// second named point relative to the first.
	Control        string    `toml:"control"`
	OpeningAt      float64   `toml:"opening_at"`
	Opening        float64   `toml:"opening"`
	Gauge          []string  `toml:"gauge"`
	GaugeDirection []float64 `toml:"gauge_direction"`
}

// fixEntry is one support: a component of the displacement held at zero on a label.
type fixEntry struct {
	Label     string `toml:"label"`
	Component string `toml:"component"` // "x", "y" (or "r", "z") or "both"
}

// solverSection is [solver]: Newton iterations and load stepping.
type solverSection struct {
	Increment    float64 `toml:"increment"`     // first increment of t
	MinIncrement float64 `toml:"min_increment"` // stop cleanly below this
	MaxIncrement float64 `toml:"max_increment"`
	MaxIter      int     `toml:"max_iterations"`
	Tolerance    float64 `toml:"tolerance"` // relative residual
	Mixed        *bool   `toml:"mixed"`     // u–θ–P mixed element (default true)
	Workers      int     `toml:"workers"`   // goroutines for assembly; 0 = all cores
	// ReleaseSteps: converged steps over which an element with a broken
	// point gives up its force (element vanish); 0 = an element leaves
	// only when all its points are broken.
	ReleaseSteps *int `toml:"release_steps"`
	// PorosityStep: the largest porosity growth of a point per increment
	// the step size aims at (0 = increments sized by iterations alone).
	PorosityStep float64 `toml:"porosity_step"`
}

// stopSection is [stop]: when the run ends.
type stopSection struct {
	T        float64 `toml:"t"`         // final pseudo-time
	Da       float64 `toml:"da"`        // stop once Δa reaches this (0 = no limit)
	MaxSteps int     `toml:"max_steps"` // converged steps at most
	Hours    float64 `toml:"hours"`     // wall-clock limit (0 = none)
}

// outputSection is [output]: what goes into the run folder.
type outputSection struct {
	FieldsEvery       int     `toml:"fields_every"`       // write fields every N steps (and the last)
	CheckpointMinutes float64 `toml:"checkpoint_minutes"` // checkpoint interval
}

// adaptSection is [adapt]: the adaptive remeshing cycle.
type adaptSection struct {
	Enabled  *bool   `toml:"enabled"`              // default: true when the geometry has a crack tip
	Margin   float64 `toml:"margin"`               // remesh when the front is within this many ℓ of the fine zone's edge
	Ahead    float64 `toml:"ahead"`                // fine zone reaches this many ℓ ahead of the tip
	Wake     float64 `toml:"wake"`                 // element size in the wake, as a multiple of h_fine
	AlertP   float64 `toml:"alert_plastic_strain"` // p above which a point must sit in an element of the wake size or finer
	MaxRuns  int     `toml:"max_remeshes"`
	Coarsen  *bool   `toml:"coarsen_wake"`
	Simplify float64 `toml:"simplify"` // crack-face simplification tolerance, × local size
	// Local: a remesh rebuilds only a patch around the changes and keeps
	// the rest of the mesh and its state verbatim (remesh.CycleConfig.Local).
	Local bool `toml:"local"`
}

// choice checks that value is one of allowed.
func choice(value string, allowed []string, src *caseSource, key string) error {
	for _, a := range allowed {
		if value == a {
			return nil
		}
	}
	return badInput("%s: %q is not allowed; use one of %s", src.where(key), value, strings.Join(allowed, ", "))
}

// positive checks v > 0.
func positive(v float64, src *caseSource, key string) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return badInput("%s: %g must be a positive number", src.where(key), v)
	}
	return nil
}

// nonNegative checks v ≥ 0.
func nonNegative(v float64, src *caseSource, key string) error {
	if !(v >= 0) || math.IsInf(v, 0) {
		return badInput("%s: %g must be zero or positive", src.where(key), v)
	}
	return nil
}

func (m *materialSection) complete(src *caseSource) error {
	def := materialDefaults()
	if m.Model == "" {
		m.Model = def.Model
	}
	if err := choice(m.Model, []string{"gtn", "elastic"}, src, "material.model"); err != nil {
		return err
	}
	// E and ν have no default: a default modulus would silently fix the
	// unit system (DEVELOPERS.md, units).
	for _, k := range []string{"young", "poisson"} {
		if !src.given("material." + k) {
			return badInput("%s; give Young's modulus (material.young > 0, a stress in the case's units) and Poisson's ratio (material.poisson in (−1, 0.5))", src.missing("material."+k))
		}
	}
	if err := positive(m.Young, src, "material.young"); err != nil {
		return err
	}
	if !(m.Poisson > -1 && m.Poisson < 0.5) {
		return badInput("%s: %g is outside (−1, 0.5)", src.where("material.poisson"), m.Poisson)
	}
	if m.Model == "elastic" {
		return nil
	}
	fillAbsent(src, "material", []defaultValue{
		{"yield_stress", &m.Yield, def.Yield}, {"q1", &m.Q1, def.Q1}, {"q2", &m.Q2, def.Q2}, {"f0", &m.F0, def.F0},
		{"fc", &m.Fc, def.Fc}, {"ff", &m.Ff, def.Ff}, {"reference_strain", &m.RefStrain, def.RefStrain},
		{"hardening_exponent", &m.Exponent, def.Exponent}, {"penalty", &m.Penalty, def.Penalty},
	})
	if m.Hardening == "" {
		m.Hardening = def.Hardening
	}
	if err := choice(m.Hardening, []string{"power", "voce", "table", "perfect"}, src, "material.hardening"); err != nil {
		return err
	}
	if err := checkEach(src, "material", positive, []keyValue{
		{"yield_stress", m.Yield},
		{"q1", m.Q1},
		{"q2", m.Q2},
		{"reference_strain", m.RefStrain},
	}); err != nil {
		return err
	}
	if err := checkEach(src, "material", nonNegative, []keyValue{
		{"f0", m.F0},
		{"length", m.Length},
		{"penalty", m.Penalty},
		{"nucleation_fraction", m.NuclF},
		{"nucleation_strain", m.NuclStrain},
		{"nucleation_spread", m.NuclSpread},
		{"hardening_exponent", m.Exponent},
		{"voce_saturation", m.VoceQ},
		{"voce_rate", m.VoceB},
	}); err != nil {
		return err
	}
	if !(m.F0 < m.Fc && m.Fc < m.Ff && m.Ff < 1/m.Q1) {
		return badInput("%s: porosities must satisfy 0 ≤ f0 < fc < ff < 1/q1 (= %.4g); have f0 = %g, fc = %g, ff = %g",
			src.where("material.ff"), 1/m.Q1, m.F0, m.Fc, m.Ff)
	}
	if m.FBreak != 0 && !(m.FBreak > m.Fc && m.FBreak < 1/m.Q1) {
		return badInput("%s: %g must lie in (fc, 1/q1) = (%g, %.4g)", src.where("material.f_break"), m.FBreak, m.Fc, 1/m.Q1)
	}
	if m.NuclF > 0 && !(m.NuclSpread > 0) {
		return badInput("%s: nucleation needs a positive spread s_N", src.where("material.nucleation_spread"))
	}
	if m.Hardening == "table" {
		if len(m.FlowTable) < 2 {
			return badInput("%s: a tabulated flow curve needs at least 2 rows [p, stress]", src.where("material.flow_table"))
		}
		for i, row := range m.FlowTable {
			if i == 0 && row[0] != 0 {
				return badInput("%s: the first row must be at p = 0, have %g", src.where("material.flow_table"), row[0])
			}
			if i > 0 && !(row[0] > m.FlowTable[i-1][0]) {
				return badInput("%s: row %d: p = %g must be larger than the previous %g", src.where("material.flow_table"), i+1, row[0], m.FlowTable[i-1][0])
			}
			if !(row[1] > 0) {
				return badInput("%s: row %d: stress %g must be positive", src.where("material.flow_table"), i+1, row[1])
			}
		}
	}
	return nil
}

// completeOpening checks the keys of an opening control and fills the
// crack-opening distance of a K field.
func (l *loadingSection) completeOpening(src *caseSource, unit float64) error {
	if l.Control != "opening" {
		if l.Opening != 0 || l.OpeningAt != 0 || len(l.Gauge) > 0 || len(l.GaugeDirection) > 0 {
			return badInput("%s: loading.opening, opening_at, gauge and gauge_direction need control = \"opening\"", src.where("loading.control"))
		}
		return nil
	}
	if err := positive(l.Opening, src, "loading.opening"); err != nil {
		return err
	}
	if len(l.Gauge) > 0 || len(l.GaugeDirection) > 0 {
		if len(l.Gauge) < 1 || len(l.Gauge) > 2 || len(l.GaugeDirection) != 2 || (l.GaugeDirection[0] == 0 && l.GaugeDirection[1] == 0) {
			return badInput("%s: a gauge names one or two points (gauge = [\"a\"] or [\"a\", \"b\"]) and a non-zero direction (gauge_direction = [x, y])", src.where("loading.gauge"))
		}
	}
	if l.Kind != "k_field" || len(l.Gauge) > 0 {
		if l.OpeningAt != 0 {
			return badInput("%s: opening_at places the crack-opening gauge of a K field; this control reads %s", src.where("loading.opening_at"), l.gaugeName())
		}
		return nil
	}
	if l.OpeningAt == 0 {
		l.OpeningAt = defaultOpeningAt * unit
	}
	return positive(l.OpeningAt, src, "loading.opening_at")
}

// gaugeName says which gauge an opening control reads.
func (l *loadingSection) gaugeName() string {
	if len(l.Gauge) > 0 {
		return fmt.Sprintf("the named gauge %v", l.Gauge)
	}
	return "the specimen's natural gauge"
}

func (l *loadingSection) complete(src *caseSource, natural, naturalControl string, unit float64) error {
	if l.Kind == "" {
		l.Kind = natural
	}
	if err := choice(l.Kind, []string{"k_field", "displacement", "pin", "pressure"}, src, "loading.kind"); err != nil {
		return err
	}
	if l.Control == "" {
		l.Control = naturalControl
		if l.Kind == "pressure" {
			// a follower pressure has no load rate for a bordered control
			l.Control = "load"
		}
	}
	if err := choice(l.Control, []string{"load", "opening", "dissipation"}, src, "loading.control"); err != nil {
		return err
	}
	if err := l.completeOpening(src, unit); err != nil {
		return err
	}
	switch l.Kind {
	case "k_field":
		if err := positive(l.K, src, "loading.k"); err != nil {
			return err
		}
	case "displacement", "pin", "pressure":
		if l.Value == 0 {
			return badInput("%s: the load magnitude at t = 1 must be non-zero", src.where("loading.value"))
		}
	}
	if l.Component != "" {
		if err := choice(l.Component, []string{"x", "y", "r", "z"}, src, "loading.component"); err != nil {
			return err
		}
	}
	for i, f := range l.Fix {
		if f.Label == "" {
			return badInput("%s: entry %d has no label", src.where("loading.fix"), i+1)
		}
		if err := choice(f.Component, []string{"x", "y", "r", "z", "both"}, src, "loading.fix"); err != nil {
			return err
		}
	}
	return nil
}

func (s *solverSection) complete(src *caseSource) error {
	def := solverDefaults()
	fillAbsent(src, "solver", []defaultValue{
		{"increment", &s.Increment, def.Increment}, {"max_increment", &s.MaxIncrement, def.MaxIncrement},
		{"min_increment", &s.MinIncrement, def.MinIncrement}, {"tolerance", &s.Tolerance, def.Tolerance},
	})
	if !src.given("solver.max_iterations") {
		s.MaxIter = def.MaxIter
	}
	if s.Mixed == nil {
		s.Mixed = def.Mixed
	}
	if s.ReleaseSteps == nil {
		s.ReleaseSteps = def.ReleaseSteps
	}
	if err := checkEach(src, "solver", positive, []keyValue{
		{"increment", s.Increment},
		{"min_increment", s.MinIncrement},
		{"max_increment", s.MaxIncrement},
		{"tolerance", s.Tolerance},
	}); err != nil {
		return err
	}
	if !(s.MinIncrement <= s.Increment && s.Increment <= s.MaxIncrement) {
		return badInput("%s: need min_increment ≤ increment ≤ max_increment, have %g, %g, %g",
			src.where("solver.increment"), s.MinIncrement, s.Increment, s.MaxIncrement)
	}
	if s.MaxIter < 1 || s.MaxIter > 200 {
		return badInput("%s: %d must be between 1 and 200", src.where("solver.max_iterations"), s.MaxIter)
	}
	if s.Workers < 0 {
		return badInput("%s: %d must be ≥ 0 (0 = all cores)", src.where("solver.workers"), s.Workers)
	}
	if p := s.PorosityStep; !(p >= 0 && p < 1) {
		return badInput("%s: %g must be in [0, 1) (0 = increments sized by Newton iterations alone)", src.where("solver.porosity_step"), p)
	}
	if n := *s.ReleaseSteps; n < 0 || n > 100 {
		return badInput("%s: %d must be between 0 and 100 (0 = an element leaves when all its points are broken)", src.where("solver.release_steps"), n)
	}
	return nil
}

func (s *stopSection) complete(src *caseSource) error {
	def := stopDefaults()
	fillAbsent(src, "stop", []defaultValue{{"t", &s.T, def.T}})
	if !src.given("stop.max_steps") {
		s.MaxSteps = def.MaxSteps
	}
	if err := positive(s.T, src, "stop.t"); err != nil {
		return err
	}
	if err := checkEach(src, "stop", nonNegative, []keyValue{{"da", s.Da}, {"hours", s.Hours}}); err != nil {
		return err
	}
	if s.MaxSteps < 1 {
		return badInput("%s: %d must be positive", src.where("stop.max_steps"), s.MaxSteps)
	}
	return nil
}

func (o *outputSection) complete(src *caseSource) error {
	def := outputDefaults()
	if !src.given("output.fields_every") {
		o.FieldsEvery = def.FieldsEvery
	}
	fillAbsent(src, "output", []defaultValue{{"checkpoint_minutes", &o.CheckpointMinutes, def.CheckpointMinutes}})
	if o.FieldsEvery < 1 {
		return badInput("%s: %d must be positive", src.where("output.fields_every"), o.FieldsEvery)
	}
	return positive(o.CheckpointMinutes, src, "output.checkpoint_minutes")
}

func (a *adaptSection) complete(src *caseSource, hasCrack bool) error {
	if a.Enabled == nil {
		a.Enabled = &hasCrack
	}
	def := adaptDefaults()
	if a.Coarsen == nil {
		a.Coarsen = def.Coarsen
	}
	fillAbsent(src, "adapt", []defaultValue{
		{"margin", &a.Margin, def.Margin}, {"ahead", &a.Ahead, def.Ahead}, {"wake", &a.Wake, def.Wake},
		{"alert_plastic_strain", &a.AlertP, def.AlertP}, {"simplify", &a.Simplify, def.Simplify},
	})
	if err := checkEach(src, "adapt", positive, []keyValue{
		{"margin", a.Margin},
		{"ahead", a.Ahead},
		{"wake", a.Wake},
		{"alert_plastic_strain", a.AlertP},
		{"simplify", a.Simplify},
	}); err != nil {
		return err
	}
	if a.Wake < 1 {
		return badInput("%s: %g must be ≥ 1 (a multiple of h_fine)", src.where("adapt.wake"), a.Wake)
	}
	if a.MaxRuns < 0 {
		return badInput("%s: %d must be ≥ 0 (0 = no limit)", src.where("adapt.max_remeshes"), a.MaxRuns)
	}
	return nil
}

// defaultValue is a number of a section, its key and its default.
type defaultValue struct {
	key string
	v   *float64
	def float64
}

// fillAbsent sets every value whose key the case does not give to its
// default. A written value — zero included — is kept and validated as
// written.
func fillAbsent(src *caseSource, section string, vals []defaultValue) {
	for _, d := range vals {
		if !src.given(section + "." + d.key) {
			*d.v = d.def
		}
	}
}

// keyValue is one number of a section, named by its key.
type keyValue struct {
	key   string
	value float64
}

// checkEach applies check to every value in order and returns the first
// error; the keys are those of section.
func checkEach(src *caseSource, section string, check func(float64, *caseSource, string) error, vals []keyValue) error {
	for _, kv := range vals {
		if err := check(kv.value, src, section+"."+kv.key); err != nil {
			return err
		}
	}
	return nil
}
