package sparse

import (
	"math/rand/v2"
	"testing"
)

// TestAMDPermutation: the ordering is a permutation on random and FE
// patterns, including ones with dense rows and empty rows.
func TestAMDPermutation(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	mats := []*CSR{
		feSystem(feOptions{nc: 6, mixed: true, gradient: true, seed: 1}),
		randomSparse(rng, 200, 0.01, false),
		randomSparse(rng, 50, 0.5, true),
		NewTriplet(5, 5).CSR(),
	}
	// Arrow matrix: one dense row and column.
	arrow := NewTriplet(400, 400)
	for i := 0; i < 400; i++ {
		arrow.Add(i, i, 4)
		arrow.Add(0, i, 1)
		arrow.Add(i, 0, 1)
	}
	mats = append(mats, arrow.CSR())
	for k, a := range mats {
		ptr, adj := symmetricPattern(a)
		p := amd(a.Rows, ptr, adj, nil)
		if len(p) != a.Rows {
			t.Fatalf("matrix %d: len(perm) = %d, want %d", k, len(p), a.Rows)
		}
		seen := make([]bool, a.Rows)
		for _, v := range p {
			if v < 0 || v >= a.Rows || seen[v] {
				t.Fatalf("matrix %d: not a permutation (%d)", k, v)
			}
			seen[v] = true
		}
	}
}
