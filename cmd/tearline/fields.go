package main

import (
	"fmt"
	"io"
	"math"
	"path/filepath"

	"tearline/remesh"
	"tearline/solver/fem"
	"tearline/solver/fem/vtu"
)

// writeFields writes the current state as .vtu files (reference and
// deformed configuration) and updates the two .pvd collections.
func (ob *observer) writeFields(view remesh.View) error {
	m := view.Mesh()
	u := view.Displacement()
	nn := len(m.X)
	flat := make([]float64, 0, 2*nn)
	for _, v := range u {
		flat = append(flat, v[0], v[1])
	}
	points := []vtu.Array{{Name: "displacement", Components: 2, Values: flat}}
	for _, f := range []fem.Field{fem.Theta, fem.Pressure, fem.Abar, fem.Lambda} {
		v := make([]float64, nn)
		if has, err := view.NodalField(f, v); err != nil {
			return err
		} else if !has {
			continue
		}
		points = append(points, vtu.Array{Name: f.String(), Components: 1, Values: v})
	}
	gp := view.GaussPoints()
	ne := len(m.Tri)
	nq := gp.PerElement
	porosity, plastic, broken, mises, mean, work := make([]float64, ne), make([]float64, ne), make([]float64, ne), make([]float64, ne), make([]float64, ne), make([]float64, ne)
	stress := make([]float64, 4*ne)
	for e := 0; e < ne; e++ {
		var sig [4]float64
		for i := 0; i < nq; i++ {
			g := gp.At(e, i)
			porosity[e] = math.Max(porosity[e], g.State.F)
			plastic[e] += g.State.P / float64(nq)
			work[e] += g.W / float64(nq)
			s := fem.Cauchy(g.F, g.P)
			for k := range sig {
				sig[k] += s[k] / float64(nq)
			}
		}
		if view.Released(e) {
			broken[e] = 1
		}
		copy(stress[4*e:], sig[:])
		mean[e] = (sig[0] + sig[1] + sig[2]) / 3
		d0, d1, d2 := sig[0]-mean[e], sig[1]-mean[e], sig[2]-mean[e]
		mises[e] = math.Sqrt(1.5 * (d0*d0 + d1*d1 + d2*d2 + 2*sig[3]*sig[3]))
	}
	cells := []vtu.Array{
		{Name: "porosity_max", Components: 1, Values: porosity},
		{Name: "plastic_strain", Components: 1, Values: plastic},
		{Name: "broken", Components: 1, Values: broken},
		{Name: "stress_cauchy_11_22_33_12", Components: 4, Values: stress},
		{Name: "stress_mises", Components: 1, Values: mises},
		{Name: "stress_mean", Components: 1, Values: mean},
		{Name: "stress_work", Components: 1, Values: work},
	}
	pr := view.Progress()
	step := pr.Steps
	ref := fmt.Sprintf("step_%06d_mesh%03d.vtu", step, pr.Remeshes)
	def := fmt.Sprintf("step_%06d_mesh%03d_deformed.vtu", step, pr.Remeshes)
	dir := filepath.Join(ob.dir, "fields")
	if n := len(ob.pvd); n > 0 && ob.pvd[n-1].File == ref {
		return nil // already written for this step
	}
	if err := vtu.WriteFile(filepath.Join(dir, ref), func(w io.Writer) error { return vtu.Write(w, m, points, cells, nil) }); err != nil {
		return err
	}
	if err := vtu.WriteFile(filepath.Join(dir, def), func(w io.Writer) error {
		return vtu.Write(w, m, points, cells, &vtu.Options{Displacement: u})
	}); err != nil {
		return err
	}
	if err := vtu.WriteFile(filepath.Join(dir, fmt.Sprintf("boundary_mesh%03d.vtu", pr.Remeshes)), func(w io.Writer) error { return vtu.WriteBoundary(w, m, nil) }); err != nil {
		return err
	}
	ob.pvd = append(ob.pvd, pvdEntry{T: pr.T, File: ref})
	var cr, cd vtu.Collection
	for _, e := range ob.pvd {
		cr.Add(e.T, e.File)
		cd.Add(e.T, e.File[:len(e.File)-4]+"_deformed.vtu")
	}
	if err := cr.WriteFile(filepath.Join(dir, "fields.pvd")); err != nil {
		return err
	}
	return cd.WriteFile(filepath.Join(dir, "fields_deformed.pvd"))
}
