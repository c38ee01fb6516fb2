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
	f.Add([]byte("[model]\nfiles = [\"" + mesh + "\"]\n[defaults]\nemissivity = 0.5\nspecular = 0.5\nsolar_absorptance = 0.3\nadiabatic = true\n" +
		"[surfaces.floor]\ntwo_sided = true\ntransmittance = 0.2\nsolar_transmittance = 0.4\n[[sun]]\nname = \"a\"\nazimuth = 10\nelevation = 20\nirradiance = 1000\n" +
		"[[sun]]\nname = \"b\"\ntoward = [0, 1, 1]\nirradiance = 500\n[sky]\nirradiance = 100\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		p := filepath.Join(dir, "c.toml")
		os.WriteFile(p, data, 0o644)
		openCase(p)
	})
}
