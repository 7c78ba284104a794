package criteria

import (
	"fmt"
	"math"
)

// CTGeometryFactor returns f(a/W) of the compact-tension C(T) stress
// intensity K = P/√(B·B_N·W) f(a/W) (ASTM E399 and E1820 Annex A1; Srawley
// 1976, Int. J. Fract. 12; from memory):
//
//	f(α) = (2+α)/(1−α)^{3/2} (0.886 + 4.64α − 13.32α² + 14.72α³ − 5.6α⁴),
//
// quoted as accurate to ±0.5% for 0.2 ≤ α < 1. Other α is an error.
func CTGeometryFactor(aOverW float64) (float64, error) {
	a := aOverW
	if !(a >= 0.2 && a < 1) {
		return 0, fmt.Errorf("C(T): a/W = %g outside the range [0.2, 1) of the K-calibration", a)
	}
	return (2 + a) / math.Pow(1-a, 1.5) * (0.886 + a*(4.64+a*(-13.32+a*(14.72-5.6*a)))), nil
}

// CTComplianceFactor returns the dimensionless load-line compliance
// E'·B_e·C_LL of a C(T) specimen (Saxena & Hudak 1978, Int. J. Fract. 14, as
// used by ASTM E1820 Annex A1; from memory):
//
//	E'B_eC = ((1+α)/(1−α))² (2.1630 + 12.219α − 20.065α² − 0.9925α³ + 20.609α⁴ − 9.9314α⁵),
//
// for 0.2 ≤ α < 1. Other α is an error.
func CTComplianceFactor(aOverW float64) (float64, error) {
	a := aOverW
	if !(a >= 0.2 && a < 1) {
		return 0, fmt.Errorf("C(T): a/W = %g outside the range [0.2, 1) of the compliance calibration", a)
	}
	r := (1 + a) / (1 - a)
	return r * r * (2.1630 + a*(12.219+a*(-20.065+a*(-0.9925+a*(20.609-9.9314*a))))), nil
}

// CTSpecimen is a compact-tension specimen: width W (load line to back
// face), thickness B, net thickness B_N between side grooves (0 means B),
// initial crack size A0 (from the load line) and the elastic constants.
// A plane-strain simulation that reports force per unit thickness uses
// B = B_N = 1.
type CTSpecimen struct {
	W, B, BN, A0 float64
	El           Elastic
}

func (s CTSpecimen) bn() float64 {
	if s.BN == 0 {
		return s.B
	}
	return s.BN
}

// Validate checks the dimensions and the elastic constants.
func (s CTSpecimen) Validate() error {
	if !(s.W > 0) || math.IsInf(s.W, 0) {
		return fmt.Errorf("C(T): width W = %g must be finite and > 0", s.W)
	}
	if !(s.B > 0) || math.IsInf(s.B, 0) {
		return fmt.Errorf("C(T): thickness B = %g must be finite and > 0", s.B)
	}
	if bn := s.bn(); !(bn > 0 && bn <= s.B) {
		return fmt.Errorf("C(T): net thickness B_N = %g must lie in (0, B = %g]", bn, s.B)
	}
	if !(s.A0/s.W >= 0.2 && s.A0 < s.W) {
		return fmt.Errorf("C(T): initial crack a0 = %g gives a0/W = %g outside [0.2, 1)", s.A0, s.A0/s.W)
	}
	if err := s.El.Validate(); err != nil {
		return fmt.Errorf("C(T): %w", err)
	}
	return nil
}

// K returns the stress intensity at force P and crack size a:
// K = P/√(B·B_N·W) f(a/W) (ASTM E1820 A1).
func (s CTSpecimen) K(P, a float64) (float64, error) {
	f, err := CTGeometryFactor(a / s.W)
	if err != nil {
		return 0, err
	}
	return P / math.Sqrt(s.B*s.bn()*s.W) * f, nil
}

// Compliance returns the elastic load-line compliance at crack size a with
// the plane-strain modulus E' = E/(1−ν²) and the effective thickness
// B_e = B − (B−B_N)²/B (ASTM E1820).
func (s CTSpecimen) Compliance(a float64) (float64, error) {
	g, err := CTComplianceFactor(a / s.W)
	if err != nil {
		return 0, err
	}
	bn := s.bn()
	be := s.B - (s.B-bn)*(s.B-bn)/s.B
	ep := s.El.E / (1 - s.El.Nu*s.El.Nu)
	return g / (ep * be), nil
}

