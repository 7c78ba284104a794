package solver

import (
	"errors"
	"math"
	"strings"
	"testing"

	"tearline/solver/fem"
	"tearline/solver/material"
)

// fragile is Hencky elasticity whose local integration "fails" beyond an
// equivalent strain limit, standing in for a return mapping that does not
// converge: the solver must cut back, retry, and stop cleanly.
type fragile struct {
	*material.Hencky
	limit float64
}

func (f fragile) Update(in *material.Input, old, nw *material.State, out *material.Response) error {
	if math.Sqrt(in.E.Ddot(in.E)) > f.limit {
		return errors.New("test: strain beyond the integrable range")
	}
	return f.Hencky.Update(in, old, nw, out)
}

// barProblem is a unit square in plane strain pulled on its top edge by
// u_y = 0.01·t (symmetry on the left and bottom).
func barProblem(t *testing.T, mat material.Model) *fem.Problem {
	t.Helper()
	m, err := fem.Structured(3, 3, nil)
	if err != nil {
		t.Fatal(err)
	}
	bcs := fem.BCs{
		Symmetries:    []fem.Symmetry{{Label: "left", Comp: 0}, {Label: "bottom", Comp: 1}},
		Displacements: []fem.Displacement{{Label: "top", Fix: [2]bool{false, true}, Value: [2]float64{0, 0.01}}},
	}
	p, err := fem.NewProblem(m, mat, fem.Options{}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestCutBackAndCleanStop: a material failure beyond a strain limit makes
// the solver halve the increment and retry from the last converged state
// until the increment falls below DtMin, then stop with a reason — having
// converged every step up to just below the limit (DESIGN.md §3 step
// control).
func TestCutBackAndCleanStop(t *testing.T) {
	p := barProblem(t, fragile{hencky(t, 0.3), 0.005})
	o := DefaultOptions()
	o.DtMin = 1e-3
	s, err := New(p, o)
	if err != nil {
		t.Fatal(err)
	}
	var last Step
	res, err := s.Run(func(st Step) error { last = st; return nil })
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != Stopped || !strings.Contains(res.Reason, "below the minimum") || !strings.Contains(res.Reason, "integrable range") {
		t.Fatalf("status %v, reason %q; want a clean stop naming the small increment and the material failure", res.Status, res.Reason)
	}
	if res.Cutbacks == 0 {
		t.Errorf("no cut-backs recorded")
	}
	// uniaxial strain ε_yy = 0.01 t: the equivalent log-strain norm is
	// ≈ 0.01 t, so the failure sets in near t = 0.5
	if !(res.T > 0.45 && res.T < 0.5) || p.TCommitted != res.T {
		t.Errorf("stopped at t = %g (problem at %g), want just below 0.5", res.T, p.TCommitted)
	}
	if last.T != res.T {
		t.Errorf("last reported step at t = %g, result at %g", last.T, res.T)
	}
	// the committed state is the converged one: the residual there is small
	if err := p.Assemble(false); err != nil {
		t.Fatal(err)
	}
	for d, r := range p.Res {
		f := p.Dofs.FieldOf[d]
		sc := p.Scale[f]
		if f <= fem.Uy {
			sc = math.Max(p.Scale[fem.Ux], p.Scale[fem.Uy]) // as the solver judges them
		}
		if math.Abs(r) > o.RTol*sc {
			t.Fatalf("committed state is not in equilibrium: residual %g at unknown %d (%v, scale %g)", r, d, f, sc)
		}
	}
}

// TestGrowthAndStop: easy steps grow the increment (Grow = 1.5 after ≤ 4
// iterations); a callback returning ErrStop ends the run cleanly.
func TestGrowthAndStop(t *testing.T) {
	p := barProblem(t, hencky(t, 0.3))
	o := DefaultOptions()
	s, err := New(p, o)
	if err != nil {
		t.Fatal(err)
	}
	var dts []float64
	res, err := s.Run(func(st Step) error {
		dts = append(dts, st.Dt)
		if st.Index == 4 {
			return ErrStop
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != Stopped || res.Steps != 4 || !errors.Is(ErrStop, ErrStop) {
		t.Errorf("status %v after %d steps (%q), want stopped after 4", res.Status, res.Steps, res.Reason)
	}
	for i := 1; i < len(dts); i++ {
		if math.Abs(dts[i]/dts[i-1]-o.Grow) > 1e-12 {
			t.Errorf("increments %v do not grow by %g", dts, o.Grow)
			break
		}
	}
	// a callback error that is not ErrStop is returned
	p2 := barProblem(t, hencky(t, 0.3))
	s2, _ := New(p2, o)
	boom := errors.New("boom")
	if _, err := s2.Run(func(Step) error { return boom }); !errors.Is(err, boom) {
		t.Errorf("callback error: got %v", err)
	}
}

// TestInvertedElementCutsBack: a load that would invert elements in one
// increment (det F ≤ 0) is not an error but a cut-back; a load that
// inverts them at any increment ends in a clean stop.
func TestInvertedElementCutsBack(t *testing.T) {
	m, err := fem.Structured(2, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	bcs := fem.BCs{
		Symmetries:    []fem.Symmetry{{Label: "left", Comp: 0}, {Label: "bottom", Comp: 1}},
		Displacements: []fem.Displacement{{Label: "top", Fix: [2]bool{false, true}, Value: [2]float64{0, -1.2}}},
	}
	p, err := fem.NewProblem(m, hencky(t, 0.3), fem.Options{}, bcs)
	if err != nil {
		t.Fatal(err)
	}
	o := DefaultOptions()
	o.Dt, o.DtMax = 1, 1
	s, _ := New(p, o)
	res, err := s.Run(nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != Stopped || res.T >= 1/1.2 {
		t.Errorf("status %v at t = %g (%s); want a stop before the top reaches the bottom at t = %g", res.Status, res.T, res.Reason, 1/1.2)
	}
	if res.Steps == 0 {
		t.Errorf("no step converged: the cut-backs did not recover")
	}
}

// TestOptionsValidate: every out-of-range option is reported.
func TestOptionsValidate(t *testing.T) {
	if err := DefaultOptions().Validate(); err != nil {
		t.Fatalf("defaults invalid: %v", err)
	}
	for _, tc := range []struct {
		name string
		mod  func(*Options)
		want string
	}{
		{"zero TEnd", func(o *Options) { o.TEnd = 0 }, "TEnd"},
		{"NaN Dt", func(o *Options) { o.Dt = math.NaN() }, "Dt"},
		{"DtMin above Dt", func(o *Options) { o.DtMin = 0.5 }, "DtMin"},
		{"no iterations", func(o *Options) { o.MaxIter = 0 }, "MaxIter"},
		{"shrinking growth", func(o *Options) { o.Grow = 0.9 }, "Grow"},
		{"cut of one", func(o *Options) { o.Cut = 1 }, "Cut"},
		{"line search trials", func(o *Options) { o.LineSearchMax = 0 }, "LineSearchMax"},
		{"negative RTol", func(o *Options) { o.RTol = -1 }, "RTol"},
		{"no steps", func(o *Options) { o.MaxSteps = 0 }, "MaxSteps"},
	} {
		o := DefaultOptions()
		tc.mod(&o)
		err := o.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: got %v, want an error naming %s", tc.name, err, tc.want)
		}
	}
}
