package material

import (
	"errors"
	"fmt"
	"math"
)

// GTNParams are the parameters of the finite-strain GTN porous-plasticity
// model (Gurson 1977, J. Eng. Mater. Technol. 99; Tvergaard 1981, Int. J.
// Fract. 17; Tvergaard & Needleman 1984, Acta Metall. 32) with optional
// strain-controlled void nucleation (Chu & Needleman 1980, J. Eng. Mater.
// Technol. 102) and gradient regularisation of the cumulative matrix plastic
// strain p (micromorphic form: Forest 2009, J. Eng. Mech. 135).
type GTNParams struct {
	Elastic   Elastic   // Young's modulus and Poisson's ratio (Hencky law in log space)
	Hardening Hardening // matrix flow curve R(p); σ₀ = R(0)

	Q1, Q2 float64 // Tvergaard's fitting parameters q₁, q₂ > 0; q₃ = q₁²
	F0     float64 // initial porosity, 0 ≤ f₀ < f_c
	FC, FF float64 // coalescence onset f_c and final porosity f_F, f_c < f_F < 1/q₁

	// Strain-controlled nucleation (Chu & Needleman 1980): the nucleation
	// rate is A_N ṗ with A_N = f_N/(s_N√(2π)) exp(−½((p−ε_N)/s_N)²).
	// FN = 0 switches nucleation off.
	FN, SN, EpsN float64

	// FBreak is the porosity at which a point is broken (carries no stress).
	// Zero selects the default: the porosity at which f* reaches 0.95/q₁,
	// i.e. 95% of the way to the total loss of stress-carrying capacity.
	FBreak float64

	// Length is the internal length ℓ ≥ 0; 0 is the local model. The
	// gradient modulus is c = σ₀ℓ².
	Length float64
	// Penalty is the augmentation penalty r ≥ 0 (a stress) of the
	// regularised model, A = R(p) + λ + r(p − ā). Ignored when Length = 0.
	Penalty float64
}

