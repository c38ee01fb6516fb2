// Package mesh holds hemiray's surface model: a Mesh of indexed triangles
// (facets) grouped into named Surfaces, read from STL and OBJ files, written
// back to them, built from simple shapes, and checked for the defects CAD
// exports carry.
//
// # Model
//
// Vertices are in metres (float64). Each facet lists three vertex indices in
// counter-clockwise order seen from its front, belongs to exactly one
// Surface, and remembers where it came from (file and line for OBJ, file and
// facet number for STL) so that every error and warning can point at the
// input.
//
// # Surfaces
//
// An OBJ group (g) or object (o) — or material (usemtl) with GroupByMaterial —
// an ASCII STL solid block, or a whole binary STL file is one Surface. Facets
// before any group go to a surface named after the file. Two files that define
// the same surface name are an error.
//
// # Reading
//
// STL is binary when its size is exactly 84 + 50·count bytes, whatever its
// first bytes say (binary exports often begin with "solid"). STL vertices are
// welded by exact coordinate equality, so shared edges are shared vertices.
// Memory is bounded by the size of the file, never by a count read from it.
// Errors carry the path and the line or facet (ParseError).
package mesh
