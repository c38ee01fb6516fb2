package report

import (
	"fmt"
	"path/filepath"

	"github.com/hemiray/hemiray/raytrace"
)

// The raw tallies in text, tallies.csv, for people and other tools (solve
// and merge read the binary tallies.bin). One row per count:
//
//	replicate,from,to,count
//
// replicate is "all" for the pooled tallies or 0, 1, … for replicates;
// to is a node name, "ambient", "rays" (the rays traced from the node) or
// "backface:SURFACE". Replicate rows, when present, add up to the pooled
// ones. Above SquareLimit nodes it is not written (it would run to
// gigabytes); tallies.bin has the same counts.
const TalliesCSV = "tallies.csv"

func writeTallies(dir string, res *raytrace.Result, surfaces []string) error {
	return writeCSV(filepath.Join(dir, TalliesCSV), func(emit func(...string)) error {
		emit("replicate", "from", "to", "count")
		one := func(rep string, t *raytrace.Tally) {
			for i, n := range res.Nodes {
				emit(rep, n.Name, "rays", fmt.Sprint(t.Rays[i]))
				for k, j := range t.Hits[i].Col {
					emit(rep, n.Name, res.Nodes[j].Name, fmt.Sprint(t.Hits[i].Val[k]))
				}
				if t.Escaped[i] > 0 {
					emit(rep, n.Name, "ambient", fmt.Sprint(t.Escaped[i]))
				}
				for k, s := range t.Back[i].Col {
					emit(rep, n.Name, "backface:"+surfaces[s], fmt.Sprint(t.Back[i].Val[k]))
				}
			}
		}
		one("all", &res.Tally)
		for r := range res.Replicas {
			one(fmt.Sprint(r), &res.Replicas[r])
		}
		return nil
	})
}