// CTRecord is one point of a C(T) test record: force P, load-line
// displacement V and the current crack size A (0 means the initial a0).
type CTRecord struct {
	P, V, A float64
}

// ComplianceMode chooses the elastic compliance that separates the plastic
// load-line displacement v_pl = v − P·C.
type ComplianceMode int

const (
	// ComplianceFit fits C through the origin to the record points with
	// P ≤ FitFraction·P_max before the peak (common practice).
	ComplianceFit ComplianceMode = iota
	// ComplianceGiven uses E1820Options.C for every point.
	ComplianceGiven
	// ComplianceCrack uses CTSpecimen.Compliance(a(i)) at each point's
	// current crack size (the E1820 resistance-curve practice).
	ComplianceCrack
)

// E1820Options controls E1820J.
type E1820Options struct {
	Mode ComplianceMode
	// C is the compliance of ComplianceGiven.
	C float64
	// FitFraction is the force fraction of ComplianceFit; 0 means 0.4.
	FitFraction float64
}

// JPoint is the E1820 evaluation of one record point.
type JPoint struct {
	A   float64 // crack size a(i)
	K   float64 // stress intensity at a(i)
	Jel float64 // elastic part K²(1−ν²)/E
	Jpl float64 // plastic part (incrementally corrected for crack growth)
	J   float64 // Jel + Jpl
	Apl float64 // plastic area under force versus v_pl up to this point
	Vpl float64 // plastic load-line displacement
	C   float64 // the elastic compliance used
}

// E1820J evaluates J along a C(T) record by ASTM E1820 Annex A1:
// J = J_el + J_pl with J_el = K²(1−ν²)/E at the current crack size, and the
// plastic part by the incremental formula that corrects for crack growth,
//
//	J_pl(i) = [J_pl(i−1) + η(i−1)/b(i−1) · (A_pl(i) − A_pl(i−1))/B_N] · [1 − γ(i−1)(a(i) − a(i−1))/b(i−1)],
//
// η = 2 + 0.522 b/W, γ = 1 + 0.76 b/W, b = W − a, and the plastic area
// increment by the trapezium rule, (P(i) + P(i−1))(v_pl(i) − v_pl(i−1))/2.
// Without crack growth this is J_pl = η(b₀) A_pl/(B_N b₀), the basic method.
// The record starts from its first point with J_pl = 0 (normally P = 0).
func E1820J(s CTSpecimen, rec []CTRecord, opt E1820Options) ([]JPoint, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if len(rec) == 0 {
		return nil, fmt.Errorf("C(T): empty record")
	}
	a := make([]float64, len(rec))
	for i, r := range rec {
		if math.IsNaN(r.P+r.V+r.A) || math.IsInf(r.P+r.V+r.A, 0) {
			return nil, fmt.Errorf("C(T): record point %d (P %g, v %g, a %g) is not finite", i, r.P, r.V, r.A)
		}
		a[i] = r.A
		if a[i] == 0 {
			a[i] = s.A0
		}
		if !(a[i]/s.W >= 0.2 && a[i] < s.W) {
			return nil, fmt.Errorf("C(T): record point %d has crack size a = %g, a/W = %g outside [0.2, 1)", i, a[i], a[i]/s.W)
		}
	}
	comp := make([]float64, len(rec))
	switch opt.Mode {
	case ComplianceGiven:
		if !(opt.C > 0) || math.IsInf(opt.C, 0) {
			return nil, fmt.Errorf("C(T): given compliance C = %g must be finite and > 0", opt.C)
		}
		for i := range comp {
			comp[i] = opt.C
		}
	case ComplianceCrack:
		for i := range comp {
			c, err := s.Compliance(a[i])
			if err != nil {
				return nil, fmt.Errorf("C(T): record point %d: %w", i, err)
			}
			comp[i] = c
		}
	case ComplianceFit:
		c, err := fitCompliance(rec, opt.FitFraction)
		if err != nil {
			return nil, err
		}
		for i := range comp {
			comp[i] = c
		}
	default:
		return nil, fmt.Errorf("C(T): unknown compliance mode %d (allowed: ComplianceFit, ComplianceGiven, ComplianceCrack)", opt.Mode)
	}
	bn := s.bn()
	out := make([]JPoint, len(rec))
	for i, r := range rec {
		k, err := s.K(r.P, a[i])
		if err != nil {
			return nil, fmt.Errorf("C(T): record point %d: %w", i, err)
		}
		p := JPoint{A: a[i], K: k, Jel: FarFieldJ(k, s.El), Vpl: r.V - r.P*comp[i], C: comp[i]}
		if i > 0 {
			q := out[i-1]
			dA := 0.5 * (r.P + rec[i-1].P) * (p.Vpl - q.Vpl)
			b := s.W - a[i-1]
			eta := 2 + 0.522*b/s.W
			gamma := 1 + 0.76*b/s.W
			p.Apl = q.Apl + dA
			p.Jpl = (q.Jpl + eta/b*dA/bn) * (1 - gamma*(a[i]-a[i-1])/b)
		}
		p.J = p.Jel + p.Jpl
		out[i] = p
	}
	return out, nil
}

