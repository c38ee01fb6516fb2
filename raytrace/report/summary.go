package report

import (
	"math"
	"time"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
)

// cautions are written into every summary.json, as in the README.
var cautions = []string{
	"View factors (or absorption factors), solar loads and heat flows are Monte Carlo estimates with the stated confidence intervals, computed on the mesh and surface properties as given; check them before using them in design work. Mirrors and windows can concentrate sunlight to temperatures that damage equipment or burn.",
	"Where results bear on safety (furnaces and ovens, fire exposure, burn-hazard surface temperatures, spacecraft), the applicable codes and standards and licensed professional practice govern.",
}

// NodeSummary is one node's line in summary.json.
type NodeSummary struct {
	Name           string  `json:"name"`
	AreaM2         float64 `json:"area_m2"`
	Rays           int64   `json:"rays"`
	RowSum         float64 `json:"row_sum"`
	ToAmbient      float64 `json:"to_ambient"`
	BackFaceHits   int64   `json:"backface_hits"`
	MaxHalfWidth   float64 `json:"max_halfwidth"`
	ReciprocityErr float64 `json:"max_reciprocity_error,omitempty"`
	// DroppedShare is the share of the node's emission in conductors left
	// out below the threshold.
	DroppedShare float64 `json:"dropped_conductor_share,omitempty"`
}

// MissedRow is a node whose row did not reach the half-width target.
type MissedRow struct {
	Node      string  `json:"node"`
	HalfWidth float64 `json:"halfwidth"`
	Rays      int64   `json:"rays"`
}

// Summary is the content of summary.json.
type Summary struct {
	Tool            string   `json:"tool"`
	Version         string   `json:"version"`
	Created         string   `json:"created"`
	InputHash       string   `json:"input_hash"`
	Inputs          []string `json:"inputs"`
	Seed            uint64   `json:"seed"`
	RaysPerNode     int64    `json:"rays_per_node"`
	HalfWidthTarget float64  `json:"halfwidth_target,omitempty"`
	Confidence      float64  `json:"confidence"`
	FacetNodes      bool     `json:"facet_nodes"`
	// Factors is "view" (F_ij: the surface a ray meets first) or
	// "absorption" (B_ij: where a ray followed through reflections and
	// transmissions is absorbed).
	Factors         string                  `json:"factors"`
	Complete        bool                    `json:"complete"` // every planned ray traced (from the plan, not from how the run ended)
	HalfWidthMissed []MissedRow             `json:"halfwidth_missed,omitempty"`
	RaysTraced      int64                   `json:"rays_traced"`
	EscapedRays     int64                   `json:"escaped_rays"`
	BackFaceRays    int64                   `json:"backface_rays"`
	BVHBuildSeconds float64                 `json:"bvh_build_seconds"`
	TraceSeconds    float64                 `json:"trace_seconds"`
	RaysPerSecond   float64                 `json:"rays_per_second"`
	Threads         int                     `json:"threads"`
	Nodes           []NodeSummary           `json:"nodes,omitempty"` // up to SquareLimit nodes; nodes.csv has all
	BackFaces       []raytrace.BackFaceNote `json:"backface_hits"`
	Warnings        []string                `json:"warnings"`
	Cautions        []string                `json:"cautions"`
	Extra           map[string]any          `json:"results,omitempty"`
}