// DefaultGTN returns a representative parameter set of an invented
// pressure-vessel steel: E = 200 GPa, ν = 0.3, power-law hardening
// σ₀ = 400 MPa, ε₀ = σ₀/E, n = 0.1; q₁ = 1.5, q₂ = 1 (Tvergaard 1981);
// f₀ = 0.002; f_c = 0.15, f_F = 0.25 (Tvergaard & Needleman 1984);
// nucleation off (s_N = 0.1, ε_N = 0.3 ready, the values of Chu & Needleman
// 1980); default f_break; local (ℓ = 0) with penalty r = σ₀ ready for ℓ > 0.
func DefaultGTN() GTNParams {
	return GTNParams{
		Elastic:   Elastic{Young: 200e3, Poisson: 0.3},
		Hardening: PowerLaw{Sigma0: 400, Eps0: 400 / 200e3, N: 0.1},
		Q1:        1.5, Q2: 1,
		F0: 0.002, FC: 0.15, FF: 0.25,
		FN: 0, SN: 0.1, EpsN: 0.3,
		Penalty: 400,
	}
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Validate checks every parameter and says which one is wrong and why.
func (p *GTNParams) Validate() error {
	if err := p.Elastic.Validate(); err != nil {
		return fmt.Errorf("gtn: %w", err)
	}
	if p.Hardening == nil {
		return errors.New("gtn: no hardening law given")
	}
	if err := p.Hardening.Validate(); err != nil {
		return fmt.Errorf("gtn: %w", err)
	}
	if !(p.Q1 > 0) || !finite(p.Q1) {
		return fmt.Errorf("gtn: q1 = %g must be finite and > 0", p.Q1)
	}
	if !(p.Q2 > 0) || !finite(p.Q2) {
		return fmt.Errorf("gtn: q2 = %g must be finite and > 0", p.Q2)
	}
	if !(p.F0 >= 0) || !(p.F0 < p.FC) {
		return fmt.Errorf("gtn: initial porosity f0 = %g must satisfy 0 <= f0 < fc = %g", p.F0, p.FC)
	}
	if !(p.FC < p.FF) || !(p.FF < 1/p.Q1) {
		return fmt.Errorf("gtn: porosities must satisfy fc < fF < 1/q1: fc = %g, fF = %g, 1/q1 = %g", p.FC, p.FF, 1/p.Q1)
	}
	if !(p.FN >= 0) || !finite(p.FN) || p.FN >= 1 {
		return fmt.Errorf("gtn: nucleation volume fraction fN = %g must lie in [0, 1)", p.FN)
	}
	if p.FN > 0 {
		if !(p.SN > 0) || !finite(p.SN) {
			return fmt.Errorf("gtn: nucleation spread sN = %g must be finite and > 0 when fN > 0", p.SN)
		}
		if !finite(p.EpsN) {
			return fmt.Errorf("gtn: nucleation mean strain epsN = %g must be finite", p.EpsN)
		}
	}
	if p.FBreak != 0 && !(p.FBreak > p.FC && p.FBreak < p.FF) {
		return fmt.Errorf("gtn: break porosity %g must satisfy fc = %g < f_break < fF = %g (or 0 for the default)", p.FBreak, p.FC, p.FF)
	}
	if !(p.Length >= 0) || !finite(p.Length) {
		return fmt.Errorf("gtn: internal length %g must be finite and >= 0 (0 = local model)", p.Length)
	}
	if !(p.Penalty >= 0) || !finite(p.Penalty) {
		return fmt.Errorf("gtn: augmentation penalty r = %g must be finite and >= 0", p.Penalty)
	}
	return nil
}

// Delta returns the coalescence acceleration δ = (1/q₁ − f_c)/(f_F − f_c).
func (p *GTNParams) Delta() float64 { return (1/p.Q1 - p.FC) / (p.FF - p.FC) }

// FStar returns the effective porosity f* and df*/df: f* = f for f ≤ f_c,
// f_c + δ(f − f_c) above (Tvergaard & Needleman 1984).
func (p *GTNParams) FStar(f float64) (fs, dfs float64) {
	if f <= p.FC {
		return f, 1
	}
	d := p.Delta()
	return p.FC + d*(f-p.FC), d
}

// BreakPorosity returns f_break: FBreak if set, otherwise the porosity at
// which f* = 0.95/q₁.
func (p *GTNParams) BreakPorosity() float64 {
	if p.FBreak != 0 {
		return p.FBreak
	}
	return p.FC + (0.95/p.Q1-p.FC)/p.Delta()
}

// GTN is the GTN model in logarithmic-strain space. It is immutable after
// NewGTN and safe for concurrent use on different points.
//
// Kinematics and elasticity: Eᵉ = E − Eᵖ, T = λ tr(Eᵉ) I + 2μ Eᵉ.
// Effective stress σ*(T, f*): (σ_eq/σ*)² + 2q₁f* cosh(3q₂σ_m/(2σ*)) − 1 −
// (q₁f*)² = 0, σ_m = tr T/3, σ_eq = √(3/2 s:s). Yield σ* − A ≤ 0 with
// A = R(p) (local) or A = R(p) + λ + r(p − ā) (regularised). Normality
// Ėᵖ = γ̇ ∂σ*/∂T; matrix plastic strain by work equivalence
// (1−f)σ*ṗ = T:Ėᵖ; porosity ḟ = (1−f) tr Ėᵖ + A_N ṗ.
//
// Integration (backward Euler, Aravas 1987, IJNME 24): with the trial state
// T^tr = σ_m^tr I + s^tr, the return keeps the deviatoric direction,
// T = (σ_m^tr − K Δε_p) I + β s^tr, Δε_p = tr ΔEᵖ, and the local unknowns
// (Δε_p, β, Δp) solve
//
//	Δε_p ∂Φ/∂σ_eq − Δε_q ∂Φ/∂σ_m = 0   (normality, Δε_q = (1−β)σ_eq^tr/(3μ))
//	ln((σ_eq/A)² + 2q₁f* cosh(3q₂σ_m/(2A))) = ln(1 + (q₁f*)²)   (σ* = A)
//	(1−f) A Δp = σ_m Δε_p + σ_eq Δε_q   (work equivalence)
//
// with f from the exact integral of the matrix volume balance,
// 1 − f = (1 − f_n − A_N Δp) exp(−Δε_p), so that without nucleation
// (1 − f) exp(tr Eᵖ) is conserved to rounding (nucleation is added before
// growth within the step). The logarithmic form of the yield condition is
// evaluated without overflow for any σ_m/A and is nearly linear in σ_m where
// cosh is steep. When f_n > 0 the first unknown is ln f instead of Δε_p, so
// that f stays positive and small porosities under high pressure are
// resolved to relative precision. The Newton iteration is damped
// (backtracking on the residual norm), projected onto the sign bounds
// (Δε_p has the sign of σ_m, 0 < β, Δp ≥ 0, f < f_F), starts from the von
// Mises radial return and, if that fails, from the trial point; it stops
// one step after the scaled residual falls below 1e-10, so the state is
// converged to rounding and the tangent is exact. The consistent tangent
// follows from the implicit-function theorem on the converged system.
// When the iteration reaches f ≥ f_break the point is broken.
type GTN struct {
	par                 GTNParams
	lambda, mu, bulk    float64
	sigma0, c, r        float64
	local               bool
	delta, fBreak, fLim float64
	nuc                 float64 // f_N/(s_N √(2π)), 0 without nucleation
}

// NewGTN validates the parameters and returns the model.
func NewGTN(p GTNParams) (*GTN, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	m := &GTN{par: p}
	m.lambda, m.mu = p.Elastic.Lame()
	m.bulk = p.Elastic.Bulk()
	m.sigma0, _ = p.Hardening.Flow(0)
	m.c = m.sigma0 * p.Length * p.Length
	m.local = m.c == 0
	if !m.local {
		m.r = p.Penalty
	}
	m.delta = p.Delta()
	m.fBreak = p.BreakPorosity()
	// Iterates of the local Newton stay below f* = (1 − 1e-9)/q₁.
	m.fLim = p.FC + ((1-1e-9)/p.Q1-p.FC)/m.delta
	if p.FN > 0 {
		m.nuc = p.FN / (p.SN * math.Sqrt(2*math.Pi))
	}
	return m, nil
}

// Sigma0 returns the initial yield stress σ₀ = R(0).
func (m *GTN) Sigma0() float64 { return m.sigma0 }

// BreakPorosity returns the porosity f_break at which a point breaks.
func (m *GTN) BreakPorosity() float64 { return m.fBreak }

// Initial returns the virgin state: f = f₀, no plastic strain.
func (m *GTN) Initial() State { return State{F: m.par.F0} }

// Regularisation returns c = σ₀ℓ² and the penalty r (both 0 when local).
func (m *GTN) Regularisation() (c, r float64) { return m.c, m.r }

// EffectiveStress returns σ* of the stress T at porosity f, the root of
// (σ_eq/σ*)² + 2q₁f* cosh(3q₂σ_m/(2σ*)) − 1 − (q₁f*)² = 0, by Newton's
// method on the logarithm of the yield function in ln σ*, safeguarded by
// bisection inside a bracket. It returns 0 for T = 0 and an error when
// f* ≥ 1/q₁ (no finite σ*: the material carries no stress).
func (m *GTN) EffectiveStress(T Sym, f float64) (float64, error) {
	fs, _ := m.par.FStar(f)
	q1, q2 := m.par.Q1, m.par.Q2
	if fs < 0 || q1*fs >= 1 {
		return 0, fmt.Errorf("gtn: effective stress undefined at f* = %g (allowed 0 <= f* < 1/q1 = %g)", fs, 1/q1)
	}
	sm := T.Trace() / 3
	s := Sym{T[0] - sm, T[1] - sm, T[2] - sm, T[3]}
	seq2 := 1.5 * s.Ddot(s)
	if seq2 == 0 && sm == 0 {
		return 0, nil
	}
	b := 2 * q1 * fs
	lk := math.Log(1 + q1*q1*fs*fs)
	// g(y) = ln(σ_eq² e^{−2y} + b cosh(1.5 q₂ σ_m e^{−y})) − ln κ, y = ln σ*,
	// strictly decreasing in y.
	g := func(y float64) (float64, float64) {
		inv := math.Exp(-y)
		a := seq2 * inv * inv
		x := 1.5 * q2 * sm * inv
		l, la, _, lx := logYield(a, b, x)
		return l - lk, -2*a*la - x*lx
	}
	y := 0.5 * math.Log(seq2+2.25*q2*q2*sm*sm)
	lo, hi := y, y
	for k := 0; ; k++ {
		if v, _ := g(hi); v < 0 {
			break
		}
		hi += math.Ln2
		if k > 2000 {
			return 0, errors.New("gtn: effective stress: no upper bracket")
		}
	}
	for k := 0; ; k++ {
		if v, _ := g(lo); v > 0 {
			break
		}
		lo -= math.Ln2
		if k > 2000 {
			return 0, errors.New("gtn: effective stress: no lower bracket")
		}
	}
	y = 0.5 * (lo + hi)
	for it := 0; it < 200; it++ {
		v, dv := g(y)
		if v > 0 {
			lo = y
		} else {
			hi = y
		}
		yn := y - v/dv
		if !(yn > lo && yn < hi) {
			yn = 0.5 * (lo + hi)
		}
		if math.Abs(yn-y) < 1e-15*(1+math.Abs(y)) || hi-lo < 1e-15*(1+math.Abs(y)) {
			return math.Exp(yn), nil
		}
		y = yn
	}
	return 0, errors.New("gtn: effective stress: iteration did not converge")
}

// logYield returns L = ln(a + b cosh x) and ∂L/∂a, ∂L/∂b, ∂L/∂x, evaluated
// without overflow through w = e^{−|x|}: a + b cosh x = (2aw + b(1+w²))/(2w).
func logYield(a, b, x float64) (l, la, lb, lx float64) {
	ax := math.Abs(x)
	w := math.Exp(-ax)
	st := 2*a*w + b*(1+w*w)
	sg := 1.0
	if x < 0 {
		sg = -1
	}
	l = ax + math.Log(st) - math.Ln2
	la = 2 * w / st
	lb = (1 + w*w) / st
	lx = b * sg * (1 - w*w) / st
	return l, la, lb, lx
}

// yieldPartials is L = ln(a + b cosh x) with its first partials and the
// second partials the local Jacobian needs.
type yieldPartials struct {
	l, la, lb, lx           float64
	laa, lab, lax, lxx, lxb float64
}

// logYieldPartials returns L = ln(a + b cosh x) and its partials (see
// logYield). With D = a + b cosh x and t = sinh x/D: L_a = 1/D, L_b =
// cosh x/D, L_x = b t, so L_aa = −L_a², L_ab = −L_a L_b, L_ax = −L_a L_x,
// L_xx = b L_b − L_x², and L_xb = t(1 − b L_b) = a t L_a since
// a L_a + b L_b = 1.
func logYieldPartials(a, b, x float64) yieldPartials {
	L, La, Lb, Lx := logYield(a, b, x)
	tt := 0.0
	if b > 0 {
		tt = Lx / b
	} else {
		// b = 0: t = sinh x/(a + b cosh x) is only needed multiplied by a in
		// ∂L_x/∂b; compute it directly.
		ax := math.Abs(x)
		w := math.Exp(-ax)
		st := 2 * a * w
		tt = (1 - w*w) / st
		if x < 0 {
			tt = -tt
		}
	}
	return yieldPartials{
		l: L, la: La, lb: Lb, lx: Lx,
		laa: -La * La,
		lab: -La * Lb,
		lax: -La * Lx,
		lxx: b*Lb - Lx*Lx,
		lxb: a * tt * La,
	}
}

// Local Newton settings: the iteration stops one step after the scaled
// residual falls below newtonTol (the last step brings it to rounding).
const (
	newtonTol     = 1e-10
	newtonMaxIter = 60
)

// gtnLocal is the local problem of one plastic step, on the stack.
type gtnLocal struct {
	m          *GTN
	smTr, q    float64 // trial mean stress and trial σ_eq²
	pN, fN     float64
	abar, lamb float64
	aN         float64                 // flow stress A at the start of the step
	hist       *[newtonMaxIter]float64 // residual history (tests), may be nil
	nHist      int
	// logF selects the first unknown y = ln f instead of Δε_p (when
	// f_n > 0): it keeps f > 0 and resolves small porosities under high
	// pressure, where Δε_p fixes f only to an absolute rounding error.
	logF bool
	// sgn is the sign of σ_m^tr, 0 when it is at the rounding level of the
	// trial stress.
	sgn float64
}

// gtnEval is the local problem evaluated at u = (Δε_p or ln f, β, Δp).
type gtnEval struct {
	ok      bool
	sm, a   float64 // mean stress, A
	f       float64
	u1      float64 // Δε_p
	u1y     float64 // ∂Δε_p/∂u₀
	u1u3    float64 // ∂Δε_p/∂Δp
	r       [3]float64
	jac     [3][3]float64 // ∂r/∂u
	ry      [3][4]float64 // ∂r/∂y, y = (σ_m^tr, σ_eq^tr², ā, λ)
	normRes float64
}

// gtnPorosity is the porosity f and the volumetric plastic strain Δε_p at
// one point of the local problem, with their derivatives with respect to
// the first unknown u₀ and to Δp.
type gtnPorosity struct {
	f, u1     float64 // f, Δε_p
	u1y, u1u3 float64 // ∂Δε_p/∂u₀, ∂Δε_p/∂Δp
	fy, fu3   float64 // ∂f/∂u₀, ∂f/∂Δp
}

// porosity returns f and Δε_p from 1 − f = (1 − f_n − A_N Δp) e^{−Δε_p}
// and the first unknown u₀: Δε_p itself, or ln f (logF); aN and daN are
// the nucleation rate at p_n + Δp and its derivative.
func (lp *gtnLocal) porosity(u0, u3, aN, daN float64) gtnPorosity {
	var po gtnPorosity
	if lp.logF {
		po.f = math.Exp(u0)
		omega := 1 - po.f
		po.u1 = math.Log1p(-lp.fN-aN*u3) - math.Log1p(-po.f)
		po.u1y = po.f / omega
		po.u1u3 = -(aN + daN*u3) / (1 - lp.fN - aN*u3)
		po.fy = po.f
	} else {
		po.u1 = u0
		e1 := math.Exp(-po.u1)
		omega := (1 - lp.fN - aN*u3) * e1
		po.f = 1 - omega
		po.u1y = 1
		po.fy = omega
		po.fu3 = (aN + daN*u3) * e1
	}
	return po
}

// eval evaluates the local problem at u into ev; ev.ok is false where u is
// not admissible (or the result not finite).
func (lp *gtnLocal) eval(u [3]float64, ev *gtnEval) {
	m := lp.m
	par := &m.par
	ev.ok = false
	beta, u3 := u[1], u[2]
	if !(beta > 0 && beta <= 2 && u3 >= 0) {
		return
	}
	p := lp.pN + u3
	A, dA, dAbar, dLambda := m.flowStress(p, lp.abar, lp.lamb)
	if !(A > 0) {
		return
	}
	aN, daN := m.nucleation(p)
	po := lp.porosity(u[0], u3, aN, daN)
	u1, f, u1y, u1u3, fy, fu3 := po.u1, po.f, po.u1y, po.u1u3, po.fy, po.fu3
	if !(f >= 0 && f < m.fLim) {
		return
	}
	// The volumetric plastic strain has the sign of σ_m, and σ_m keeps
	// the sign of its trial value during the return (wrong signs at the
	// rounding level are tolerated; a trial σ_m at rounding level has no
	// sign). Where no admissible solution exists — backward Euler cannot
	// follow void growth faster than e-fold per step, as from f ≈ 0 under
	// extreme triaxiality — the iteration fails and the solver cuts back.
	sm := lp.smTr - m.bulk*u1
	if lp.sgn != 0 && (sm*lp.sgn < -1e-12*A || u1*lp.sgn < -1e-15*math.Max(f, lp.fN)) {
		return
	}
	fs, dfs := par.FStar(f)
	q1, q2, mu := par.Q1, par.Q2, m.mu

	a := beta * beta * lp.q / (A * A)
	x := 1.5 * q2 * sm / A
	b := 2 * q1 * fs
	kap := 1 + q1*q1*fs*fs
	if !(2*a+b > 0) {
		return
	}
	ly := logYieldPartials(a, b, x)
	L, La, Lb, Lx := ly.l, ly.la, ly.lb, ly.lx
	Laa, Lab, Lax, Lxx, Lxb := ly.laa, ly.lab, ly.lax, ly.lxx, ly.lxb

	aB := 2 * beta * lp.q / (A * A)
	aQ := beta * beta / (A * A)
	aA := -2 * a / A
	xS := 1.5 * q2 / A
	xA := -x / A
	bF := 2 * q1 * dfs
	lkF := 2 * q1 * q1 * fs * dfs / kap

	c1 := 6 * mu * u1 * beta / A
	c2 := -(1 - beta) * 1.5 * q2
	ga := c1*Laa + c2*Lax
	gb := c1*Lab + c2*Lxb
	gx := c1*Lax + c2*Lxx
	s0 := m.sigma0

	ev.r[0] = c1*La + c2*Lx
	ev.r[1] = L - math.Log(kap)
	ev.r[2] = ((1-f)*A*u3 - sm*u1 - beta*(1-beta)*lp.q/(3*mu)) / s0

	// Explicit partials ∂r/∂u and partials with respect to the dependent
	// variables d = (Q, σ_m, A, f).
	ex := [3][3]float64{
		{6 * mu * beta / A * La, 6*mu*u1/A*La + 1.5*q2*Lx + ga*aB, 0},
		{0, La * aB, 0},
		{-sm / s0, -(1 - 2*beta) * lp.q / (3 * mu) / s0, (1 - f) * A / s0},
	}
	dd := [3][4]float64{
		{ga * aQ, gx * xS, -c1/A*La + ga*aA + gx*xA, gb * bF},
		{La * aQ, Lx * xS, La*aA + Lx*xA, Lb*bF - lkF},
		{-beta * (1 - beta) / (3 * mu) / s0, -u1 / s0, (1 - f) * u3 / s0, -A * u3 / s0},
	}
	// Chain rule to the unknowns: Δε_p = Δε_p(u₀, Δp), f = f(u₀, Δp),
	// σ_m = σ_m^tr − K Δε_p, A = A(p_n + Δp).
	for i := 0; i < 3; i++ {
		du1 := ex[i][0] - m.bulk*dd[i][1] // ∂r/∂Δε_p at fixed f
		ev.jac[i][0] = du1*u1y + dd[i][3]*fy
		ev.jac[i][1] = ex[i][1]
		ev.jac[i][2] = ex[i][2] + dA*dd[i][2] + du1*u1u3 + fu3*dd[i][3]
		// ∂d/∂y: Q: (0,1,0,0); σ_m: (1,0,0,0); A: (0,0,−r,1) if regularised.
		ev.ry[i][0] = dd[i][1]
		ev.ry[i][1] = dd[i][0]
		ev.ry[i][2] = dAbar * dd[i][2]
		ev.ry[i][3] = dLambda * dd[i][2]
	}
	ev.sm, ev.a, ev.f, ev.u1 = sm, A, f, u1
	ev.u1y, ev.u1u3 = u1y, u1u3
	ev.normRes = math.Sqrt(ev.r[0]*ev.r[0] + ev.r[1]*ev.r[1] + ev.r[2]*ev.r[2])
	ev.ok = finite(ev.normRes)
}

// nucleation returns the Chu–Needleman rate A_N(p) and its derivative.
func (m *GTN) nucleation(p float64) (aN, daN float64) {
	if m.nuc == 0 {
		return 0, 0
	}
	z := (p - m.par.EpsN) / m.par.SN
	aN = m.nuc * math.Exp(-0.5*z*z)
	return aN, -aN * z / m.par.SN
}

// Flow-stress bound of the regularised model (our choice; no single
// source): the gradient term may lower the flow stress to floorShare·R(p)
// and no further, reached smoothly over floorWidth·σ₀.
const (
	floorShare = 0.5
	floorWidth = 0.05
)

// flowStress returns the flow stress A at matrix plastic strain p with the
// interpolated ā and λ, and its derivatives with respect to p, ā and λ.
// Local model: A = R(p). Regularised: A = R(p) + λ + r(p − ā), bounded
// below by a₁ = αR(p), α = floorShare: with x = R + λ + r(p − ā) and
// d = floorWidth·σ₀, A = x for x ≥ a₁ + d and A = a₁ + d·exp((x − a₁ − d)/d)
// below (C¹ at a₁ + d, never below a₁).
//
// The gradient term λ ≈ −cΔā is negative at the edges of a localisation
// band and next to broken material it reaches −10σ₀. Under a small
// absolute floor the wake of the crack would yield at a few MPa and flow
// like a fluid, and the Newton iteration would stall in it. A bound
// proportional to R keeps the edge softening that sets the band width
// while the wake keeps its strength.
func (m *GTN) flowStress(p, abar, lamb float64) (a, dp, dAbar, dLambda float64) {
	r, dr := m.par.Hardening.Flow(p)
	if m.local {
		return r, dr, 0, 0
	}
	x := r + lamb + m.r*(p-abar)
	lo, d := floorShare*r, floorWidth*m.sigma0
	if x >= lo+d {
		return x, dr + m.r, -m.r, 1
	}
	s := math.Exp((x - lo - d) / d)
	// ∂A/∂x = s and ∂A/∂R at fixed x = α(1 − s).
	return lo + d*s, s*(dr+m.r) + floorShare*(1-s)*dr, -m.r * s, s
}

// FlowStress returns the flow stress A the model uses at matrix plastic
// strain p with the non-local ā and multiplier λ at the point (both
// ignored by the local model); see flowStress.
func (m *GTN) FlowStress(p, abar, lambda float64) float64 {
	a, _, _, _ := m.flowStress(p, abar, lambda)
	return a
}

func (lp *gtnLocal) zeroFlow(u3 float64) float64 {
	if !lp.logF {
		return 0
	}
	aN, _ := lp.m.nucleation(lp.pN + u3)
	return math.Log(lp.fN + aN*u3)
}

// solve3 solves J x = b by Cramer's rule; ok is false when J is singular.
func solve3(j *[3][3]float64, b [3]float64) (x [3]float64, ok bool) {
	c00 := j[1][1]*j[2][2] - j[1][2]*j[2][1]
	c01 := j[1][2]*j[2][0] - j[1][0]*j[2][2]
	c02 := j[1][0]*j[2][1] - j[1][1]*j[2][0]
	det := j[0][0]*c00 + j[0][1]*c01 + j[0][2]*c02
	scale := math.Abs(j[0][0]*c00) + math.Abs(j[0][1]*c01) + math.Abs(j[0][2]*c02)
	if !(math.Abs(det) > 1e-300) || math.Abs(det) < 1e-14*scale {
		return x, false
	}
	inv := [3][3]float64{
		{c00, j[0][2]*j[2][1] - j[0][1]*j[2][2], j[0][1]*j[1][2] - j[0][2]*j[1][1]},
		{c01, j[0][0]*j[2][2] - j[0][2]*j[2][0], j[0][2]*j[1][0] - j[0][0]*j[1][2]},
		{c02, j[0][1]*j[2][0] - j[0][0]*j[2][1], j[0][0]*j[1][1] - j[0][1]*j[1][0]},
	}
	for r := 0; r < 3; r++ {
		x[r] = (inv[r][0]*b[0] + inv[r][1]*b[1] + inv[r][2]*b[2]) / det
	}
	return x, finite(x[0]) && finite(x[1]) && finite(x[2])
}

// project clips an iterate onto the simple bounds of the local problem:
// Δε_p has the sign of σ_m^tr, 0 < β ≤ 2, Δp ≥ 0. The remaining constraints
// (σ_m keeps its sign, f < f_lim, A > 0) are left to the backtracking.
func (lp *gtnLocal) project(u [3]float64) [3]float64 {
	u[1] = math.Min(math.Max(u[1], 1e-12), 2)
	u[2] = math.Max(u[2], 0)
	z := lp.zeroFlow(u[2])
	// Δε_p increases with u₀ in both parametrisations.
	if (u[0]-z)*lp.sgn < 0 {
		u[0] = z
	}
	return u
}

// errLocalNewton is returned when the local integration fails; the solver
// cuts the increment back.
var errLocalNewton = errors.New("gtn: local return mapping did not converge")

// solve runs the local Newton iteration from up to two starting points. It
// returns the solution and the evaluation at it; on failure the last
// accepted iterate.
func (lp *gtnLocal) solve() (u [3]float64, ev gtnEval, err error) {
	// First start: the von Mises radial return with the flow stress of the
	// start of the step, β₀ = A_n/σ_eq^tr, Δp₀ = (1−β₀)σ_eq^tr/(3μ),
	// Δε_p = 0 (exact for perfectly plastic von Mises). Second start, if
	// the first is not admissible or its iteration fails: the trial point
	// (Δε_p, β, Δp) = (0, 1, 0).
	if seq := math.Sqrt(lp.q); seq > lp.aN {
		b0 := lp.aN / seq
		u3 := (1 - b0) * seq / (3 * lp.m.mu)
		u, ev, err = lp.iterate([3]float64{lp.zeroFlow(u3), b0, u3})
		if err == nil {
			return u, ev, nil
		}
	}
	if u, ev, err = lp.iterate([3]float64{lp.zeroFlow(0), 1, 0}); err == nil {
		return u, ev, nil
	}
	if ev.ok && ev.f >= lp.m.fBreak {
		return u, ev, err
	}
	return lp.bracketed()
}

// iterate runs the damped, projected Newton iteration from u0.
func (lp *gtnLocal) iterate(u0 [3]float64) (u [3]float64, ev gtnEval, err error) {
	u = u0
	lp.eval(u, &ev)
	if !ev.ok {
		return u, ev, errLocalNewton
	}
	var trial gtnEval
	for it := 0; it < newtonMaxIter; it++ {
		if lp.hist != nil && lp.nHist < newtonMaxIter {
			lp.hist[lp.nHist] = ev.normRes
			lp.nHist++
		}
		final := ev.normRes < newtonTol
		du, ok := solve3(&ev.jac, [3]float64{-ev.r[0], -ev.r[1], -ev.r[2]})
		if !ok {
			return u, ev, errLocalNewton
		}
		if lp.logF && math.Abs(du[0]) > 5 {
			// At most a factor e⁵ in f per iteration.
			sc := 5 / math.Abs(du[0])
			du = [3]float64{du[0] * sc, du[1] * sc, du[2] * sc}
		}
		alpha := 1.0
		accepted := false
		for k := 0; k < 40; k++ {
			un := lp.project([3]float64{u[0] + alpha*du[0], u[1] + alpha*du[1], u[2] + alpha*du[2]})
			lp.eval(un, &trial)
			if trial.ok && (final || trial.normRes < (1-1e-4*alpha)*ev.normRes) {
				u, ev = un, trial
				accepted = true
				break
			}
			alpha *= 0.5
		}
		if final {
			if !accepted {
				// The correction cannot be taken; the current point is
				// already converged to newtonTol.
				lp.eval(u, &ev)
			}
			if lp.hist != nil && lp.nHist < newtonMaxIter {
				lp.hist[lp.nHist] = ev.normRes
				lp.nHist++
			}
			return u, ev, nil
		}
		if !accepted {
			// Stagnation at rounding: the Newton correction is negligible
			// although the residual is above newtonTol (ill-conditioned
			// states, e.g. f → 0 under high pressure, or a flow stress
			// floored to a tiny A next to a localisation band, where the
			// rounding floor of the residual ∝ μ/A exceeds newtonTol).
			// Accept it when no unknown would change by more than 1e-8
			// relative.
			small := true
			for i := range du {
				small = small && math.Abs(du[i]) <= 1e-8*(1+math.Abs(u[i]))
			}
			if small && ev.normRes < 1e-6 {
				return u, ev, nil
			}
			return u, ev, errLocalNewton
		}
	}
	return u, ev, errLocalNewton
}

// gtnTrial is the elastic trial state of a step.
type gtnTrial struct {
	ee, t, s Sym     // trial elastic strain, stress and stress deviator
	sm, q    float64 // trial mean stress and σ_eq²
	aN       float64 // flow stress A at the start of the step
	plastic  bool    // the trial stress lies outside the yield surface
}

// trial returns the elastic trial state. Plastic when σ*(T^tr) > A(p_n),
// i.e. when the logarithmic yield function is positive at A = A(p_n).
func (m *GTN) trial(in *Input, old *State) (tr gtnTrial, err error) {
	for i := range tr.ee {
		tr.ee[i] = in.E[i] - old.Ep[i]
	}
	hookeStress(m.lambda, m.mu, tr.ee, &tr.t)
	tr.sm = tr.t.Trace() / 3
	tr.s = Sym{tr.t[0] - tr.sm, tr.t[1] - tr.sm, tr.t[2] - tr.sm, tr.t[3]}
	tr.q = 1.5 * tr.s.Ddot(tr.s)
	if !finite(tr.sm) || !finite(tr.q) {
		return tr, fmt.Errorf("gtn: trial stress not finite (strain %v)", in.E)
	}
	aN := m.FlowStress(old.P, in.Abar, in.Lambda)
	if !(aN > 0) {
		return tr, fmt.Errorf("gtn: flow stress A = R(p) + λ + r(p − ā) = %g must stay > 0 (p = %g, ā = %g, λ = %g)", aN, old.P, in.Abar, in.Lambda)
	}
	tr.aN = aN
	fsN, _ := m.par.FStar(old.F)
	if tr.q > 0 || fsN > 0 {
		l, _, _, _ := logYield(tr.q/(aN*aN), 2*m.par.Q1*fsN, 1.5*m.par.Q2*tr.sm/aN)
		tr.plastic = l-math.Log(1+m.par.Q1*m.par.Q1*fsN*fsN) > 0
	}
	return tr, nil
}

// localProblem sets up the local return-mapping problem of a plastic trial
// state.
func (m *GTN) localProblem(tr *gtnTrial, in *Input, old *State) gtnLocal {
	lp := gtnLocal{m: m, smTr: tr.sm, q: tr.q, pN: old.P, fN: old.F, abar: in.Abar, lamb: in.Lambda, aN: tr.aN,
		logF: old.F > 0}
	if math.Abs(tr.sm) > 1e-13*(math.Abs(tr.sm)+math.Sqrt(tr.q)+tr.aN) {
		lp.sgn = math.Copysign(1, tr.sm)
	}
	return lp
}

// Update integrates one step (see the type documentation). A broken point
// stays broken with zero stress and tangent. On a local integration failure
// it returns an error and leaves new and out unspecified, unless the failure
// is the loss of stress-carrying capacity (f reaching f_break during the
// iteration), in which case the point is marked broken.
func (m *GTN) Update(in *Input, old, new *State, out *Response) error {
	return m.update(in, old, new, out, nil, nil)
}

func (m *GTN) broken(old *State, f float64, new *State, out *Response) {
	*new = *old
	new.Broken = true
	new.F = math.Max(f, old.F)
	*out = Response{P: new.P, Plastic: true}
}

func (m *GTN) update(in *Input, old, new *State, out *Response, hist *[newtonMaxIter]float64, nHist *int) error {
	if old.Broken || old.F >= m.fBreak {
		m.broken(old, old.F, new, out)
		return nil
	}
	lam, mu, K := m.lambda, m.mu, m.bulk
	tr, err := m.trial(in, old)
	if err != nil {
		return err
	}
	ee, tTr, sTr, smTr, q := tr.ee, tr.t, tr.s, tr.sm, tr.q
	if !tr.plastic {
		*new = *old
		*out = Response{T: tTr, P: old.P}
		hookeTangent(lam, mu, &out.DTdE)
		out.Energy = 0.5 * tTr.Ddot(ee)
		return nil
	}
	lp := m.localProblem(&tr, in, old)
	lp.hist = hist
	u, ev, err := lp.solve()
	if nHist != nil {
		*nHist = lp.nHist
	}
	if err != nil {
		if ev.ok && ev.f >= m.fBreak {
			m.broken(old, ev.f, new, out)
			return nil
		}
		return fmt.Errorf("%w (trial σ_m = %g, σ_eq = %g, p = %g, f = %g)", err, smTr, math.Sqrt(q), old.P, old.F)
	}
	u1, beta, u3 := ev.u1, u[1], u[2]

	// New state. A point whose porosity reaches f_break in this step is
	// marked broken but still answers with the stress and tangent of the
	// converged GTN update (small: q₁f* is then close to 1): zeroing them
	// at once would make the response jump between global Newton
	// iterations as the point crosses f_break back and forth, and the
	// iterations would stall. It carries no stress from the next step on.
	*new = State{P: old.P + u3, F: ev.f, Broken: ev.f >= m.fBreak}
	for i := 0; i < 4; i++ {
		dk := 0.0
		if i < 3 {
			dk = 1
		}
		new.Ep[i] = old.Ep[i] + u1/3*dk + (1-beta)/(2*mu)*sTr[i]
	}

	// Sensitivities du/dy = −J⁻¹ ∂r/∂y, y = (σ_m^tr, Q, ā, λ).
	var dudy [3][4]float64
	for l := 0; l < 4; l++ {
		x, ok := solve3(&ev.jac, [3]float64{-ev.ry[0][l], -ev.ry[1][l], -ev.ry[2][l]})
		if !ok {
			return fmt.Errorf("%w: singular tangent (p = %g, f = %g)", errLocalNewton, old.P, old.F)
		}
		// Row 0 becomes dΔε_p/dy from the derivative of the first unknown.
		dudy[0][l] = ev.u1y*x[0] + ev.u1u3*x[2]
		dudy[1][l], dudy[2][l] = x[1], x[2]
	}

	*out = Response{P: new.P, Plastic: true}
	sm := ev.sm
	for i := 0; i < 4; i++ {
		dk := 0.0
		if i < 3 {
			dk = 1
		}
		out.T[i] = sm*dk + beta*sTr[i]
	}
	// dy/dE_j: σ_m^tr → K δ_j, Q → 6μ w_j s_j.
	for j := 0; j < 4; j++ {
		dj := 0.0
		if j < 3 {
			dj = 1
		}
		ySm := K * dj
		yQ := 6 * mu * symWeight[j] * sTr[j]
		du1 := dudy[0][0]*ySm + dudy[0][1]*yQ
		dbe := dudy[1][0]*ySm + dudy[1][1]*yQ
		dp := dudy[2][0]*ySm + dudy[2][1]*yQ
		dsm := ySm - K*du1
		for i := 0; i < 4; i++ {
			di := 0.0
			if i < 3 {
				di = 1
			}
			dev := 0.0
			if i == j {
				dev = 1
			}
			dev -= di * dj / 3
			out.DTdE[i][j] = di*dsm + sTr[i]*dbe + beta*2*mu*dev
		}
		out.DPdE[j] = dp
	}
	for i := 0; i < 4; i++ {
		di := 0.0
		if i < 3 {
			di = 1
		}
		out.DTdAbar[i] = -di*K*dudy[0][2] + sTr[i]*dudy[1][2]
		out.DTdLambda[i] = -di*K*dudy[0][3] + sTr[i]*dudy[1][3]
	}
	out.DPdAbar = dudy[2][2]
	out.DPdLambda = dudy[2][3]
	for i := range ee {
		ee[i] = in.E[i] - new.Ep[i]
	}
	out.Energy = 0.5 * out.T.Ddot(ee)
	out.Dissipation = (1 - ev.f) * ev.a * u3
	return nil
}
