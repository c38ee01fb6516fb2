package report

import (
	"encoding/csv"
	"errors"
	"fmt"
	"github.com/hemiray/hemiray/raytrace"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// ErrUnknownColoring is returned by ReadField for a colouring it does not know.
var ErrUnknownColoring = errors.New("unknown colouring")

// readNodeColumn reads column col of a CSV keyed by its first column.
func readNodeColumn(path, col string) (map[string]float64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("%s: empty", path)
	}
	k := -1
	for i, h := range recs[0] {
		if h == col {
			k = i
		}
	}
	if k < 0 {
		return nil, fmt.Errorf("%s has no column %q (columns: %s)", path, col, strings.Join(recs[0][1:], ", "))
	}
	out := map[string]float64{}
	for _, r := range recs[1:] {
		if v, err := strconv.ParseFloat(r[k], 64); err == nil {
			out[r[0]] = v
		}
	}
	return out, nil
}

// ReadField reads the values and label of a colouring from a results folder:
// temperature, heat-flux, ambient or vf:NODE.
func ReadField(dir, colorBy string) (map[string]float64, string, error) {
	// The first of these a run wrote: absorption factors when its rays
	// were followed through reflections.
	var matrix string
	for _, name := range []string{"viewfactors_smoothed.csv", "absorption_smoothed.csv", "viewfactors.csv", "absorption.csv"} {
		matrix = filepath.Join(dir, name)
		if _, err := os.Stat(matrix); err == nil {
			break
		}
	}
	sym := "F"
	if strings.HasPrefix(filepath.Base(matrix), "absorption") {
		sym = "B"
	}
	switch {
	case colorBy == "temperature":
		v, err := readNodeColumn(filepath.Join(dir, "surfaces.csv"), "T_K")
		return v, "T [K]", err
	case colorBy == "heat-flux":
		v, err := readNodeColumn(filepath.Join(dir, "surfaces.csv"), "q_W_per_m2")
		return v, "q [W/m²]", err
	case colorBy == "ambient":
		v, err := readNodeColumn(matrix, "ambient")
		return v, sym + " to ambient", err
	case strings.HasPrefix(colorBy, "vf:"):
		node := strings.TrimPrefix(colorBy, "vf:")
		v, err := readNodeColumn(matrix, node)
		return v, sym + " to " + node, err
	}
	return nil, "", fmt.Errorf("%w %q: use surface, side, temperature, heat-flux, ambient or vf:NODE", ErrUnknownColoring, colorBy)
}

// MatchField checks that the values read from results folder dir are of
// these nodes: every name a node of the model and every node given. Results of
// another model, or of a facet-level run drawn on surface nodes, are
// refused instead of painted.
func MatchField(values map[string]float64, nodes []raytrace.Node, dir string) error {
	known := make(map[string]bool, len(nodes))
	for _, n := range nodes {
		known[n.Name] = true
	}
	for name := range values {
		if !known[name] {
			return fmt.Errorf("the results in %s are of another model: they have a node %q this model does not (a facet-level run, or other meshes?)", dir, name)
		}
	}
	if len(values) < len(nodes) {
		for _, n := range nodes {
			if _, ok := values[n.Name]; !ok {
				return fmt.Errorf("the results in %s are of another model: they have no value for node %s", dir, n.Name)
			}
		}
	}
	return nil
}
