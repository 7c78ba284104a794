package specimen_test

import (
	"errors"
	"math"
	"sort"
	"strings"
	"testing"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
)

var steel = criteria.Elastic{E: 200e3, Nu: 0.3}

// built returns a function that fails the test on a constructor's error.
func built(t *testing.T) func(*specimen.Specimen, error) *specimen.Specimen {
	return func(s *specimen.Specimen, err error) *specimen.Specimen {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
}

// labelsOf returns the boundary labels and the points the conditions name,
// sorted.
func labelsOf(b fem.BCs) (labels, points []string) {
	for _, s := range b.Symmetries {
		labels = append(labels, s.Label)
	}
	for _, d := range b.Displacements {
		if d.Point != "" {
			points = append(points, d.Point)
		} else {
			labels = append(labels, d.Label)
		}
	}
	for _, tr := range b.Tractions {
		labels = append(labels, tr.Label)
	}
	for _, p := range b.Pins {
		labels = append(labels, p.Label)
	}
	sort.Strings(labels)
	sort.Strings(points)
	return labels, points
}

// TestNaturalConditions applies each built-in specimen's natural load and
// checks its conditions against the project's record of the natural loads
// per specimen (DEVELOPERS.md, "Natural loads per specimen"): the labels
// and points they name exist in the geometry, the mirror plane and axis
// are held, the J route is the far field for SSY and ASTM E1820 for a C(T)
// (DEVELOPERS.md: the J of the resistance curve), and J and CTOD mirror
// exactly the plane half models.
func TestNaturalConditions(t *testing.T) {
	must := built(t)
	full := func(p geom.CT) geom.CT { p.Full, p.TipRadius = true, 0.2; return p }
	ssyFull := geom.DefaultSSY()
	ssyFull.Full = true
	barFull := geom.DefaultNotchedBar()
	barFull.Full = true
	cases := []struct {
		name      string
		s         *specimen.Specimen
		load      specimen.Load
		labels    []string // sorted labels of the conditions
		points    []string
		route     specimen.JRoute
		symmetric bool
	}{
		{"ssy half", must(specimen.NewSSY(geom.DefaultSSY())), specimen.Load{K: 100}, []string{"remote", "symmetry"}, nil, specimen.JFarField, true},
		{"ssy full", must(specimen.NewSSY(ssyFull)), specimen.Load{K: 100}, []string{"remote"}, nil, specimen.JFarField, false},
		{"ct half", must(specimen.NewCT(geom.DefaultCT())), specimen.Load{Value: 0.5}, []string{"pin", "symmetry"}, []string{"loadline"}, specimen.JE1820, true},
		{"ct full", must(specimen.NewCT(full(geom.DefaultCT()))), specimen.Load{Value: 0.5}, []string{"pin", "pin_lower"}, []string{"loadline"}, specimen.JE1820, false},
		{"notched bar half", must(specimen.NewNotchedBar(geom.DefaultNotchedBar())), specimen.Load{Value: 0.6, Comp: 1}, []string{"axis", "end", "symmetry"}, nil, specimen.JDomain, false},
		{"notched bar full", must(specimen.NewNotchedBar(barFull)), specimen.Load{Value: 0.6, Comp: 1}, []string{"axis", "base", "end"}, nil, specimen.JDomain, false},
		{"dent", must(specimen.NewDENT(geom.DefaultDENT())), specimen.Load{Value: 0.4, Comp: 1}, []string{"bottom", "top"}, nil, specimen.JDomain, false},
	}
	for _, c := range cases {
		c.load.Kind = c.s.Natural
		su, err := c.s.Apply(c.load, steel)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		labels, points := labelsOf(su.BCs)
		for _, l := range labels {
			if !c.s.Has(l) {
				t.Errorf("%s: a condition names label %q, the geometry has %v", c.name, l, c.s.Domain.Labels())
			}
		}
		for _, p := range points {
			if _, ok := c.s.Domain.Points[p]; !ok {
				t.Errorf("%s: a condition names point %q, which the geometry lacks", c.name, p)
			}
		}
		if strings.Join(labels, ",") != strings.Join(c.labels, ",") || strings.Join(points, ",") != strings.Join(c.points, ",") {
			t.Errorf("%s: conditions on labels %v and points %v, want %v and %v", c.name, labels, points, c.labels, c.points)
		}
		if su.JRoute() != c.route || c.s.Symmetric != c.symmetric {
			t.Errorf("%s: J route %v, symmetric %v; want %v, %v", c.name, su.JRoute(), c.s.Symmetric, c.route, c.symmetric)
		}
		if su.Measure == nil || su.Control != nil {
			t.Errorf("%s: measure set %v, opening control set %v; want a measure and load control", c.name, su.Measure != nil, su.Control != nil)
		}
	}
}

// TestGrips: the DENT's grips are clamped (both components held) and the
// bottom moves against the top (DEVELOPERS.md: clamped grips on top and
// bottom); the round bar's end moves only along the axis.
func TestGrips(t *testing.T) {
	must := built(t)
	dent := must(specimen.NewDENT(geom.DefaultDENT()))
	su, err := dent.Apply(specimen.Load{Kind: specimen.Displacement, Value: 0.4, Comp: 1}, steel)
	if err != nil {
		t.Fatal(err)
	}
	want := []fem.Displacement{
		{Label: geom.LabelTop, Fix: [2]bool{true, true}, Value: [2]float64{0, 0.4}},
		{Label: geom.LabelBottom, Fix: [2]bool{true, true}, Value: [2]float64{0, -0.4}},
	}
	if d := su.BCs.Displacements; len(d) != 2 || d[0].Label != want[0].Label || d[0].Fix != want[0].Fix || d[0].Value != want[0].Value ||
		d[1].Label != want[1].Label || d[1].Fix != want[1].Fix || d[1].Value != want[1].Value {
		t.Errorf("DENT grips %+v, want %+v", d, want)
	}
	bar := must(specimen.NewNotchedBar(geom.DefaultNotchedBar()))
	su, err = bar.Apply(specimen.Load{Kind: specimen.Displacement, Value: 0.6, Comp: 1}, steel)
	if err != nil {
		t.Fatal(err)
	}
	if d := su.BCs.Displacements; len(d) != 1 || d[0].Fix != [2]bool{false, true} {
		t.Errorf("bar end %+v, want u_z prescribed only", d)
	}
}

// TestCTRecord: the ASTM E1820 record of a pin-loaded C(T) has the
// specimen's W, a₀ = (a₀/W)·W and B = B_N = the thickness (side-grooved
// only when B_N < B; ASTM E1820 definitions).
func TestCTRecord(t *testing.T) {
	must := built(t)
	p := geom.DefaultCT()
	s := must(specimen.NewCT(p))
	su, err := s.Apply(specimen.Load{Kind: specimen.Pin, Value: 0.5}, steel)
	if err != nil {
		t.Fatal(err)
	}
	want := criteria.CTSpecimen{W: 50, B: 25, BN: 25, A0: 27.5, El: steel}
	if su.CT == nil || math.Abs(su.CT.W-want.W) > 1e-12 || math.Abs(su.CT.A0-want.A0) > 1e-12 ||
		math.Abs(su.CT.B-want.B) > 1e-12 || su.CT.BN != su.CT.B || su.CT.El != steel {
		t.Errorf("E1820 record %+v, want %+v", su.CT, want)
	}
	// A C(T) loaded by a displacement is not an E1820 test.
	su, err = s.Apply(specimen.Load{Kind: specimen.Displacement, Label: geom.LabelPin, Value: 0.5, Comp: 1}, steel)
	if err != nil {
		t.Fatal(err)
	}
	if su.JRoute() != specimen.JDomain {
		t.Errorf("displacement-loaded C(T): J route %v, want the domain integral", su.JRoute())
	}
}

// TestLoadErrors: a load the geometry cannot carry is a *LoadError naming
// the field at fault and what the geometry has (common practice for input
// errors: say what, where and what is allowed).
func TestLoadErrors(t *testing.T) {
	must := built(t)
	ssy := must(specimen.NewSSY(geom.DefaultSSY()))
	ct := must(specimen.NewCT(geom.DefaultCT()))
	square := geom.Polygon{Loops: []geom.LoopSpec{{Start: [2]float64{0, 0}, Pieces: []geom.PieceSpec{
		{To: [2]float64{1, 0}, Label: "a"}, {To: [2]float64{1, 1}, Label: "b"}, {To: [2]float64{0, 1}, Label: "a"}, {To: [2]float64{0, 0}, Label: "a"}}}}}
	poly, _, err := specimen.NewPolygon(square)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name  string
		s     *specimen.Specimen
		load  specimen.Load
		field specimen.Field
		want  string
	}{
		{"K-field without remote boundary", ct, specimen.Load{Kind: specimen.KField, K: 1}, specimen.FieldKind, `no boundary label "remote" (it has symmetry, free, notch, crack, pin)`},
		{"infinite K", ssy, specimen.Load{Kind: specimen.KField, K: math.Inf(1)}, specimen.FieldK, "must be finite"},
		{"pin without hole", ssy, specimen.Load{Kind: specimen.Pin, Value: 1}, specimen.FieldLabel, `no boundary label "pin"`},
		{"displacement without loaded edge", poly, specimen.Load{Kind: specimen.Displacement, Value: 1, Comp: 1}, specimen.FieldLabel, "give the boundary label the load acts on (labels: a, b)"},
		{"pressure on a missing label", poly, specimen.Load{Kind: specimen.Pressure, Value: 1, Label: "top"}, specimen.FieldLabel, `no boundary label "top"`},
		{"fix on a missing label", poly, specimen.Load{Kind: specimen.Displacement, Label: "b", Value: 1, Fix: []fem.Displacement{{Label: "c", Fix: [2]bool{true, true}}}}, specimen.FieldFix, `no boundary label "c"`},
		{"component", poly, specimen.Load{Kind: specimen.Displacement, Label: "b", Value: 1, Comp: 2}, specimen.FieldComp, "component 2"},
		{"opening of a polygon without gauge", poly, specimen.Load{Kind: specimen.Displacement, Label: "b", Value: 1, Opening: 0.1}, specimen.FieldOpening, "no natural gauge"},
		{"negative opening", ct, specimen.Load{Kind: specimen.Pin, Value: 1, Opening: -0.1}, specimen.FieldOpening, "must be positive"},
		{"no kind", ssy, specimen.Load{}, specimen.FieldKind, "not a load kind"},
	}
	for _, c := range cases {
		_, err := c.s.Apply(c.load, steel)
		var le *specimen.LoadError
		if !errors.As(err, &le) || le.Field != c.field || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want a LoadError in %v containing %q", c.name, err, c.field, c.want)
		}
	}
	// A polygon with a remote boundary but no tip point.
	remote := square
	remote.Loops = []geom.LoopSpec{{Start: [2]float64{0, 0}, Pieces: []geom.PieceSpec{
		{To: [2]float64{1, 0}, Label: "a"}, {To: [2]float64{1, 1}, Label: geom.LabelRemote}, {To: [2]float64{0, 1}, Label: "a"}, {To: [2]float64{0, 0}, Label: "a"}}}}
	s, _, err := specimen.NewPolygon(remote)
	if err != nil {
		t.Fatal(err)
	}
	if s.Natural != specimen.KField {
		t.Errorf("polygon with a remote boundary: natural load %v, want a K-field", s.Natural)
	}
	var le *specimen.LoadError
	if _, err := s.Apply(specimen.Load{Kind: specimen.KField, K: 1}, steel); !errors.As(err, &le) || le.Field != specimen.FieldKind || !strings.Contains(err.Error(), `crack tip point "tip"`) {
		t.Errorf("K-field without tip: error %v", err)
	}
}

