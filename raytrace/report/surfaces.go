package report

import (
	"math"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/internal/sparse"
)

// SurfaceColumns is the header of surfaces.csv: one quantity and one unit
// per column. A node's given condition is in the column of its kind
// (T_set_K, q_set_W_per_m2 or Q_set_W), the others empty.
var SurfaceColumns = []string{"node", "area_m2", "emissivity", "condition", "T_set_K", "q_set_W_per_m2", "Q_set_W",
	"T_K", "T_C", "T_halfwidth_K", "J_W_per_m2", "q_W_per_m2", "Q_W", "Q_halfwidth_W"}

// writeSurfaces writes surfaces.csv: per node its inputs and results (with
// suns, those of the first sun's steady state).
func writeSurfaces(dir string, a *analysis.Result) error {
	var sun *analysis.SunState
	if len(a.Suns) > 0 {
		sun = &a.Suns[0]
	}
	return writeSurfacesFile(filepath.Join(dir, "surfaces.csv"), a, sun)
}

// writeSurfacesFile writes one steady state: a's, or sun's when given
// (then with the absorbed solar power in two more columns).
func writeSurfacesFile(path string, a *analysis.Result, sun *analysis.SunState) error {
	sol, THalf, QHalf := a.Solution, a.THalf, a.QHalf
	if sun != nil {
		sol, THalf, QHalf = sun.Solution, sun.THalf, sun.QHalf
	}
	return writeCSV(path, func(emit func(...string)) error {
		head := SurfaceColumns
		if sun != nil {
			head = append(append([]string{}, head...), "solar_W", "solar_halfwidth_W")
		}
		emit(head...)
		for i, n := range a.Nodes {
			th, qh := "", ""
			if THalf != nil {
				th, qh = num(THalf[i]), num(QHalf[i])
			}
			in := a.Info[i]
			set := make([]string, 3) // T, q, Q given
			switch {
			case strings.HasPrefix(in.Condition, "temperature"):
				set[0] = num(in.Value)
			case strings.HasPrefix(in.Condition, "heat_flux"):
				set[1] = num(in.Value)
			case strings.HasPrefix(in.Condition, "heat_flow"):
				set[2] = num(in.Value)
			}
			T := sol.T[i]
			rec := []string{n.Name, num(n.Area), num(in.Emissivity), in.Condition, set[0], set[1], set[2], num(T), num(celsius(T)), th,
				optional(sol.J[i]), num(sol.Flux(i)), num(sol.Q[i]), qh}
			if sun != nil {
				rec = append(rec, num(sun.Load[i]), num(sun.LoadHalf[i]))
			}
			emit(rec...)
		}
		return nil
	})
}

// optional writes NaN, a value that has no meaning for the node (the
// radiosity of a node in an absorption-factor solve), as an empty cell.
func optional(x float64) string {
	if math.IsNaN(x) {
		return ""
	}
	return num(x)
}

// celsius converts kelvin to degrees Celsius (T − 273.15 K, SI brochure,
// 9th ed., 2019), rounded to 1e-9 K so that 308 K reads 34.85, not
// 34.850000000000023.
func celsius(T float64) float64 { return math.Round((T-273.15)*1e9) / 1e9 }

// writeConductances writes conductances.csv: one symmetric conductor per
// pair with a non-zero total exchange factor, and each node's to the
// ambient.
func writeConductances(dir string, a *analysis.Result) error {
	return writeCSV(filepath.Join(dir, "conductances.csv"), func(emit func(...string)) error {
		emit("from", "to", "exchange_factor", "conductance_W_per_K4")
		c := a.Conductors
		upper := sparse.Transpose(c.Lower) // row i: the conductors to j > i
		for i, n := range a.Nodes {
			for k, j := range upper[i].Col {
				s := upper[i].Val[k]
				emit(n.Name, a.Nodes[j].Name, num(s/n.Area), num(exchange.Sigma*s))
			}
			if a.Open && c.ToAmbient[i] > 0 {
				emit(n.Name, "ambient", num(c.ToAmbient[i]/n.Area), num(exchange.Sigma*c.ToAmbient[i]))
			}
		}
		return nil
	})
}
