package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"image"
	"io"

	"github.com/hemiray/hemiray/raytrace/render"
	"github.com/hemiray/hemiray/raytrace/report"
)

func renderCommand() *command {
	c := &command{
		Name:      "render",
		UsageLine: "render (CASE.toml | MESH...) [--color C] [--results DIR] [--view V] [--size WxH] [-o FILE.png]",
		Short:     "draw the model as a PNG: by surface, by side, or by a result",
		Long: `Render draws a perspective picture of the model with hemiray's own ray
tracer, framed automatically, shaded by the angle between each facet and the
view. --color chooses the colouring:

  surface      one colour per surface, with a legend (default)
  side         fronts blue, backs orange: flipped normals stand out
  temperature  node temperatures from DIR/surfaces.csv (needs --results)
  heat-flux    net heat flux q from DIR/surfaces.csv
  ambient      view factor to the ambient
  vf:NODE      view factor to NODE

Results are read from --results DIR (the output folder of run); the colour
map is viridis (perceptually uniform, colour-blind safe) with a labelled
colour bar. --view is +x, -x, +y, -y, +z, -z (look from that side) or
AZIMUTH,ELEVATION in degrees (default 35,25).`,
		Flags: flag.NewFlagSet("render", flag.ContinueOnError),
	}
	tf := newTraceFlags()
	tf.register(c.Flags, meshFlags)
	out := c.Flags.String("o", "", "picture file (default model_COLOR.png)")
	colorBy := c.Flags.String("color", "surface", "surface, side, temperature, heat-flux, ambient or vf:NODE")
	results := c.Flags.String("results", "", "results folder for field colourings (default: the case's output.dir, else hemiray-out)")
	viewFlag := c.Flags.String("view", "35,25", "+x … -z, or AZIMUTH,ELEVATION in degrees")
	size := c.Flags.String("size", "1024x768", "picture size in pixels, WxH")
	up := c.Flags.String("up", "", "the model's up axis: z or y (default: the case's output.up, else z)")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		var w, h int
		if _, err := fmt.Sscanf(*size, "%dx%d", &w, &h); err != nil || w < 64 || h < 64 || w > 1<<14 || h > 1<<14 || w*h > 64e6 {
			return usagef("--size %q: give WxH, each from 64 to 16384, at most 64 megapixels", *size)
		}
		view, err := render.ParseView(*viewFlag)
		if err != nil {
			return usageError{err.Error()}
		}
		j, err := loadInput(c.Flags, tf, pos)
		if err != nil {
			return err
		}
		in := j.in
		switch {
		case *up == "y" || *up == "z":
			view.Up = *up
		case *up != "":
			return usagef("--up %q: give z or y", *up)
		case in.Case != nil:
			view.Up = in.Case.Output.Up
		}
		file := *out
		if file == "" {
			file = report.PictureName(*colorBy)
		}
		p := report.NewPicture(in.Mesh, in.Settings.TwoSided)
		var img *image.RGBA
		switch *colorBy {
		case "surface":
			img = p.BySurface(view, w, h)
		case "side":
			img = p.BySide(view, w, h)
		default:
			dir := *results
			if dir == "" {
				dir = j.run.Dir
			}
			values, label, err := report.ReadField(dir, *colorBy)
			if errors.Is(err, report.ErrUnknownColoring) {
				return usageError{err.Error()}
			}
			if err != nil {
				return err
			}
			nodes, err := in.Nodes()
			if err != nil {
				return err
			}
			if err := report.MatchField(values, nodes, dir); err != nil {
				return err
			}
			img = p.ByField(view, w, h, nodes, values, label, *colorBy == "heat-flux")
		}
		if err := report.WritePNG(file, img); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "wrote %s (%d×%d)\n", file, w, h)
		return nil
	}
	return c
}
