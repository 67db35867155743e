package main

import (
	"bytes"
	"image/color"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// plotPNG draws two panels against the ground program's size (atoms), both
// on log scales: total CPU time, and circuit nodes. Every family is one
// line; instances over the limit are crosses at the limit on the time
// panel.
func plotPNG(rows []row, limit time.Duration) ([]byte, error) {
	pt := plot.New()
	pt.Title.Text = "total CPU time (ground → solve)"
	pt.X.Label.Text = "ground atoms"
	pt.Y.Label.Text = "seconds"
	pn := plot.New()
	pn.Title.Text = "circuit size"
	pn.X.Label.Text = "ground atoms"
	pn.Y.Label.Text = "circuit nodes"
	for _, p := range []*plot.Plot{pt, pn} {
		p.X.Scale, p.X.Tick.Marker = plot.LogScale{}, plot.LogTicks{Prec: -1}
		p.Y.Scale, p.Y.Tick.Marker = plot.LogScale{}, plot.LogTicks{Prec: -1}
		p.Add(plotter.NewGrid())
		p.Legend.Top, p.Legend.Left = false, false
		p.Legend.TextStyle.Font.Size = vg.Points(9)
	}

	var order []string
	byFam := map[string][]row{}
	for _, r := range rows {
		if _, ok := byFam[r.Fam.Key]; !ok {
			order = append(order, r.Fam.Key)
		}
		byFam[r.Fam.Key] = append(byFam[r.Fam.Key], r)
	}
	var over plotter.XYs
	for i, key := range order {
		var times, nodes plotter.XYs
		for _, r := range byFam[key] {
			m := r.Main
			if !finished(m, stGround) || m.Atoms == 0 {
				continue
			}
			x := float64(m.Atoms)
			if !m.ok() {
				over = append(over, plotter.XY{X: x, Y: limit.Seconds()})
				continue
			}
			times = append(times, plotter.XY{X: x, Y: max(m.TotalCPU.Seconds(), 1e-4)})
			nodes = append(nodes, plotter.XY{X: x, Y: max(float64(m.Nodes), 1)})
		}
		for _, panel := range []struct {
			p   *plot.Plot
			xys plotter.XYs
		}{{pt, times}, {pn, nodes}} {
			if len(panel.xys) == 0 {
				continue
			}
			l, s, err := plotter.NewLinePoints(panel.xys)
			if err != nil {
				return nil, err
			}
			l.Color = plotutil.Color(i)
			l.Width = vg.Points(1.5)
			if i >= 7 {
				l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
			}
			s.Color = plotutil.Color(i)
			s.Shape = plotutil.Shape(i)
			panel.p.Add(l, s)
			panel.p.Legend.Add(key, l, s)
		}
	}
	if len(over) > 0 {
		s, err := plotter.NewScatter(over)
		if err != nil {
			return nil, err
		}
		s.Shape = draw.CrossGlyph{}
		s.Color = color.RGBA{R: 200, A: 255}
		s.Radius = vg.Points(4)
		pt.Add(s)
		pt.Legend.Add("over the limit", s)
	}

	const w, h = 16 * vg.Inch, 7 * vg.Inch
	img := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(96))
	dc := draw.New(img)
	tiles := draw.Tiles{Rows: 1, Cols: 2, PadX: vg.Inch / 3, PadY: vg.Inch / 4, PadLeft: vg.Inch / 6, PadRight: vg.Inch / 4, PadTop: vg.Inch / 6, PadBottom: vg.Inch / 6}
	plots := [][]*plot.Plot{{pt, pn}}
	canvases := plot.Align(plots, tiles, dc)
	pt.Draw(canvases[0][0])
	pn.Draw(canvases[0][1])
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: img}).WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
