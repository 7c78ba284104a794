package material

import "math"

// The bracketed fallback of the local GTN return mapping.
//
// The damped Newton iteration of gtnLocal.iterate fails on a small set of
// states: a flow stress A held near its floor by a strongly negative
// gradient term (next to a localisation band) under a trial stress a
// hundred times larger. There the residual norm is a poor merit function
// and the backtracking crawls. The same backward-Euler system (the one in
// the GTN type documentation) is then solved as two nested scalar root
// problems, each bracketed and solved by bisection, which cannot fail when
// a solution exists:
//
//   - inner, at fixed Δp (so A and the nucleated porosity are fixed): the
//     mean stress magnitude t = |σ_m| ∈ [0, |σ_m^tr|] from the normality
//     condition, with σ_eq = A √(κ − b cosh x) from the yield condition
//     (x = 3q₂t/(2A), b = 2q₁f*, κ = 1 + (q₁f*)²) and f from the volume
//     balance 1 − f = (1 − f_n − A_N Δp) exp(−Δε_p);
//   - outer: Δp ≥ 0 from the work equivalence (1−f)AΔp = σ_mΔε_p + σ_eqΔε_q,
//     whose residual is negative at Δp = 0 for a plastic trial state and
//     positive for Δp large.
//
// The bracketed solution is then polished by the Newton iteration, which
// starts within its quadratic range and supplies the Jacobian for the
// consistent tangent. (Our construction on the standard system of Aravas
// 1987, IJNME 24.)

// bracketPoint is the inner solution at one Δp.
type bracketPoint struct {
	t, de    float64 // |σ_m| and |Δε_p|
	seq, f   float64 // σ_eq and porosity at the end of the step
	a        float64 // flow stress A(p_n + Δp)
	valid    bool    // false: no admissible porosity at this Δp (nucleation beyond 1)
	residual float64 // work-equivalence residual (1−f)AΔp − σ_mΔε_p − σ_eqΔε_q
}

// normality returns the sign-extended normality residual at the volumetric
// plastic strain magnitude de = |Δε_p| and the porosity f it gives, for the
// flow stress a: positive when |σ_m| must grow (less volumetric flow),
// negative when it must shrink. seq is σ_eq from the yield condition.
func (lp *gtnLocal) normality(de, f, a float64) (g, seq float64) {
	m := lp.m
	q1, q2 := m.par.Q1, m.par.Q2
	t := math.Abs(lp.smTr) - m.bulk*de
	if !(f >= 0 && f < m.fLim) || t < 0 {
		// Too much void growth (tension) or compaction (compression).
		return 1, 0
	}
	fs, _ := m.par.FStar(f)
	b := 2 * q1 * fs
	kap := 1 + q1*q1*fs*fs
	x := 1.5 * q2 * t / a
	if b > 0 && x >= math.Acosh(kap/b) {
		// Beyond the hydrostatic point of the surface.
		return -1, 0
	}
	h := kap - b*math.Cosh(x)
	seq = a * math.Sqrt(math.Max(h, 0))
	dq := (math.Sqrt(lp.q) - seq) / (3 * m.mu)
	return de*2*seq/a - dq*1.5*q2*b*math.Sinh(x), seq
}

