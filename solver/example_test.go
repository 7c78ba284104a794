package solver_test

import (
	"fmt"
	"math"

	"tearline/solver"
	"tearline/solver/fem"
	"tearline/solver/material"
)

// A thick cylinder (a = 1, b = 2, quarter model) of Hencky material under
// an internal pressure of 10 that grows with the pseudo-time t: build the
// mesh, the problem and the solver, run to t = 1, and read the reaction of
// a symmetry line and a nodal displacement. The hoop force equals p·a and
// the bore displacement the Lamé value (1+ν)/E ((1−2ν)Aa + B/a) = 9.533e-5
// (Timoshenko & Goodier §28); the second step starts from the extrapolated
// first and converges in one iteration.
func ExampleSolver_Run() {
	mesh, err := fem.Structured(8, 8, fem.AnnularSector(1, 2, 0, math.Pi/2, 1))
	if err != nil {
		fmt.Println(err)
		return
	}
	steel, err := material.NewHencky(material.Elastic{Young: 200e3, Poisson: 0.3})
	if err != nil {
		fmt.Println(err)
		return
	}
	bcs := fem.BCs{
		Symmetries: []fem.Symmetry{{Label: "bottom", Comp: 1}, {Label: "top", Comp: 0}},
		Tractions:  []fem.Traction{{Label: "left", Pressure: 10}},
	}
	p, err := fem.NewProblem(mesh, steel, fem.Options{Kinematics: fem.PlaneStrain}, bcs)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer p.Close()
	opt := solver.DefaultOptions()
	opt.Dt = 0.5
	s, err := solver.New(p, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := s.Run(func(st solver.Step) error {
		f, _ := p.Reaction("bottom") // the hoop force carried across y = 0
		fmt.Printf("step %d: t = %.2f, hoop force %.4g, %d iterations\n", st.Index, st.T, -f[1], st.Iterations)
		return nil
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	ur, _ := p.Nodal(p.Committed, mesh.Points["origin"], fem.Ux)
	fmt.Printf("%s after %d steps; bore displacement %.4g\n", res.Status, res.Steps, ur)
	// Output:
	// step 1: t = 0.50, hoop force 5, 2 iterations
	// step 2: t = 1.00, hoop force 10, 1 iterations
	// completed after 2 steps; bore displacement 9.533e-05
}
