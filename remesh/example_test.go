package remesh_test

import (
	"fmt"
	"log"
	"math"

	"tearline/criteria"
	"tearline/remesh"
	"tearline/remesh/geom"
	"tearline/remesh/size"
	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
)

// elasticRecorder keeps the step records of a run.
type elasticRecorder struct{ steps []remesh.StepRecord }

func (r *elasticRecorder) Step(s *remesh.StepRecord, _ remesh.View) error {
	r.steps = append(r.steps, *s)
	return nil
}

func (r *elasticRecorder) Remesh(*remesh.RemeshRecord, remesh.View) error { return nil }

// A small elastic cycle: the upper half of a boundary-layer disk of Hencky
// material under the remote Williams K field, in two load steps. Nothing
// breaks, so nothing remeshes; the domain J around the tip equals the
// far-field J = K²(1−ν²)/E of the applied K (Rice 1968; Irwin), which is
// what the example checks.
func ExampleCycle() {
	d, err := geom.SSY{Radius: 20, TipRadius: 0.02}.Domain()
	if err != nil {
		log.Fatal(err)
	}
	el := material.Elastic{Young: 200e3, Poisson: 0.3} // MPa
	mat, err := material.NewHencky(el)
	if err != nil {
		log.Fatal(err)
	}
	const K = 100.0 // MPa√mm at load factor 1
	tip := d.Points["tip"]
	field := criteria.KField{K: 1, El: criteria.Elastic{E: el.Young, Nu: el.Poisson}, Tip: tip.X, Dir: tip.Dir}
	so := solver.DefaultOptions()
	so.Dt, so.DtMax = 0.5, 0.5
	cfg := remesh.CycleConfig{
		Domain:   d,
		Size:     size.Options{HFine: 0.05, HFar: 2, FineRadius: 0.5},
		Material: mat,
		BCs: func(m *fem.Mesh) (fem.BCs, error) {
			return fem.BCs{
				Symmetries: []fem.Symmetry{{Label: geom.LabelSymmetry, Comp: 1}},
				Displacements: []fem.Displacement{{Label: geom.LabelRemote, Fix: [2]bool{true, true},
					Func: func(X [2]float64, t float64) [2]float64 {
						u := field.Displacement(X)
						return [2]float64{K * t * u[0], K * t * u[1]}
					}}},
			}, nil
		},
		Measure:   func(p *fem.Problem) (float64, float64, error) { return K * p.TCommitted, math.NaN(), nil },
		Solver:    so,
		J:         &remesh.JConfig{Unit: 0.5, Rings: []criteria.Ring{{In: 4, Out: 8}}},
		KField:    &criteria.KField{K: K, El: field.El, Tip: tip.X, Dir: tip.Dir},
		Symmetric: true,
	}
	c, err := remesh.NewCycle(cfg)
	if err != nil {
		log.Fatal(err)
	}
	var rec elasticRecorder
	out, err := c.Run(&rec)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%v after %d steps, Δa = %g\n", out.Status, out.Steps, out.Da)
	for _, s := range rec.steps {
		fmt.Printf("K = %3.0f MPa√mm: J_domain / J_far = %.2f\n", s.Control, s.JDomain/s.JFar)
	}
	// Output:
	// completed after 2 steps, Δa = 0
	// K =  50 MPa√mm: J_domain / J_far = 1.00
	// K = 100 MPa√mm: J_domain / J_far = 1.00
}
