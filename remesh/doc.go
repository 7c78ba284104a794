// Package remesh is the adaptive crack-growth cycle (DESIGN.md §4): it
// advances a finite-element problem step by step and, when the process
// zone approaches the end of the fine mesh, rebuilds the mesh around the
// crack tips and carries the whole state over to it.
//
// One pass of Cycle.Run, read top-down in cycle.go:
//
//	solve an increment      solver.Solver.Next (cut-backs inside)
//	locate the front        criteria.LocateFront → the tips move (follow)
//	record                  StepRecord to the Observer (force, J, Δa, CTOD)
//	decide                  stop.da, deadline, trigger.Check
//	remesh (remesh.go):     size field      size.NewTipField
//	                        new geometry    carve.Domain (released elements leave)
//	                        mesh            meshing.Mesh
//	                        transfer        transfer.Map onto a new stage
//	                        settle          repair points the transferred state fails on
//	                        re-equilibrate  solver.Rebind + Settle at the same load
//
// A fixed-mesh run is the same cycle with Adapt off. The parts have one
// job each and live in sub-packages: size (size field and fine zone),
// trigger (when to remesh), carve (the geometry left when broken material
// goes), meshing (domain → 6-node mesh). A stage is one mesh with its
// problem: the current one, or the next one while its transferred state
// settles; it replaces the current stage only once it is in equilibrium,
// so a failed remesh leaves the run where it was (it is retried after the
// next step, remeshAttempts times in a row at most).
//
// One solver follows the whole run: Rebind moves it onto a new mesh with
// its increment size and pseudo-time, so nothing is carried by hand.
// Observers see the run through a read-only View; checkpoints
// (checkpoint.go) hold the committed state and the solver's position, and
// ResumeCycle continues a run to the same results as an uninterrupted one.
package remesh
