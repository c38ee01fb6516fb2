package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/hemiray/hemiray/raytrace"
)

// The raw tallies file, tallies.csv, lets solve redo smoothing and the
// exchange solve without tracing again. One row per count:
//
//	replicate,from,to,count
//
// replicate is "all" for the pooled tallies or 0, 1, … for replicates;
// to is a node name, "ambient", "rays" (the rays traced from the node) or
// "backface:SURFACE". Replicate rows, when present, add up to the pooled
// ones.
const tallyFile = "tallies.csv"

func writeTallies(dir string, res *raytrace.Result, surfaces []string) error {
	return writeCSV(filepath.Join(dir, tallyFile), func(emit func(...string)) error {
		emit("replicate", "from", "to", "count")
		one := func(rep string, t *raytrace.Tally) {
			for i, n := range res.Nodes {
				emit(rep, n.Name, "rays", fmt.Sprint(t.Rays[i]))
				for k, j := range t.Hits[i].Col {
					emit(rep, n.Name, res.Nodes[j].Name, fmt.Sprint(t.Hits[i].Count[k]))
				}
				if t.Escaped[i] > 0 {
					emit(rep, n.Name, "ambient", fmt.Sprint(t.Escaped[i]))
				}
				for k, s := range t.Back[i].Col {
					emit(rep, n.Name, "backface:"+surfaces[s], fmt.Sprint(t.Back[i].Count[k]))
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

// readTallies reads tallies.csv back for the given nodes.
func readTallies(dir string, nodes []raytrace.Node, surfaces []string) (pooled raytrace.Tally, reps []raytrace.Tally, err error) {
	path := filepath.Join(dir, tallyFile)
	f, err := os.Open(path)
	if err != nil {
		return pooled, nil, fmt.Errorf("%w (run trace or run first)", err)
	}
	defer f.Close()
	nodeIdx := map[string]int32{}
	for i, n := range nodes {
		nodeIdx[n.Name] = int32(i)
	}
	surfIdx := map[string]int32{}
	for i, s := range surfaces {
		surfIdx[s] = int32(i)
	}
	pooled = raytrace.NewTally(len(nodes))
	// Entries are gathered per row and sorted once at the end: adding them
	// one by one to sorted rows would be quadratic in the row length.
	type entry struct {
		col int32
		n   int64
	}
	type rows struct{ hits, back [][]entry }
	newRows := func() rows { return rows{make([][]entry, len(nodes)), make([][]entry, len(nodes))} }
	pooledRows := newRows()
	var repRows []rows
	cr := csv.NewReader(f)
	cr.FieldsPerRecord = 4
	line := 0
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		line++
		if err != nil {
			return pooled, nil, fmt.Errorf("%s: %w", path, err)
		}
		if line == 1 {
			continue
		}
		bad := func(format string, a ...any) error {
			return fmt.Errorf("%s:%d: %s", path, line, fmt.Sprintf(format, a...))
		}
		t, rs := &pooled, &pooledRows
		if rec[0] != "all" {
			r, err := strconv.Atoi(rec[0])
			if err != nil || r < 0 || r > 10000 {
				return pooled, nil, bad("replicate %q", rec[0])
			}
			for len(reps) <= r {
				reps = append(reps, raytrace.NewTally(len(nodes)))
				repRows = append(repRows, newRows())
			}
			t, rs = &reps[r], &repRows[r]
		}
		i, ok := nodeIdx[rec[1]]
		if !ok {
			return pooled, nil, bad("node %q is not in this case (was it traced with other settings?)", rec[1])
		}
		n, err := strconv.ParseInt(rec[3], 10, 64)
		if err != nil || n < 0 {
			return pooled, nil, bad("count %q", rec[3])
		}
		switch to := rec[2]; {
		case to == "rays":
			t.Rays[i] += n
		case to == "ambient":
			t.Escaped[i] += n
		case strings.HasPrefix(to, "backface:"):
			s, ok := surfIdx[strings.TrimPrefix(to, "backface:")]
			if !ok {
				return pooled, nil, bad("surface %q", to)
			}
			rs.back[i] = append(rs.back[i], entry{s, n})
		default:
			j, ok := nodeIdx[to]
			if !ok {
				return pooled, nil, bad("node %q", to)
			}
			rs.hits[i] = append(rs.hits[i], entry{j, n})
		}
	}
	toRow := func(es []entry) raytrace.Row {
		sort.Slice(es, func(a, b int) bool { return es[a].col < es[b].col })
		var r raytrace.Row
		for _, e := range es {
			if k := len(r.Col); k > 0 && r.Col[k-1] == e.col {
				r.Count[k-1] += e.n
				continue
			}
			r.Col, r.Count = append(r.Col, e.col), append(r.Count, e.n)
		}
		return r
	}
	fill := func(t *raytrace.Tally, rs *rows) {
		for i := range nodes {
			t.Hits[i], t.Back[i] = toRow(rs.hits[i]), toRow(rs.back[i])
		}
	}
	fill(&pooled, &pooledRows)
	for r := range reps {
		fill(&reps[r], &repRows[r])
	}
	return pooled, reps, nil
}
