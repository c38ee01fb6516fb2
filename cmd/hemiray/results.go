package main

import (
	"fmt"
	"io"
	"path/filepath"
	"text/tabwriter"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// writeAnalysis writes the smoothed matrix, surfaces.csv and
// conductances.csv; it returns the names written.
func writeAnalysis(dir string, res *raytrace.Result, a *analysis) ([]string, error) {
	var written []string
	cols := columns(res)
	smoothedAt := func(i, j int) float64 {
		if j == res.Ambient() {
			return a.sm.Ambient[i]
		}
		for _, e := range a.sm.F[i] {
			if int(e.J) == j {
				return e.F
			}
		}
		return 0
	}
	if len(res.Nodes) <= squareLimit {
		err := writeCSV(filepath.Join(dir, "viewfactors_smoothed.csv"), func(emit func(...string)) error {
			emit(append([]string{"from"}, cols...)...)
			for i, n := range res.Nodes {
				rec := []string{n.Name}
				for j := range cols {
					rec = append(rec, num(smoothedAt(i, j)))
				}
				emit(rec...)
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		written = append(written, "viewfactors_smoothed.csv")
	}
	err := writeAtomic(filepath.Join(dir, "viewfactors_smoothed_pairs.csv"), func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = append(lw.buf, "from,to,F_raw,F_smoothed,moved_stderr\n"...)
		row := func(from, to string, raw, sm, moved float64) error {
			lw.name(from)
			lw.name(to)
			lw.float(raw)
			lw.float(sm)
			lw.float(moved)
			return lw.end()
		}
		open := res.HasAmbient()
		for i, n := range res.Nodes {
			hits := &res.Hits[i]
			for _, e := range a.sm.F[i] {
				if err := row(n.Name, cols[e.J], float64(hits.At(e.J))/float64(res.Rays[i]), e.F, e.Moved); err != nil {
					return err
				}
			}
			if open {
				if err := row(n.Name, "ambient", res.Factor(i, res.Ambient()).F, a.sm.Ambient[i], a.sm.MovedAmbient[i]); err != nil {
					return err
				}
			}
		}
		return lw.flush()
	})
	if err != nil {
		return nil, err
	}
	written = append(written, "viewfactors_smoothed_pairs.csv")
	err = writeCSV(filepath.Join(dir, "surfaces.csv"), func(emit func(...string)) error {
		emit("node", "area_m2", "emissivity", "condition", "condition_value", "T_K", "T_halfwidth_K", "J_W_per_m2", "q_W_per_m2", "Q_W", "Q_halfwidth_W")
		for i, n := range res.Nodes {
			th, qh := "", ""
			if a.THalf != nil {
				th, qh = num(a.THalf[i]), num(a.QHalf[i])
			}
			in := a.info[i]
			val := ""
			if in.Condition != "" && in.Condition != "adiabatic" && (len(in.Condition) < 6 || in.Condition[:6] != "shared") {
				val = num(in.Value)
			}
			emit(n.Name, num(n.Area), num(in.Emissivity), in.Condition, val, num(a.sol.T[i]), th, num(a.sol.J[i]), num(a.sol.Flux(i)), num(a.sol.Q[i]), qh)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	written = append(written, "surfaces.csv")
	if a.S != nil {
		err = writeCSV(filepath.Join(dir, "conductances.csv"), func(emit func(...string)) error {
			emit("from", "to", "exchange_factor", "conductance_W_per_K4")
			for i, n := range res.Nodes {
				for j := i + 1; j < len(res.Nodes); j++ {
					if s := a.S[i][j]; s > 0 {
						emit(n.Name, res.Nodes[j].Name, num(s/n.Area), num(exchange.Sigma*s))
					}
				}
				if res.HasAmbient() && a.toAmb[i] > 0 {
					emit(n.Name, "ambient", num(a.toAmb[i]/n.Area), num(exchange.Sigma*a.toAmb[i]))
				}
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		written = append(written, "conductances.csv")
	}
	return written, nil
}

// printAnalysis prints the heat balance per node with intervals.
func printAnalysis(w io.Writer, res *raytrace.Result, a *analysis) {
	if len(res.Nodes) > 50 {
		fmt.Fprintf(w, "%d nodes; see surfaces.csv\n", len(res.Nodes))
	} else {
		tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "node\temissivity\tcondition\tT [K]\t±\tQ [W]\t±\t")
		for i, n := range res.Nodes {
			th, qh := "-", "-"
			if a.THalf != nil {
				th, qh = fmt.Sprintf("%.2f", a.THalf[i]), fmt.Sprintf("%.4g", a.QHalf[i])
			}
			fmt.Fprintf(tw, "%s\t%.3g\t%s\t%.2f\t%s\t%.5g\t%s\t\n", n.Name, a.info[i].Emissivity, a.info[i].Condition, a.sol.T[i], th, a.sol.Q[i], qh)
		}
		tw.Flush()
	}
	sum := 0.0
	for _, q := range a.sol.Q {
		sum += q
	}
	if res.HasAmbient() {
		fmt.Fprintf(w, "\nnet heat leaving all nodes %.6g W; absorbed by the ambient (%.2f K) %.6g W; imbalance %.1e of the largest flow\n",
			sum, a.ambientT, a.sol.ToAmbient, a.sol.Imbalance)
	} else {
		fmt.Fprintf(w, "\nclosed model (no ray escaped): net heat of all nodes %.3g W, imbalance %.1e of the largest flow\n", sum, a.sol.Imbalance)
	}
	if a.Replicates > 0 {
		fmt.Fprintf(w, "± are %.0f%% t-intervals from %d independent replicates, each smoothed and solved\n", 100*res.Options.Confidence, a.Replicates)
	}
	fmt.Fprintf(w, "smoothing: reciprocity error %.2g → %.2g, summation error %.2g → %.2g, largest move %.2g standard errors\n",
		a.sm.ReciprocityBefore, a.sm.ReciprocityAfter, a.sm.SummationBefore, a.sm.SummationAfter, a.sm.MaxMoved)
}

// analysisSummary is what summary.json carries of an analysis.
func analysisSummary(a *analysis) map[string]any {
	return map[string]any{
		"smoothing": map[string]any{
			"method":             "constrained maximum likelihood (Daun, Morton & Howell 2005)",
			"reciprocity_before": a.sm.ReciprocityBefore, "reciprocity_after": a.sm.ReciprocityAfter,
			"summation_before": a.sm.SummationBefore, "summation_after": a.sm.SummationAfter,
			"max_moved_stderr": a.sm.MaxMoved, "newton_iterations": a.sm.Iterations,
		},
		"ambient_temperature_K": a.ambientT,
		"heat_to_ambient_W":     a.sol.ToAmbient,
		"energy_imbalance":      a.sol.Imbalance,
		"replicates":            a.Replicates,
		"notes":                 a.notes,
	}
}
