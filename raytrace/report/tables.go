package report

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
)

// NodeTable prints one line per node: area, rays, row sum, escape fraction
// and the widest interval of its row.
func NodeTable(w io.Writer, res *raytrace.Result) {
	if len(res.Nodes) > 50 {
		fmt.Fprintf(w, "%d nodes; per-node figures are in summary.json\n", len(res.Nodes))
		return
	}
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "node\tarea_m2\trays\tto_ambient\tmax_halfwidth\trow_sum\t")
	for i, n := range res.Nodes {
		amb := fmt.Sprintf("%.4f", res.Factor(i, res.Ambient()).F)
		fmt.Fprintf(tw, "%s\t%.6g\t%d\t%s\t%.2g\t%.6f\t\n", n.Name, n.Area, res.Rays[i], amb, res.RowHalfWidth(i), res.RowSum(i))
	}
	tw.Flush()
}

// HeatBalance prints the heat balance per node with intervals, and the
// smoothing diagnostics.
func HeatBalance(w io.Writer, a *analysis.Result) {
	if len(a.Nodes) > 50 {
		fmt.Fprintf(w, "%d nodes; see surfaces.csv\n", len(a.Nodes))
	} else {
		tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "node\temissivity\tcondition\tT [K]\t±\tQ [W]\t±\t")
		for i, n := range a.Nodes {
			th, qh := "-", "-"
			if a.THalf != nil {
				th, qh = fmt.Sprintf("%.3g", a.THalf[i]), fmt.Sprintf("%.4g", a.QHalf[i])
			}
			fmt.Fprintf(tw, "%s\t%.3g\t%s\t%.2f\t%s\t%.5g\t%s\t\n", n.Name, a.Info[i].Emissivity, a.Info[i].Condition, a.Solution.T[i], th, a.Solution.Q[i], qh)
		}
		tw.Flush()
	}
	sum := 0.0
	for _, q := range a.Solution.Q {
		sum += q
	}
	switch {
	case a.Solution.Absorbed != 0:
		fmt.Fprintf(w, "\nnet heat leaving all nodes %.6g W and sunlight they absorb %.6g W; absorbed by the ambient (%.2f K) %.6g W; imbalance %.1e of the largest flow\n",
			sum, a.Solution.Absorbed, a.AmbientT, a.Solution.ToAmbient, a.Solution.Imbalance)
	case a.Open:
		fmt.Fprintf(w, "\nnet heat leaving all nodes %.6g W; absorbed by the ambient (%.2f K) %.6g W; imbalance %.1e of the largest flow\n",
			sum, a.AmbientT, a.Solution.ToAmbient, a.Solution.Imbalance)
	default:
		fmt.Fprintf(w, "\nclosed model (no ray escaped): net heat of all nodes %.3g W, imbalance %.1e of the largest flow\n", sum, a.Solution.Imbalance)
	}
	sunLines(w, a)
	if a.Replicates > 0 {
		fmt.Fprintf(w, "± are %.0f%% t-intervals from %d independent replicates, each smoothed and solved\n", 100*a.Confidence, a.Replicates)
	}
	moved := fmt.Sprintf(", largest move %.2g standard errors", a.Smoothed.MaxMoved)
	if math.IsNaN(a.Smoothed.MaxMoved) {
		moved = " (given factors: no standard errors)"
	}
	fmt.Fprintf(w, "smoothing: reciprocity error %.2g → %.2g, summation error %.2g → %.2g%s\n",
		a.Smoothed.ReciprocityBefore, a.Smoothed.ReciprocityAfter, a.Smoothed.SummationBefore, a.Smoothed.SummationAfter, moved)
}
