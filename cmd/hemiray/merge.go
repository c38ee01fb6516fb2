package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
)

// planFile is what merge writes when a --halfwidth run needs another round.
const planFile = "plan.json"

type plan struct {
	Round   int     `json:"round"`
	Targets []int64 `json:"targets"`
}

func readPlan(path string) ([]int64, error) {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		path = filepath.Join(path, planFile)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var p plan
	if err := json.Unmarshal(b, &p); err != nil || len(p.Targets) == 0 {
		return nil, fmt.Errorf("%s: not a hemiray plan", path)
	}
	return p.Targets, nil
}

func mergeCommand() *command {
	c := &command{
		Name:      "merge",
		UsageLine: "merge -o DIR PART...",
		Short:     "add up shard tallies exactly and write every output",
		Long: `Merge reads the tallies.bin of every shard folder (from trace or run with
--shard I/N), checks that they are the shards 0 … N−1 of one run — same mesh
files, case and settings, none missing, none twice — adds them up and writes
every output of trace, and of run when the case gives every surface an
emissivity and a condition. The outputs are byte-identical to a single
process's (summary.json differs only in timings).

With --halfwidth, shards trace one round at a time. If another round is
needed, merge writes DIR/plan.json and says so: run the same shards again
with --plan DIR/plan.json --resume, then merge again.`,
		Flags: flag.NewFlagSet("merge", flag.ContinueOnError),
	}
	out := c.Flags.String("o", "", "output folder (required)")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		parts, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if *out == "" || len(parts) == 0 {
			return usagef("give -o DIR and the shard folders")
		}
		return merge(*out, parts, stdout, stderr)
	}
	return c
}

func merge(dir string, parts []string, stdout, stderr io.Writer) error {
	var cks []*raytrace.Checkpoint
	var metas []*tallyMeta
	for _, p := range parts {
		ck, m, err := readCheckpoint(p)
		if err != nil {
			return err
		}
		cks, metas = append(cks, ck), append(metas, m)
	}
	first := metas[0]
	seen := map[int]string{}
	for k, m := range metas {
		if d := m.differences(first); len(d) > 0 || m.InputHash != first.InputHash {
			return fmt.Errorf("%s and %s are not shards of one run: %s", parts[k], parts[0], strings.Join(append(d, "input hash differs")[:max(1, len(d))], "; "))
		}
		if m.Shards != first.Shards {
			return fmt.Errorf("%s is shard %d/%d but %s is shard %d/%d", parts[k], m.Shard, m.Shards, parts[0], first.Shard, first.Shards)
		}
		if prev, ok := seen[m.Shard]; ok {
			return fmt.Errorf("shard %d/%d is given twice: %s and %s", m.Shard, m.Shards, prev, parts[k])
		}
		seen[m.Shard] = parts[k]
	}
	var missing []string
	for i := range first.Shards {
		if _, ok := seen[i]; !ok {
			missing = append(missing, fmt.Sprint(i))
		}
	}
	if len(missing) > 0 {
		return fmt.Errorf("shard(s) %s of %d are missing", strings.Join(missing, ", "), first.Shards)
	}
	in, err := inputFromMeta(first)
	if err != nil {
		return err
	}
	in.outDir = dir
	merged, err := raytrace.Merge(cks, in.opts)
	if err != nil {
		return err
	}
	nodes, err := raytrace.Nodes(in.mesh, in.opts)
	if err != nil {
		return err
	}
	res, err := raytrace.NewResult(nodes, merged.Tally, merged.Replicas, in.opts)
	if err != nil {
		return err
	}
	res.Targets = merged.Targets
	meta, err := in.meta(len(nodes))
	if err != nil {
		return err
	}
	if meta.InputHash != first.InputHash {
		return fmt.Errorf("the inputs changed since the shards were traced: %s", strings.Join(meta.differences(first), "; "))
	}
	if err := writeCheckpoint(dir, merged, meta); err != nil {
		return err
	}
	if next, more := res.NextTargets(); more {
		round := 0
		for r := in.opts.Rays; r < maxOf(merged.Targets); r *= 2 {
			round++
		}
		p := plan{Round: round + 1, Targets: next}
		if err := writeJSON(filepath.Join(dir, planFile), p); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "round %d of the --halfwidth run merged; some intervals are still wider than %g.\nwrote %s: run the same %d shards again with --plan %s --resume (each in its own folder), then merge again.\n",
			round, in.opts.HalfWidth, filepath.Join(dir, planFile), first.Shards, filepath.Join(dir, planFile))
		return nil
	}
	os.Remove(filepath.Join(dir, planFile))
	st := traceState{complete: true}
	if in.lc != nil && preflight(in) == nil {
		return finishRun(in, res, st, stdout, stderr)
	}
	return finishTrace(in, res, st, stdout, stderr)
}

func maxOf(xs []int64) int64 {
	m := int64(0)
	for _, x := range xs {
		m = max(m, x)
	}
	return m
}

// inputFromMeta rebuilds the input of a run from its tally metadata.
func inputFromMeta(m *tallyMeta) (*input, error) {
	o := m.Options
	in := &input{units: o.Units, byMaterial: o.ByMaterial}
	var err error
	if m.Case != "" {
		if in.lc, err = readCase(m.Case); err != nil {
			return nil, err
		}
		in.mesh = in.lc.mesh
		for _, s := range in.mesh.Sources {
			in.files = append(in.files, s.Path)
		}
	} else {
		for _, f := range m.Inputs {
			in.files = append(in.files, f.Path)
		}
		unit, err := mesh.ParseUnit(o.Units)
		if err != nil {
			return nil, err
		}
		if in.mesh, err = mesh.Load(in.files, mesh.LoadOptions{Unit: unit, GroupByMaterial: o.ByMaterial}); err != nil {
			return nil, err
		}
	}
	in.opts = raytrace.Options{Rays: o.Rays, HalfWidth: o.HalfWidth, MaxRays: o.MaxRays, Seed: o.Seed, Confidence: o.Confidence,
		FacetNodes: o.Facets, TwoSided: o.TwoSided, Replicates: o.Replicates, BatchSize: o.BatchSize}
	two := append([]string(nil), o.TwoSided...)
	sort.Strings(two)
	in.settings = map[string]any{
		"rays": o.Rays, "halfwidth": o.HalfWidth, "max_rays": o.MaxRays, "seed": o.Seed,
		"facets": o.Facets, "two_sided": two, "flipped": o.Flipped, "batch": o.BatchSize,
		"units": o.Units, "by_material": o.ByMaterial,
	}
	return in, nil
}
