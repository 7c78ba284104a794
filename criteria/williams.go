package criteria

import (
	"fmt"
	"math"

	"tearline/solver/material"
)

// Elastic holds the isotropic elastic constants the fracture measures need:
// Young's modulus E and Poisson's ratio Nu.
type Elastic struct {
	E  float64
	Nu float64
}

// Validate reports whether the constants are physically admissible:
// E > 0 and −1 < ν < 0.5.
func (el Elastic) Validate() error {
	if !(el.E > 0) || math.IsInf(el.E, 0) {
		return fmt.Errorf("criteria: Young's modulus E = %g must be finite and > 0", el.E)
	}
	if !(el.Nu > -1 && el.Nu < 0.5) {
		return fmt.Errorf("criteria: Poisson's ratio ν = %g must lie in (-1, 0.5)", el.Nu)
	}
	return nil
}

// Shear returns the shear modulus μ = E/(2(1+ν)).
func (el Elastic) Shear() float64 { return el.E / (2 * (1 + el.Nu)) }

// FarFieldJ returns the plane-strain energy release rate of a mode-I stress
// intensity K: J = K²(1−ν²)/E (Irwin 1957; Rice 1968, J. Appl. Mech. 35).
func FarFieldJ(K float64, el Elastic) float64 {
	return K * K * (1 - el.Nu*el.Nu) / el.E
}

// FarFieldJMixed returns the plane-strain energy release rate of a mixed
// mode-I/mode-II field: J = (K_I² + K_II²)(1−ν²)/E (Irwin 1957; e.g.
// Anderson, Fracture Mechanics, ch. 2).
func FarFieldJMixed(KI, KII float64, el Elastic) float64 {
	return (KI*KI + KII*KII) * (1 - el.Nu*el.Nu) / el.E
}

// KinkAngle returns the crack-growth direction θ₀ (radians, from the crack
// direction, positive towards the normal n) of the maximum-hoop-stress
// criterion of Erdogan & Sih (1963, J. Basic Eng. 85): the root of
// K_I sin θ + K_II (3 cos θ − 1) = 0 with the hoop stress a maximum,
// θ₀ = 2 atan[(K_I − √(K_I² + 8K_II²)) / (4K_II)]; 0 for K_II = 0.
func KinkAngle(KI, KII float64) float64 {
	if KII == 0 {
		return 0
	}
	return 2 * math.Atan((KI-math.Sqrt(KI*KI+8*KII*KII))/(4*KII))
}

// Face selects which crack face a point on the crack line behind the tip
// (θ = ±π exactly) belongs to.
type Face int

const (
	// UpperFace takes θ = +π on the crack line (the side of +n, n the crack
	// direction turned by +90°).
	UpperFace Face = 1
	// LowerFace takes θ = −π on the crack line.
	LowerFace Face = -1
)

// KField is the plane-strain near-tip field: the leading singular mode-I
// term with stress intensity K, the constant T-stress term of the Williams
// (1957, J. Appl. Mech. 24) expansion and, optionally, the leading singular
// mode-II (in-plane shear) term with stress intensity KII, for a crack that
// lies behind Tip along −Dir and would grow along +Dir. Displacements are
// those of linear elasticity with κ = 3 − 4ν (e.g. Anderson, Fracture
// Mechanics, ch. 2, mode-I and mode-II crack-tip fields). KII = 0 (the zero
// value) gives the pure mode-I field.
type KField struct {
	K, T float64    // mode-I stress intensity and T-stress
	El   Elastic    // elastic constants
	Tip  [2]float64 // crack-tip position
	Dir  [2]float64 // crack direction (need not be unit length)
	KII  float64    // mode-II stress intensity (0 = pure mode I)
}

// Validate checks the elastic constants and the direction.
func (k KField) Validate() error {
	if err := k.El.Validate(); err != nil {
		return fmt.Errorf("K-field: %w", err)
	}
	if d := math.Hypot(k.Dir[0], k.Dir[1]); !(d > 0) || math.IsInf(d, 0) {
		return fmt.Errorf("K-field: crack direction %v must be a finite non-zero vector", k.Dir)
	}
	if math.IsNaN(k.K) || math.IsInf(k.K, 0) || math.IsNaN(k.T) || math.IsInf(k.T, 0) {
		return fmt.Errorf("K-field: K = %g and T = %g must be finite", k.K, k.T)
	}
	if math.IsNaN(k.KII) || math.IsInf(k.KII, 0) {
		return fmt.Errorf("K-field: K_II = %g must be finite", k.KII)
	}
	return nil
}

// frame returns the unit crack direction t and normal n = t turned by +90°.
func frame(dir [2]float64) (t, n [2]float64) {
	d := math.Hypot(dir[0], dir[1])
	t = [2]float64{dir[0] / d, dir[1] / d}
	n = [2]float64{-t[1], t[0]}
	return t, n
}

