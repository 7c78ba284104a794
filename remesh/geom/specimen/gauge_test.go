package specimen_test

import (
	"math"
	"strings"
	"testing"

	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
	"tearline/remesh/size"
	"tearline/solver/fem"
)

// TestNaturalGauges reads each built-in specimen's gauge in the homogeneous
// displacement field u = (ex·x, ey·y) (exact in the quadratic elements)
// and compares with the closed form at the gauge's points: the load-line
// opening of a C(T) is 2·ey·y_ll (half and full model alike), the
// diameter reduction of a notched bar −2·ex·r₀, the mean notch-mouth
// opening of a DENT 2·ey·r (the mouth corners at y = ±r, r the notch
// half-width).
func TestNaturalGauges(t *testing.T) {
	must := built(t)
	const ex, ey = 1e-3, 2e-3
	ct := geom.DefaultCT()
	ctFull := ct
	ctFull.Full, ctFull.TipRadius = true, 0.1
	bar := geom.DefaultNotchedBar()
	dent := geom.DefaultDENT()
	cases := []struct {
		name string
		s    *specimen.Specimen
		kin  fem.Kinematics
		want func(d *geom.Domain) float64
	}{
		{"C(T) half", must(specimen.NewCT(ct)), fem.PlaneStrain, func(d *geom.Domain) float64 { return 2 * ey * d.Points[geom.PointLoadLine].X[1] }},
		{"C(T) full", must(specimen.NewCT(ctFull)), fem.PlaneStrain, func(d *geom.Domain) float64 { return 2 * ey * d.Points[geom.PointLoadLine].X[1] }},
		{"notched bar", must(specimen.NewNotchedBar(bar)), fem.Axisymmetric, func(d *geom.Domain) float64 { return -2 * ex * bar.MinRadius }},
		{"DENT", must(specimen.NewDENT(dent)), fem.PlaneStrain, func(d *geom.Domain) float64 { return 2 * ey * dent.TipRadius }},
	}
	for _, c := range cases {
		if c.s.Gauge == nil {
			t.Errorf("%s: no natural gauge", c.name)
			continue
		}
		if err := c.s.Gauge.Validate(c.s.Domain); err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		p := homogeneousField(t, c.s.Domain, c.kin, ex, ey)
		got, err := c.s.Gauge.Reading(p)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if want := c.want(c.s.Domain); math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("%s: %s reads %.15g, closed form %.15g", c.name, c.s.Gauge.Name, got, want)
		}
	}
}

// homogeneousField meshes d coarsely and sets the committed displacement
// u = (ex·x, ey·y) at every node.
func homogeneousField(t *testing.T, d *geom.Domain, kin fem.Kinematics, ex, ey float64) *fem.Problem {
	t.Helper()
	p := elasticProblem(t, d, size.Options{HFine: 0.5, HFar: 5}, kin, fem.BCs{})
	ux, uy := make([]float64, len(p.Mesh.X)), make([]float64, len(p.Mesh.X))
	for i, x := range p.Mesh.X {
		ux[i], uy[i] = ex*x[0], ey*x[1]
	}
	if err := p.SetNodalField(fem.Ux, ux); err != nil {
		t.Fatal(err)
	}
	if err := p.SetNodalField(fem.Uy, uy); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestGaugeValidate: a gauge reads distinct named points of the body's
// mesh along finite non-zero directions (a reference point such as the
// C(T) pin centre is not a mesh node; common practice: refuse it before
// the run, not inside the solver).
func TestGaugeValidate(t *testing.T) {
	ct := built(t)(specimen.NewCT(geom.DefaultCT()))
	up := [2]float64{0, 1}
	for _, c := range []struct {
		name string
		g    specimen.Gauge
		want string
	}{
		{"missing point", specimen.Gauge{Name: "g", Terms: []specimen.GaugeTerm{{"nowhere", up, 1}}}, "no named point"},
		{"reference point", specimen.Gauge{Name: "g", Terms: []specimen.GaugeTerm{{geom.PointLoad, up, 1}}}, "reference point"},
		{"same point twice", specimen.Gauge{Name: "g", Terms: []specimen.GaugeTerm{{geom.PointMouth, up, 1}, {geom.PointMouth, up, -1}}}, "twice"},
		{"zero direction", specimen.Gauge{Name: "g", Terms: []specimen.GaugeTerm{{geom.PointMouth, [2]float64{}, 1}}}, "non-zero"},
		{"no terms", specimen.Gauge{Name: "g"}, "reads no point"},
	} {
		if err := c.g.Validate(ct.Domain); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error containing %q", c.name, err, c.want)
		}
	}
}
