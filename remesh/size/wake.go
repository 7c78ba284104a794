package size

import (
	"fmt"
	"math"
	"sort"

	"tearline/solver/fem"
)

// DamagedPoints returns the reference positions of the Gauss points whose
// porosity reaches fLevel or whose cumulative plastic strain reaches pLevel
// (a level ≤ 0 or +Inf switches that test off), skipping the points of
// elements marked in broken (nil: none), which the next geometry removes.
// These are the points the size field keeps at the wake size or finer, and
// the trigger watches with the same levels.
func DamagedPoints(gp *fem.GaussPoints, broken []bool, fLevel, pLevel float64) ([][2]float64, error) {
	ne, err := gp.Elements()
	if err != nil {
		return nil, fmt.Errorf("damaged points: %w", err)
	}
	if broken != nil && len(broken) != ne {
		return nil, fmt.Errorf("remesh: damaged points: broken flags for %d elements, Gauss points for %d", len(broken), ne)
	}
	var out [][2]float64
	for i := range gp.Points {
		if broken != nil && broken[i/gp.PerElement] {
			continue
		}
		if AboveAlert(&gp.Points[i], fLevel, pLevel) {
			out = append(out, gp.Points[i].X)
		}
	}
	return out, nil
}

// AboveAlert reports whether a Gauss point is damaged or plastically active
// above the levels (level ≤ 0 or +Inf: that test is off); broken points
// always count.
func AboveAlert(g *fem.GaussPoint, fLevel, pLevel float64) bool {
	if g.State.Broken {
		return true
	}
	if fLevel > 0 && !math.IsInf(fLevel, 1) && g.State.F >= fLevel {
		return true
	}
	return pLevel > 0 && !math.IsInf(pLevel, 1) && g.State.P >= pLevel
}

// kdPoints is a static 2-d tree over points for nearest-distance queries
// (Bentley 1975, Commun. ACM 18): the points are sorted in place so that
// the median of every sub-range splits it on alternating axes.
type kdPoints struct {
	p [][2]float64
}

func newKDPoints(pts [][2]float64) *kdPoints {
	t := &kdPoints{p: append([][2]float64(nil), pts...)}
	t.build(0, len(t.p), 0)
	return t
}

func (t *kdPoints) build(lo, hi, axis int) {
	if hi-lo <= 1 {
		return
	}
	s := t.p[lo:hi]
	sort.Slice(s, func(i, j int) bool { return s[i][axis] < s[j][axis] })
	m := (lo + hi) / 2
	t.build(lo, m, 1-axis)
	t.build(m+1, hi, 1-axis)
}

// nearest returns the distance from x to the nearest point, or a value
// ≥ cutoff when none lies closer than cutoff (+Inf for an empty tree).
func (t *kdPoints) nearest(x [2]float64, cutoff float64) float64 {
	best := cutoff * cutoff
	if len(t.p) == 0 {
		return math.Inf(1)
	}
	t.search(x, 0, len(t.p), 0, &best)
	return math.Sqrt(best)
}

func (t *kdPoints) search(x [2]float64, lo, hi, axis int, best *float64) {
	if hi <= lo {
		return
	}
	m := (lo + hi) / 2
	q := t.p[m]
	if d := (q[0]-x[0])*(q[0]-x[0]) + (q[1]-x[1])*(q[1]-x[1]); d < *best {
		*best = d
	}
	diff := x[axis] - q[axis]
	near0, near1, far0, far1 := lo, m, m+1, hi
	if diff > 0 {
		near0, near1, far0, far1 = m+1, hi, lo, m
	}
	t.search(x, near0, near1, 1-axis, best)
	if diff*diff < *best {
		t.search(x, far0, far1, 1-axis, best)
	}
}
