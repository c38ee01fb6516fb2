package mesh

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// builder accumulates one file's facets into a Mesh, creating surfaces on
// their first facet.
type builder struct {
	m          Mesh
	surfaceIdx map[string]int32
	cur        int32 // current surface, -1 before the first
}

// newBuilder starts a mesh read from src, or a built shape when src is nil.
func newBuilder(src *Source) *builder {
	b := &builder{surfaceIdx: map[string]int32{}, cur: -1}
	if src != nil {
		b.m.Sources = []Source{*src}
	}
	return b
}

// use makes name the surface that following facets belong to.
func (b *builder) use(name string) {
	i, ok := b.surfaceIdx[name]
	if !ok {
		i = int32(len(b.m.Surfaces))
		b.surfaceIdx[name] = i
		src := 0
		if len(b.m.Sources) == 0 {
			src = -1
		}
		b.m.Surfaces = append(b.m.Surfaces, Surface{Name: name, Source: src})
	}
	b.cur = i
}

// add appends a facet to the current surface; line locates it in the file.
func (b *builder) add(v0, v1, v2 int32, line int32) {
	f := int32(len(b.m.Facets))
	b.m.Facets = append(b.m.Facets, [3]int32{v0, v1, v2})
	b.m.SurfaceOf = append(b.m.SurfaceOf, b.cur)
	if len(b.m.Sources) > 0 {
		b.m.Origin = append(b.m.Origin, Origin{Source: 0, Line: line})
	}
	b.m.Surfaces[b.cur].Facets = append(b.m.Surfaces[b.cur].Facets, f)
}

// finish drops surfaces without facets, computes areas and returns the mesh.
func (b *builder) finish() *Mesh {
	m := &b.m
	if len(m.Surfaces) > 0 {
		keep := m.Surfaces[:0]
		remap := make([]int32, len(m.Surfaces))
		for i, s := range m.Surfaces {
			if len(s.Facets) == 0 {
				remap[i] = -1
				continue
			}
			remap[i] = int32(len(keep))
			keep = append(keep, s)
		}
		m.Surfaces = keep
		for f, s := range m.SurfaceOf {
			m.SurfaceOf[f] = remap[s]
		}
	}
	for i := range m.Surfaces {
		s := &m.Surfaces[i]
		s.Area = m.AreaOf(s.Facets)
	}
	if len(m.Sources) > 0 {
		m.Sources[0].Facets = len(m.Facets)
	}
	return m
}

// welder gives one index to every distinct position: STL stores each
// facet's corners separately, and shared corners must become shared
// vertices for edges to be shared. An open-addressing table keyed by the
// coordinate bits beats a Go map several times on million-facet files, and
// its key array becomes the vertex array, so no copy is made.
type welder struct {
	slots []int32 // index into keys, -1 when empty
	keys  []geometry.Vec3
	mask  uint32
}

func newWelder(expected int) *welder {
	n := 1024
	for n < 2*expected {
		n *= 2
	}
	w := &welder{slots: make([]int32, n), mask: uint32(n - 1), keys: make([]geometry.Vec3, 0, expected)}
	for i := range w.slots {
		w.slots[i] = -1
	}
	return w
}

func hashKey(p geometry.Vec3) uint32 {
	x, y, z := math.Float64bits(p.X), math.Float64bits(p.Y), math.Float64bits(p.Z)
	h := x*0x9E3779B97F4A7C15 ^ (y*0xC2B2AE3D27D4EB4F + y>>31) ^ z*0x165667B19E3779F9
	h ^= h >> 29
	h *= 0xBF58476D1CE4E5B9
	return uint32(h >> 32)
}

// same compares positions bit for bit (NaN equal to itself, so a NaN
// corner welds and is reported once by the reader).
func same(a, b geometry.Vec3) bool {
	return math.Float64bits(a.X) == math.Float64bits(b.X) &&
		math.Float64bits(a.Y) == math.Float64bits(b.Y) &&
		math.Float64bits(a.Z) == math.Float64bits(b.Z)
}

// id returns the index of position (x, y, z), adding it if new.
func (w *welder) id(x, y, z float64) int32 {
	// −0 and +0 are the same position.
	p := geometry.Vec3{X: x + 0, Y: y + 0, Z: z + 0}
	for s := hashKey(p) & w.mask; ; s = (s + 1) & w.mask {
		i := w.slots[s]
		if i < 0 {
			i = int32(len(w.keys))
			w.keys = append(w.keys, p)
			w.slots[s] = i
			if 2*len(w.keys) > len(w.slots) {
				w.grow()
			}
			return i
		}
		if same(w.keys[i], p) {
			return i
		}
	}
}

func (w *welder) grow() {
	n := 2 * len(w.slots)
	w.slots = make([]int32, n)
	w.mask = uint32(n - 1)
	for i := range w.slots {
		w.slots[i] = -1
	}
	for i, k := range w.keys {
		s := hashKey(k) & w.mask
		for w.slots[s] >= 0 {
			s = (s + 1) & w.mask
		}
		w.slots[s] = int32(i)
	}
}

// vertices returns the welded positions scaled to metres, in place; the
// welder is spent afterwards.
func (w *welder) vertices(scale float64) []geometry.Vec3 {
	v := w.keys
	w.keys, w.slots = nil, nil
	if scale != 1 {
		for i := range v {
			v[i] = v[i].Scale(scale)
		}
	}
	return v
}
