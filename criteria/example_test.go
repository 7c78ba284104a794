package criteria_test

import (
	"fmt"

	"tearline/criteria"
)

// The far-field J of a remote K in plane strain (Irwin; Rice 1968).
func ExampleFarFieldJ() {
	steel := criteria.Elastic{E: 200e3, Nu: 0.3} // MPa
	fmt.Printf("J = %.4f N/mm\n", criteria.FarFieldJ(100, steel))
	// Output: J = 0.0455 N/mm
}

// The remote boundary condition of a boundary-layer model: the Williams
// displacement on the rim of a disk around the tip. At θ = 90° both
// components are K/(2μ)·√(r/2π)·cos45°·κ (hand check: 2.333e-3 mm).
func ExampleWilliamsDisplacement() {
	el := criteria.Elastic{E: 200e3, Nu: 0.3}
	tip, dir := [2]float64{0, 0}, [2]float64{1, 0}
	u := criteria.WilliamsDisplacement(100, 0, el, tip, dir, [2]float64{0, 50})
	fmt.Printf("u at (0, 50) = (%.5f, %.5f) mm\n", u[0], u[1])
	// Output: u at (0, 50) = (0.00233, 0.00233) mm
}

// The C(T) K-calibration and the E1820 J of a short record with crack
// growth (force per unit thickness of a plane-strain model: B = 1). Hand
// check of the second point: K = 1500/√50·9.659 = 2049, J_el = K²·0.91/E =
// 19.10; C = 36.99/E' = 1.683e-4, v_pl = 0.1476, A_pl = 110.7,
// J_pl = 2.261·110.7/25 = 10.01.
func ExampleE1820J() {
	ct := criteria.CTSpecimen{W: 50, B: 1, A0: 25, El: criteria.Elastic{E: 200e3, Nu: 0.3}}
	f, _ := criteria.CTGeometryFactor(0.5)
	fmt.Printf("f(0.5) = %.3f\n", f)
	rec := []criteria.CTRecord{{P: 0, V: 0}, {P: 1500, V: 0.4}, {P: 1600, V: 0.9, A: 25.5}}
	out, err := criteria.E1820J(ct, rec, criteria.E1820Options{Mode: criteria.ComplianceCrack})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range out {
		fmt.Printf("a = %.1f  J_el = %.2f  J_pl = %.2f  J = %.2f N/mm\n", p.A, p.Jel, p.Jpl, p.J)
	}
	// Output:
	// f(0.5) = 9.659
	// a = 25.0  J_el = 0.00  J_pl = 0.00  J = 0.00 N/mm
	// a = 25.0  J_el = 19.10  J_pl = 10.01  J = 29.11 N/mm
	// a = 25.5  J_el = 23.13  J_pl = 73.70  J = 96.83 N/mm
}