// fitCompliance fits v = C·P by least squares through the origin to the
// points up to the peak force with P ≤ frac·P_max.
func fitCompliance(rec []CTRecord, frac float64) (float64, error) {
	if frac == 0 {
		frac = 0.4
	}
	if !(frac > 0 && frac <= 1) {
		return 0, fmt.Errorf("C(T): compliance fit fraction %g must lie in (0, 1]", frac)
	}
	pmax, imax := 0.0, 0
	for i, r := range rec {
		if r.P > pmax {
			pmax, imax = r.P, i
		}
	}
	if !(pmax > 0) {
		return 0, fmt.Errorf("C(T): the record has no positive force to fit the elastic compliance to")
	}
	var spp, spv float64
	n := 0
	for _, r := range rec[:imax+1] {
		if r.P > 0 && r.P <= frac*pmax {
			spp += r.P * r.P
			spv += r.P * r.V
			n++
		}
	}
	if n < 2 || !(spv > 0) {
		return 0, fmt.Errorf("C(T): only %d record points with 0 < P ≤ %g·P_max before the peak: too few to fit the elastic compliance (give it with ComplianceGiven)", n, frac)
	}
	return spv / spp, nil
}

// TearingModulus returns the tearing modulus T = (E/σ₀²) dJ/da (Paris,
// Tada, Zahoor & Ernst 1979, ASTM STP 668) at each point of a J–Δa record.
// dJ/da is the least-squares slope of J against Δa over the points with
// |Δa_j − Δa_i| ≤ window/2 (a centred window, common practice); where the
// window holds fewer than two distinct Δa the value is NaN (not defined,
// written empty in history.csv).
func TearingModulus(da, J []float64, E, sigma0, window float64) ([]float64, error) {
	if len(da) != len(J) {
		return nil, fmt.Errorf("tearing modulus: %d Δa values but %d J values", len(da), len(J))
	}
	if !(E > 0) || !(sigma0 > 0) || math.IsInf(E, 0) || math.IsInf(sigma0, 0) {
		return nil, fmt.Errorf("tearing modulus: E = %g and σ₀ = %g must be finite and > 0", E, sigma0)
	}
	if !(window > 0) || math.IsInf(window, 0) {
		return nil, fmt.Errorf("tearing modulus: window %g must be finite and > 0 (a Δa width)", window)
	}
	for i := range da {
		if math.IsNaN(da[i]+J[i]) || math.IsInf(da[i]+J[i], 0) {
			return nil, fmt.Errorf("tearing modulus: point %d (Δa %g, J %g) is not finite", i, da[i], J[i])
		}
	}
	out := make([]float64, len(da))
	for i := range da {
		var n, sx, sy, sxx, sxy float64
		for j := range da {
			if math.Abs(da[j]-da[i]) <= window/2 {
				n++
				sx += da[j]
				sy += J[j]
				sxx += da[j] * da[j]
				sxy += da[j] * J[j]
			}
		}
		den := n*sxx - sx*sx
		if n < 2 || !(den > 1e-14*(n*sxx+1e-300)) {
			out[i] = math.NaN()
			continue
		}
		out[i] = E / (sigma0 * sigma0) * (n*sxy - sx*sy) / den
	}
	return out, nil
}
