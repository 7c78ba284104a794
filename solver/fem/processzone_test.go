package fem

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestProcessZoneGradientFD checks the gradient of the process zone's
// plastic strain V = Σ (p − pₙ)·dV against central finite differences of
// V itself (common practice, as for the tangent in V9), for every
// kinematics and element variant, with the synthetic law whose p depends
// on E, ā and λ; and that points below the zone's porosity count for
// nothing.
func TestProcessZoneGradientFD(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, tc := range tangentCases() {
		t.Run(tc.name, func(t *testing.T) {
			p := randomProblem(t, tc, 2, 2, rng)
			// half the elements' points past the zone's porosity
			for e := range p.oldState {
				for g := range p.oldState[e] {
					if e%2 == 0 {
						p.oldState[e][g].F = 0.05
					}
				}
			}
			if err := p.TrackProcessZone(0.02); err != nil {
				t.Fatal(err)
			}
			if err := p.Assemble(true); err != nil {
				t.Fatal(err)
			}
			v0, g0, _, n := p.ProcessZone()
			if want := len(p.oldState) / 2 * perElem; n != want+len(p.oldState)%2*perElem {
				t.Fatalf("%d zone points, want those of the even elements", n)
			}
			grad := append([]float64(nil), g0...)
			if v0 == 0 {
				t.Fatal("V = 0: the synthetic law's p should not vanish")
			}
			var worst float64
			for d := range p.U {
				if p.Constrained(d) {
					continue
				}
				h := 1e-6 * math.Max(1, math.Abs(p.U[d]))
				u := p.U[d]
				p.U[d] = u + h
				if err := p.Assemble(true); err != nil {
					t.Fatal(err)
				}
				vp, _, _, _ := p.ProcessZone()
				p.U[d] = u - h
				if err := p.Assemble(true); err != nil {
					t.Fatal(err)
				}
				vm, _, _, _ := p.ProcessZone()
				p.U[d] = u
				fd := (vp - vm) / (2 * h)
				worst = math.Max(worst, math.Abs(fd-grad[d])/math.Max(1e-3*math.Abs(v0), math.Abs(fd)))
			}
			if worst > 1e-5 {
				t.Errorf("largest relative gradient error %.3g, want ≤ 1e-5", worst)
			}
		})
	}
}

// TestTrackProcessZoneRejects: the zone's porosity must be positive and
// finite.
func TestTrackProcessZoneRejects(t *testing.T) {
	p := randomProblem(t, tangentCases()[0], 1, 1, rand.New(rand.NewPCG(1, 2)))
	for _, level := range []float64{0, -0.1, math.NaN(), math.Inf(1)} {
		if err := p.TrackProcessZone(level); err == nil {
			t.Errorf("level %g accepted", level)
		}
	}
}
