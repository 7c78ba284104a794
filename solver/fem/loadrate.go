package fem

import (
	"errors"
	"math"
)

// TrackLoadRate makes every Assemble(true) also evaluate LoadRate, the
// derivative of the residual of the free unknowns with respect to the
// pseudo-time T at fixed free unknowns. A solver that controls something
// other than T (a crack opening) needs it for its bordered system; the
// coupling it takes from the tangent is removed when the constrained
// columns are cleared, so it is taken before. Follower pressures depend on
// the deformed geometry as well as on T and are not supported.
func (p *Problem) TrackLoadRate() error {
	if len(p.follower) > 0 {
		return errors.New("fem: the load rate does not cover follower pressures; control the load factor instead")
	}
	if p.rate == nil {
		p.rate = make([]float64, p.Dofs.N)
	}
	return nil
}

// LoadRate returns dR/dT of the last Assemble(true) (zero on constrained
// unknowns), or nil unless TrackLoadRate was called. The slice is reused.
func (p *Problem) LoadRate() []float64 { return p.rate }

// loadRate evaluates dR/dT = K_fc·dU_c/dT − f_ext from the unconstrained
// tangent: prescribed unknowns move with T, frozen ones do not.
func (p *Problem) loadRate() {
	clear(p.rate)
	for i := range p.presc {
		q := &p.presc[i]
		v := q.rateAt(p.T)
		if v == 0 || p.frozen[q.dof] {
			continue
		}
		d := q.dof
		for k := p.K.RowPtr[d]; k < p.K.RowPtr[d+1]; k++ {
			j := p.K.ColInd[k]
			if j == d || p.Constrained(j) {
				continue
			}
			if t := p.pos(j, d); t >= 0 {
				p.rate[j] += p.K.Val[t] * v
			}
		}
	}
	for _, d := range p.fextList {
		if !p.Constrained(d) {
			p.rate[d] -= p.fext[d]
		}
	}
}

// rateAt is dU/dT of a prescribed unknown at t: exact for the linear
// value·t, a central difference for a prescribed function of t.
func (q *prescribed) rateAt(t float64) float64 {
	if q.fn == nil && q.pinFn == nil {
		return q.value
	}
	h := 1e-6 * math.Max(1, math.Abs(t))
	return (q.at(t+h) - q.at(t-h)) / (2 * h)
}
