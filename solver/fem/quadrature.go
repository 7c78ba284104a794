package fem

// Rule is a quadrature rule on a triangle in area (barycentric) coordinates.
// The weights sum to one: ∫_T g dA ≈ area(T) Σ W[i] g(L[i]).
type Rule struct {
	L [][3]float64 // area coordinates (L1, L2, L3) of the points
	W []float64    // weights, summing to 1
}

// Len returns the number of points of the rule.
func (r Rule) Len() int { return len(r.W) }

// Point returns the position of point i of the rule in the straight-sided
// triangle with vertices a, b, c.
func (r Rule) Point(i int, a, b, c [2]float64) [2]float64 {
	l := r.L[i]
	return [2]float64{
		l[0]*a[0] + l[1]*b[0] + l[2]*c[0],
		l[0]*a[1] + l[1]*b[1] + l[2]*c[1],
	}
}

// Degree2 is the symmetric 3-point rule, exact for polynomials of degree 2
// (Dunavant 1985, IJNME 21, degree 2; from memory, verified by the tests
// against the closed-form monomial integrals).
func Degree2() Rule {
	const a, b = 2.0 / 3.0, 1.0 / 6.0
	return Rule{
		L: [][3]float64{{a, b, b}, {b, a, b}, {b, b, a}},
		W: []float64{1.0 / 3, 1.0 / 3, 1.0 / 3},
	}
}

// Degree4 is the symmetric 6-point rule, exact for polynomials of degree 4
// (Dunavant 1985, IJNME 21, degree 4; from memory, verified by the tests
// against the closed-form monomial integrals).
func Degree4() Rule {
	const (
		a1, w1 = 0.445948490915965, 0.223381589678011
		a2, w2 = 0.091576213509771, 0.109951743655322
	)
	b1, b2 := 1-2*a1, 1-2*a2
	return Rule{
		L: [][3]float64{{b1, a1, a1}, {a1, b1, a1}, {a1, a1, b1}, {b2, a2, a2}, {a2, b2, a2}, {a2, a2, b2}},
		W: []float64{w1, w1, w1, w2, w2, w2},
	}
}

// ElementRule returns the rule the solid elements integrate with, and
// therefore the layout of the Gauss-point state: State[e][i] belongs to
// point i of this rule in triangle e.
func ElementRule() Rule { return Degree4() }
