package main

import (
	"context"
	"fmt"
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
)

// accuracyCase is a model and the node whose row must reach the target.
type accuracyCase struct {
	name, from string
	m          *mesh.Mesh
	twoSided   []string
}

// accuracyCases are issue 13's four configurations, meshed exactly (flat
// rectangles as two triangles each).
func accuracyCases() ([]accuracyCase, error) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	join := func(parts ...*mesh.Mesh) (*mesh.Mesh, error) {
		m := &mesh.Mesh{}
		for _, p := range parts {
			if err := m.Append(p); err != nil {
				return nil, err
			}
		}
		return m, nil
	}
	bottom := mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 1, 1)
	opposed, err := join(bottom, mesh.Rectangle("top", v(0, 0, 1), v(0, 1, 0), v(1, 0, 0), 1, 1))
	if err != nil {
		return nil, err
	}
	perpendicular, err := join(bottom, mesh.Rectangle("wall", v(0, 0, 0), v(0, 1, 0), v(0, 0, 1), 1, 1))
	if err != nil {
		return nil, err
	}
	blocked, err := join(bottom, mesh.Rectangle("top", v(0, 0, 1), v(0, 1, 0), v(1, 0, 0), 1, 1),
		mesh.Rectangle("blocker", v(0.25, 0.25, 0.5), v(0, 0.5, 0), v(0.5, 0, 0), 1, 1))
	if err != nil {
		return nil, err
	}
	cube := mesh.Box("", geometry.Box{Max: v(1, 1, 1)}, 1, true)
	return []accuracyCase{
		{"opposed unit squares, unit distance", "bottom", opposed, nil},
		{"closed unit cube", "zmin", cube, nil},
		{"perpendicular squares, common edge", "bottom", perpendicular, nil},
		{"opposed squares, 0.5 m opaque square between", "bottom", blocked, []string{"blocker"}},
	}, nil
}

// rowSpread traces m seeds times with n rays per node and returns, for
// the row of each node in from, the largest standard deviation across
// seeds of any entry (ambient included), and the trace seconds per ray.
func rowSpread(m *mesh.Mesh, twoSided []string, from []string, sampling string, n int64, seeds int) (worst []float64, secPerRay float64, err error) {
	runs := make([][][]float64, len(from)) // row, seed, column
	secs, rays := 0.0, int64(0)
	for s := range seeds {
		r, err := raytrace.Estimate(context.Background(), m, raytrace.Options{Settings: raytrace.Settings{
			Rays: n, Seed: uint64(s + 1), Sampling: sampling, Replicates: raytrace.DefaultReplicates, TwoSided: twoSided}})
		if err != nil {
			return nil, 0, err
		}
		for k, name := range from {
			i := r.NodeIndex(name)
			if i < 0 {
				return nil, 0, fmt.Errorf("no node %q", name)
			}
			row := make([]float64, len(r.Nodes)+1)
			for j := range row {
				row[j] = r.Factor(i, j).F
			}
			runs[k] = append(runs[k], row)
		}
		secs += r.TraceSeconds
		rays += r.RaysTraced()
	}
	worst = make([]float64, len(from))
	for k := range from {
		for j := range runs[k][0] {
			mean, v := 0.0, 0.0
			for _, row := range runs[k] {
				mean += row[j] / float64(seeds)
			}
			for _, row := range runs[k] {
				v += (row[j] - mean) * (row[j] - mean) / float64(seeds-1)
			}
			worst[k] = max(worst[k], math.Sqrt(v))
		}
	}
	return worst, secs / float64(rays), nil
}

// accuracyResult is the rays per node one sampling needs for a case.
type accuracyResult struct {
	name, sampling string
	rays           float64 // per node, for 1.96·σ = target on every entry of the row
	seconds        float64 // tracing the model's every node that many rays
}

// raysToTarget finds, for each case and sampling, the rays per node at
// which 1.96 times the worst standard deviation of the row (measured over
// seeds independent runs, not estimated by the run itself) falls to
// target, by log-log interpolation between powers of two.
func raysToTarget(target float64, seeds int) ([]accuracyResult, error) {
	cases, err := accuracyCases()
	if err != nil {
		return nil, err
	}
	var out []accuracyResult
	for _, c := range cases {
		for _, sampling := range []string{raytrace.SamplingMC, raytrace.SamplingRQMC} {
			var prevN, prevW float64
			found := false
			for n := int64(1 << 12); n <= 1<<21; n *= 2 {
				sd, spr, err := rowSpread(c.m, c.twoSided, []string{c.from}, sampling, n, seeds)
				if err != nil {
					return nil, err
				}
				w := 1.96 * sd[0]
				if w <= target {
					need := float64(n)
					if prevN > 0 {
						slope := math.Log(w/prevW) / math.Log(float64(n)/prevN)
						need = prevN * math.Exp(math.Log(target/prevW)/slope)
					}
					nodes := float64(len(c.m.Surfaces) + len(c.twoSided))
					out = append(out, accuracyResult{c.name, sampling, need, need * nodes * spr})
					found = true
					break
				}
				prevN, prevW = float64(n), w
			}
			if !found {
				return nil, fmt.Errorf("%s, %s: the target was not reached by 2^21 rays per node", c.name, sampling)
			}
		}
	}
	return out, nil
}

// roomRatio compares the samplings on the cluttered room at surface level
// (7 nodes) with n rays per node: per row, the worst standard deviation
// over seeds; it returns the smallest and the overall ratio of the rays
// plain Monte Carlo needs to RQMC's for the same worst half-width.
func roomRatio(n int64, seeds int) (worstRow, overall float64, err error) {
	m, err := clutteredRoom()
	if err != nil {
		return 0, 0, err
	}
	rows := []string{"room_xmin", "room_xmax", "room_ymin", "room_ymax", "room_zmin", "room_zmax", "clutter"}
	mc, _, err := rowSpread(m, nil, rows, raytrace.SamplingMC, n, seeds)
	if err != nil {
		return 0, 0, err
	}
	q, _, err := rowSpread(m, nil, rows, raytrace.SamplingRQMC, n, seeds)
	if err != nil {
		return 0, 0, err
	}
	worstRow = math.Inf(1)
	var allMC, allQ float64
	for k := range rows {
		worstRow = min(worstRow, (mc[k]/q[k])*(mc[k]/q[k]))
		allMC, allQ = max(allMC, mc[k]), max(allQ, q[k])
	}
	return worstRow, (allMC / allQ) * (allMC / allQ), nil
}

// printAccuracy prints the rays-to-accuracy table.
func printAccuracy(rs []accuracyResult, roomWorst, roomAll float64) {
	fmt.Println("\nrays per node for a 95 % half-width of 0.001 on every entry of the row (1.96 × the spread over independent runs)")
	fmt.Printf("%-46s %14s %14s %8s %10s %10s\n", "configuration", "mc rays", "rqmc rays", "ratio", "mc s", "rqmc s")
	for k := 0; k+1 < len(rs); k += 2 {
		mc, q := rs[k], rs[k+1]
		fmt.Printf("%-46s %14.0f %14.0f %8.1f %10.2f %10.2f\n", mc.name, mc.rays, q.rays, mc.rays/q.rays, mc.seconds, q.seconds)
	}
	fmt.Printf("cluttered room (7 surface nodes): rays ratio mc/rqmc for equal worst half-width: %.2f overall, %.2f on the least favoured row\n", roomAll, roomWorst)
	for _, r := range rs {
		fmt.Printf("accuracy=%q sampling=%s rays_per_node=%.0f seconds=%.3f\n", r.name, r.sampling, r.rays, r.seconds)
	}
}
