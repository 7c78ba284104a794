package main

import (
	"fmt"
	"image/color"
	"math"
	"os"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// plotSpec is one figure of DIR/plots: a y quantity against an x quantity
// of the history, possibly with several curves.
type plotSpec struct {
	file, title, xlabel, ylabel string
	x                           func(historyRow) float64
	curves                      []plotCurve
}

type plotCurve struct {
	name string
	y    func(historyRow) float64
}

// writePlots draws the standard figures of a run from its history rows.
// A figure with no finite point is skipped (the quantity does not apply).
func writePlots(dir string, rows []historyRow) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	specs := []plotSpec{
		{"J-da.svg", "Resistance curve", "Δa", "J", func(r historyRow) float64 { return r.Da },
			[]plotCurve{{"J (far field)", func(r historyRow) float64 { return r.JFar }},
				{"J (E1820)", func(r historyRow) float64 { return r.JE1820 }},
				{"J (domain, at the current tip)", func(r historyRow) float64 { return r.JDomain }}}},
		{"force-displacement.svg", "Force versus displacement", "control (displacement or K)", "force",
			func(r historyRow) float64 { return r.Control },
			[]plotCurve{{"force", func(r historyRow) float64 { return r.Force }}}},
		{"unknowns-da.svg", "Problem size versus crack growth", "Δa", "unknowns",
			func(r historyRow) float64 { return r.Da },
			[]plotCurve{{"unknowns", func(r historyRow) float64 { return float64(r.Dofs) }}}},
		{"memory-da.svg", "Memory versus crack growth", "Δa", "resident memory (MB)",
			func(r historyRow) float64 { return r.Da },
			[]plotCurve{{"peak RSS", func(r historyRow) float64 { return r.RSS }}}},
	}
	for _, s := range specs {
		if err := drawPlot(filepath.Join(dir, s.file), s, rows); err != nil {
			return fmt.Errorf("plot %s: %w", s.file, err)
		}
	}
	return nil
}

func drawPlot(path string, s plotSpec, rows []historyRow) error {
	p := plot.New()
	p.Title.Text = s.title
	p.X.Label.Text = s.xlabel
	p.Y.Label.Text = s.ylabel
	p.Add(plotter.NewGrid())
	drawn := 0
	for i, c := range s.curves {
		var pts plotter.XYs
		for _, r := range rows {
			x, y := s.x(r), c.y(r)
			if !math.IsNaN(x) && !math.IsNaN(y) && !math.IsInf(x, 0) && !math.IsInf(y, 0) {
				pts = append(pts, plotter.XY{X: x, Y: y})
			}
		}
		if len(pts) == 0 {
			continue
		}
		line, err := plotter.NewLine(pts)
		if err != nil {
			return err
		}
		line.Color = plotColor(i)
		line.Width = vg.Points(1.5)
		p.Add(line)
		p.Legend.Add(c.name, line)
		drawn++
	}
	if drawn == 0 {
		return nil
	}
	p.Legend.Top = true
	p.Legend.Left = true
	return p.Save(6*vg.Inch, 4*vg.Inch, path)
}

// plotColor gives the i-th curve colour (a plain dark palette of our own).
func plotColor(i int) color.Color {
	palette := []color.RGBA{{20, 60, 140, 255}, {190, 80, 20, 255}, {30, 130, 60, 255}, {120, 40, 130, 255}}
	return palette[i%len(palette)]
}
