package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// series is one line of a chart.
type series struct {
	name string
	xs   []float64
	ys   []float64
}

// panel is one chart of a figure.
type panel struct {
	title, xlabel, ylabel string
	lines                 []series
}

// writeFigure draws panels side by side into path (.svg or .png).
func writeFigure(path string, panels []panel) error {
	ext := strings.ToLower(filepath.Ext(path))
	w, h := vg.Length(5.5*float64(len(panels)))*vg.Inch, 4*vg.Inch
	var c draw.Canvas
	var wt io.WriterTo
	switch ext {
	case ".svg":
		cv := vgsvg.New(w, h)
		c, wt = draw.New(cv), cv
	case ".png":
		cv := vgimg.PngCanvas{Canvas: vgimg.New(w, h)}
		c, wt = draw.New(cv), cv
	default:
		return fmt.Errorf("%w: --plot wants a .svg or .png file, got %q", errUsage, path)
	}
	plots := make([][]*plot.Plot, 1)
	for _, pn := range panels {
		p := plot.New()
		p.Title.Text = pn.title
		p.X.Label.Text = pn.xlabel
		p.Y.Label.Text = pn.ylabel
		p.Add(plotter.NewGrid())
		p.Legend.Top = true
		p.Legend.Left = true
		for i, s := range pn.lines {
			pts := make(plotter.XYs, len(s.xs))
			for j := range s.xs {
				pts[j].X, pts[j].Y = s.xs[j], s.ys[j]
			}
			l, sc, err := plotter.NewLinePoints(pts)
			if err != nil {
				return err
			}
			col := plotPalette[i%len(plotPalette)]
			l.Color, sc.Color = col, col
			l.Width = vg.Points(1.5)
			p.Add(l, sc)
			if s.name != "" {
				p.Legend.Add(s.name, l, sc)
			}
		}
		plots[0] = append(plots[0], p)
	}
	tiles := draw.Tiles{Rows: 1, Cols: len(panels), PadX: vg.Millimeter * 4, PadTop: vg.Millimeter * 2, PadBottom: vg.Millimeter * 2, PadLeft: vg.Millimeter * 2, PadRight: vg.Millimeter * 4}
	canv := plot.Align(plots, tiles, c)
	for j := range plots[0] {
		plots[0][j].Draw(canv[0][j])
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if _, err := wt.WriteTo(f); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
