package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/raytrace/report"
)

// --threads 1 and --threads 2 must write byte-identical view-factor files.
func TestTraceThreadsIdentical(t *testing.T) {
	dir := t.TempDir()
	var outs [2]string
	for k, th := range []string{"1", "2"} {
		outs[k] = filepath.Join(dir, "t"+th)
		code, _, errOut := runCLI("trace", "../../testdata/cabinet_multi.stl", "--rays", "20000", "--threads", th, "--quiet", "-o", outs[k])
		if code != 0 {
			t.Fatalf("trace --threads %s: exit %d: %s", th, code, errOut)
		}
	}
	for _, f := range []string{"viewfactors.csv", "viewfactors_halfwidth.csv", "viewfactors_pairs.csv"} {
		a, _ := os.ReadFile(filepath.Join(outs[0], f))
		b, _ := os.ReadFile(filepath.Join(outs[1], f))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between 1 and 2 threads", f)
		}
	}
	var s report.Summary
	b, _ := os.ReadFile(filepath.Join(outs[0], "summary.json"))
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	if s.RaysTraced != 40000 || s.InputHash == "" || len(s.Nodes) != 2 || len(s.Cautions) == 0 {
		t.Errorf("summary: %+v", s)
	}
}

func TestTraceBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(text), 0o644)
		return p
	}
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	tests := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"no input", []string{"trace"}, 2, "give a case file"},
		{"unknown key", []string{"trace", write("k.toml", "[model]\nfiles = [\""+mesh+"\"]\ncolour = 3\n")}, 1, "k.toml:3: unknown key \"model.colour\""},
		{"unknown surface", []string{"trace", write("s.toml", "[model]\nfiles = [\""+mesh+"\"]\n\n[surfaces.roof]\nemissivity = 0.5\n")}, 1, "s.toml:4: no surface \"roof\" in the model; its surfaces are: floor, back_wall"},
		{"bad emissivity", []string{"trace", write("e.toml", "[model]\nfiles = [\""+mesh+"\"]\n[surfaces.floor]\nemissivity = 1.5\n")}, 1, "e.toml:4: emissivity 1.5 is outside (0, 1]"},
		{"two conditions", []string{"trace", write("c.toml", "[model]\nfiles = [\""+mesh+"\"]\n[surfaces.floor]\ntemperature = 300\nadiabatic = true\n")}, 1, "c.toml:3: [surfaces.floor] sets 2 boundary conditions"},
		{"negative temperature", []string{"trace", write("t.toml", "[model]\nfiles = [\""+mesh+"\"]\n[defaults]\ntemperature = -4\n")}, 1, "t.toml:4: temperature -4 K must be positive"},
		{"syntax", []string{"trace", write("x.toml", "[model\nfiles = 1\n")}, 1, "x.toml:1:"},
		{"wrong type", []string{"trace", write("w.toml", "[model]\nfiles = [\""+mesh+"\"]\n[rays]\nper_node = \"many\"\n")}, 1, "w.toml:4: per_node: expected a whole number, found a TOML string"},
		{"BOM", []string{"trace", write("bom.toml", "\xef\xbb\xbf[model]\nfiles = [\""+mesh+"\"]\n[rays]\nper_node = -1\n")}, 1, "bom.toml:4: per_node must be positive"},
		{"missing mesh", []string{"trace", write("m.toml", "[model]\nfiles = [\"nope.stl\"]\n")}, 1, "nope.stl"},
		{"bad two-sided", []string{"trace", mesh, "--two-sided", "roof"}, 1, "two-sided surface \"roof\" is not in the model"},
		{"bad halfwidth", []string{"trace", mesh, "--halfwidth", "0.7"}, 2, "--halfwidth"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errOut := runCLI(append(tc.args, "--quiet", "-o", filepath.Join(dir, "out"))...)
			if code != tc.code || !strings.Contains(errOut, tc.want) {
				t.Errorf("exit %d, stderr %q; want exit %d containing %q", code, errOut, tc.code, tc.want)
			}
		})
	}
}

// The columns of the matrix files depend on the model, never on the draw:
// a closed box, where no ray escapes, still has the ambient column (all
// zeros), like an open model (design rule; common practice for schemas).
func TestAmbientColumnAlwaysPresent(t *testing.T) {
	dir := t.TempDir()
	box := writeBox(t, dir)
	out := filepath.Join(dir, "out")
	if code, _, e := runCLI("trace", box, "--rays", "2000", "--quiet", "-o", out); code != 0 {
		t.Fatal(e)
	}
	for _, f := range []string{"viewfactors.csv", "viewfactors_halfwidth.csv"} {
		lines := strings.Split(string(mustRead(t, filepath.Join(out, f))), "\n")
		if !strings.HasSuffix(lines[0], ",ambient") || !strings.HasSuffix(lines[1], ",0") && f == "viewfactors.csv" {
			t.Errorf("%s of a closed box: header %q, first row %q", f, lines[0], lines[1])
		}
	}
}

// --csv compact leaves out the per-pair CSVs and tallies.csv; the Matrix
// Market file carries the same matrix.
func TestCompactCSV(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "o")
	if code, _, e := runCLI("trace", "../../testdata/cabinet_multi.stl", "--rays", "2000", "--csv", "compact", "--quiet", "-o", out); code != 0 {
		t.Fatal(e)
	}
	for f, want := range map[string]bool{"viewfactors_pairs.csv": false, "tallies.csv": false, "viewfactors.mtx": true, "viewfactors.csv": true, "nodes.csv": true} {
		if _, err := os.Stat(filepath.Join(out, f)); (err == nil) != want {
			t.Errorf("%s written: %v, want %v", f, err == nil, want)
		}
	}
	if code, _, e := runCLI("trace", "../../testdata/cabinet_multi.stl", "--csv", "some", "-o", out); code != 2 || !strings.Contains(e, "--csv") {
		t.Errorf("--csv some: exit %d, %q", code, e)
	}
}
