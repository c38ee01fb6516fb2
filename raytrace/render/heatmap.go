package render

import (
	"golang.org/x/image/font"
	"image"
	"image/color"
	"math"
)

// LogFloor is the smallest view factor the logarithmic heat map shows;
// smaller ones (and zeros) take the bottom colour.
const LogFloor = 1e-4

// HeatMap draws matrix F (rows, cols names) as coloured cells with a colour
// bar, linear or base-10 logarithmic, under title. Rows and columns are
// labelled when there are at most 40 of them; long names are shortened
// with "…" so that labels never print over each other.
func HeatMap(title string, rows, cols []string, F [][]float64, log bool) *image.RGBA {
	n, m := len(rows), len(cols)
	cell := max(1, min(600/max(n, m), 40))
	labels := n <= 40 && m <= 40
	left, top := 10, 40
	fc := face(12)
	if labels {
		short := func(names []string, width int) []string {
			out := make([]string, len(names))
			for k, n := range names {
				out[k] = shorten(fc, n, width)
			}
			return out
		}
		rows, cols = short(rows, 160), short(cols, 2*cell-6) // columns alternate between two lines
		for _, r := range rows {
			left = max(left, textWidth(fc, r)+16)
		}
		top = 70
	}
	w, h := left+m*cell+130, max(top+n*cell+40, 260)
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	fill(img, img.Bounds(), color.RGBA{255, 255, 255, 255})
	lo, hi := 0.0, 0.0
	for _, row := range F {
		for _, f := range row {
			hi = math.Max(hi, f)
		}
	}
	value := func(f float64) float64 { return f }
	if log {
		value = func(f float64) float64 { return math.Log10(math.Max(f, LogFloor)) }
		lo, hi = math.Log10(LogFloor), math.Log10(math.Max(hi, LogFloor*10))
	}
	if hi <= lo {
		hi = lo + 1
	}
	for i, row := range F {
		for j, f := range row {
			c := Viridis((value(f) - lo) / (hi - lo))
			fill(img, image.Rect(left+j*cell, top+i*cell, left+(j+1)*cell, top+(i+1)*cell), c)
		}
	}
	if log {
		title += ", log scale"
	}
	text(img, face(14), 10, 22, shorten(face(14), title, w-120), ink)
	if labels {
		for i, r := range rows {
			text(img, fc, 8, top+i*cell+cell/2+4, r, ink)
		}
		for j, c := range cols {
			// Column names run down in a staggered pair of lines to fit.
			text(img, fc, left+j*cell+2, top-8-14*(j%2), c, ink)
		}
	}
	label, scale := "F", Linear
	if log {
		label, scale = "F (log)", Log
	}
	ColorBar(img, label, lo, hi, scale)
	return img
}

// shorten cuts s to fit width pixels, ending it with "…" when cut.
func shorten(fc font.Face, s string, width int) string {
	if textWidth(fc, s) <= width {
		return s
	}
	r := []rune(s)
	for len(r) > 1 && textWidth(fc, string(r)+"…") > width {
		r = r[:len(r)-1]
	}
	return string(r) + "…"
}
