package analysis

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// Part is one shard's tally file, as ReadTallies returns it.
type Part struct {
	Name       string // for messages: the folder or file it came from
	Checkpoint *raytrace.Checkpoint
	Record     *Record
}

// MergeShards checks that parts are the shards 0 … N−1 of one run — same
// mesh files and settings, none missing, none twice — and adds them up
// exactly. It returns the merged tallies and the run's record.
func MergeShards(parts []Part) (*raytrace.Checkpoint, *Record, error) {
	if len(parts) == 0 {
		return nil, nil, fmt.Errorf("no shards to merge")
	}
	first := parts[0].Record
	seen := map[int]string{}
	cks := make([]*raytrace.Checkpoint, len(parts))
	for k, p := range parts {
		m := p.Record
		if d := m.Differences(first); len(d) > 0 || m.InputHash != first.InputHash {
			if len(d) == 0 {
				d = []string{"the input hash differs"}
			}
			return nil, nil, fmt.Errorf("%s and %s are not shards of one run: %s", p.Name, parts[0].Name, strings.Join(d, "; "))
		}
		if m.Shards != first.Shards {
			return nil, nil, fmt.Errorf("%s is shard %d/%d but %s is shard %d/%d", p.Name, m.Shard, m.Shards, parts[0].Name, first.Shard, first.Shards)
		}
		if prev, ok := seen[m.Shard]; ok {
			return nil, nil, fmt.Errorf("shard %d/%d is given twice: %s and %s", m.Shard, m.Shards, prev, p.Name)
		}
		seen[m.Shard] = p.Name
		cks[k] = p.Checkpoint
	}
	var missing []string
	for i := range first.Shards {
		if _, ok := seen[i]; !ok {
			missing = append(missing, fmt.Sprint(i))
		}
	}
	if len(missing) > 0 {
		return nil, nil, fmt.Errorf("shard(s) %s of %d are missing", strings.Join(missing, ", "), first.Shards)
	}
	merged, err := raytrace.Merge(cks, raytrace.Options{Settings: first.Settings})
	if err != nil {
		return nil, nil, err
	}
	rec := *first
	rec.Shard, rec.Shards = 0, 1
	return merged, &rec, nil
}

// PlanFile is what a merge writes when a HalfWidth run needs another round.
const PlanFile = "plan.json"

// Plan is the next round of a sharded HalfWidth run: the rays per node
// every shard traces up to.
type Plan struct {
	Round   int     `json:"round"`
	Targets []int64 `json:"targets"`
}

// NextPlan returns the next round's plan for the merged result res, and
// false when no node needs more rays.
func NextPlan(res *raytrace.Result) (Plan, bool) {
	next, more := res.NextTargets()
	if !more {
		return Plan{}, false
	}
	top := int64(0)
	for _, t := range res.Targets {
		top = max(top, t)
	}
	round := 1 // the round just merged, counted from 1
	for r := res.Options.Rays; r < top; r *= 2 {
		round++
	}
	return Plan{Round: round + 1, Targets: next}, true
}

// WritePlan writes p into dir/plan.json.
func WritePlan(dir string, p Plan) error {
	return atomicfile.Write(filepath.Join(dir, PlanFile), func(w io.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(p)
	})
}

// ReadPlan reads a plan (a folder holding plan.json, or the file).
func ReadPlan(path string) (Plan, error) {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		path = filepath.Join(path, PlanFile)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return Plan{}, err
	}
	var p Plan
	if err := json.Unmarshal(b, &p); err != nil || len(p.Targets) == 0 {
		return Plan{}, fmt.Errorf("%s: not a hemiray plan", path)
	}
	for _, t := range p.Targets {
		if t <= 0 || t > 1<<50 {
			return Plan{}, fmt.Errorf("%s: a target of %d rays is outside [1, 2^50]", path, t)
		}
	}
	return p, nil
}
