package render

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"math"
	"strconv"
	"strings"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// face returns the Go Regular font at size points (72 dpi: points = pixels).
func face(size float64) font.Face {
	f, err := opentype.Parse(goregular.TTF)
	if err != nil {
		return nil // the embedded font always parses
	}
	fc, err := opentype.NewFace(f, &opentype.FaceOptions{Size: size, DPI: 72, Hinting: font.HintingFull})
	if err != nil {
		return nil
	}
	return fc
}

var ink = color.RGBA{0x20, 0x20, 0x20, 255}

// text draws s with its baseline at (x, y).
func text(img *image.RGBA, fc font.Face, x, y int, s string, c color.Color) {
	if fc == nil {
		return
	}
	d := font.Drawer{Dst: img, Src: image.NewUniform(c), Face: fc, Dot: fixed.P(x, y)}
	d.DrawString(s)
}

func textWidth(fc font.Face, s string) int {
	if fc == nil {
		return 0
	}
	return font.MeasureString(fc, s).Ceil()
}

func fill(img *image.RGBA, r image.Rectangle, c color.Color) {
	draw.Draw(img, r, image.NewUniform(c), image.Point{}, draw.Src)
}

// frame draws a one-pixel outline of r.
func frame(img *image.RGBA, r image.Rectangle, c color.Color) {
	fill(img, image.Rect(r.Min.X, r.Min.Y, r.Max.X, r.Min.Y+1), c)
	fill(img, image.Rect(r.Min.X, r.Max.Y-1, r.Max.X, r.Max.Y), c)
	fill(img, image.Rect(r.Min.X, r.Min.Y, r.Min.X+1, r.Max.Y), c)
	fill(img, image.Rect(r.Max.X-1, r.Min.Y, r.Max.X, r.Max.Y), c)
}

// Legend draws colour boxes and names in the top-left corner on a light
// panel; past maxRows entries it says how many more there are.
func Legend(img *image.RGBA, title string, names []string, colors []color.RGBA) {
	const maxRows = 24
	fc := face(13)
	rows := min(len(names), maxRows)
	w := textWidth(fc, title)
	for _, n := range names[:rows] {
		w = max(w, 22+textWidth(fc, n))
	}
	h := 22 + 18*rows
	if len(names) > maxRows {
		h += 18
	}
	fill(img, image.Rect(6, 6, 6+w+16, 6+h), color.RGBA{255, 255, 255, 255})
	frame(img, image.Rect(6, 6, 6+w+16, 6+h), color.RGBA{0xBB, 0xBB, 0xBB, 255})
	text(img, fc, 14, 22, title, ink)
	for k := range rows {
		y := 28 + 18*k
		fill(img, image.Rect(14, y+2, 28, y+14), colors[k])
		text(img, fc, 34, y+13, names[k], ink)
	}
	if len(names) > maxRows {
		text(img, fc, 14, 28+18*rows+13, fmt.Sprintf("… and %d more", len(names)-maxRows), ink)
	}
}

// Scale is how a colour bar maps values to colours.
type Scale int

const (
	Linear Scale = iota // viridis from lo to hi
	Log                 // viridis over log10 of the values (lo, hi are logarithms)
	Signed              // the diverging map, grey at zero; lo = −hi
)

// Color returns the colour of value v on a bar from lo to hi.
func (s Scale) Color(v, lo, hi float64) color.RGBA {
	t := (v - lo) / (hi - lo)
	if s == Signed {
		return Diverging(t)
	}
	return Viridis(t)
}

// ColorBar draws a vertical colour bar at the right edge with round tick
// values (NiceTicks) from lo to hi and a label (the quantity and its unit).
// With Log, lo and hi are base-10 logarithms and ticks fall on powers of
// ten; with Signed the bar is the diverging map with zero in the middle.
func ColorBar(img *image.RGBA, label string, lo, hi float64, scale Scale) {
	fc := face(13)
	b := img.Bounds()
	x0, y0 := b.Max.X-100, 40
	label = fitLabel(fc, label, b.Max.X-(x0-4)-4)
	y1 := b.Max.Y - 30
	fill(img, image.Rect(x0-8, 8, b.Max.X, b.Max.Y), color.RGBA{255, 255, 255, 255})
	text(img, fc, x0-4, 26, label, ink)
	for y := y0; y <= y1; y++ {
		v := lo + (hi-lo)*float64(y1-y)/float64(y1-y0)
		fill(img, image.Rect(x0, y, x0+18, y+1), scale.Color(v, lo, hi))
	}
	ticks := NiceTicks(lo, hi, 5)
	if scale == Log {
		ticks = NiceTicks(math.Ceil(lo), math.Floor(hi), int(math.Floor(hi)-math.Ceil(lo))+1)
	}
	for _, v := range ticks {
		y := y1 - int(math.Round((v-lo)/(hi-lo)*float64(y1-y0)))
		shown := v
		if scale == Log {
			shown = math.Pow(10, v)
		}
		fill(img, image.Rect(x0+18, y, x0+23, y+1), ink)
		text(img, fc, x0+26, y+5, strconv.FormatFloat(shown, 'g', 6, 64), ink)
	}
}

// Caption writes s at the bottom left of the picture.
func Caption(img *image.RGBA, s string) {
	fc := face(13)
	y := img.Bounds().Max.Y - 12
	fill(img, image.Rect(6, y-16, 14+textWidth(fc, s), y+6), color.RGBA{255, 255, 255, 255})
	text(img, fc, 10, y, s, ink)
}

// fitLabel splits a long colour-bar label at its first comma or bracket
// that fits, else cuts it, so it stays inside the bar's margin.
func fitLabel(fc font.Face, s string, width int) string {
	for textWidth(fc, s) > width && len(s) > 1 {
		if i := strings.LastIndexAny(s, ",["); i > 0 {
			s = strings.TrimSpace(s[:i])
			continue
		}
		s = s[:len(s)-1]
	}
	return s
}
