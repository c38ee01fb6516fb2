package report_test

import (
	"fmt"
	"os"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/report"
)

// Write puts every result file of an analysis into a folder; here the
// view factors are given rather than traced, so only the analysis files
// are written.
func ExampleWrite() {
	f := func(x float64) *float64 { return &x }
	in, _ := analysis.Open(&analysis.Case{
		Dir: "../../testdata", Model: analysis.ModelSpec{Files: []string{"cabinet_multi.stl"}},
		Ambient:  analysis.AmbientSpec{Temperature: f(290)},
		Defaults: analysis.SurfaceSpec{Emissivity: f(0.8), Temperature: f(350)},
	})
	a, err := in.AnalyseFactors([]analysis.Given{
		{From: "floor", To: "back_wall", F: 0.2}, {From: "floor", To: "ambient", F: 0.8},
		{From: "back_wall", To: "floor", F: 0.2}, {From: "back_wall", To: "ambient", F: 0.8},
	})
	if err != nil {
		panic(err)
	}
	dir, _ := os.MkdirTemp("", "hemiray-example")
	defer os.RemoveAll(dir)
	written, err := report.Write(dir, report.Outputs{Input: in, Analysis: a})
	fmt.Println(written, err)
	// Output:
	// [viewfactors_smoothed.csv viewfactors_smoothed_pairs.csv surfaces.csv viewfactors_smoothed.mtx conductances.mtx conductances.csv nodes.csv summary.json] <nil>
}
