package specimen

import (
	"fmt"
	"math"
	"strings"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/solver"
	"tearline/solver/fem"
)

// Load is the applied load of a run and its extra supports.
type Load struct {
	Kind LoadKind
	// K and T are the stress intensity and the T-stress of a K-field at
	// t = 1.
	K, T float64
	// Value is the pin displacement, the prescribed displacement or the
	// pressure at t = 1.
	Value float64
	// Label is the boundary label a pin, displacement or pressure acts on;
	// "" takes the specimen's: geom.LabelPin for a pin, else geom.LabelEnd
	// or, without one, geom.LabelTop.
	Label string
	// Comp is the component of a prescribed displacement (0: x or r,
	// 1: y or z).
	Comp int
	// Fix holds extra supports on boundary labels.
	Fix []fem.Displacement
	// Opening, when > 0, makes the pseudo-time drive the specimen's gauge
	// (Specimen.Gauge) from its reading at the start to that plus Opening
	// at t = 1; the load factor is then solved for. 0 means load control.
	Opening float64
}

// Field names the field of a Load an error is about.
type Field int

const (
	FieldKind    Field = iota // Kind, or a label or point the kind needs
	FieldK                    // K and T
	FieldLabel                // Label
	FieldComp                 // Comp
	FieldFix                  // Fix
	FieldOpening              // Opening
)

func (f Field) String() string {
	switch f {
	case FieldKind:
		return "kind"
	case FieldK:
		return "K"
	case FieldLabel:
		return "label"
	case FieldComp:
		return "component"
	case FieldFix:
		return "fix"
	case FieldOpening:
		return "opening"
	}
	return fmt.Sprintf("Field(%d)", int(f))
}

// LoadError is an error in one field of a Load, so that the caller can
// point at the input the field came from.
type LoadError struct {
	Field Field
	Err   error
}

func (e *LoadError) Error() string { return fmt.Sprintf("load %v: %v", e.Field, e.Err) }

// Unwrap returns the error without the field.
func (e *LoadError) Unwrap() error { return e.Err }

// Setup is a specimen under a load: the conditions and measures of a run.
type Setup struct {
	BCs fem.BCs
	// Measure returns the history's control quantity and force of a
	// converged state; NaN where one does not apply.
	Measure func(p *fem.Problem) (control, force float64, err error)
	// Control is the opening control of a problem; nil under load control.
	Control func(p *fem.Problem) (*solver.Control, error)
	// KField is the applied K-field at t = 1 (K-field load only).
	KField *criteria.KField
	// CT is the specimen of the ASTM E1820 J (pin-loaded C(T) only).
	CT *criteria.CTSpecimen
}

// JRoute is the way to the J of the resistance curve.
type JRoute int

const (
	// JDomain is the domain integral around the current tip.
	JDomain JRoute = iota
	// JFarField is the J of the applied K-field, K²(1−ν²)/E in plane
	// strain (small-scale yielding; Rice 1968, J. Appl. Mech. 35).
	JFarField
	// JE1820 is the J of ASTM E1820 from the force–load-line-displacement
	// record of a C(T) specimen.
	JE1820
)

func (r JRoute) String() string {
	switch r {
	case JDomain:
		return "domain integral"
	case JFarField:
		return "far field"
	case JE1820:
		return "ASTM E1820"
	}
	return fmt.Sprintf("JRoute(%d)", int(r))
}

// JRoute returns the route to the J of the resistance curve.
func (su *Setup) JRoute() JRoute {
	switch {
	case su.KField != nil:
		return JFarField
	case su.CT != nil:
		return JE1820
	}
	return JDomain
}

// pinContact is the half-angle in degrees of a pin's contact arc about the
// loading direction: a narrow arc acts as a hinge, while a pin tied over
// the whole loaded half of the hole resists the arm's rotation and
// stiffens a C(T) specimen (see fem.Pin.Contact).
const pinContact = 10.0

