package report

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
)

// givenCabinet analyses the open cabinet of testdata with view factors
// given by hand (no tracing): floor and back wall at right angles.
func givenCabinet(t *testing.T) (*analysis.Input, *analysis.Result) {
	t.Helper()
	f := func(x float64) *float64 { return &x }
	in, err := analysis.Open(&analysis.Case{
		Dir: "../../testdata", Model: analysis.ModelSpec{Files: []string{"cabinet_multi.stl"}},
		Ambient:  analysis.AmbientSpec{Temperature: f(290)},
		Defaults: analysis.SurfaceSpec{Emissivity: f(0.8), Temperature: f(350)},
	})
	if err != nil {
		t.Fatal(err)
	}
	a, err := in.AnalyseFactors([]analysis.Given{
		{From: "floor", To: "back_wall", F: 0.2}, {From: "floor", To: "ambient", F: 0.8},
		{From: "back_wall", To: "floor", F: 0.2}, {From: "back_wall", To: "ambient", F: 0.8},
	})
	if err != nil {
		t.Fatal(err)
	}
	return in, a
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

// What Write writes reads back exactly: the numbers of surfaces.csv are the
// solution's to the bit (shortest round-trip text), the smoothed matrix has
// the ambient column, and summary.json carries the cautions.
func TestWriteReadsBack(t *testing.T) {
	in, a := givenCabinet(t)
	dir := t.TempDir()
	written, err := Write(dir, Outputs{Input: in, Analysis: a})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(written, ","), "surfaces.csv") {
		t.Errorf("written: %v", written)
	}
	s := readCSV(t, filepath.Join(dir, "surfaces.csv"))
	col := func(name string) int { return slices.Index(s[0], name) }
	for i, n := range a.Nodes {
		row := s[i+1]
		T, _ := strconv.ParseFloat(row[col("T_K")], 64)
		Q, _ := strconv.ParseFloat(row[col("Q_W")], 64)
		if c, _ := strconv.ParseFloat(row[col("T_C")], 64); math.Abs(c-(T-273.15)) > 1e-9 || row[col("T_set_K")] != "350" {
			t.Errorf("T_C %v for T_K %v, T_set_K %q", c, T, row[col("T_set_K")])
		}
		if row[0] != n.Name || T != a.Solution.T[i] || Q != a.Solution.Q[i] {
			t.Errorf("surfaces.csv row %v; solution T %v Q %v", row, a.Solution.T[i], a.Solution.Q[i])
		}
	}
	m := readCSV(t, filepath.Join(dir, "viewfactors_smoothed.csv"))
	if got := strings.Join(m[0], ","); got != "from,floor,back_wall,ambient" {
		t.Errorf("smoothed header %q", got)
	}
	var sum Summary
	b, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err := json.Unmarshal(b, &sum); err != nil || len(sum.Cautions) == 0 || !sum.Complete {
		t.Errorf("summary.json: %v, %+v", err, sum)
	}
}

// MatchField accepts the values of the model's own nodes only.
func TestMatchField(t *testing.T) {
	nodes := []raytrace.Node{{Name: "a"}, {Name: "b"}}
	tests := []struct {
		values map[string]float64
		ok     bool
	}{
		{map[string]float64{"a": 1, "b": 2}, true},
		{map[string]float64{"a": 1}, false},
		{map[string]float64{"a": 1, "b": 2, "a#0": 3}, false},
	}
	for _, tc := range tests {
		if err := MatchField(tc.values, nodes, "dir"); (err == nil) != tc.ok {
			t.Errorf("%v: %v", tc.values, err)
		}
	}
}
