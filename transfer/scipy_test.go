package transfer

import (
	"encoding/json"
	"math"
	"os/exec"
	"testing"

	"tearline/solver/fem"
)

// scipyScript triangulates random points with scipy.spatial.Delaunay
// (Qhull) and interpolates a nodal field linearly at query points with
// scipy.interpolate.LinearNDInterpolator on that triangulation; points
// outside the hull come back as NaN (written as null).
const scipyScript = `
import json, numpy as np
from scipy.spatial import Delaunay
from scipy.interpolate import LinearNDInterpolator
rng = np.random.default_rng(7)
pts = rng.random((300, 2))
tri = Delaunay(pts)
vals = np.sin(3*pts[:, 0]) + pts[:, 1]**2
q = rng.random((2000, 2))*1.1 - 0.05
f = LinearNDInterpolator(tri, vals)(q)
print(json.dumps({"pts": pts.tolist(), "tri": tri.simplices.tolist(), "vals": vals.tolist(),
	"q": q.tolist(), "f": [None if np.isnan(v) else float(v) for v in f]}))
`

// TestLocateAgainstSciPy: location plus linear interpolation on a Qhull
// Delaunay triangulation agree with SciPy's LinearNDInterpolator (SciPy
// 1.10, scipy.interpolate; run with /usr/bin/python3), and the points SciPy
// finds outside the convex hull are outside for Locate too.
func TestLocateAgainstSciPy(t *testing.T) {
	out, err := exec.Command("/usr/bin/python3", "-c", scipyScript).Output()
	if err != nil {
		t.Skipf("python3 with scipy not available: %v", err)
	}
	var ref struct {
		Pts  [][2]float64
		Tri  [][3]int
		Vals []float64
		Q    [][2]float64
		F    []*float64
	}
	if err := json.Unmarshal(out, &ref); err != nil {
		t.Fatal(err)
	}
	m := buildP2(ref.Pts, ref.Tri, nil)
	lc, err := NewLocator(m, 0)
	if err != nil {
		t.Fatal(err)
	}
	inside, outside := 0, 0
	for i, q := range ref.Q {
		e, l, in := lc.Locate(q)
		if ref.F[i] == nil {
			outside++
			if in {
				t.Errorf("query %v: SciPy finds it outside the hull, Locate inside triangle %d", q, e)
			}
			continue
		}
		inside++
		if !in {
			t.Errorf("query %v: SciPy interpolates, Locate reports outside", q)
			continue
		}
		N := fem.ShapeP1(l)
		tr := m.Tri[e]
		got := N[0]*ref.Vals[tr[0]] + N[1]*ref.Vals[tr[1]] + N[2]*ref.Vals[tr[2]]
		if math.Abs(got-*ref.F[i]) > 1e-12 {
			t.Errorf("query %v: interpolated %.15g, SciPy %.15g", q, got, *ref.F[i])
		}
	}
	t.Logf("%d queries inside, %d outside the hull", inside, outside)
	if inside < 1000 || outside < 50 {
		t.Fatalf("too few queries on one side: %d inside, %d outside", inside, outside)
	}
}
