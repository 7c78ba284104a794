package criteria

import (
	"fmt"
	"math"
)

// The J_Q construction of ASTM E1820 on a J–Δa record. Clause numbers and
// constants are from memory (Annex A9, "J_Ic determination"; the
// measurement capacity in section 9): check them against the printed
// standard before quoting a result.
//
//   - σ_Y, the effective yield strength, is the mean of the 0.2% offset
//     yield strength and the tensile strength (section 3, terminology).
//   - The construction (blunting) line is J = M·σ_Y·Δa with M = 2 (A9.3).
//   - Exclusion lines parallel to it cut the Δa axis at 0.15 mm and 1.5 mm;
//     the points between them qualify for the fit (A9.3, A9.4).
//   - The fit is the least-squares line ln J = ln C1 + C2·ln Δa through the
//     qualified points (A9.6).
//   - J_Q is where J = C1·Δa^C2 meets the 0.2 mm offset line
//     J = M·σ_Y·(Δa − 0.2 mm) (A9.6).
//   - The measurement capacity of the specimen is Δa_max = 0.25·b₀ and
//     J_max = min(b₀, B)·σ_Y/20 (section 9, J–R curve).
//
// The 0.15, 0.2 and 1.5 mm are millimetres whatever the record's unit,
// hence JQOptions.MM.
const (
	jqBluntingM  = 2.0  // M of the construction line J = M·σ_Y·Δa
	jqExcludeLow = 0.15 // mm, first exclusion line
	jqExcludeTop = 1.5  // mm, second exclusion line
	jqOffset     = 0.2  // mm, the offset line J_Q is read on
	jqCapacityDa = 0.25 // Δa_max / b₀
	jqCapacityJ  = 20.0 // J_max = min(b₀, B)·σ_Y / jqCapacityJ
)

// JQOptions are the specimen and material figures of the construction.
type JQOptions struct {
	// SigmaY is the effective yield strength σ_Y = (σ_YS + σ_TS)/2.
	SigmaY float64
	// B0 is the initial ligament b₀ = W − a₀, B the thickness.
	B0, B float64
	// MM is one millimetre in the record's length unit (1 for a record in
	// mm, 1e-3 in m): the standard's offsets are fixed lengths.
	MM float64
}

// Validate checks that every figure is finite and positive.
func (o JQOptions) Validate() error {
	for _, v := range []struct {
		name string
		v    float64
	}{{"σ_Y", o.SigmaY}, {"b₀", o.B0}, {"B", o.B}, {"one millimetre", o.MM}} {
		if !(v.v > 0) || math.IsInf(v.v, 0) {
			return fmt.Errorf("E1820 J_Q construction: %s = %g must be finite and > 0", v.name, v.v)
		}
	}
	return nil
}

// JQ is the construction on one record: its lines, the power-law fit and
// J_Q. C1, C2, DaQ and JQ are NaN where they cannot be had (fewer than two
// qualified points, or a fit that does not meet the offset line).
type JQ struct {
	// Slope is M·σ_Y, the slope of the construction line and its parallels.
	Slope float64
	// ExcludeLow, ExcludeTop and Offset are where the two exclusion lines
	// and the offset line cut the Δa axis, in the record's length unit.
	ExcludeLow, ExcludeTop, Offset float64
	// DaMax and JMax are the measurement capacity of the specimen.
	DaMax, JMax float64
	// Qualified are the indices of the record points between the exclusion
	// lines, the points of the fit.
	Qualified []int
	C1, C2    float64
	DaQ, JQ   float64
}

// Line returns J on the parallel to the construction line that cuts the Δa
// axis at offset: Slope·(Δa − offset).
func (q *JQ) Line(offset, da float64) float64 {
	return q.Slope * (da - offset)
}

// PowerLaw returns C1·Δa^C2 (NaN without a fit).
func (q *JQ) PowerLaw(da float64) float64 {
	return q.C1 * math.Pow(da, q.C2)
}

// E1820JQ makes the J_Q construction on the record (da[i], J[i]). Points
// that are not finite are left out of it (a history may lack J at some
// steps); lengths of da and J must agree.
func E1820JQ(da, J []float64, opt JQOptions) (JQ, error) {
	if len(da) != len(J) {
		return JQ{}, fmt.Errorf("E1820 J_Q construction: %d Δa values but %d J values", len(da), len(J))
	}
	if err := opt.Validate(); err != nil {
		return JQ{}, err
	}
	nan := math.NaN()
	q := JQ{
		Slope:      jqBluntingM * opt.SigmaY,
		ExcludeLow: jqExcludeLow * opt.MM,
		ExcludeTop: jqExcludeTop * opt.MM,
		Offset:     jqOffset * opt.MM,
		DaMax:      jqCapacityDa * opt.B0,
		JMax:       math.Min(opt.B0, opt.B) * opt.SigmaY / jqCapacityJ,
		C1:         nan, C2: nan, DaQ: nan, JQ: nan,
	}
	for i := range da {
		if !(da[i] > 0) || !(J[i] > 0) || math.IsInf(da[i]+J[i], 0) {
			continue // the fit is in ln Δa, ln J
		}
		if J[i] <= q.Line(q.ExcludeLow, da[i]) && J[i] >= q.Line(q.ExcludeTop, da[i]) {
			q.Qualified = append(q.Qualified, i)
		}
	}
	q.C1, q.C2 = powerFit(da, J, q.Qualified)
	q.DaQ = q.offsetCrossing()
	q.JQ = q.PowerLaw(q.DaQ)
	return q, nil
}

// powerFit fits ln J = ln C1 + C2 ln Δa by least squares to the points idx;
// NaN, NaN with fewer than two distinct Δa.
func powerFit(da, J []float64, idx []int) (c1, c2 float64) {
	var n, sx, sy, sxx, sxy float64
	for _, i := range idx {
		x, y := math.Log(da[i]), math.Log(J[i])
		n++
		sx += x
		sy += y
		sxx += x * x
		sxy += x * y
	}
	den := n*sxx - sx*sx
	if n < 2 || !(den > 1e-14*n*sxx) {
		return math.NaN(), math.NaN()
	}
	c2 = (n*sxy - sx*sy) / den
	return math.Exp((sy - c2*sx) / n), c2
}

// offsetCrossing returns the Δa where the power law meets the offset line,
// NaN where it does not. g(Δa) = C1·Δa^C2 − Slope·(Δa − offset) is positive
// at the offset; with C2 < 1 it falls without bound, so a root is bracketed
// by doubling and found by bisection to round-off. C2 ≥ 1 (a curve that
// rises as fast as the line) may never meet it: NaN then too.
func (q *JQ) offsetCrossing() float64 {
	if math.IsNaN(q.C1) || !(q.C2 < 1) {
		return math.NaN()
	}
	g := func(x float64) float64 { return q.PowerLaw(x) - q.Line(q.Offset, x) }
	lo, hi := q.Offset, 2*q.Offset
	for g(hi) > 0 {
		lo, hi = hi, 2*hi
		if math.IsInf(hi, 0) {
			return math.NaN()
		}
	}
	for i := 0; i < 200 && hi-lo > 1e-15*hi; i++ {
		mid := 0.5 * (lo + hi)
		if g(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// EffectiveYield returns E1820's effective yield strength, the mean of the
// yield and the tensile strength (section 3, from memory).
func EffectiveYield(yieldStrength, tensileStrength float64) float64 {
	return 0.5 * (yieldStrength + tensileStrength)
}
