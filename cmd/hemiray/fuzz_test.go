package main

import (
	"os"
	"path/filepath"
	"testing"
)

// FuzzReadCase: any case file either reads or fails with an error.
func FuzzReadCase(f *testing.F) {
	mesh, _ := filepath.Abs("../../testdata/cabinet_multi.stl")
	f.Add([]byte("[model]\nfiles = [\"" + mesh + "\"]\n[defaults]\nemissivity = 0.5\n[surfaces.floor]\ntemperature = 300\n"))
	f.Add([]byte("[model]\nfiles = [\"" + mesh + "\"]\n[surfaces.\"floor.back\"]\nemissivity = 2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		p := filepath.Join(dir, "c.toml")
		os.WriteFile(p, data, 0o644)
		openCase(p)
	})
}