// Apply returns the conditions and measures of the specimen under l; el
// are the elastic constants of the K-field and of the E1820 record. The
// natural supports come first, then l.Fix, then the load's own conditions.
// An error in l is a *LoadError.
func (s *Specimen) Apply(l Load, el criteria.Elastic) (*Setup, error) {
	su := &Setup{}
	su.BCs.Symmetries = s.Supports()
	for _, f := range l.Fix {
		if err := s.need(f.Label, FieldFix); err != nil {
			return nil, err
		}
		su.BCs.Displacements = append(su.BCs.Displacements, f)
	}
	if l.Comp != 0 && l.Comp != 1 {
		return nil, &LoadError{FieldComp, fmt.Errorf("component %d must be 0 (x or r) or 1 (y or z)", l.Comp)}
	}
	if l.Opening != 0 {
		if err := s.checkGauge(l.Opening); err != nil {
			return nil, err
		}
	}
	var err error
	switch l.Kind {
	case KField:
		err = s.kField(su, l, el)
	case Pin:
		err = s.pin(su, l, el)
	case Displacement, Pressure:
		err = s.edge(su, l)
	default:
		err = &LoadError{FieldKind, fmt.Errorf("%v is not a load kind", l.Kind)}
	}
	if err != nil {
		return nil, err
	}
	if l.Opening != 0 {
		su.Control = s.Gauge.Control(l.Opening)
	}
	return su, nil
}

// checkGauge checks that an opening control of opening can drive the
// specimen's gauge.
func (s *Specimen) checkGauge(opening float64) error {
	if !(opening > 0) || math.IsInf(opening, 0) {
		return &LoadError{FieldOpening, fmt.Errorf("the opening at t = 1 is %g; it must be positive and finite", opening)}
	}
	if s.Gauge == nil {
		return &LoadError{FieldOpening, fmt.Errorf("this geometry has no natural gauge for an opening control; name its points (loading.gauge)")}
	}
	if err := s.Gauge.Validate(s.Domain); err != nil {
		return &LoadError{FieldOpening, err}
	}
	return nil
}

// need checks that the domain has a boundary label.
func (s *Specimen) need(label string, f Field) error {
	if !s.Has(label) {
		return &LoadError{f, fmt.Errorf("the geometry has no boundary label %q (it has %s)", label, strings.Join(s.Domain.Labels(), ", "))}
	}
	return nil
}

// kField prescribes the Williams displacement of the K-field on the remote
// boundary (Williams 1957, J. Appl. Mech. 24).
func (s *Specimen) kField(su *Setup, l Load, el criteria.Elastic) error {
	if err := s.need(geom.LabelRemote, FieldKind); err != nil {
		return err
	}
	tip, ok := s.Domain.Points[geom.PointTip]
	if !ok {
		return &LoadError{FieldKind, fmt.Errorf("a K-field needs a crack tip point %q in the geometry", geom.PointTip)}
	}
	kf := criteria.KField{K: l.K, T: l.T, El: el, Tip: tip.X, Dir: tip.Dir}
	if err := kf.Validate(); err != nil {
		return &LoadError{FieldK, err}
	}
	su.KField = &kf
	// The field of K = 1 (T/K keeps the ratio) scaled by K·t.
	unit := kf
	unit.K, unit.T = 1, l.T/l.K
	k := l.K
	su.BCs.Displacements = append(su.BCs.Displacements, fem.Displacement{
		Label: geom.LabelRemote, Fix: [2]bool{true, true},
		Func: func(X [2]float64, t float64) [2]float64 {
			u := unit.Displacement(X)
			f := k * t
			return [2]float64{f * u[0], f * u[1]}
		},
	})
	// The force: the resultant of the reactions on the remote boundary
	// along the crack's opening direction (the model's own, per unit
	// thickness), so that a transfer and the re-equilibration show in it.
	dl := math.Hypot(tip.Dir[0], tip.Dir[1])
	normal := [2]float64{-tip.Dir[1] / dl, tip.Dir[0] / dl}
	thick := s.Thickness()
	su.Measure = func(p *fem.Problem) (float64, float64, error) {
		r, err := p.Reaction(geom.LabelRemote)
		return k * p.TCommitted, (r[0]*normal[0] + r[1]*normal[1]) * thick, err
	}
	return nil
}

