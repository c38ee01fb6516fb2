package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func runCLI(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = run(context.Background(), args, &o, &e)
	return code, o.String(), e.String()
}

func TestInspectTable(t *testing.T) {
	code, out, errOut := runCLI("inspect", "../../testdata/cabinet_multi.stl", "--units", "cm")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	// 40 cm × 30 cm floor = 0.12 m²; 40 cm × 25 cm wall = 0.1 m² ... in cm units: ×1e-4.
	for _, want := range []string{"floor", "back_wall", "1.2e-05", "1e-05", "closed: no", "edge(s) belong to only one facet"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestInspectJSON(t *testing.T) {
	code, out, _ := runCLI("inspect", "--json", "../../testdata/duct_bend.obj")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var r struct {
		Files []struct {
			Ignored map[string]int `json:"ignored_lines"`
		} `json:"files"`
		Surfaces []struct {
			Name string  `json:"name"`
			Area float64 `json:"area_m2"`
		} `json:"surfaces"`
		Total float64 `json:"total_area_m2"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, out)
	}
	if len(r.Surfaces) != 3 || r.Surfaces[1].Name != "end_plate" || r.Surfaces[1].Area != 3 || r.Total != 7.5 {
		t.Errorf("surfaces %+v total %v", r.Surfaces, r.Total)
	}
	if r.Files[0].Ignored["vt"] != 1 {
		t.Errorf("ignored = %v", r.Files[0].Ignored)
	}
}

func TestInspectBadInputExits(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.obj")
	os.WriteFile(bad, []byte("v 0 0 0\nf 1 2 3\n"), 0o644)
	tests := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"inspect", bad}, 1, "bad.obj:2: face refers to vertex 2"},
		{[]string{"inspect", dir}, 1, "unknown mesh format"},
		{[]string{"inspect", "--units", "yd", bad}, 2, `unknown length unit "yd"`},
		{[]string{"inspect"}, 2, "no mesh files"},
		{[]string{"inspect", "--nope", bad}, 2, "flag provided but not defined"},
		{[]string{"frobnicate"}, 2, "unknown command"},
	}
	for _, tc := range tests {
		code, _, errOut := runCLI(tc.args...)
		if code != tc.code || !strings.Contains(errOut, tc.want) || strings.Contains(errOut, "panic") {
			t.Errorf("hemiray %v: exit %d, stderr %q; want exit %d containing %q", tc.args, code, errOut, tc.code, tc.want)
		}
	}
}

// Each command's help lists its own flags only, and version answers.
func TestHelpPerCommand(t *testing.T) {
	_, out, _ := runCLI("help", "render")
	if strings.Contains(out, "-rays") || strings.Contains(out, "-shard") || !strings.Contains(out, "-size") || !strings.Contains(out, "picture file") {
		t.Errorf("help render:\n%s", out)
	}
	_, out, _ = runCLI("help", "solve")
	if strings.Contains(out, "-shard") || strings.Contains(out, "-units") || !strings.Contains(out, "-viewfactors") {
		t.Errorf("help solve:\n%s", out)
	}
	if code, out, _ := runCLI("version"); code != 0 || !strings.HasPrefix(out, "hemiray 0.") {
		t.Errorf("version: exit %d, %q", code, out)
	}
}

// inspect reads a case file (its meshes as the case reads them) and, with
// --json, reports an error as JSON on stdout with exit status 1.
func TestInspectCaseAndJSONErrors(t *testing.T) {
	dir := t.TempDir()
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	cs := filepath.Join(dir, "c.toml")
	os.WriteFile(cs, []byte("[model]\nfiles = [\""+mesh+"\"]\n[model.rename]\nfloor = \"base\"\n"), 0o644)
	if code, out, e := runCLI("inspect", cs); code != 0 || !strings.Contains(out, "base") {
		t.Errorf("inspect CASE: exit %d, %q, %q", code, out, e)
	}
	code, out, _ := runCLI("inspect", "--json", filepath.Join(dir, "missing.obj"))
	var v struct{ Error string }
	if err := json.Unmarshal([]byte(out), &v); code != 1 || err != nil || v.Error == "" {
		t.Errorf("inspect --json of a missing file: exit %d, %q (%v)", code, out, err)
	}
}
