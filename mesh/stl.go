package mesh

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"unicode"

	"github.com/hschendel/stl"
)

const (
	stlHeaderSize = 84
	stlRecordSize = 50
)

// ReadSTL reads a binary or ASCII STL file from r. name is the file's path,
// used in messages and, without its extension, as the surface name when the
// file gives none. Coordinates are scaled from unit to metres.
func ReadSTL(r io.ReadSeeker, name string, unit Unit) (*Mesh, error) {
	scale := unit.Metres()
	if scale == 0 {
		return nil, fmt.Errorf("%s: unknown length unit %q", name, unit)
	}
	size, err := r.Seek(0, io.SeekEnd)
	if err != nil {
		return nil, &ParseError{Path: name, Err: err}
	}
	if size == 0 {
		return nil, &ParseError{Path: name, Err: errors.New("empty file")}
	}
	if _, err := r.Seek(0, io.SeekStart); err != nil {
		return nil, &ParseError{Path: name, Err: err}
	}
	var header [stlHeaderSize]byte
	n, _ := io.ReadFull(r, header[:])
	count := -1
	if n == stlHeaderSize {
		count = int(binary.LittleEndian.Uint32(header[80:]))
	}
	if _, err := r.Seek(0, io.SeekStart); err != nil {
		return nil, &ParseError{Path: name, Err: err}
	}
	if count >= 0 && int64(stlHeaderSize)+int64(stlRecordSize)*int64(count) == size {
		return readBinarySTL(r, name, header[:80], count, unit)
	}
	// Not binary by size: the whole file is text, so reading it is bounded by its size.
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &ParseError{Path: name, Err: err}
	}
	if looksBinary(data) {
		msg := fmt.Sprintf("binary STL of %d bytes is not 84 + 50·count bytes", size)
		if count >= 0 {
			msg = fmt.Sprintf("binary STL header promises %d facets (%d bytes) but the file has %d bytes: truncated, or altered by a text-mode transfer",
				count, int64(stlHeaderSize)+int64(stlRecordSize)*int64(count), size)
		}
		return nil, &ParseError{Path: name, Err: errors.New(msg)}
	}
	return readASCIISTL(data, name, unit)
}

// looksBinary reports whether data holds control bytes that no text STL has.
func looksBinary(data []byte) bool {
	for _, c := range data {
		if c < 0x20 && c != '\n' && c != '\r' && c != '\t' && c != '\f' && c != '\v' {
			return true
		}
	}
	return false
}

// stlSink receives facets from the stl package and welds their corners.
type stlSink struct {
	b       *builder
	w       *welder
	n       int // facets seen in the file so far
	badNum  int // first facet with a NaN or infinite coordinate, 0 if none
	surface string
}

func (s *stlSink) SetName(string)          {}
func (s *stlSink) SetBinaryHeader([]byte)  {}
func (s *stlSink) SetASCII(bool)           {}
func (s *stlSink) SetTriangleCount(uint32) {} // sized by the file, not the header

func (s *stlSink) AppendTriangle(t stl.Triangle) {
	s.n++
	var id [3]int32
	for k, v := range t.Vertices {
		for _, c := range v {
			if s.badNum == 0 && (math.IsNaN(float64(c)) || math.IsInf(float64(c), 0)) {
				s.badNum = s.n
			}
		}
		id[k] = s.w.id(float64(v[0]), float64(v[1]), float64(v[2]))
	}
	s.b.add(id[0], id[1], id[2], int32(s.n))
}

func (s *stlSink) finish(name string, unit Unit) (*Mesh, error) {
	if s.badNum > 0 {
		return nil, &ParseError{Path: name, Facet: s.badNum, Err: errors.New("coordinate is NaN or infinite")}
	}
	s.b.m.Vertices = s.w.vertices(unit.Metres())
	return s.b.finish(), nil
}

func readBinarySTL(r io.ReadSeeker, name string, header []byte, count int, unit Unit) (*Mesh, error) {
	b := newBuilder(&Source{Path: name, Format: "stl-binary", Unit: unit})
	b.m.Facets = make([][3]int32, 0, count)
	b.m.SurfaceOf = make([]int32, 0, count)
	b.m.Origin = make([]Origin, 0, count)
	b.use(surfaceName(binaryHeaderName(header), name))
	b.m.Surfaces[0].Facets = make([]int32, 0, count)
	// A closed triangle mesh has about half as many vertices as facets.
	sink := &stlSink{b: b, w: newWelder(count/2 + count/32 + 16)}
	if err := stl.CopyAll(r, sink); err != nil {
		return nil, &ParseError{Path: name, Facet: sink.n + 1, Err: err}
	}
	return sink.finish(name, unit)
}

// binaryHeaderName extracts a name from the 80-byte header: its printable
// text up to the first NUL, without a leading "solid".
func binaryHeaderName(h []byte) string {
	if i := bytes.IndexByte(h, 0); i >= 0 {
		h = h[:i]
	}
	for _, c := range h {
		if c < 0x20 || c > 0x7e {
			return ""
		}
	}
	s := strings.TrimSpace(string(h))
	if s == "solid" || strings.HasPrefix(s, "solid ") {
		s = strings.TrimSpace(s[len("solid"):])
	}
	return s
}

