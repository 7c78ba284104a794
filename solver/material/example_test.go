package material_test

import (
	"fmt"
	"log"

	"tearline/solver/material"
)

// A plane-strain stretch by 2 in direction 1: E₁₁ = ln 2.
func ExampleLogStrain() {
	C := material.Sym{4, 1, 1, 0} // F = diag(2, 1, 1)
	E, dEdC := material.LogStrain(C)
	fmt.Printf("E11 = %.6f, dE11/dC11 = %.4f\n", E[0], dEdC[0][0])
	// Output:
	// E11 = 0.693147, dE11/dC11 = 0.1250
}

// One Gauss-point update of the default GTN material in uniaxial stretch.
func ExampleGTN() {
	m, err := material.NewGTN(material.DefaultGTN())
	if err != nil {
		log.Fatal(err)
	}
	old := m.Initial()
	var st material.State
	var out material.Response
	// Axial log strain 0.01 with lateral contraction 0.3·0.002 + 0.5·0.008.
	in := material.Input{E: material.Sym{0.01, -0.0046, -0.0046, 0}}
	if err := m.Update(&in, &old, &st, &out); err != nil {
		log.Fatal(err)
	}
	fmt.Printf("plastic %v, p = %.4f, f = %.5f\n", out.Plastic, st.P, st.F)
	// Output:
	// plastic true, p = 0.0077, f = 0.00202
}