// polar returns r and θ ∈ [−π, π] of x in the crack frame; on the crack line
// behind the tip (within a relative 1e-12, so that round-off in a turned
// frame cannot flip a face node to the other face) θ is +π or −π as face
// says.
func (k KField) polar(x [2]float64, face Face) (r, th float64, t, n [2]float64) {
	t, n = frame(k.Dir)
	dx, dy := x[0]-k.Tip[0], x[1]-k.Tip[1]
	x1 := dx*t[0] + dy*t[1]
	x2 := dx*n[0] + dy*n[1]
	r = math.Hypot(x1, x2)
	if math.Abs(x2) <= 1e-12*math.Abs(x1) {
		if x1 < 0 {
			if face == LowerFace {
				return r, -math.Pi, t, n
			}
			return r, math.Pi, t, n
		}
		return r, 0, t, n
	}
	return r, math.Atan2(x2, x1), t, n
}

// Displacement returns the displacement at x; a point on the crack line
// behind the tip (to a relative 1e-12) is taken on the upper face.
func (k KField) Displacement(x [2]float64) [2]float64 { return k.DisplacementFace(x, UpperFace) }

// DisplacementFace returns the displacement at x, taking a point on the
// crack line behind the tip on the given face (the lower face of a full
// model has the same coordinates as the upper one).
func (k KField) DisplacementFace(x [2]float64, face Face) [2]float64 {
	r, th, t, n := k.polar(x, face)
	mu := k.El.Shear()
	kappa := 3 - 4*k.El.Nu
	a := k.K / (2 * mu) * math.Sqrt(r/(2*math.Pi))
	s, c := math.Sincos(th / 2)
	u1 := a * c * (kappa - 1 + 2*s*s)
	u2 := a * s * (kappa + 1 - 2*c*c)
	if k.KII != 0 {
		// Mode II (Anderson, Fracture Mechanics, ch. 2): the faces slide,
		// u₁ = ±b(κ+1) and u₂ = 0 at θ = ±π.
		b := k.KII / (2 * mu) * math.Sqrt(r/(2*math.Pi))
		u1 += b * s * (kappa + 1 + 2*c*c)
		u2 += -b * c * (kappa - 1 - 2*s*s)
	}
	if k.T != 0 {
		// Uniform σ₁₁ = T in plane strain: ε₁₁ = (1−ν²)T/E, ε₂₂ = −ν(1+ν)T/E.
		nu := k.El.Nu
		x1 := r * math.Cos(th)
		x2 := r * math.Sin(th)
		u1 += (1 - nu*nu) * k.T / k.El.E * x1
		u2 += -nu * (1 + nu) * k.T / k.El.E * x2
	}
	return [2]float64{u1*t[0] + u2*n[0], u1*t[1] + u2*n[1]}
}

// Stress returns the Cauchy (small-strain) stress at x in the global frame
// as a material.Sym (components 11, 22, 33, 12; plane strain σ₃₃ = ν(σ₁₁+σ₂₂)).
// It is singular (±Inf or NaN) at the tip itself.
func (k KField) Stress(x [2]float64) material.Sym {
	return k.StressFace(x, UpperFace)
}

// StressFace is Stress with the face choice of DisplacementFace.
func (k KField) StressFace(x [2]float64, face Face) material.Sym {
	r, th, t, n := k.polar(x, face)
	a := k.K / math.Sqrt(2*math.Pi*r)
	s, c := math.Sincos(th / 2)
	s3, c3 := math.Sincos(3 * th / 2)
	s11 := a*c*(1-s*s3) + k.T
	s22 := a * c * (1 + s*s3)
	s12 := a * c * s * c3
	if k.KII != 0 {
		// Mode II (Anderson, Fracture Mechanics, ch. 2): pure shear
		// σ₁₂ = K_II/√(2πr) on the crack line ahead of the tip.
		b := k.KII / math.Sqrt(2*math.Pi*r)
		s11 += -b * s * (2 + c*c3)
		s22 += b * s * c * c3
		s12 += b * c * (1 - s*s3)
	}
	// Rotate to the global frame: σ = Q σ' Qᵀ with Q = [t n].
	g11 := t[0]*t[0]*s11 + 2*t[0]*n[0]*s12 + n[0]*n[0]*s22
	g22 := t[1]*t[1]*s11 + 2*t[1]*n[1]*s12 + n[1]*n[1]*s22
	g12 := t[0]*t[1]*s11 + (t[0]*n[1]+n[0]*t[1])*s12 + n[0]*n[1]*s22
	return material.Sym{g11, g22, k.El.Nu * (s11 + s22), g12}
}

// WilliamsDisplacement returns the plane-strain mode-I displacement at x of
// the field with stress intensity K and T-stress T around the tip with crack
// direction dir (see KField; points on the crack line behind the tip are
// taken on the upper face). It is the remote boundary condition of the
// small-scale-yielding boundary-layer model. dir must be non-zero
// (KField.Validate checks it).
func WilliamsDisplacement(K, T float64, el Elastic, tip, dir [2]float64, x [2]float64) [2]float64 {
	return KField{K: K, T: T, El: el, Tip: tip, Dir: dir}.Displacement(x)
}
