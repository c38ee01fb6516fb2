package mesh

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
)

// CellArray is per-facet data for WriteVTP: Int, Float or String, one
// value per facet.
type CellArray struct {
	Name   string
	Int    []int32
	Float  []float64
	String []string
}

// WriteVTP writes m as a VTK XML PolyData file (the .vtp format of the
// public VTK file-format specification, "VTK File Formats", XML PolyData),
// ASCII-encoded, with one triangle per facet and the given cell arrays,
// so that ParaView and other VTK readers open it directly. comment, if not
// empty, is written as an XML comment (e.g. the surface names).
func WriteVTP(w io.Writer, m *Mesh, cells []CellArray, comment string) error {
	for _, c := range cells {
		if n := max(len(c.Int), len(c.Float), len(c.String)); n != len(m.Facets) {
			return fmt.Errorf("vtp: cell array %s has %d values for %d facets", c.Name, n, len(m.Facets))
		}
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintln(bw, `<?xml version="1.0"?>`)
	if comment != "" {
		fmt.Fprintf(bw, "<!-- %s -->\n", xmlComment(comment))
	}
	fmt.Fprintln(bw, `<VTKFile type="PolyData" version="0.1" byte_order="LittleEndian">`)
	fmt.Fprintln(bw, `  <PolyData>`)
	fmt.Fprintf(bw, "    <Piece NumberOfPoints=\"%d\" NumberOfVerts=\"0\" NumberOfLines=\"0\" NumberOfStrips=\"0\" NumberOfPolys=\"%d\">\n", len(m.Vertices), len(m.Facets))
	fmt.Fprintln(bw, `      <Points>`)
	fmt.Fprintln(bw, `        <DataArray type="Float64" NumberOfComponents="3" format="ascii">`)
	var buf []byte
	for _, v := range m.Vertices {
		bw.Write(appendVec(buf[:0], v))
	}
	fmt.Fprintln(bw, `        </DataArray>`)
	fmt.Fprintln(bw, `      </Points>`)
	fmt.Fprintln(bw, `      <Polys>`)
	fmt.Fprintln(bw, `        <DataArray type="Int32" Name="connectivity" format="ascii">`)
	for _, f := range m.Facets {
		fmt.Fprintf(bw, "%d %d %d\n", f[0], f[1], f[2])
	}
	fmt.Fprintln(bw, `        </DataArray>`)
	fmt.Fprintln(bw, `        <DataArray type="Int32" Name="offsets" format="ascii">`)
	for i := range m.Facets {
		fmt.Fprintln(bw, 3*(i+1))
	}
	fmt.Fprintln(bw, `        </DataArray>`)
	fmt.Fprintln(bw, `      </Polys>`)
	fmt.Fprintln(bw, `      <CellData>`)
	for _, c := range cells {
		if c.String != nil {
			// VTK's ASCII form of a string array: each string as its byte
			// values, ended by a 0 (what vtkXMLWriter itself writes).
			fmt.Fprintf(bw, "        <Array type=\"String\" Name=\"%s\" format=\"ascii\">\n", c.Name)
			for _, x := range c.String {
				for i := 0; i < len(x); i++ {
					if x[i] != 0 {
						bw.Write(strconv.AppendInt(buf[:0], int64(x[i]), 10))
						bw.WriteByte(' ')
					}
				}
				bw.WriteString("0\n")
			}
			fmt.Fprintln(bw, `        </Array>`)
			continue
		}
		if c.Int != nil {
			fmt.Fprintf(bw, "        <DataArray type=\"Int32\" Name=\"%s\" format=\"ascii\">\n", c.Name)
			for _, x := range c.Int {
				fmt.Fprintln(bw, x)
			}
		} else {
			fmt.Fprintf(bw, "        <DataArray type=\"Float64\" Name=\"%s\" format=\"ascii\">\n", c.Name)
			for _, x := range c.Float {
				bw.Write(append(strconv.AppendFloat(buf[:0], x, 'g', -1, 64), '\n'))
			}
		}
		fmt.Fprintln(bw, `        </DataArray>`)
	}
	fmt.Fprintln(bw, `      </CellData>`)
	fmt.Fprintln(bw, `    </Piece>`)
	fmt.Fprintln(bw, `  </PolyData>`)
	fmt.Fprintln(bw, `</VTKFile>`)
	return bw.Flush()
}

// xmlComment makes s safe inside <!-- -->.
func xmlComment(s string) string {
	out := []byte{}
	for i := 0; i < len(s); i++ {
		if s[i] == '-' && i+1 < len(s) && s[i+1] == '-' {
			out = append(out, '-', ' ')
			continue
		}
		out = append(out, s[i])
	}
	return string(out)
}
