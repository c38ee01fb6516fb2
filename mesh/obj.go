package mesh

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/hemiray/hemiray/geometry"
)

// OBJOptions controls how an OBJ file becomes surfaces.
type OBJOptions struct {
	Unit Unit
	// GroupByMaterial makes each usemtl material a surface instead of each
	// g/o group (for exports that put a whole part in one group).
	GroupByMaterial bool
}

// ReadOBJ reads the polygons of a Wavefront OBJ file from r. name is the
// file's path, used in messages and as the surface of facets before any
// group. Polygons with more than three corners are triangulated by ear
// clipping on their best-fit plane, so concave outlines come out right.
// Texture coordinates, normals and other lines that carry no geometry are
// counted in Source.Ignored and otherwise skipped.
func ReadOBJ(r io.Reader, name string, opts OBJOptions) (*Mesh, error) {
	scale := opts.Unit.Metres()
	if scale == 0 {
		return nil, fmt.Errorf("%s: unknown length unit %q", name, opts.Unit)
	}
	p := objParser{
		name:  name,
		scale: scale,
		opts:  opts,
		b:     newBuilder(&Source{Path: name, Format: "obj", Unit: opts.Unit, Ignored: map[string]int{}}),
	}
	if err := p.parse(r); err != nil {
		return nil, err
	}
	if len(p.b.m.Facets) == 0 {
		if p.lines == 0 {
			return nil, &ParseError{Path: name, Err: errors.New("empty file")}
		}
		return nil, &ParseError{Path: name, Err: errors.New("no faces (f lines) in OBJ file")}
	}
	return p.b.finish(), nil
}

// maxLine bounds one OBJ line (or statement continued with \), so that a
// file without line breaks cannot take unbounded memory.
const maxLine = 64 << 20

// utf8BOM is the byte-order mark some editors put before the first line.
var utf8BOM = []byte("\xef\xbb\xbf")

// maxPolygon bounds the corners of one OBJ face: ear clipping takes time
// quadratic in the corners (cubic for pathological outlines).
const maxPolygon = 10000

type objParser struct {
	name  string
	scale float64
	opts  OBJOptions
	b     *builder
	lines int
	line  int32 // line of the statement being parsed (its first line if continued)
	poly  []int32
	tri   earClipper
}

func (p *objParser) errorf(format string, args ...any) error {
	return &ParseError{Path: p.name, Line: int(p.line), Err: fmt.Errorf(format, args...)}
}

func (p *objParser) parse(r io.Reader) error {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), maxLine)
	var joined []byte
	p.b.use(surfaceName("", p.name))
	for sc.Scan() {
		p.lines++
		text := bytes.TrimRight(sc.Bytes(), " \t\r")
		if p.lines == 1 {
			text = bytes.TrimPrefix(text, utf8BOM)
		}
		if len(joined) == 0 {
			p.line = int32(p.lines)
		}
		// A trailing backslash continues the statement on the next line.
		if len(text) > 0 && text[len(text)-1] == '\\' {
			if len(joined)+len(text) > maxLine {
				return p.errorf("a statement continued with \\ runs over %d MiB", maxLine>>20)
			}
			joined = append(joined, text[:len(text)-1]...)
			joined = append(joined, ' ')
			continue
		}
		if len(joined) > 0 {
			text = append(joined, text...)
			joined = joined[:0]
		}
		if err := p.statement(text); err != nil {
			return err
		}
	}
	if err := sc.Err(); errors.Is(err, bufio.ErrTooLong) {
		return &ParseError{Path: p.name, Line: p.lines + 1, Err: fmt.Errorf("line longer than %d MiB: not an OBJ file", maxLine>>20)}
	} else if err != nil {
		return &ParseError{Path: p.name, Line: p.lines + 1, Err: err}
	}
	if len(joined) > 0 {
		return p.statement(joined)
	}
	return nil
}

