package plane

import (
	"math"
	"testing"
)

// TestInverse3 checks A·A⁻¹ = I and the determinant against closed forms
// (a triangular matrix: the product of its diagonal; a singular one: 0).
func TestInverse3(t *testing.T) {
	for _, c := range []struct {
		name string
		a    [3][3]float64
		det  float64
		ok   bool
	}{
		{"upper triangular", [3][3]float64{{2, 1, 3}, {0, 4, 5}, {0, 0, 0.5}}, 4, true},
		{"normal equations of a linear fit on (0,0), (1,0), (0,1)", [3][3]float64{{3, 1, 1}, {1, 1, 0}, {1, 0, 1}}, 1, true},
		{"rank two", [3][3]float64{{1, 2, 3}, {2, 4, 6}, {1, 0, 1}}, 0, false},
		{"not finite", [3][3]float64{{math.Inf(1), 0, 0}, {0, 1, 0}, {0, 0, 1}}, math.NaN(), false},
	} {
		inv, det, ok := Inverse3(c.a)
		if ok != c.ok || (!math.IsNaN(c.det) && det != c.det) {
			t.Errorf("%s: det %g ok %v, want %g %v", c.name, det, ok, c.det, c.ok)
			continue
		}
		if !ok {
			if inv != ([3][3]float64{}) {
				t.Errorf("%s: failed inverse is not zero: %v", c.name, inv)
			}
			continue
		}
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				s := 0.0
				for k := 0; k < 3; k++ {
					s += c.a[i][k] * inv[k][j]
				}
				want := 0.0
				if i == j {
					want = 1
				}
				if math.Abs(s-want) > 1e-14 {
					t.Errorf("%s: (A·A⁻¹)[%d][%d] = %g, want %g", c.name, i, j, s, want)
				}
			}
		}
	}
}
