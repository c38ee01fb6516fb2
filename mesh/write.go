package mesh

import (
	"bufio"
	"fmt"
	"io"
	"strconv"

	"github.com/hschendel/stl"

	"github.com/hemiray/hemiray/geometry"
)

// WriteSTL writes m as one binary STL solid named name. Surfaces are not
// kept (binary STL has one solid); coordinates are rounded to float32.
func WriteSTL(w io.Writer, m *Mesh, name string) error {
	s := stl.Solid{Name: name, Triangles: make([]stl.Triangle, len(m.Facets))}
	for f := range m.Facets {
		t := m.Triangle(f)
		n := t.Normal()
		s.Triangles[f] = stl.Triangle{
			Normal: stl.Vec3{float32(n.X), float32(n.Y), float32(n.Z)},
			Vertices: [3]stl.Vec3{
				{float32(t.V0.X), float32(t.V0.Y), float32(t.V0.Z)},
				{float32(t.V1.X), float32(t.V1.Y), float32(t.V1.Z)},
				{float32(t.V2.X), float32(t.V2.Y), float32(t.V2.Z)},
			},
		}
	}
	bw := bufio.NewWriter(w)
	if err := s.WriteAll(bw); err != nil {
		return err
	}
	return bw.Flush()
}

// WriteOBJ writes m as an OBJ file in metres with one g group per surface.
// Coordinates are written with the shortest text that reads back exactly.
func WriteOBJ(w io.Writer, m *Mesh) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %d vertices, %d facets, %d surfaces; units: m\n", len(m.Vertices), len(m.Facets), len(m.Surfaces))
	var buf []byte
	for _, v := range m.Vertices {
		bw.Write(appendVec(append(buf[:0], "v "...), v))
	}
	for _, s := range m.Surfaces {
		fmt.Fprintf(bw, "g %s\n", s.Name)
		for _, f := range s.Facets {
			v := m.Facets[f]
			fmt.Fprintf(bw, "f %d %d %d\n", v[0]+1, v[1]+1, v[2]+1)
		}
	}
	return bw.Flush()
}

// appendVec appends "x y z\n" with the shortest exact text of each value.
func appendVec(buf []byte, v geometry.Vec3) []byte {
	buf = strconv.AppendFloat(buf, v.X, 'g', -1, 64)
	buf = append(buf, ' ')
	buf = strconv.AppendFloat(buf, v.Y, 'g', -1, 64)
	buf = append(buf, ' ')
	buf = strconv.AppendFloat(buf, v.Z, 'g', -1, 64)
	return append(buf, '\n')
}