// nextField splits the first whitespace-separated field off s.
func nextField(s []byte) (field, rest []byte) {
	i := 0
	for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
		i++
	}
	j := i
	for j < len(s) && s[j] != ' ' && s[j] != '\t' {
		j++
	}
	return s[i:j], s[j:]
}

func (p *objParser) statement(text []byte) error {
	key, rest := nextField(text)
	if len(key) == 0 || key[0] == '#' {
		return nil
	}
	switch string(key) {
	case "v":
		return p.vertex(rest)
	case "f":
		return p.face(rest)
	case "g", "o":
		if !p.opts.GroupByMaterial {
			p.b.use(surfaceName(string(bytes.TrimSpace(rest)), p.name))
			return nil
		}
	case "usemtl":
		if p.opts.GroupByMaterial {
			p.b.use(surfaceName(string(bytes.TrimSpace(rest)), p.name))
			return nil
		}
	}
	p.b.m.Sources[0].Ignored[string(key)]++
	return nil
}

func (p *objParser) vertex(rest []byte) error {
	var c [3]float64
	for k := range c {
		var f []byte
		f, rest = nextField(rest)
		if len(f) == 0 {
			return p.errorf("vertex has %d coordinates, want 3", k)
		}
		x, err := strconv.ParseFloat(string(f), 64)
		if err != nil {
			return p.errorf("vertex coordinate %q is not a number", clip(string(f)))
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return p.errorf("vertex coordinate is %s", f)
		}
		c[k] = x * p.scale
	}
	p.b.m.Vertices = append(p.b.m.Vertices, geometry.Vec3{X: c[0], Y: c[1], Z: c[2]})
	return nil
}

func (p *objParser) face(rest []byte) error {
	nv := len(p.b.m.Vertices)
	p.poly = p.poly[:0]
	for {
		var f []byte
		f, rest = nextField(rest)
		if len(f) == 0 {
			break
		}
		// The position index is the part before any "/" (v, v/vt, v//vn, v/vt/vn).
		if i := bytes.IndexByte(f, '/'); i >= 0 {
			f = f[:i]
		}
		idx, err := strconv.Atoi(string(f))
		if err != nil {
			return p.errorf("face index %q is not an integer", clip(string(f)))
		}
		switch {
		case idx == 0:
			return p.errorf("face index 0 (OBJ indices start at 1)")
		case idx < 0:
			idx += nv // relative: -1 is the last vertex so far
		default:
			idx--
		}
		if idx < 0 || idx >= nv {
			return p.errorf("face refers to vertex %s but %d vertices are defined before this line", f, nv)
		}
		// Repeated consecutive corners add nothing to the outline.
		if n := len(p.poly); n == 0 || p.poly[n-1] != int32(idx) {
			p.poly = append(p.poly, int32(idx))
		}
	}
	if n := len(p.poly); n > 1 && p.poly[0] == p.poly[n-1] {
		p.poly = p.poly[:n-1]
	}
	if len(p.poly) > maxPolygon {
		return p.errorf("face has %d corners; hemiray triangulates polygons of up to %d (export triangles or smaller polygons)", len(p.poly), maxPolygon)
	}
	if d := distinctCorners(p.poly); d < 3 {
		return p.errorf("face has %d distinct corners, want at least 3", d)
	}
	if len(p.poly) == 3 {
		p.b.add(p.poly[0], p.poly[1], p.poly[2], p.line)
		return nil
	}
	for _, t := range p.tri.triangulate(p.b.m.Vertices, p.poly) {
		if t[0] == t[1] || t[1] == t[2] || t[0] == t[2] {
			continue // a polygon that revisits a corner: no area, and not a triangle
		}
		p.b.add(t[0], t[1], t[2], p.line)
	}
	return nil
}

// distinctCorners counts the different vertex indices of a polygon.
func distinctCorners(poly []int32) int {
	n := 0
	for i, v := range poly {
		if !slices.Contains(poly[:i], v) {
			n++
		}
	}
	return n
}
