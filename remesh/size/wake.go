package size

import (
	"fmt"
	"math"

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
