package analysis

import (
	"fmt"
	"runtime"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// bytesPerEntry is what the analysis holds per entry of a matrix it is
// smoothing and solving: the lower triangle of the counts transposed (6
// bytes an entry), the pairs and their Hessian weights (20 bytes a pair,
// at most one pair an entry) and the smoothed matrix (12 bytes an entry
// of the pattern and its mirror, at most two an entry): at most 50 bytes,
// when every pair is seen one way only, and garbage not yet collected
// beside it. Measured peaks: 38 bytes an entry on the 10⁴-node sphere at
// 10⁴ rays per node (go run ./bench -scale -scale-rays 10000: 5.0 GB of
// heap with 6.3·10⁷ pooled entries and a replicate of 2.2·10⁷ in work
// beside it on 2 cores, 1.8 GB of it the tallies), where most pairs are
// seen both ways; about 72 on facet nodes of a box at 150 rays
// (TestAnalysisWithinItsEstimate), where most are seen one way.
const bytesPerEntry = 100

// AnalysisBytes estimates the memory Analyse needs for res beyond what
// res holds: the pooled matrix in work, and beside it one replicate per
// further worker.
func AnalysisBytes(res *raytrace.Result) int64 {
	entries := func(t *raytrace.Tally) int64 {
		n := int64(0)
		for i := range t.Hits {
			n += int64(t.Hits[i].Len())
		}
		return n
	}
	worst := int64(0)
	for k := range res.Replicas {
		worst = max(worst, entries(&res.Replicas[k]))
	}
	return analysisBytes(len(res.Nodes), entries(&res.Tally), worst, len(res.Replicas))
}

// analysisBytes is the memory of the pooled matrix's entries in work with,
// beside it, one replicate of worst entries per further worker; and, up to
// exchange.DenseLimit nodes, the dense matrices of the solves running side
// by side (each its matrix, its LU factors, and the last solve's pair not
// yet collected).
func analysisBytes(nodes int, pooled, worst int64, replicates int) int64 {
	side := int64(min(replicates, max(1, runtime.GOMAXPROCS(0)-1)))
	need := bytesPerEntry * (pooled + side*worst)
	if nodes <= exchange.DenseLimit {
		n := int64(nodes)
		need += (1 + side) * 4 * 8 * n * n
	}
	return need
}

// PlannedAnalysisBytes bounds, before any ray is traced, what
// AnalysisBytes will say after a trace of nodes nodes with settings s: a
// row holds at most one entry per ray and one per node, so the pooled
// matrix has at most nodes·min(nodes, rays) entries and a replicate
// nodes·min(nodes, ⌈rays/R⌉). The bound is reached where every node sees
// most others (a closed sphere of 10⁴ nodes at 10⁴ rays had 63 % of its
// entries); a model whose nodes see few others needs far less.
func PlannedAnalysisBytes(nodes int, s raytrace.Settings) int64 {
	pooled, worst := plannedEntries(nodes, s)
	return analysisBytes(nodes, pooled, worst, s.WithDefaults().Replicates)
}

// plannedEntries bounds the entries of the pooled matrix and of the
// largest replicate (see PlannedAnalysisBytes).
func plannedEntries(nodes int, s raytrace.Settings) (pooled, worst int64) {
	s = s.WithDefaults()
	rays := s.Rays
	if s.HalfWidth > 0 {
		rays = s.MaxRays
	}
	n := int64(nodes)
	if r := int64(s.Replicates); r > 0 {
		worst = n * min(n, (rays+r-1)/r)
	}
	return n * min(n, rays), worst
}

// MemoryNote warns, before a run traces, when the bound of
// PlannedAnalysisBytes (and of the exchange areas, when asked for) exceeds
// the memory free now; "" when it does not or the free memory is unknown.
// It does not refuse: the bound can be far above the need, and the
// analysis checks the real figure after the trace.
func (in *Input) MemoryNote() string {
	nodes, err := in.Nodes()
	if err != nil {
		return ""
	}
	need := PlannedAnalysisBytes(len(nodes), in.Settings)
	if c := in.Case; c != nil && (c.Output.Conductances == nil || *c.Output.Conductances) {
		pooled, _ := plannedEntries(len(nodes), in.Settings)
		need += exchange.ExchangeBytes(len(nodes), int(pooled))
	}
	have := availableMemory()
	if have <= 0 || need <= have {
		return ""
	}
	return fmt.Sprintf("the analysis after the trace may need up to %.1f GiB (if every node's rays spread over as many nodes as they can), more than the %.1f GiB free now; it checks the real need before it starts and stops with a message if memory is short, the tallies saved for hemiray solve on a larger machine. Fewer rays per node, replicates or nodes lower the bound",
		float64(need)/(1<<30), float64(have)/(1<<30))
}

// checkMemory refuses an analysis that would need more memory than the
// machine has free, rather than let the system kill it part way (the
// tallies are saved: solve can take them up on a larger machine). The
// exchange areas count too when the case asks for conductances.
func (in *Input) checkMemory(res *raytrace.Result) error {
	need, have := AnalysisBytes(res), availableMemory()
	if c := in.Case.Output.Conductances; c == nil || *c {
		entries := 0
		for i := range res.Hits {
			entries += res.Hits[i].Len()
		}
		need += exchange.ExchangeBytes(len(res.Nodes), entries)
	}
	if have > 0 && need > have {
		return fmt.Errorf("the analysis of these tallies needs about %.1f GiB (%.3g entries of the matrix with its replicates in work), more than the %.1f GiB free: run hemiray solve on the same case on a machine with more memory (the tallies are in the output folder's tallies.bin), or use fewer replicates (or --no-conductances)",
			float64(need)/(1<<30), float64(need)/bytesPerEntry, float64(have)/(1<<30))
	}
	return nil
}
