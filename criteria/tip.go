package criteria

import "math"

// Tip is a crack tip: where it is (reference configuration) and which way
// it grows. Name is the named point the tip carries in a domain ("tip",
// "tip_left", …; empty when it carries none). It is the one crack-tip type
// of the program: the damage front starts from tips and returns them, the
// adaptive cycle follows them.
type Tip struct {
	Name string
	X    [2]float64 // position
	Dir  [2]float64 // growth direction; any non-zero length, normalised on use
}

// UnitDir returns the tip's direction normalised, and false when it is zero
// or not finite.
func (t Tip) UnitDir() ([2]float64, bool) {
	n := math.Hypot(t.Dir[0], t.Dir[1])
	if !(n > 0) || math.IsInf(n, 0) {
		return [2]float64{}, false
	}
	return [2]float64{t.Dir[0] / n, t.Dir[1] / n}, true
}

// pathDirection is the growth direction at the end of a crack path of
// length da: the chord of its last part — from the last path vertex more
// than da/4 back (or the start) to the end, so that the mesh zigzag of
// the last segments does not turn the tip — or initial while the path is
// a single point.
func pathDirection(path [][2]float64, da float64, initial [2]float64) [2]float64 {
	n := len(path)
	if n < 2 {
		return initial
	}
	end := path[n-1]
	for i := n - 2; i >= 0; i-- {
		d := [2]float64{end[0] - path[i][0], end[1] - path[i][1]}
		if math.Hypot(d[0], d[1]) > 0 {
			if i == 0 || math.Hypot(d[0], d[1]) > 0.25*da {
				return d
			}
		}
	}
	return initial
}
