package analysis

import (
	"fmt"
	"runtime"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// bytesPerEntry is what the analysis holds per entry of a matrix it is
// smoothing and solving (the counts' transpose, the pairs and Hessian
// weights, the smoothed matrix and its moves, the solver's system),
// measured on the 10⁴-node sphere at 10⁴ rays per node (go run ./bench
// -scale -scale-rays 10000): a peak of 9.9 GB of heap with 6.3·10⁷ pooled
// entries and a replicate of 2.2·10⁷ in work beside it on 2 cores, 1.8 GB
// of it the tallies, is about 95 bytes an entry; 120 leaves room for the
// garbage collector's lag.
const bytesPerEntry = 120

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
	side := int64(min(len(res.Replicas), max(1, runtime.GOMAXPROCS(0)-1)))
	return bytesPerEntry * (entries(&res.Tally) + side*worst)
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
