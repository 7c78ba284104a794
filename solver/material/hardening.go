package material

import (
	"fmt"
	"math"
	"sort"
)

// Hardening is a flow curve of the matrix material: the flow stress R(p) and
// its slope R′(p) as functions of the cumulative matrix plastic strain p ≥ 0.
// Implementations are immutable values, safe for concurrent use.
type Hardening interface {
	// Flow returns R(p) and R′(p).
	Flow(p float64) (r, dr float64)
	// Validate reports whether the parameters are admissible.
	Validate() error
}

// PowerLaw is the flow curve R(p) = σ₀ (1 + p/ε₀)ⁿ, a Swift-type law with
// initial yield stress σ₀, reference strain ε₀ and exponent n (n = 0 is
// perfectly plastic). A common choice ties ε₀ to the elastic strain,
// ε₀ = σ₀/E, as in the small-scale-yielding studies of Tvergaard &
// Needleman 1984 (Acta Metall. 32); that choice is left to the caller.
type PowerLaw struct {
	Sigma0 float64 // σ₀ > 0
	Eps0   float64 // ε₀ > 0
	N      float64 // 0 ≤ n < 1
}

// Flow returns R(p) and R′(p).
func (h PowerLaw) Flow(p float64) (float64, float64) {
	if h.N == 0 {
		return h.Sigma0, 0
	}
	base := 1 + p/h.Eps0
	r := h.Sigma0 * math.Pow(base, h.N)
	return r, h.N * r / (base * h.Eps0)
}

// Validate checks σ₀ > 0, ε₀ > 0 and 0 ≤ n < 1.
func (h PowerLaw) Validate() error {
	if !(h.Sigma0 > 0) || math.IsInf(h.Sigma0, 0) {
		return fmt.Errorf("material: power-law hardening: σ₀ = %g must be finite and > 0", h.Sigma0)
	}
	if !(h.Eps0 > 0) || math.IsInf(h.Eps0, 0) {
		return fmt.Errorf("material: power-law hardening: ε₀ = %g must be finite and > 0", h.Eps0)
	}
	if !(h.N >= 0 && h.N < 1) {
		return fmt.Errorf("material: power-law hardening: exponent n = %g must lie in [0, 1)", h.N)
	}
	return nil
}

// Voce is the saturating flow curve R(p) = σ₀ + Q (1 − exp(−b p)) (Voce
// 1948, J. Inst. Met. 74).
type Voce struct {
	Sigma0 float64 // σ₀ > 0
	Q      float64 // saturation increment; σ₀ + Q > 0
	B      float64 // rate b ≥ 0
}

// Flow returns R(p) and R′(p).
func (h Voce) Flow(p float64) (float64, float64) {
	e := math.Exp(-h.B * p)
	return h.Sigma0 + h.Q*(1-e), h.Q * h.B * e
}

// Validate checks σ₀ > 0, σ₀ + Q > 0 (the stress stays positive) and b ≥ 0.
func (h Voce) Validate() error {
	if !(h.Sigma0 > 0) || math.IsInf(h.Sigma0, 0) {
		return fmt.Errorf("material: Voce hardening: σ₀ = %g must be finite and > 0", h.Sigma0)
	}
	if !(h.Sigma0+h.Q > 0) || math.IsInf(h.Q, 0) {
		return fmt.Errorf("material: Voce hardening: σ₀ + Q = %g must be finite and > 0", h.Sigma0+h.Q)
	}
	if !(h.B >= 0) || math.IsInf(h.B, 0) {
		return fmt.Errorf("material: Voce hardening: rate b = %g must be finite and >= 0", h.B)
	}
	return nil
}

// PerfectlyPlastic is the constant flow stress R(p) = σ₀.
type PerfectlyPlastic struct {
	Sigma0 float64 // σ₀ > 0
}

// Flow returns σ₀ and 0.
func (h PerfectlyPlastic) Flow(float64) (float64, float64) { return h.Sigma0, 0 }

// Validate checks σ₀ > 0.
func (h PerfectlyPlastic) Validate() error {
	if !(h.Sigma0 > 0) || math.IsInf(h.Sigma0, 0) {
		return fmt.Errorf("material: perfectly plastic: σ₀ = %g must be finite and > 0", h.Sigma0)
	}
	return nil
}

// Tabulated is a piecewise-linear flow curve through the points
// (P[k], Stress[k]). P starts at 0 and increases strictly; every stress is
// positive. Beyond the last point the stress stays constant (perfectly
// plastic continuation, so that a table never extrapolates to a negative
// stress); at a kink R′ is the slope of the segment to the right.
type Tabulated struct {
	P      []float64
	Stress []float64
}

// Flow returns R(p) and R′(p) by linear interpolation.
func (h Tabulated) Flow(p float64) (float64, float64) {
	n := len(h.P)
	if p >= h.P[n-1] {
		return h.Stress[n-1], 0
	}
	if p <= 0 {
		k := 0
		s := (h.Stress[k+1] - h.Stress[k]) / (h.P[k+1] - h.P[k])
		return h.Stress[0] + s*p, s
	}
	// Largest k with P[k] <= p.
	k := sort.SearchFloat64s(h.P, p)
	if k == n || h.P[k] > p {
		k--
	}
	s := (h.Stress[k+1] - h.Stress[k]) / (h.P[k+1] - h.P[k])
	return h.Stress[k] + s*(p-h.P[k]), s
}

// Validate checks the table: at least two points, equal lengths, P[0] = 0,
// P strictly increasing, every stress finite and > 0.
func (h Tabulated) Validate() error {
	if len(h.P) != len(h.Stress) {
		return fmt.Errorf("material: tabulated hardening: %d strains but %d stresses", len(h.P), len(h.Stress))
	}
	if len(h.P) < 2 {
		return fmt.Errorf("material: tabulated hardening: %d points, at least 2 needed", len(h.P))
	}
	if h.P[0] != 0 {
		return fmt.Errorf("material: tabulated hardening: first plastic strain %g must be 0", h.P[0])
	}
	for k := range h.P {
		if math.IsNaN(h.P[k]) || math.IsInf(h.P[k], 0) {
			return fmt.Errorf("material: tabulated hardening: point %d: plastic strain %g must be finite", k, h.P[k])
		}
		if k > 0 && !(h.P[k] > h.P[k-1]) {
			return fmt.Errorf("material: tabulated hardening: point %d: plastic strain %g must exceed the previous %g", k, h.P[k], h.P[k-1])
		}
		if !(h.Stress[k] > 0) || math.IsInf(h.Stress[k], 0) {
			return fmt.Errorf("material: tabulated hardening: point %d: stress %g must be finite and > 0", k, h.Stress[k])
		}
	}
	return nil
}
