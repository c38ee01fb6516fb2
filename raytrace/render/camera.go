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

// View names a direction to look from: azimuth and elevation in degrees,
// or an axis. With the model's up axis Up = "z" (the default) azimuth runs
// from +x toward +y and elevation above the x–y plane; with Up = "y" (as
// many graphics exports have it) azimuth runs from +z toward +x and
// elevation above the z–x plane, and the picture's up is +y.
type View struct {
	Azimuth, Elevation float64
	Axis               geometry.Vec3 // looking from this axis when not zero
	Up                 string        // "z" (default) or "y"
}

// ParseView reads "+x", "-y", "+z", … (looking from that side) or "AZ,EL".
func ParseView(s string) (View, error) {
	axes := map[string]geometry.Vec3{"+x": {X: 1}, "-x": {X: -1}, "+y": {Y: 1}, "-y": {Y: -1}, "+z": {Z: 1}, "-z": {Z: -1}}
	if a, ok := axes[strings.ToLower(strings.TrimSpace(s))]; ok {
		return View{Axis: a}, nil
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
	// A right-handed basis (e1, e2, up) for the model's up axis.
	e1, e2, up := geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, geometry.Vec3{Z: 1}
	if v.Up == "y" {
		e1, e2, up = geometry.Vec3{Z: 1}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}
	}
	az, el := v.Azimuth*math.Pi/180, v.Elevation*math.Pi/180
	dir := e1.Scale(math.Cos(el) * math.Cos(az)).Add(e2.Scale(math.Cos(el) * math.Sin(az))).Add(up.Scale(math.Sin(el)))
	if v.Axis != (geometry.Vec3{}) {
		dir = v.Axis.Normalize()
	}
	c := Camera{Width: width, Height: height, tanHalf: math.Tan(35.0 / 2 * math.Pi / 180)}
	// The sphere must fit the narrower of the two fields of view.
	tanFit := c.tanHalf * math.Min(1, float64(width)/float64(height))
	dist := radius / math.Sin(math.Atan(tanFit)) * 1.05
	c.Eye = centre.Add(dir.Scale(dist))
	c.forward = dir.Scale(-1)
	worldUp := up
	if math.Abs(dir.Dot(up)) > 0.999 { // looking along the up axis: e2 is up in the picture
		worldUp = e2
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
