// Package sparse holds tearline's sparse linear algebra: compressed sparse
// row matrices with a fixed pattern for re-assembly, triplet (coordinate)
// assembly, a fill-reducing ordering, a direct LU factorisation with
// threshold partial pivoting, and Matrix Market input and output.
//
// A Newton run assembles the tangent into the same pattern hundreds of
// times and factors it each time. The pattern is built once from a Triplet;
// each iteration zeroes the values, adds element contributions through Pos,
// and calls Factorize, which reuses the ordering and the symbolic analysis
// of the first call:
//
//	t := sparse.NewTriplet(n, n)
//	// ... t.Add(i, j, v) for every element entry ...
//	a := t.CSR()
//	var lu sparse.LU
//	for iter := 0; iter < maxIter; iter++ {
//		a.Zero()
//		// ... a.Val[a.Pos(i, j)] += v ...
//		if err := lu.Factorize(a); err != nil {
//			return err
//		}
//		if err := lu.Solve(dx, r); err != nil {
//			return err
//		}
//	}
//
// The factorisation is multifrontal (Duff & Reid 1983, ACM TOMS 9) on the
// pattern of A+Aᵀ ordered by approximate minimum degree (Amestoy, Davis &
// Duff 1996, SIAM J. Matrix Anal. Appl. 17). Before ordering, every
// variable with a zero or absent diagonal (a multiplier of a saddle-point
// system) is paired with a neighbour and the pair is ordered as one node,
// so both land in the same front. The matrix is equilibrated in two stages
// — the one-pass row-then-column scaling of LAPACK's dgeequ, then the
// iteration of Ruiz 2001 — so that the pivot threshold compares like with
// like across fields with different units; the caller's matrix is not
// changed. Each front is a dense matrix factored with blocked
// kernels (gonum's blas64); pivots are chosen by threshold partial pivoting
// inside the fully summed block, and a column that fails the threshold is
// delayed to the parent front. Independent subtrees of the assembly tree
// are factored by separate goroutines, and the large Schur-complement
// updates near the root are split between them. Solve finishes with
// iterative refinement until the componentwise backward error is at the
// level of rounding.
package sparse
