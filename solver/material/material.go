// Package material holds the constitutive laws of tearline: logarithmic
// strain and its derivatives, Hencky elasticity, and finite-strain GTN porous
// plasticity with gradient (micromorphic) regularisation of the cumulative
// plastic strain.
//
// # Kinematics
//
// The element forms C = FᵀF (F₃₃ = 1 in plane strain, 1 + u_r/R in
// axisymmetry) and calls LogStrain for E = ½ ln C and ∂E/∂C. A Model maps E
// to the stress T work-conjugate to E; SecondPK gives S = 2 T:∂E/∂C,
// LogStrainCurvature the geometric term T:∂²E/∂C², and SecondPKTangent
// assembles ∂S/∂C from the two (Miehe, Apel & Lambrecht 2002).
//
// # Models
//
// Hencky is isotropic elasticity in log space. GTN is Gurson–Tvergaard–
// Needleman porous plasticity with coalescence, optional nucleation and the
// gradient coupling A = R(p) + λ + r(p − ā); with f₀ = 0 and no nucleation
// it is von Mises plasticity. Hardening laws: PowerLaw, Voce, Tabulated,
// PerfectlyPlastic. Every parameter set has Validate; models are immutable
// and safe for concurrent Update calls on different points; Update does not
// allocate. A model with a yield surface implements Plastic, which lets a
// caller bring a state mapped from another mesh back onto the surface.
//
// # Conventions
//
// Sym holds the components 11, 22, 33, 12 (tensor shear). Derivatives with
// respect to a Sym count the 12 component once: dAᵢ = Σⱼ D[i][j] dBⱼ. Stresses
// are positive in tension; σ_m = tr T/3, σ_eq = √(3/2 s:s).
package material

// Sym is a symmetric 3×3 tensor of a 2D problem (plane strain or
// axisymmetry), stored as the tensor components 11, 22, 33, 12 (the 13 and 23
// components vanish). Shear is stored as the tensor component, not the
// engineering one, so the double contraction is
// A:B = A₁₁B₁₁ + A₂₂B₂₂ + A₃₃B₃₃ + 2A₁₂B₁₂.
//
// Derivatives with respect to a Sym, written [4][4]float64 D with
// D[i][j] = ∂Aᵢ/∂Bⱼ, treat B₁₂ and B₂₁ as one variable: dAᵢ = Σⱼ D[i][j] dBⱼ.
type Sym [4]float64

// Ddot returns the double contraction A:B.
func (a Sym) Ddot(b Sym) float64 {
	return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] + 2*a[3]*b[3]
}

// Trace returns A₁₁ + A₂₂ + A₃₃.
func (a Sym) Trace() float64 { return a[0] + a[1] + a[2] }

// State is the history of one material point (Gauss point). It is what the
// state transfer maps between meshes and what checkpoints store.
type State struct {
	Ep     Sym     // plastic logarithmic strain (Lagrangian log space)
	P      float64 // cumulative matrix plastic strain p
	F      float64 // porosity f
	Broken bool    // f has reached f_break: the point carries no stress
}

// Input is what the element hands to the material at a Gauss point.
type Input struct {
	E      Sym     // logarithmic strain (its trace replaced by θ in the mixed element)
	Abar   float64 // non-local plastic strain ā interpolated at the point
	Lambda float64 // Lagrange multiplier λ interpolated at the point
}

// Response is the material's answer at a Gauss point: the stress T
// work-conjugate to the logarithmic strain, the local plastic strain p that
// feeds the regularisation equations, and their consistent derivatives.
type Response struct {
	T         Sym           // stress conjugate to E
	DTdE      [4][4]float64 // ∂T/∂E (consistent tangent)
	DTdAbar   Sym           // ∂T/∂ā
	DTdLambda Sym           // ∂T/∂λ
	P         float64       // cumulative plastic strain p at the end of the step
	DPdE      Sym           // ∂p/∂E (as a Sym of derivatives: dp = Σⱼ DPdE[j] dEⱼ)
	DPdAbar   float64       // ∂p/∂ā
	DPdLambda float64       // ∂p/∂λ
	Plastic   bool          // the step was plastic
	Energy    float64       // stored (elastic) energy density, for the J integral
	// Dissipation is the plastic work density of the step, T:ΔEᵖ =
	// (1−f)σ*Δp (zero in an elastic step); its sum over steps is the
	// plastic dissipation recorded at remeshes.
	Dissipation float64
}

// Model is a constitutive law. Update integrates one step from old to new
// for the given input; it must not allocate and must be safe to call from
// several goroutines at once on different points.
type Model interface {
	// Initial returns the virgin state (f = f₀, no plastic strain).
	Initial() State
	// Update integrates a step. It returns an error (never NaN) when the
	// local integration fails; the solver then cuts the increment back.
	Update(in *Input, old, new *State, out *Response) error
	// Regularisation returns c = σ₀ℓ² and the augmentation penalty r; c = 0
	// means the local model (no ā, λ fields).
	Regularisation() (c, r float64)
}
