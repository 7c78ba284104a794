// Package fem holds the finite-element core of tearline: the mesh type
// shared by every package, degree-of-freedom numbering for the mixed fields,
// triangle quadrature, element routines and assembly.
//
// # Overview
//
// A Problem ties a Mesh (6-node triangles, corner nodes first), a
// material.Model and boundary conditions (BCs) together:
//
//	p, err := fem.NewProblem(mesh, model, fem.Options{Kinematics: fem.Axisymmetric}, bcs)
//
// The unknowns are quadratic displacement on every node and, on corner
// nodes, the linear fields θ and P (mixed u–θ–P formulation, on unless
// Options.DisplacementOnly) and ā and λ (gradient regularisation, on when
// the model's Regularisation returns c > 0). Dofs numbers them node by node
// in reverse Cuthill–McKee order.
//
// The element (element.go) is total Lagrangian with the logarithmic strain
// E = ½ ln C, plane strain (F₃₃ = 1) or axisymmetric (F₃₃ = 1 + u_r/R,
// dV = 2πR dA), integrated with ElementRule (6 points). Its tangent is the
// exact derivative of its residual (checked against finite differences in
// the tests, DESIGN.md V9).
//
// Assemble evaluates the residual and the tangent at Problem.U into a
// sparsity pattern fixed for the mesh (a sparse.CSR), in parallel over
// element colours, without allocating. Prescribed unknowns, and those only
// broken elements touched, become identity rows; the residual of those
// rows before clearing (Problem.Full) gives the reactions.
//
// Package solver drives SetTime, Assemble, Commit and Rollback along the
// pseudo-time. After convergence, GaussPoints exports F, P, W and the
// material state for the crack-growth criteria, NodalField the nodal
// fields for output, Reaction and PinForce the forces.
//
// After a state transfer onto a new mesh (committed.go), MaterialStrain
// gives the strain the material sees in the committed unknowns, so that
// the caller can make the transferred plastic strain consistent with the
// transferred displacement; ProjectVolume, Straighten and
// ResetRegularisation repair what interpolation breaks (θ out of step with
// the displacement, inverted curved elements, a multiplier field that
// leaves no elastic range) before the first assembly.
//
// Structured builds simple structured meshes (rectangles, annular sectors)
// for verification.
package fem
