package main

import (
	"time"

	"github.com/hemiray/hemiray/raytrace"
)

// cautions are written into every summary.json, as in the README.
var cautions = []string{
	"View factors and heat flows are Monte Carlo estimates with the stated confidence intervals, computed on the mesh as given; check them before using them in design work.",
	"Where results bear on safety (furnaces and ovens, fire exposure, burn-hazard surface temperatures, spacecraft), the applicable codes and standards and licensed professional practice govern.",
}

type nodeSummary struct {
	Name           string  `json:"name"`
	AreaM2         float64 `json:"area_m2"`
	Rays           int64   `json:"rays"`
	RowSum         float64 `json:"row_sum"`
	ToAmbient      float64 `json:"to_ambient"`
	BackFaceHits   int64   `json:"backface_hits"`
	MaxHalfWidth   float64 `json:"max_halfwidth"`
	ReciprocityErr float64 `json:"max_reciprocity_error,omitempty"`
}

type summary struct {
	Tool            string                  `json:"tool"`
	Version         string                  `json:"version"`
	Created         string                  `json:"created"`
	InputHash       string                  `json:"input_hash"`
	Inputs          []string                `json:"inputs"`
	Seed            uint64                  `json:"seed"`
	RaysPerNode     int64                   `json:"rays_per_node"`
	HalfWidthTarget float64                 `json:"halfwidth_target,omitempty"`
	Confidence      float64                 `json:"confidence"`
	FacetNodes      bool                    `json:"facet_nodes"`
	Complete        bool                    `json:"complete"` // false when a time limit stopped the trace
	RaysTraced      int64                   `json:"rays_traced"`
	EscapedRays     int64                   `json:"escaped_rays"`
	BackFaceRays    int64                   `json:"backface_rays"`
	BVHBuildSeconds float64                 `json:"bvh_build_seconds"`
	TraceSeconds    float64                 `json:"trace_seconds"`
	RaysPerSecond   float64                 `json:"rays_per_second"`
	Threads         int                     `json:"threads"`
	Nodes           []nodeSummary           `json:"nodes"`
	BackFaces       []raytrace.BackFaceNote `json:"backface_hits"`
	Warnings        []string                `json:"warnings"`
	Cautions        []string                `json:"cautions"`
	Extra           map[string]any          `json:"results,omitempty"`
}

func newSummary(in *input, res *raytrace.Result, warnings []string) (*summary, error) {
	h, err := in.hash()
	if err != nil {
		return nil, err
	}
	s := &summary{
		Tool: "hemiray", Version: version, Created: time.Now().UTC().Format(time.RFC3339),
		InputHash: h, Inputs: in.files, Seed: in.opts.Seed, RaysPerNode: in.opts.Rays,
		HalfWidthTarget: in.opts.HalfWidth, Confidence: in.opts.Confidence, FacetNodes: in.opts.FacetNodes,
		RaysTraced: res.RaysTraced(), BVHBuildSeconds: res.BuildSeconds, TraceSeconds: res.TraceSeconds,
		Threads: res.Threads, BackFaces: res.BackFaces(surfaceNames(in.mesh)),
		Warnings: append([]string{}, warnings...), Cautions: cautions,
	}
	if res.TraceSeconds > 0 {
		s.RaysPerSecond = float64(s.RaysTraced) / res.TraceSeconds
	}
	for i, n := range res.Nodes {
		ns := nodeSummary{Name: n.Name, AreaM2: n.Area, Rays: res.Rays[i], RowSum: res.RowSum(i),
			BackFaceHits: res.Back[i].Sum(), MaxHalfWidth: res.RowHalfWidth(i)}
		if res.HasAmbient() {
			ns.ToAmbient = res.Factor(i, res.Ambient()).F
		}
		s.EscapedRays += res.Escaped[i]
		s.BackFaceRays += ns.BackFaceHits
		s.Nodes = append(s.Nodes, ns)
	}
	return s, nil
}
