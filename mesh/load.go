package mesh

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// LoadOptions apply to every file of a Load.
type LoadOptions struct {
	Unit            Unit // length unit of the files; "" means metres
	GroupByMaterial bool // OBJ: a surface per usemtl material instead of per group
}

// LoadFile reads one STL or OBJ file, chosen by its extension.
func LoadFile(path string, opts LoadOptions) (*Mesh, error) {
	unit := opts.Unit
	if unit == "" {
		unit = Metre
	}
	if unit.Metres() == 0 {
		return nil, fmt.Errorf("%s: unknown length unit %q (use m, cm, mm, in or ft)", path, opts.Unit)
	}
	ext := strings.ToLower(filepath.Ext(path))
	if ext != ".stl" && ext != ".obj" {
		return nil, fmt.Errorf("%s: unknown mesh format %q (hemiray reads .stl and .obj)", path, ext)
	}
	// Check before opening: opening a FIFO blocks, and a device such as
	// /dev/zero never ends.
	if st, err := os.Stat(path); err != nil {
		return nil, err
	} else if st.IsDir() {
		return nil, &ParseError{Path: path, Err: errors.New("is a directory, not a mesh file")}
	} else if !st.Mode().IsRegular() {
		return nil, &ParseError{Path: path, Err: errors.New("is not a regular file (a pipe or a device?)")}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	if ext == ".stl" {
		return ReadSTL(f, path, unit)
	}
	return ReadOBJ(f, path, OBJOptions{Unit: unit, GroupByMaterial: opts.GroupByMaterial})
}

// Load reads several files into one mesh. A surface name defined by two
// files is an error naming both.
func Load(paths []string, opts LoadOptions) (*Mesh, error) {
	if len(paths) == 0 {
		return nil, errors.New("no mesh files given")
	}
	all := &Mesh{}
	for _, p := range paths {
		m, err := LoadFile(p, opts)
		if err != nil {
			return nil, err
		}
		if err := all.Append(m); err != nil {
			return nil, err
		}
	}
	return all, nil
}
