package main

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// update rewrites the golden files: go test ./cmd/hemiray -run Golden -update.
// Review the diff before committing it: a changed golden file is a changed
// result for every user.
var update = flag.Bool("update", false, "rewrite the golden output files in testdata/demo")

// The demo's CSV and Matrix Market outputs, byte for byte. Any change to sampling, tallying,
// smoothing, the solve or the writers shows up here as a reviewed diff.
func TestDemoGolden(t *testing.T) {
	if testing.Short() {
		t.Skip("the demo traces 4 million rays")
	}
	dir := t.TempDir()
	if code, out, errOut := runCLI("demo", "-o", dir, "--quiet", "--no-pictures"); code != 0 {
		t.Fatalf("demo: exit %d\n%s\n%s", code, out, errOut)
	}
	results := filepath.Join(dir, "results")
	got, _ := filepath.Glob(filepath.Join(results, "*.csv"))
	mtx, _ := filepath.Glob(filepath.Join(results, "*.mtx"))
	got = append(got, mtx...)
	golden := filepath.Join("testdata", "demo")
	if *update {
		os.RemoveAll(golden)
		os.MkdirAll(golden, 0o755)
		for _, f := range got {
			if err := os.WriteFile(filepath.Join(golden, filepath.Base(f)), mustRead(t, f), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		return
	}
	want, _ := filepath.Glob(filepath.Join(golden, "*.csv"))
	wantMTX, _ := filepath.Glob(filepath.Join(golden, "*.mtx"))
	want = append(want, wantMTX...)
	if len(want) == 0 || len(want) != len(got) {
		t.Fatalf("demo wrote %d CSV files, %d golden ones (run with -update to create them)", len(got), len(want))
	}
	for _, w := range want {
		name := filepath.Base(w)
		g := mustRead(t, filepath.Join(results, name))
		if bytes.Equal(g, mustRead(t, w)) {
			continue
		}
		gl, wl := strings.Split(string(g), "\n"), strings.Split(string(mustRead(t, w)), "\n")
		for i := range min(len(gl), len(wl)) {
			if gl[i] != wl[i] {
				t.Errorf("%s differs from the golden file at line %d:\n got  %s\n want %s", name, i+1, gl[i], wl[i])
				break
			}
		}
		if len(gl) != len(wl) {
			t.Errorf("%s has %d lines, the golden file %d", name, len(gl), len(wl))
		}
	}
}