// surfaceName is given, or the file's base name without extension. A
// control character inside a given name (a stray carriage return or tab)
// becomes a space: node names go into CSV files, where line breaks inside a
// field do not read back alike everywhere.
func surfaceName(given, path string) string {
	given = strings.Map(func(r rune) rune {
		if unicode.IsControl(r) {
			return ' '
		}
		return r
	}, given)
	if given = strings.TrimSpace(given); given != "" {
		return given
	}
	base := filepath.Base(path)
	return strings.TrimSuffix(base, filepath.Ext(base))
}

// asciiSTL parses text STL. hemiray parses it itself rather than through
// the stl package, which rounds text coordinates to float32 (binary STL is
// float32 by format, text is not) and reports no line per facet.
type asciiSTL struct {
	name  string
	data  []byte
	off   int
	line  int // line of the last token read
	next  int // line of the next unread byte
	sink  *stlSink
	token []byte
}

// word returns the next whitespace-separated token, or nil at the end.
func (p *asciiSTL) word() []byte {
	for p.off < len(p.data) {
		c := p.data[p.off]
		if c == '\n' {
			p.next++
		} else if c != ' ' && c != '\t' && c != '\r' && c != '\f' && c != '\v' {
			break
		}
		p.off++
	}
	p.line = p.next
	start := p.off
	for p.off < len(p.data) {
		c := p.data[p.off]
		if c == ' ' || c == '\t' || c == '\r' || c == '\n' || c == '\f' || c == '\v' {
			break
		}
		p.off++
	}
	if start == p.off {
		return nil
	}
	return p.data[start:p.off]
}

// restOfLine returns the trimmed text up to the end of the current line.
func (p *asciiSTL) restOfLine() string {
	end := bytes.IndexByte(p.data[p.off:], '\n')
	if end < 0 {
		end = len(p.data) - p.off
	}
	s := strings.TrimSpace(string(p.data[p.off : p.off+end]))
	p.off += end
	return s
}

func (p *asciiSTL) errorf(format string, args ...any) error {
	return &ParseError{Path: p.name, Line: p.line, Err: fmt.Errorf(format, args...)}
}

func (p *asciiSTL) expect(keyword string) error {
	w := p.word()
	if string(w) != keyword {
		if w == nil {
			return p.errorf("file ends where %q is expected", keyword)
		}
		return p.errorf("expected %q, found %q", keyword, clip(string(w)))
	}
	return nil
}

func (p *asciiSTL) number() (float64, error) {
	w := p.word()
	if w == nil {
		return 0, p.errorf("file ends inside a facet")
	}
	x, err := strconv.ParseFloat(string(w), 64)
	if err != nil {
		return 0, p.errorf("expected a number, found %q", clip(string(w)))
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, p.errorf("coordinate is %s", w)
	}
	return x, nil
}

func (p *asciiSTL) parse(unit Unit) error {
	p.next = 1
	solids := 0
	for {
		w := p.word()
		if w == nil {
			break
		}
		if string(w) != "solid" {
			return p.errorf("expected \"solid\", found %q", clip(string(w)))
		}
		solidLine := p.line
		solids++
		p.sink.b.use(surfaceName(p.restOfLine(), p.name))
		for {
			w := p.word()
			switch string(w) {
			case "facet":
			case "endsolid":
				p.restOfLine()
			case "solid":
				return p.errorf("new solid before the endsolid of the solid at line %d", solidLine)
			case "":
				return p.errorf("file ends inside the solid of line %d: no endsolid", solidLine)
			default:
				return p.errorf("expected \"facet\" or \"endsolid\", found %q", clip(string(w)))
			}
			if string(w) == "endsolid" {
				break
			}
			if err := p.facet(); err != nil {
				return err
			}
		}
	}
	if solids == 0 {
		return &ParseError{Path: p.name, Err: errors.New("no solid in ASCII STL file")}
	}
	return nil
}

// facet reads "normal x y z outer loop vertex … ×3 endloop endfacet" after
// "facet". The stored normal is read and ignored: the winding defines the front.
func (p *asciiSTL) facet() error {
	facetLine := p.line
	if err := p.expect("normal"); err != nil {
		return err
	}
	for range 3 {
		if _, err := p.number(); err != nil {
			return err
		}
	}
	if err := p.expect("outer"); err != nil {
		return err
	}
	if err := p.expect("loop"); err != nil {
		return err
	}
	var id [3]int32
	for k := range 3 {
		if err := p.expect("vertex"); err != nil {
			return err
		}
		var c [3]float64
		for i := range c {
			x, err := p.number()
			if err != nil {
				return err
			}
			c[i] = x
		}
		id[k] = p.sink.w.id(c[0], c[1], c[2])
	}
	if err := p.expect("endloop"); err != nil {
		return err
	}
	if err := p.expect("endfacet"); err != nil {
		return err
	}
	p.sink.n++
	p.sink.b.add(id[0], id[1], id[2], int32(facetLine))
	return nil
}

func readASCIISTL(data []byte, name string, unit Unit) (*Mesh, error) {
	data = bytes.TrimPrefix(data, utf8BOM)
	b := newBuilder(&Source{Path: name, Format: "stl-ascii", Unit: unit})
	p := &asciiSTL{name: name, data: data, sink: &stlSink{b: b, w: newWelder(len(data) / 500)}}
	if err := p.parse(unit); err != nil {
		return nil, err
	}
	return p.sink.finish(name, unit)
}

// clip shortens s for an error message.
func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}