// newSummary builds summary.json's content. t is nil when the view factors
// were given rather than traced; a is nil for a trace alone.
func newSummary(in *analysis.Input, t *analysis.Traced, a *analysis.Result, warnings []string) (*Summary, error) {
	h, err := in.Hash()
	if err != nil {
		return nil, err
	}
	st := in.Settings.WithDefaults()
	s := &Summary{
		Tool: "hemiray", Version: analysis.Version, Created: time.Now().UTC().Format(time.RFC3339),
		InputHash: h, Inputs: in.Files, Seed: st.Seed, RaysPerNode: st.Rays,
		HalfWidthTarget: st.HalfWidth, Confidence: st.Confidence, FacetNodes: st.FacetNodes,
		Warnings: append([]string{}, warnings...), Cautions: cautions, Complete: true,
		Factors: namesFor(st.Optics != nil).stem,
	}
	if a != nil {
		s.Extra = analysisSummary(a)
		defer func() {
			if c := a.Conductors; c != nil {
				for i := range s.Nodes {
					s.Nodes[i].DroppedShare = c.Dropped[i]
				}
			}
		}()
	}
	if t == nil {
		s.RaysPerNode, s.Seed = 0, 0
		for _, n := range a.Nodes {
			s.Nodes = append(s.Nodes, NodeSummary{Name: n.Name, AreaM2: n.Area})
		}
		return s, nil
	}
	res := t.Result
	s.Complete = t.Complete
	s.RaysTraced, s.BVHBuildSeconds, s.TraceSeconds, s.Threads = res.RaysTraced(), res.BuildSeconds, res.TraceSeconds, res.Threads
	s.BackFaces = res.BackFaces(analysis.SurfaceNames(in.Mesh))
	if res.TraceSeconds > 0 {
		s.RaysPerSecond = float64(s.RaysTraced) / res.TraceSeconds
	}
	for _, m := range res.MissedHalfWidth() {
		s.HalfWidthMissed = append(s.HalfWidthMissed, MissedRow{Node: res.Nodes[m.Node].Name, HalfWidth: m.HalfWidth, Rays: m.Rays})
	}
	open := res.HasAmbient()
	widths := res.RowHalfWidths()
	for i, n := range res.Nodes {
		ns := NodeSummary{Name: n.Name, AreaM2: n.Area, Rays: res.Rays[i], RowSum: res.RowSum(i),
			BackFaceHits: res.Back[i].Sum(), MaxHalfWidth: widths[i]}
		if open {
			ns.ToAmbient = res.Factor(i, res.Ambient()).F
		}
		s.EscapedRays += res.Escaped[i]
		s.BackFaceRays += ns.BackFaceHits
		s.Nodes = append(s.Nodes, ns)
	}
	return s, nil
}

// analysisSummary is what summary.json carries of an analysis.
func analysisSummary(a *analysis.Result) map[string]any {
	out := map[string]any{
		"smoothing": map[string]any{
			"method":             "constrained maximum likelihood (Daun, Morton & Howell 2005)",
			"reciprocity_before": a.Smoothed.ReciprocityBefore, "reciprocity_after": a.Smoothed.ReciprocityAfter,
			"summation_before": a.Smoothed.SummationBefore, "summation_after": a.Smoothed.SummationAfter,
			"max_moved_stderr": finite(a.Smoothed.MaxMoved), "newton_iterations": a.Smoothed.Iterations,
		},
		"ambient_temperature_K": a.AmbientT,
		"heat_to_ambient_W":     a.Solution.ToAmbient,
		"energy_imbalance":      a.Solution.Imbalance,
		"replicates":            a.Replicates,
		"notes":                 a.Notes,
	}
	if c := a.Conductors; c != nil {
		cs := map[string]any{"method": "dense LU factorisation", "conductors": c.Kept()}
		if !c.Dense {
			cs["method"], cs["cg_iterations"] = "conjugate gradients per column", c.Iterations
		}
		if c.Threshold > 0 {
			worst := 0.0
			for _, d := range c.Dropped {
				worst = max(worst, d)
			}
			cs["drop_below_share"], cs["max_dropped_share"] = c.Threshold, worst
		}
		out["conductances"] = cs
	}
	var suns []map[string]any
	for _, s := range a.Suns {
		absorbed := 0.0
		for _, l := range s.Load {
			absorbed += l
		}
		d := s.Beam.Direction.Normalize().Scale(-1)
		suns = append(suns, map[string]any{
			"name": s.Name, "toward": []float64{d.X, d.Y, d.Z}, "irradiance_W_per_m2": s.Beam.Irradiance, "rays": s.Beam.Rays,
			"launch_area_m2": s.LaunchArea, "absorbed_W": absorbed, "escaped_W": s.Escaped, "backface_share": s.BackShare,
			"heat_to_ambient_W": s.Solution.ToAmbient, "energy_imbalance": s.Solution.Imbalance,
		})
	}
	if suns != nil {
		out["suns"] = suns
	}
	return out
}

// finite returns x, or nil (JSON null) when x is not a finite number.
func finite(x float64) any {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return x
}
