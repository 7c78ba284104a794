package main

import (
	"fmt"
	"io"
	"time"

	"tearline/remesh/meshing"
	"tearline/remesh/size"
	"tearline/solver/fem"
	"tearline/solver/sparse"
)

const checkUsage = `usage: tearline check CASE.toml [--set section.key=value ...]

Validates the case (every key, every value) and estimates the size of the
first mesh: triangles, nodes, unknowns, non-zeros of the tangent and of its
LU factors (from the symbolic analysis, without factorising), and the memory
the solve will need. Exit status 0 valid, 2 bad input.
`

func checkCommand(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("check", checkUsage, stderr)
	sets := setOverrides(fs)
	path, code, done := oneArgument(fs, args, "tearline check: need one case file", checkUsage, stderr)
	if done {
		return code
	}
	c, src, rs, err := prepareCase(path, *sets)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 2
	}
	t0 := time.Now()
	sf, err := size.NewField(rs.domain, rs.cfg.Size)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %s: %v\n", src.where("mesh"), err)
		return 2
	}
	m, rep, err := meshing.Mesh(rs.domain, sf.At, rs.cfg.Mesh)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: meshing %s: %v\n", path, err)
		return 2
	}
	meshTime := time.Since(t0)
	bcs, err := rs.cfg.BCs(m)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 2
	}
	p, err := fem.NewProblem(m, rs.cfg.Material, rs.cfg.FE, bcs)
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %s: %v\n", path, err)
		return 2
	}
	defer p.Close()
	lu, err := sparse.NewLU(sparse.DefaultOptions())
	if err != nil {
		fmt.Fprintf(stderr, "tearline: %v\n", err)
		return 1
	}
	t0 = time.Now()
	if err := p.Assemble(true); err != nil {
		fmt.Fprintf(stderr, "tearline: assembling the first tangent: %v\n", err)
		return 1
	}
	// The symbolic analysis alone sizes the factors: check stays fast on
	// a case whose factorisation would take minutes.
	if err := lu.Analyze(p.K); err != nil {
		fmt.Fprintf(stderr, "tearline: analysing the first tangent: %v\n", err)
		return 1
	}
	nnzK := len(p.K.Val)
	nnzLU, flops := lu.Estimate()
	u := c.Units.labels()
	fmt.Fprintf(stdout, "case %s: valid\n", path)
	fmt.Fprintf(stdout, "  units        %s (length %s, force %s, stress %s, J %s)\n", c.Units.System, u.Length, u.Force, u.Stress, u.J)
	fmt.Fprintf(stdout, "  geometry     %s, %d boundary labels, %d named points, area %.6g %s\n", c.Geometry.Kind, len(rs.domain.Labels()), len(rs.domain.Points), rs.domain.Area(), u.area())
	fmt.Fprintf(stdout, "  first mesh   %d triangles (%.0f estimated from the size field, limit mesh.max_triangles = %d), %d nodes, min angle %.1f°, size ratio max %.2f (%.2fs)\n",
		rep.Triangles, rs.triangles, c.Mesh.MaxTriangles, rep.Nodes, rep.MinAngleDeg, rep.SizeRatioMax, meshTime.Seconds())
	fmt.Fprintf(stdout, "  unknowns     %d (mixed %v, regularised %v)\n", p.Dofs.N, p.Mixed(), p.Regularised())
	fmt.Fprintf(stdout, "  tangent      %d non-zeros; LU factors about %d non-zeros, %.3g flops per factorisation (assembly and analysis %.2fs)\n", nnzK, nnzLU, flops, time.Since(t0).Seconds())
	fmt.Fprintf(stdout, "  memory       about %.0f MB at the peak of the run on this mesh\n", solveMemoryMB(nnzLU))
	fmt.Fprintf(stdout, "  adaptive     %v\n", rs.cfg.Adapt)
	if gap := supportGap(m, bcs, rs.domain.Axisymmetric); gap != "" {
		fmt.Fprintf(stdout, "  warning      the supports leave %s of the body free: the solve will find no equilibrium; hold it with [[loading.fix]] entries (label, component)\n", gap)
	}
	return 0
}
