package fem

import (
	"fmt"
	"math"
)

// processZone measures the plastic straining of the process zone — the
// points whose committed porosity has reached a level (the onset of
// coalescence) and that are not broken — for a dissipation-driven control:
// the value is
//
//	V = Σ_{zone points} (p − pₙ)·dV,
//
// the matrix plastic strain of the increment integrated over the zone's
// reference volume, and its gradient with respect to every unknown comes
// from the material's consistent derivatives of p. The plastic work the
// zone dissipates is V times the matrix flow stress (times 1 − f), which
// varies slowly across the zone; V stands for it.
type processZone struct {
	level     float64   // porosity from which a point is in the zone
	in        []bool    // per point (e·perElem + g), from the committed state
	points    int       // number of zone points
	grad      []float64 // ∂V/∂U at the last assembly (constrained unknowns cleared)
	elemValue []float64 // each element's share of V at the last assembly
	value     float64
	loadRate  float64 // ∂V/∂T through the prescribed unknowns
}

// TrackProcessZone makes every Assemble(true) also evaluate the process
// zone's plastic strain increment V and its derivatives (ProcessZone), the
// zone being the unbroken points of active elements whose committed
// porosity is at least level.
func (p *Problem) TrackProcessZone(level float64) error {
	if !(level > 0) || math.IsInf(level, 0) {
		return fmt.Errorf("fem: process-zone porosity %g must be finite and > 0", level)
	}
	ne := len(p.Mesh.Tri)
	p.pz = &processZone{level: level, in: make([]bool, ne*perElem), grad: make([]float64, p.Dofs.N), elemValue: make([]float64, ne)}
	p.updateProcessZone()
	return nil
}

// ProcessZone returns, for the last Assemble(true): V, its gradient with
// respect to the free unknowns (a reused slice, zero on constrained
// unknowns), its derivative with respect to the load factor through the
// prescribed unknowns, and the number of zone points. It returns a nil
// gradient unless TrackProcessZone was called.
func (p *Problem) ProcessZone() (v float64, grad []float64, dT float64, points int) {
	if p.pz == nil {
		return 0, nil, 0, 0
	}
	z := p.pz
	return z.value, z.grad, z.loadRate, z.points
}

// updateProcessZone selects the zone points from the committed state.
func (p *Problem) updateProcessZone() {
	z := p.pz
	if z == nil {
		return
	}
	z.points = 0
	for e := range p.Mesh.Tri {
		for g := 0; g < perElem; g++ {
			st := &p.oldState[e][g]
			in := p.active[e] && !st.Broken && st.F >= z.level
			z.in[e*perElem+g] = in
			if in {
				z.points++
			}
		}
	}
}

// processZoneStart clears the gradient before an assembly.
func (p *Problem) processZoneStart(tangent bool) {
	if p.pz != nil && tangent {
		clear(p.pz.grad)
	}
}

// processZoneFinish sums V in element order (so that it does not depend
// on the workers), takes its load-factor derivative through the prescribed
// unknowns, and clears the gradient on the constrained ones. It runs after
// the constraints of the assembly are known and before they are cleared.
func (p *Problem) processZoneFinish(tangent bool) {
	z := p.pz
	if z == nil || !tangent {
		return
	}
	z.value = 0
	for e, v := range z.elemValue {
		if p.active[e] {
			z.value += v
		}
	}
	z.loadRate = 0
	for i := range p.presc {
		q := &p.presc[i]
		if !p.frozen[q.dof] {
			z.loadRate += z.grad[q.dof] * q.rateAt(p.T)
		}
	}
	for _, d := range p.constr {
		z.grad[d] = 0
	}
}

// processZonePoint adds the zone point g of element e (volume dV) to the
// worker's element sums: its plastic strain increment and the gradient of p
// with respect to the element's unknowns, from the material's derivatives
// (pE with respect to the strain, pth to θ in the mixed element, and those
// to ā and λ in the regularised one).
func (p *Problem) processZonePoint(e, g int, w *worker, pE [4]float64, pth, dV float64) {
	var gen [nEps]float64
	copy(gen[:4], pE[:])
	gen[rowTh] = pth
	if p.reg {
		gen[rowA], gen[rowLam] = w.resp.DPdAbar, w.resp.DPdLambda
	}
	for a := 0; a < p.nd; a++ {
		lo, hi := p.rowRange(a)
		var v float64
		for r := lo; r < hi; r++ {
			v += gen[r] * w.b[r][a]
		}
		w.pzGrad[a] += v * dV
	}
	w.pzValue += (w.resp.P - p.oldState[e][g].P) * dV
}
