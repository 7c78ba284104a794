package fem

import "fmt"

// SetGaussData replaces the committed Gauss-point kinematics and stress
// work (after a state transfer, or when a checkpoint is restored): F and P
// are the deformation gradient and first Piola–Kirchhoff stress and W the
// stress-work density of every point, in the layout of GaussPoints. Nil
// slices leave that quantity as it is. The next Commit accumulates W from
// these values.
func (p *Problem) SetGaussData(F, P [][5]float64, W []float64) error {
	n := len(p.gp)
	for _, c := range []struct {
		name string
		len  int
	}{{"F", len(F)}, {"P", len(P)}, {"W", len(W)}} {
		if c.len != 0 && c.len != n {
			return fmt.Errorf("fem: SetGaussData: %s has %d points, the mesh has %d", c.name, c.len, n)
		}
	}
	for i := range p.gp {
		if F != nil {
			p.gp[i].F = F[i]
		}
		if P != nil {
			p.gp[i].P = P[i]
		}
		if W != nil {
			p.gp[i].W = W[i]
		}
	}
	return nil
}

// AdoptAssembled makes the deformation gradient and stress of the last
// assembly the committed Gauss-point values without committing the material
// state or adding stress work. After a state transfer this gives the next
// Commit the right starting point for the stress-work increment.
func (p *Problem) AdoptAssembled() {
	for i := range p.gp {
		p.gp[i].F, p.gp[i].P = p.pendF[i], p.pendP[i]
	}
}
