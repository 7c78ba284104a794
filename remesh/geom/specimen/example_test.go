package specimen_test

import (
	"fmt"

	"tearline/criteria"
	"tearline/remesh/geom"
	"tearline/remesh/geom/specimen"
)

// A half C(T) specimen under its natural load: the pins move apart, the
// ligament is a mirror plane, the load line is held against sliding, and
// the J of the resistance curve comes from the ASTM E1820 record.
func ExampleSpecimen_Apply() {
	s, err := specimen.NewCT(geom.DefaultCT())
	if err != nil {
		fmt.Println(err)
		return
	}
	su, err := s.Apply(specimen.Load{Kind: s.Natural, Value: 0.5}, criteria.Elastic{E: 200e3, Nu: 0.3})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("natural load %v, half model %v\n", s.Natural, s.Symmetric)
	for _, m := range su.BCs.Symmetries {
		fmt.Printf("mirror on %q\n", m.Label)
	}
	for _, p := range su.BCs.Pins {
		fmt.Printf("pin in %q moves %g at t = 1\n", p.Label, p.Value)
	}
	for _, d := range su.BCs.Displacements {
		fmt.Printf("point %q held in x\n", d.Point)
	}
	fmt.Printf("J: %v, W = %g, a0 = %.4g, B = %g\n", su.JRoute(), su.CT.W, su.CT.A0, su.CT.B)
	// Output:
	// natural load pin, half model true
	// mirror on "symmetry"
	// pin in "pin" moves 0.5 at t = 1
	// point "loadline" held in x
	// J: ASTM E1820, W = 50, a0 = 27.5, B = 25
}
