package transfer

import (
	"fmt"

	"tearline/solver/fem"
)

// InterpolateP2 sets dst[n] to the old displacement u interpolated with the
// old triangle's quadratic shape functions at hits[n] (from LocateNodes on
// the new mesh); a hit on an old node copies that node's value verbatim, a
// hit with Elem = -1 (a node no triangle uses) gives zero. u holds one value
// per old node.
func (lc *Locator) InterpolateP2(dst [][2]float64, hits []Hit, u [][2]float64) error {
	m := lc.mesh
	if len(u) != len(m.X) {
		return fmt.Errorf("transfer: P2 field has %d values for %d old nodes", len(u), len(m.X))
	}
	if len(dst) != len(hits) {
		return fmt.Errorf("transfer: P2 destination has %d values for %d hits", len(dst), len(hits))
	}
	for n, h := range hits {
		switch {
		case h.Elem < 0 || h.Elem >= len(m.Tri):
			dst[n] = [2]float64{}
		case h.Node >= 0:
			dst[n] = u[h.Node]
		default:
			N := fem.ShapeP2(h.L)
			t := m.Tri[h.Elem]
			var v [2]float64
			for k, nk := range t {
				v[0] += N[k] * u[nk][0]
				v[1] += N[k] * u[nk][1]
			}
			dst[n] = v
		}
	}
	return nil
}

// InterpolateP1 sets dst[n] for the first len(dst) hits (the new corner
// nodes) to the old corner field f interpolated linearly at hits[n]; a hit on
// an old corner node copies that node's value verbatim. f holds one value per
// old corner node.
func (lc *Locator) InterpolateP1(dst []float64, hits []Hit, f []float64) error {
	m := lc.mesh
	if len(f) != m.NumCorners {
		return fmt.Errorf("transfer: linear field has %d values for %d old corner nodes", len(f), m.NumCorners)
	}
	if len(dst) > len(hits) {
		return fmt.Errorf("transfer: linear destination has %d values for %d hits", len(dst), len(hits))
	}
	for n := range dst {
		h := hits[n]
		switch {
		case h.Elem < 0 || h.Elem >= len(m.Tri):
			dst[n] = 0
		case h.Node >= 0 && h.Node < m.NumCorners:
			dst[n] = f[h.Node]
		default:
			N := fem.ShapeP1(h.L)
			t := m.Tri[h.Elem]
			dst[n] = N[0]*f[t[0]] + N[1]*f[t[1]] + N[2]*f[t[2]]
		}
	}
	return nil
}
