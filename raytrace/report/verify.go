package report

import (
	"fmt"
	"io"
	"path/filepath"
	"text/tabwriter"

	"github.com/hemiray/hemiray/raytrace"
)

// WriteVerify writes the reference checks into dir/verify.csv.
func WriteVerify(dir string, checks []raytrace.ReferenceCheck) error {
	return writeCSV(filepath.Join(dir, "verify.csv"), func(emit func(...string)) error {
		emit("case", "from", "to", "reference", "source", "estimate", "stderr", "halfwidth", "tessellation_bound", "bound_derivation", "deviation_sigma", "pass")
		for _, ch := range checks {
			emit(ch.Name, ch.From, ch.To, num(ch.Reference), ch.Source, num(ch.Estimate.F), num(ch.Estimate.StdErr),
				num(ch.Estimate.HalfWidth), num(ch.Bound), ch.Why, num(ch.Score), fmt.Sprint(ch.Pass))
		}
		return nil
	})
}

// VerifyTable prints the table of reference checks and returns the number of failures.
func VerifyTable(w io.Writer, checks []raytrace.ReferenceCheck) int {
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "case\tpair\treference\testimate\t± (95%)\tbound\tdeviation\tresult\t")
	failed := 0
	for _, ch := range checks {
		res := "pass"
		if !ch.Pass {
			res = "FAIL"
			failed++
		}
		fmt.Fprintf(tw, "%s\t%s → %s\t%.5f\t%.5f\t%.5f\t%.1e\t%.1fσ\t%s\t\n", ch.Name, ch.From, ch.To, ch.Reference, ch.Estimate.F, ch.Estimate.HalfWidth, ch.Bound, ch.Score, res)
	}
	tw.Flush()
	fmt.Fprintln(w, "\nsources:")
	for _, ch := range checks {
		fmt.Fprintf(w, "  %s: %s; bound: %s\n", ch.Name, ch.Source, ch.Why)
	}
	return failed
}
