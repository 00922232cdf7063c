package report

import (
	"bytes"
	"fmt"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"plica/results"
)

// SVG renders a gonum plot as SVG bytes of the given size.
func SVG(p *plot.Plot, w, h vg.Length) ([]byte, error) {
	c := vgsvg.New(w, h)
	p.Draw(drawCanvas(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("render svg: %w", err)
	}
	return b.Bytes(), nil
}

// SaveSVG renders a gonum plot and writes it atomically.
func SaveSVG(p *plot.Plot, w, h vg.Length, path string) error {
	b, err := SVG(p, w, h)
	if err != nil {
		return err
	}
	return results.WriteAtomic(path, b)
}

func drawCanvas(c *vgsvg.Canvas) draw.Canvas { return draw.New(c) }
