package render

import (
	"image/color"
	"math"
)

// Viridis maps t in [0, 1] to the viridis colour map (van der Walt & Smith,
// matplotlib, 2015: perceptually uniform, readable in grey and by
// colour-blind viewers). It uses a sixth-degree polynomial fit to the
// published table (the fit widely used in shaders; coefficients from
// memory), within about 1 % of the table; lightness rises monotonically.
func Viridis(t float64) color.RGBA {
	t = math.Max(0, math.Min(1, t))
	c := [7][3]float64{
		{0.2777273272234177, 0.005407344544966578, 0.3340998053353061},
		{0.1050930431085774, 1.404613529898575, 1.384590162594685},
		{-0.3308618287255563, 0.214847559468213, 0.09509516302823659},
		{-4.634230498983486, -5.799100973351585, -19.33244095627987},
		{6.228269936347081, 14.17993336680509, 56.69055260068105},
		{4.776384997670288, -13.74514537774601, -65.35303263337234},
		{-5.435455855934631, 4.645852612178535, 26.3124352495832},
	}
	var rgb [3]float64
	for k := range 3 {
		v := c[6][k]
		for i := 5; i >= 0; i-- {
			v = c[i][k] + t*v
		}
		rgb[k] = math.Max(0, math.Min(1, v))
	}
	return color.RGBA{uint8(255*rgb[0] + 0.5), uint8(255*rgb[1] + 0.5), uint8(255*rgb[2] + 0.5), 255}
}

// Palette is the Okabe–Ito set of colours distinguishable by colour-blind
// viewers (Okabe & Ito, "Color Universal Design", 2002), black left out,
// for surfaces; beyond seven surfaces the colours repeat lighter and darker.
var Palette = []color.RGBA{
	{0xE6, 0x9F, 0x00, 255}, // orange
	{0x56, 0xB4, 0xE9, 255}, // sky blue
	{0x00, 0x9E, 0x73, 255}, // bluish green
	{0xF0, 0xE4, 0x42, 255}, // yellow
	{0x00, 0x72, 0xB2, 255}, // blue
	{0xD5, 0x5E, 0x00, 255}, // vermillion
	{0xCC, 0x79, 0xA7, 255}, // reddish purple
}

// SurfaceColor returns the colour of surface i.
func SurfaceColor(i int) color.RGBA {
	c := Palette[i%len(Palette)]
	switch (i / len(Palette)) % 3 {
	case 1:
		return scale(c, 0.6)
	case 2:
		return color.RGBA{uint8((int(c.R) + 255) / 2), uint8((int(c.G) + 255) / 2), uint8((int(c.B) + 255) / 2), 255}
	}
	return c
}

// Front and Back colour the two sides of facets in side mode.
var (
	Front = color.RGBA{0x00, 0x72, 0xB2, 255} // blue
	Back  = color.RGBA{0xD5, 0x5E, 0x00, 255} // vermillion
	// NoData colours facets without a value (e.g. the back of a one-sided surface).
	NoData = color.RGBA{0x99, 0x99, 0x99, 255}
)

func scale(c color.RGBA, k float64) color.RGBA {
	return color.RGBA{uint8(float64(c.R) * k), uint8(float64(c.G) * k), uint8(float64(c.B) * k), 255}
}

// luminance is the relative luminance of c (ITU-R BT.709 weights on
// linearised sRGB), for tests of monotonic colour bars.
func luminance(c color.RGBA) float64 {
	lin := func(v uint8) float64 {
		x := float64(v) / 255
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
}

// Diverging maps t in [0, 1] to a blue–grey–red map for signed values,
// t = 0.5 (zero) grey: the end and middle colours of Moreland's cool-warm
// map ("Diverging color maps for scientific visualization", ISVC 2009;
// values from memory), interpolated linearly in linear-light RGB, so that
// lightness falls symmetrically from the middle to either end.
func Diverging(t float64) color.RGBA {
	t = math.Max(0, math.Min(1, t))
	cool, mid, warm := [3]float64{59, 76, 192}, [3]float64{221, 221, 221}, [3]float64{180, 4, 38}
	a, b, u := cool, mid, 2*t
	if t > 0.5 {
		a, b, u = mid, warm, 2*t-1
	}
	var c [3]uint8
	for k := range 3 {
		la, lb := linear(a[k]/255), linear(b[k]/255)
		c[k] = uint8(255*encode(la+u*(lb-la)) + 0.5)
	}
	return color.RGBA{c[0], c[1], c[2], 255}
}

// linear and encode convert between sRGB values and linear light (IEC
// 61966-2-1).
func linear(x float64) float64 {
	if x <= 0.04045 {
		return x / 12.92
	}
	return math.Pow((x+0.055)/1.055, 2.4)
}

func encode(x float64) float64 {
	if x <= 0.0031308 {
		return 12.92 * x
	}
	return 1.055*math.Pow(x, 1/2.4) - 0.055
}
