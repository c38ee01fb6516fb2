package render

import (
	"fmt"
	"math"
	"strings"

	"github.com/hemiray/hemiray/geometry"
)

// Camera is a pinhole perspective camera.
type Camera struct {
	Eye                geometry.Vec3
	forward, right, up geometry.Vec3
	tanHalf            float64 // tangent of half the vertical field of view
	Width, Height      int
}

// View names a direction to look from: azimuth and elevation in degrees
// (azimuth from +x toward +y, elevation above the x–y plane), or an axis.
type View struct {
	Azimuth, Elevation float64
}

// ParseView reads "+x", "-y", "+z", … (looking from that side) or "AZ,EL".
func ParseView(s string) (View, error) {
	axes := map[string]View{"+x": {0, 0}, "-x": {180, 0}, "+y": {90, 0}, "-y": {270, 0}, "+z": {0, 90}, "-z": {0, -90}}
	if v, ok := axes[strings.ToLower(strings.TrimSpace(s))]; ok {
		return v, nil
	}
	var v View
	if _, err := fmt.Sscanf(s, "%g,%g", &v.Azimuth, &v.Elevation); err != nil || v.Elevation < -90 || v.Elevation > 90 {
		return View{}, fmt.Errorf("view %q: give +x, -x, +y, -y, +z, -z or AZIMUTH,ELEVATION in degrees", s)
	}
	return v, nil
}

// Frame returns a camera that looks at box b from direction v with a 35°
// vertical field of view, far enough that b's bounding sphere fills the
// picture.
func Frame(b geometry.Box, v View, width, height int) Camera {
	centre := b.Center()
	radius := math.Max(b.Diagonal().Len()/2, 1e-30)
	az, el := v.Azimuth*math.Pi/180, v.Elevation*math.Pi/180
	dir := geometry.Vec3{X: math.Cos(el) * math.Cos(az), Y: math.Cos(el) * math.Sin(az), Z: math.Sin(el)}
	c := Camera{Width: width, Height: height, tanHalf: math.Tan(35.0 / 2 * math.Pi / 180)}
	// The sphere must fit the narrower of the two fields of view.
	tanFit := c.tanHalf * math.Min(1, float64(width)/float64(height))
	dist := radius / math.Sin(math.Atan(tanFit)) * 1.05
	c.Eye = centre.Add(dir.Scale(dist))
	c.forward = dir.Scale(-1)
	worldUp := geometry.Vec3{Z: 1}
	if math.Abs(dir.Z) > 0.999 {
		worldUp = geometry.Vec3{Y: 1}
	}
	c.right = c.forward.Cross(worldUp).Normalize()
	c.up = c.right.Cross(c.forward)
	return c
}

// Ray returns the direction of the ray through the centre of pixel (x, y),
// y counted down from the top.
func (c *Camera) Ray(x, y int) geometry.Vec3 {
	aspect := float64(c.Width) / float64(c.Height)
	px := (2*(float64(x)+0.5)/float64(c.Width) - 1) * c.tanHalf * aspect
	py := (1 - 2*(float64(y)+0.5)/float64(c.Height)) * c.tanHalf
	return c.forward.Add(c.right.Scale(px)).Add(c.up.Scale(py)).Normalize()
}
