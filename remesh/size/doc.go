// Package size is the element-size field of the adaptive cycle: the
// initial field of a domain (fine around its crack tips, graded out to
// h_far), and the tip-following field of every later mesh — a fine zone of
// h_fine = ℓ/κ reaching ahead of each tip (FineZone), the wake size at
// damaged points behind it, graded at a bounded rate (DESIGN.md §4).
// Regularisation removes mesh dependence only where the process zone is
// meshed at a fraction of ℓ (common practice: h ≤ ℓ/2), so the field puts
// that size where the crack is going and nowhere else.
package size
