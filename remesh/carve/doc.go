// Package carve builds the geometry of the material that is left when the
// released (broken) elements of a mesh are removed: the new outer boundary
// with traction-free crack faces, simplified to the local element size but
// never bringing removed material back, with the named points (crack tips,
// load points) carried over.
package carve
