package main

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/hemiray/hemiray/raytrace"
)

// FuzzReadTallies: any tallies.csv either reads or fails with an error,
// never a panic, and what reads has non-negative counts.
func FuzzReadTallies(f *testing.F) {
	f.Add([]byte("replicate,from,to,count\nall,a,rays,10\nall,a,b,3\n0,a,ambient,2\nall,b,backface:s,1\n"))
	f.Add([]byte("replicate,from,to,count\nx,a,rays,-1\n"))
	nodes := []raytrace.Node{{Name: "a"}, {Name: "b"}}
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		os.WriteFile(filepath.Join(dir, tallyFile), data, 0o644)
		pooled, _, err := readTallies(dir, nodes, []string{"s"})
		if err != nil {
			return
		}
		for i := range nodes {
			if pooled.Rays[i] < 0 || pooled.Escaped[i] < 0 {
				t.Fatalf("negative count read: %+v", pooled)
			}
		}
	})
}

// FuzzReadCase: any case file either reads or fails with an error.
func FuzzReadCase(f *testing.F) {
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	f.Add([]byte("[model]\nfiles = [\"" + mesh + "\"]\n[defaults]\nemissivity = 0.5\n[surfaces.floor]\ntemperature = 300\n"))
	f.Add([]byte("[model]\nfiles = [\"" + mesh + "\"]\n[surfaces.\"floor.back\"]\nemissivity = 2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		p := filepath.Join(dir, "c.toml")
		os.WriteFile(p, data, 0o644)
		readCase(p)
	})
}
