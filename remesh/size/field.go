package size

import (
	"fmt"
	"math"

	"tearline/remesh/geom"
	"tearline/solver/plane"
)

// Options set up a Field.
type Options struct {
	// HFine is the target size in the fine zone around each crack tip
	// (the case default is ℓ/DefaultKappa, DESIGN.md §1). Required, > 0.
	HFine float64
	// HFar is the largest size, reached far from the tips. 0 means
	// DefaultFarFactor·HFine; otherwise it must be ≥ HFine.
	HFar float64
	// FineRadius is the radius of the zone around each tip where the size
	// is HFine. 0 means DefaultFineRadiusFactor·HFine.
	FineRadius float64
	// Ahead stretches the fine zone ahead of each tip along its growth
	// direction by this length (the zone becomes a capsule), leaving room
	// for several steps of growth before the next remesh. 0 = a disk.
	Ahead float64
	// Grading is the rate at which h grows with the distance from the fine
	// zone: h = HFine + Grading·(distance − FineRadius), capped at HFar.
	// It bounds |∇h| (h is Grading-Lipschitz). 0 means DefaultGrading;
	// otherwise it must lie in (0, 1].
	Grading float64
}

// Defaults of Options.
const (
	DefaultFarFactor        = 100  // HFar = 100·HFine
	DefaultFineRadiusFactor = 10   // FineRadius = 10·HFine
	DefaultGrading          = 0.25 // h grows by a quarter of the distance
)

// WithDefaults returns the options with zero fields set to their defaults.
func (o Options) WithDefaults() Options {
	if o.HFar == 0 {
		o.HFar = DefaultFarFactor * o.HFine
	}
	if o.FineRadius == 0 {
		o.FineRadius = DefaultFineRadiusFactor * o.HFine
	}
	if o.Grading == 0 {
		o.Grading = DefaultGrading
	}
	return o
}

func finitePos(v float64) bool { return v > 0 && !math.IsInf(v, 0) }

// Validate checks options with defaults already filled in (WithDefaults).
func (o Options) Validate() error {
	switch {
	case !finitePos(o.HFine):
		return fmt.Errorf("size field: h_fine = %g must be a positive finite length", o.HFine)
	case !finitePos(o.HFar) || o.HFar < o.HFine:
		return fmt.Errorf("size field: h_far = %g must be finite and ≥ h_fine = %g", o.HFar, o.HFine)
	case !finitePos(o.FineRadius):
		return fmt.Errorf("size field: fine radius = %g must be a positive finite length", o.FineRadius)
	case !(o.Ahead >= 0) || math.IsInf(o.Ahead, 0):
		return fmt.Errorf("size field: ahead = %g must be a finite length ≥ 0", o.Ahead)
	case !(o.Grading > 0 && o.Grading <= 1):
		return fmt.Errorf("size field: grading = %g must lie in (0, 1] (the growth of h per unit distance)", o.Grading)
	}
	return nil
}

// Zone is a fine zone: the points within FineRadius of the segment From–To
// (a crack tip and the point Ahead of it).
type Zone struct {
	From, To [2]float64
}

// Field is the target element size h(x, y): HFine within FineRadius of
// every zone, growing linearly at rate Grading with the distance beyond it,
// up to HFar. It is safe for concurrent use.
type Field struct {
	Options Options
	Zones   []Zone
}

// NewField returns the size field with a fine zone around every crack
// tip of d (none: h = HFar everywhere). Zero options take their defaults.
func NewField(d *geom.Domain, opt Options) (*Field, error) {
	opt = opt.WithDefaults()
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	s := &Field{Options: opt}
	if d != nil {
		for _, n := range d.Tips() {
			p := d.Points[n]
			s.Zones = append(s.Zones, Zone{From: p.X, To: [2]float64{p.X[0] + opt.Ahead*p.Dir[0], p.X[1] + opt.Ahead*p.Dir[1]}})
		}
	}
	return s, nil
}

// At returns h at (x, y).
func (s *Field) At(x, y float64) float64 {
	o := &s.Options
	h := o.HFar
	for i := range s.Zones {
		d := plane.SegDist([2]float64{x, y}, s.Zones[i].From, s.Zones[i].To) - o.FineRadius
		v := o.HFine
		if d > 0 {
			v += o.Grading * d
		}
		if v < h {
			h = v
		}
	}
	return h
}
