package report

import (
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// writeSurfaces writes surfaces.csv: per node its inputs and results.
func writeSurfaces(dir string, a *analysis.Result) error {
	return writeCSV(filepath.Join(dir, "surfaces.csv"), func(emit func(...string)) error {
		emit("node", "area_m2", "emissivity", "condition", "condition_value", "T_K", "T_halfwidth_K", "J_W_per_m2", "q_W_per_m2", "Q_W", "Q_halfwidth_W")
		for i, n := range a.Nodes {
			th, qh := "", ""
			if a.THalf != nil {
				th, qh = num(a.THalf[i]), num(a.QHalf[i])
			}
			in := a.Info[i]
			val := ""
			if in.Condition != "adiabatic" && !strings.HasPrefix(in.Condition, "shared") {
				val = num(in.Value)
			}
			emit(n.Name, num(n.Area), num(in.Emissivity), in.Condition, val, num(a.Solution.T[i]), th,
				num(a.Solution.J[i]), num(a.Solution.Flux(i)), num(a.Solution.Q[i]), qh)
		}
		return nil
	})
}

// writeConductances writes conductances.csv: one symmetric conductor per
// pair with a non-zero total exchange factor, and each node's to the
// ambient.
func writeConductances(dir string, a *analysis.Result) error {
	return writeCSV(filepath.Join(dir, "conductances.csv"), func(emit func(...string)) error {
		emit("from", "to", "exchange_factor", "conductance_W_per_K4")
		for i, n := range a.Nodes {
			for j := i + 1; j < len(a.Nodes); j++ {
				if s := a.S[i][j]; s > 0 {
					emit(n.Name, a.Nodes[j].Name, num(s/n.Area), num(exchange.Sigma*s))
				}
			}
			if a.Open && a.ToAmbient[i] > 0 {
				emit(n.Name, "ambient", num(a.ToAmbient[i]/n.Area), num(exchange.Sigma*a.ToAmbient[i]))
			}
		}
		return nil
	})
}
