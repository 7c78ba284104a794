// Package fem holds the finite-element core of tearline: the mesh type
// shared by every package, degree-of-freedom numbering for the mixed fields,
// triangle quadrature, element routines and assembly.
package fem
