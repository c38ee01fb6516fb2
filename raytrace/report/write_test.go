package report

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"os/exec"
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

// The Matrix Market files read back with an independent reader, SciPy's
// scipy.io.mmread, when Debian's python3-scipy is installed (CI installs
// it): the smoothed matrix and the conductances equal the analysis's, the
// conductances symmetric with the ambient last.
func TestMatrixMarketReadsBack(t *testing.T) {
	in, a := givenCabinet(t)
	dir := t.TempDir()
	if _, err := Write(dir, Outputs{Input: in, Analysis: a}); err != nil {
		t.Fatal(err)
	}
	py := "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		t.Skip("no system python3")
	}
	script := `import sys, scipy.io
F = scipy.io.mmread(sys.argv[1]).toarray(); G = scipy.io.mmread(sys.argv[2]).toarray()
print(F.shape[0], F.shape[1], G.shape[0], repr(F[0][1]), repr(F[1][2]), repr(G[1][0]), repr(G[0][1]), repr(G[2][0]))`
	out, err := exec.Command(py, "-c", script, filepath.Join(dir, "viewfactors_smoothed.mtx"), filepath.Join(dir, "conductances.mtx")).CombinedOutput()
	if err != nil {
		if strings.Contains(string(out), "No module named") {
			if os.Getenv("HEMIRAY_SCIPY_REQUIRED") == "1" {
				t.Fatalf("python3-scipy required: %s", out)
			}
			t.Skip("python3-scipy not installed: Matrix Market read-back skipped")
		}
		t.Fatalf("scipy: %v\n%s", err, out)
	}
	f := strings.Fields(string(out))
	val := func(k int) float64 { x, _ := strconv.ParseFloat(f[k], 64); return x }
	sigma := 5.670374419e-8
	c := a.Conductors
	if f[0] != "2" || f[1] != "3" || f[2] != "3" ||
		val(3) != a.Smoothed.F[0].At(1) || val(4) != a.Smoothed.Ambient[1] ||
		val(5) != sigma*c.Lower[1].At(0) || val(6) != val(5) || val(7) != sigma*c.ToAmbient[0] {
		t.Errorf("scipy reads %v; want F01 %v, F1amb %v, G10 = G01 = %v, G amb0 %v",
			f, a.Smoothed.F[0].At(1), a.Smoothed.Ambient[1], sigma*c.Lower[1].At(0), sigma*c.ToAmbient[0])
	}
}