// TestAddOpeningPoints: the opening points lie where the normal to the
// crack at the given distance behind the tip crosses the straight crack
// faces (elementary geometry: the faces of the blunt SSY crack are
// y = ±ρ₀, the sharp C(T) crack lies on y = 0 from the notch to a₀).
func TestAddOpeningPoints(t *testing.T) {
	must := built(t)
	full := geom.DefaultSSY()
	full.Full = true
	cases := []struct {
		name   string
		s      *specimen.Specimen
		behind float64
		want   map[string][2]float64 // nil: an error
	}{
		{"ssy half", must(specimen.NewSSY(geom.DefaultSSY())), 1, map[string][2]float64{geom.PointOpening: {-1, 0.02}}},
		{"ssy full", must(specimen.NewSSY(full)), 1, map[string][2]float64{geom.PointOpening: {-1, 0.02}, geom.PointOpeningLower: {-1, -0.02}}},
		{"ct half", must(specimen.NewCT(geom.DefaultCT())), 2, map[string][2]float64{geom.PointOpening: {25.5, 0}}},
		{"behind the notch", must(specimen.NewCT(geom.DefaultCT())), 6, nil},
		{"outside the disk", must(specimen.NewSSY(geom.DefaultSSY())), 60, nil},
		{"no crack face", must(specimen.NewNotchedBar(geom.DefaultNotchedBar())), 1, nil},
		{"no tip", &specimen.Specimen{Domain: &geom.Domain{Outer: must(specimen.NewDENT(geom.DefaultDENT())).Domain.Outer, Points: map[string]geom.Point{}}}, 1, nil},
	}
	for _, c := range cases {
		err := c.s.AddOpeningPoints(c.behind)
		if c.want == nil {
			if err == nil {
				t.Errorf("%s: no error", c.name)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		for name, x := range c.want {
			p, ok := c.s.Domain.Points[name]
			if !ok || math.Hypot(p.X[0]-x[0], p.X[1]-x[1]) > 1e-12 {
				t.Errorf("%s: point %q at %v (present %v), want %v", c.name, name, p.X, ok, x)
			}
		}
	}
}

// TestWilliamsForce solves the upper half of a boundary-layer disk of
// radius R under the Williams displacement of K (and T) on its rim and
// checks the measures against closed forms of the K-field (Williams 1957,
// J. Appl. Mech. 24; opening from Irwin's near-tip displacement, e.g.
// Anderson, Fracture Mechanics, ch. 2):
//   - force: the resultant along the crack normal of the reactions on the
//     rim, which balances σ_yy = K/√(2πx) over the ligament 0 < x < R:
//     ∫ K/√(2πx) dx = 2K√(R/2π); the T-stress acts along the crack and
//     adds nothing (the tolerance covers the discretisation error of this
//     mesh, which shrinks as the tip is refined);
//   - control: K·t;
//   - the opening control's value: the crack opening r behind the tip,
//     twice the upper face's u_y, δ = 8K(1−ν²)/E·√(r/2π).
//
// T is kept of the order of the K-field's stress at the rim, K/√(2πR): a
// T-stress far above it couples into the force through finite-strain terms.
func TestWilliamsForce(t *testing.T) {
	must := built(t)
	const R, K, r = 10.0, 50.0, 1.0
	for _, T := range []float64{0, 5} {
		s := must(specimen.NewSSY(geom.SSY{Radius: R}))
		if err := s.AddOpeningPoints(r); err != nil {
			t.Fatal(err)
		}
		su, err := s.Apply(specimen.Load{Kind: specimen.KField, K: K, T: T, Opening: 0.01}, steel)
		if err != nil {
			t.Fatal(err)
		}
		p := solveElastic(t, s.Domain, su.BCs)
		control, force, err := su.Measure(p)
		if err != nil {
			t.Fatal(err)
		}
		want := 2 * K * math.Sqrt(R/(2*math.Pi))
		if control != K || math.Abs(force-want) > 0.01*want {
			t.Errorf("T = %g: control %g, force %.6g; want K = %g and 2K√(R/2π) = %.6g within 1%%", T, control, force, K, want)
		}
		c, err := su.Control(p)
		if err != nil {
			t.Fatal(err)
		}
		node := p.Mesh.Points[geom.PointOpening]
		if len(c.Dofs) != 1 || c.Dofs[0] != p.Dofs.Of(node, fem.Uy) || c.Weights[0] != 2 || c.Rate != 0.01 {
			t.Errorf("T = %g: opening control %+v, want twice u_y of node %d at rate 0.01 (half model)", T, c, node)
		}
		delta := 8 * K * (1 - steel.Nu*steel.Nu) / steel.E * math.Sqrt(r/(2*math.Pi))
		if got := c.Value(p.Committed); math.Abs(got-delta) > 0.01*delta {
			t.Errorf("T = %g: opening %.6g at %g behind the tip, closed form %.6g (1%%)", T, got, r, delta)
		}
	}
}

// elasticProblem meshes d to the size options and sets up a Hencky problem
// of the constants steel (small strains: linear elasticity) with bcs.
func elasticProblem(t *testing.T, d *geom.Domain, so size.Options, kin fem.Kinematics, bcs fem.BCs) *fem.Problem {
	t.Helper()
	sf, err := size.NewField(d, so)
	if err != nil {
		t.Fatal(err)
	}
	m, _, err := meshing.Mesh(d, sf.At, meshing.Options{})
	if err != nil {
		t.Fatal(err)
	}
	mat, err := material.NewHencky(material.Elastic{Young: steel.E, Poisson: steel.Nu})
	if err != nil {
		t.Fatal(err)
	}
	p, err := fem.NewProblem(m, mat, fem.Options{Kinematics: kin, DisplacementOnly: true}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(p.Close)
	return p
}

// solveElastic meshes d (fine at the tip) and solves it in one increment
// to t = 1 with a Hencky material of the constants steel (small strains:
// linear elasticity).
func solveElastic(t *testing.T, d *geom.Domain, bcs fem.BCs) *fem.Problem {
	t.Helper()
	p := elasticProblem(t, d, size.Options{HFine: 0.02, HFar: 1}, fem.PlaneStrain, bcs)
	opt := solver.DefaultOptions()
	opt.Dt = 1
	sv, err := solver.New(p, opt)
	if err != nil {
		t.Fatal(err)
	}
	res, err := sv.Run(func(solver.Step) error { return nil })
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != solver.Completed {
		t.Fatalf("solve stopped: %s", res.Reason)
	}
	return p
}
