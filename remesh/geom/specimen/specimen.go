package specimen

import (
	"fmt"

	"tearline/remesh/geom"
	"tearline/solver/fem"
)

// LoadKind is the kind of the applied load.
type LoadKind int

const (
	// KField prescribes the Williams displacement of a remote K-field.
	KField LoadKind = iota + 1
	// Pin loads the pin hole(s) through rigid pins.
	Pin
	// Displacement prescribes a displacement on a label.
	Displacement
	// Pressure applies a dead pressure on a label.
	Pressure
)

func (k LoadKind) String() string {
	switch k {
	case KField:
		return "K-field"
	case Pin:
		return "pin"
	case Displacement:
		return "displacement"
	case Pressure:
		return "pressure"
	}
	return fmt.Sprintf("LoadKind(%d)", int(k))
}

// Specimen is a geometry with its mechanical meaning. The constructors fill
// every field; a Specimen of another domain may be given directly.
type Specimen struct {
	Domain *geom.Domain
	// Natural is the load of the specimen when a run names none.
	Natural LoadKind
	// Symmetric marks a half model whose mirror plane is the crack plane:
	// the domain J is doubled and the CTOD is twice the upper face's
	// opening (criteria.JOptions, criteria.CTODOptions).
	Symmetric bool
	// Clamped holds both displacement components on a loaded edge and its
	// opposite (grips that do not let the edges slide).
	Clamped bool
	// CT is set for a compact-tension specimen: a pin load then gives the
	// record of the ASTM E1820 J.
	CT *geom.CT
	// Gauge is the specimen's natural opening gauge, which an opening
	// control drives: the load-line opening of a C(T), the reduction of a
	// notched bar's minimum diameter, the mean notch-mouth opening of a
	// DENT, the crack opening behind the tip of a boundary-layer disk
	// (AddOpeningPoints); nil where there is none (a polygon names its own).
	Gauge *Gauge
}

// build completes a specimen of a freshly built domain.
func build(d *geom.Domain, err error, s Specimen) (*Specimen, error) {
	if err != nil {
		return nil, err
	}
	s.Domain = d
	return &s, nil
}

// NewSSY returns the boundary-layer disk under a remote K-field, a half
// model unless p.Full.
func NewSSY(p geom.SSY) (*Specimen, error) {
	d, err := p.Domain()
	return build(d, err, Specimen{Natural: KField, Symmetric: !p.Full})
}

// NewCT returns the compact-tension specimen loaded through its pins, a half
// model unless p.Full.
func NewCT(p geom.CT) (*Specimen, error) {
	d, err := p.Domain()
	g := pairOpening("load-line opening", geom.PointLoadLine, geom.PointLoadLineLower, [2]float64{0, 1}, p.Full)
	return build(d, err, Specimen{Natural: Pin, Symmetric: !p.Full, CT: &p, Gauge: g})
}

// NewNotchedBar returns the round bar pulled at its end. Its half model has
// the minimum section as a mirror plane, but it is not Symmetric: J is not
// evaluated in axisymmetry and the CTOD is taken without mirroring.
func NewNotchedBar(p geom.NotchedBar) (*Specimen, error) {
	d, err := p.Domain()
	// ΔD = −2·u_r at the notch root on the minimum section
	g := &Gauge{Name: "diameter reduction", Terms: []GaugeTerm{{geom.PointRoot, [2]float64{1, 0}, -2}}}
	return build(d, err, Specimen{Natural: Displacement, Gauge: g})
}

// NewDENT returns the double-edge-notched plate pulled by clamped grips on
// its top and bottom edges.
func NewDENT(p geom.DENT) (*Specimen, error) {
	d, err := p.Domain()
	// the mean of the two notches' mouth openings, upper minus lower face
	up := [2]float64{0, 1}
	g := &Gauge{Name: "notch-mouth opening", Terms: []GaugeTerm{
		{geom.PointMouth, up, 0.5}, {geom.PointMouthLower, up, -0.5},
		{geom.PointMouthRight, up, 0.5}, {geom.PointMouthRightLower, up, -0.5}}}
	return build(d, err, Specimen{Natural: Displacement, Clamped: true, Gauge: g})
}

// NewPolygon returns a general domain; its meaning follows its labels: the
// natural load is a K-field with a geom.LabelRemote boundary, a pin load
// with a geom.LabelPin boundary (the later of the two in the order of
// Domain.Labels when both are present), a displacement otherwise, and it is
// Symmetric when it has a geom.LabelSymmetry boundary. The notes say which
// loops geom.Polygon.Domain reversed.
func NewPolygon(p geom.Polygon) (*Specimen, []string, error) {
	d, notes, err := p.Domain()
	if err != nil {
		return nil, notes, err
	}
	s := &Specimen{Domain: d, Natural: Displacement, Symmetric: hasLabel(d, geom.LabelSymmetry)}
	for _, l := range d.Labels() {
		switch l {
		case geom.LabelRemote:
			s.Natural = KField
		case geom.LabelPin:
			s.Natural = Pin
		}
	}
	return s, notes, nil
}

// hasLabel reports whether a boundary piece of d carries label.
func hasLabel(d *geom.Domain, label string) bool {
	for _, l := range d.Labels() {
		if l == label {
			return true
		}
	}
	return false
}

// Has reports whether a boundary piece carries label.
func (s *Specimen) Has(label string) bool { return hasLabel(s.Domain, label) }

// Thickness is the out-of-plane thickness that multiplies the plane-strain
// force per unit thickness: the domain's, or 1 when it gives none.
func (s *Specimen) Thickness() float64 {
	if s.Domain.Thickness > 0 {
		return s.Domain.Thickness
	}
	return 1
}

// Supports returns the natural supports, which every load keeps: the
// mirror plane on geom.LabelSymmetry (y = 0, or z = 0 of a round bar; the
// crack grows along it) and the axis r = 0 on geom.LabelAxis.
func (s *Specimen) Supports() []fem.Symmetry {
	var sym []fem.Symmetry
	if s.Has(geom.LabelSymmetry) {
		sym = append(sym, fem.Symmetry{Label: geom.LabelSymmetry, Comp: 1, CrackPlane: true})
	}
	if s.Has(geom.LabelAxis) {
		sym = append(sym, fem.Symmetry{Label: geom.LabelAxis, Comp: 0})
	}
	return sym
}
