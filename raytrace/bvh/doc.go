// Package bvh is hemiray's ray-tracing acceleration structure: a bounding
// volume hierarchy over triangles, built with the binned surface area
// heuristic and traversed for the closest hit or any hit.
//
// # Layout
//
// The tree is flattened into 32-byte nodes with float32 bounds (unexported:
// the traversal reads them with unchecked pointer arithmetic). Vertices
// are stored rounded to float32 (RoundVertex), so the bounds of the stored
// triangles are float32 numbers and are exact, hence conservative. The two children of an inner node sit side by
// side at Offset and Offset+1, 64-byte aligned, so the traversal's test of
// both children touches one cache line; the pairs are laid out depth-first. Triangles are stored in
// leaf order with their float32 vertices and the caller's facet id, 40 bytes
// each; a leaf's data is one contiguous run.
//
// # Robustness
//
// Triangles are tested with the watertight test of Woop, Benthin & Wald
// (geometry.Shear); box tests widen the far distance by 1 + 2γ(4) (farScale); the
// caller's emitting facet is skipped by id, and origins leave their facet
// through geometry.OffsetOrigin. No absolute epsilon appears anywhere, so a
// model in millimetres and one in kilometres behave the same.
//
// # Cost
//
// Nothing is allocated per ray; traversal uses a fixed stack of 64 entries
// (depth is capped at 32 SAH levels plus median splits below, which halve
// the count, so 64 always suffices).
package bvh
