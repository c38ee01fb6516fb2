package render

import (
	"image"
	"image/color"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/raytrace/bvh"
)

// Scene is what Render draws: the tree, each facet's unit front normal, and
// the colour of each side of each facet. Visible, if set, says which sides
// are drawn; rays pass through the others, so that the one-sided walls of an
// enclosure, seen from outside, show its inside.
type Scene struct {
	Tree    *bvh.Tree
	Normal  []geometry.Vec3
	Color   func(facet int32, front bool) color.RGBA
	Visible func(facet int32, front bool) bool
}

// maxPassThrough bounds how many hidden sides one pixel's ray crosses.
const maxPassThrough = 32

// Background is the colour of pixels that see nothing.
var Background = color.RGBA{0xF6, 0xF6, 0xF6, 255}

// Shade returns the brightness factor for a facet seen at cos θ = |n·d|:
// flat faces facing the viewer keep their colour, grazing ones darken.
func Shade(cos float64) float64 { return 0.35 + 0.65*math.Abs(cos) }

// Render traces one primary ray per pixel through the tree, rows in
// parallel on threads goroutines (0: GOMAXPROCS), and returns the picture.
func Render(s Scene, cam Camera, threads int) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, cam.Width, cam.Height))
	if threads <= 0 {
		threads = runtime.GOMAXPROCS(0)
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range threads {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b bvh.Batch
			qs := make([]bvh.Query, cam.Width)
			hits := make([]bvh.Hit, cam.Width)
			for {
				y := int(next.Add(1) - 1)
				if y >= cam.Height {
					return
				}
				for x := range qs {
					qs[x] = bvh.Query{O: cam.Eye, D: cam.Ray(x, y), TMax: math.Inf(1), Skip: -1}
				}
				s.Tree.IntersectBatch(&b, qs, hits)
				row := img.Pix[y*img.Stride:]
				for x, h := range hits {
					// Continue through hidden sides from the hit point.
					for k := 0; h.Facet >= 0 && s.Visible != nil && !s.Visible(h.Facet, h.Front) && k < maxPassThrough; k++ {
						o := qs[x].O.Add(qs[x].D.Scale(h.T))
						qs[x].O = o
						h = s.Tree.Intersect(o, qs[x].D, math.Inf(1), h.Facet)
					}
					if h.Facet >= 0 && s.Visible != nil && !s.Visible(h.Facet, h.Front) {
						h.Facet = -1
					}
					c := Background
					if h.Facet >= 0 {
						c = scale(s.Color(h.Facet, h.Front), Shade(s.Normal[h.Facet].Dot(qs[x].D)))
					}
					row[4*x], row[4*x+1], row[4*x+2], row[4*x+3] = c.R, c.G, c.B, 255
				}
			}
		}()
	}
	wg.Wait()
	return img
}