// bracketAt solves the inner problem at Δp = u3. The unknown is |σ_m| (as
// |Δε_p|) in tension and ln f under compression with f_n > 0, where the
// porosity at the solution can be far below the rounding of |σ_m|.
func (lp *gtnLocal) bracketAt(u3 float64) bracketPoint {
	m := lp.m
	p := lp.pN + u3
	a := m.FlowStress(p, lp.abar, lp.lamb)
	aN, _ := m.nucleation(p)
	base := 1 - lp.fN - aN*u3
	if !(base > 0) || !(a > 0) {
		return bracketPoint{}
	}
	smAbs := math.Abs(lp.smTr)
	if lp.sgn == 0 {
		smAbs = 0
	}
	porosity := func(de float64) float64 { return 1 - base*math.Exp(-lp.sgn*de) }
	var de, f float64
	if g, _ := lp.normality(0, porosity(0), a); g >= 0 || smAbs == 0 {
		// No volumetric flow at this Δp.
		de, f = 0, porosity(0)
	} else if lp.sgn < 0 && lp.logF {
		// Compaction: bisect on y = ln f ∈ (ln f(|Δε_p| = |σ_m^tr|/K), ln f(0)].
		hiY := math.Log(math.Max(1-base, math.SmallestNonzeroFloat64))
		loY := math.Log(math.SmallestNonzeroFloat64)
		if f0 := porosity(smAbs / m.bulk); f0 > 0 {
			loY = math.Log(f0)
		}
		deOf := func(y float64) float64 { return math.Log1p(-math.Exp(y)) - math.Log(base) }
		for it := 0; it < 200 && hiY-loY > 1e-15*(1+math.Abs(hiY)); it++ {
			mid := 0.5 * (loY + hiY)
			if g, _ := lp.normality(deOf(mid), math.Exp(mid), a); g > 0 {
				loY = mid
			} else {
				hiY = mid
			}
		}
		// loY is on the admissible side of the hydrostatic point.
		de, f = deOf(loY), math.Exp(loY)
	} else {
		lo, hi := 0.0, smAbs/m.bulk
		for it := 0; it < 200 && hi-lo > 1e-16*hi; it++ {
			mid := 0.5 * (lo + hi)
			if g, _ := lp.normality(mid, porosity(mid), a); g > 0 {
				hi = mid
			} else {
				lo = mid
			}
		}
		// hi is on the admissible side of the hydrostatic point.
		de, f = hi, porosity(hi)
	}
	if !(f >= 0 && f < m.fLim) {
		return bracketPoint{}
	}
	_, seq := lp.normality(de, f, a)
	seq = math.Min(seq, math.Sqrt(lp.q))
	pt := bracketPoint{t: smAbs - m.bulk*de, de: de, seq: seq, f: f, a: a, valid: true}
	dq := (math.Sqrt(lp.q) - seq) / (3 * m.mu)
	pt.residual = (1-f)*a*u3 - pt.t*pt.de - seq*dq
	return pt
}

// bracketed returns the solution of the local problem found by nested
// bisection, polished by Newton's method; ok is false when no bracket
// exists.
func (lp *gtnLocal) bracketed() (u [3]float64, ev gtnEval, err error) {
	m := lp.m
	if pt := lp.bracketAt(0); !pt.valid || pt.residual >= 0 {
		return u, ev, errLocalNewton
	}
	lo := 0.0
	hi := math.Max(math.Sqrt(lp.q)/(3*m.mu)+math.Abs(lp.smTr)/m.bulk, 1e-12)
	for k := 0; ; k++ {
		if pt := lp.bracketAt(hi); !pt.valid || pt.residual > 0 {
			break
		}
		lo = hi
		hi *= 2
		if k > 80 {
			return u, ev, errLocalNewton
		}
	}
	for it := 0; it < 200 && hi-lo > 1e-15*hi; it++ {
		mid := 0.5 * (lo + hi)
		if pt := lp.bracketAt(mid); !pt.valid || pt.residual > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	u3 := lo
	pt := lp.bracketAt(u3)
	if !pt.valid {
		return u, ev, errLocalNewton
	}
	beta := 1.0
	if seqTr := math.Sqrt(lp.q); seqTr > 0 {
		beta = math.Min(math.Max(pt.seq/seqTr, 1e-12), 1)
	}
	u = [3]float64{lp.sgn * pt.de, beta, u3}
	if lp.logF {
		u[0] = math.Log(math.Max(pt.f, 1e-300))
	}
	if un, evn, errn := lp.iterate(u); errn == nil {
		return un, evn, nil
	}
	// The polish could not lower the residual further: accept the
	// bracketed point if it satisfies the system to 1e-6.
	lp.eval(u, &ev)
	if ev.ok && ev.normRes < 1e-6 {
		return u, ev, nil
	}
	return u, ev, errLocalNewton
}