// pin loads the pin hole(s) through rigid pins that move apart.
func (s *Specimen) pin(su *Setup, l Load, el criteria.Elastic) error {
	label := geom.LabelPin
	if l.Label != "" {
		label = l.Label
	}
	if err := s.need(label, FieldLabel); err != nil {
		return err
	}
	su.BCs.Pins = append(su.BCs.Pins, fem.Pin{Label: label, Comp: 1, Value: l.Value, Contact: pinContact})
	if s.Has(geom.LabelPinLower) {
		su.BCs.Pins = append(su.BCs.Pins, fem.Pin{Label: geom.LabelPinLower, Comp: 1, Value: -l.Value, Contact: pinContact})
	}
	_, line := s.Domain.Points[geom.PointLoadLine]
	_, lower := s.Domain.Points[geom.PointLoadLineLower]
	if line {
		// The body is free to slide along the crack: hold one point of
		// the load line (a rigid-body constraint, no force).
		su.BCs.Displacements = append(su.BCs.Displacements, fem.Displacement{Point: geom.PointLoadLine, Fix: [2]bool{true, false}})
	}
	thick := s.Thickness()
	if c := s.CT; c != nil {
		su.CT = &criteria.CTSpecimen{W: c.W, B: thick, BN: thick, A0: c.AOverW * c.W, El: el}
	}
	su.Measure = loadLineMeasure(l.Value, thick, line, lower)
	return nil
}

// loadLineMeasure returns the force (pin force × thickness) and the
// load-line displacement as a clip gauge on the load line measures it (ASTM
// E1820): the opening of the notch faces at the load line, free of the
// pin-contact deformation, twice the upper face's in a half model. Without
// a load-line point it is the pins' separation.
func loadLineMeasure(value, thick float64, line, lower bool) func(p *fem.Problem) (float64, float64, error) {
	return func(p *fem.Problem) (float64, float64, error) {
		f, err := p.PinForce(0)
		if err != nil || !line {
			return 2 * value * p.TCommitted, f * thick, err
		}
		up, _ := p.Nodal(p.Committed, p.Mesh.Points[geom.PointLoadLine], fem.Uy)
		down := -up // mirror image in a half model
		if lower {
			down, _ = p.Nodal(p.Committed, p.Mesh.Points[geom.PointLoadLineLower], fem.Uy)
		}
		return up - down, f * thick, nil
	}
}

// edge applies a prescribed displacement or a pressure on a boundary label.
func (s *Specimen) edge(su *Setup, l Load) error {
	label, err := s.loadedLabel(l.Label)
	if err != nil {
		return err
	}
	value := l.Value
	if l.Kind == Pressure {
		su.BCs.Tractions = append(su.BCs.Tractions, fem.Traction{Label: label, Pressure: value})
		nan := math.NaN()
		su.Measure = func(p *fem.Problem) (float64, float64, error) { return value * p.TCommitted, nan, nil }
		return nil
	}
	k := l.Comp
	var v [2]float64
	var fix [2]bool
	v[k], fix[k] = value, true
	if s.Clamped {
		fix = [2]bool{true, true}
	}
	su.BCs.Displacements = append(su.BCs.Displacements, fem.Displacement{Label: label, Fix: fix, Value: v})
	if o := opposite(label); o != "" && s.Has(o) {
		su.BCs.Displacements = append(su.BCs.Displacements, fem.Displacement{Label: o, Fix: fix, Value: [2]float64{-v[0], -v[1]}})
	}
	thick := s.Thickness()
	if s.Domain.Axisymmetric {
		thick = 1 // the ring force is already the whole bar's
	}
	su.Measure = func(p *fem.Problem) (float64, float64, error) {
		r, err := p.Reaction(label)
		return value * p.TCommitted, r[k] * thick, err
	}
	return nil
}

// loadedLabel returns the label a displacement or pressure acts on.
func (s *Specimen) loadedLabel(label string) (string, error) {
	if label == "" {
		for _, c := range []string{geom.LabelEnd, geom.LabelTop} {
			if s.Has(c) {
				label = c
				break
			}
		}
	}
	if label == "" {
		return "", &LoadError{FieldLabel, fmt.Errorf("give the boundary label the load acts on (labels: %s)", strings.Join(s.Domain.Labels(), ", "))}
	}
	return label, s.need(label, FieldLabel)
}

// opposite returns the edge that moves against a loaded edge, or "": the
// bottom of a plate pulled at its top, the base of a full bar pulled at its
// end.
func opposite(label string) string {
	switch label {
	case geom.LabelTop:
		return geom.LabelBottom
	case geom.LabelEnd:
		return geom.LabelBase
	}
	return ""
}
