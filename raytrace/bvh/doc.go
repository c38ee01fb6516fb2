// Package bvh is hemiray's ray-tracing acceleration structure: a bounding
// volume hierarchy over triangles, built with the binned surface area
// heuristic and traversed for the closest hit or any hit.
//
// # Layout
//
// The build makes a binary tree (binned SAH, large nodes over Morton
// clusters: cluster.go; a subtree of its own for each long run of coplanar
// facets: planes.go, or, where the run lies exactly in an axis-aligned
// plane, a 2-D grid over that plane that a ray looks up where it crosses
// it: grid.go), then widens it: each node of the tree the traversal reads
// holds up to four children (widen.go), their
// float32 boxes stored plane by plane, 128 bytes (two cache lines,
// unexported: the traversal reads them with unchecked pointer arithmetic).
// A step tests the four boxes, sorts them by entry distance without jumps,
// and pushes the hit ones it does not visit next. Vertices are stored
// rounded to float32 (RoundVertex), so the bounds of the stored triangles
// are float32 numbers and are exact, hence conservative. Triangles are
// stored in leaf order with their float32 vertices and the caller's facet
// id, 40 bytes each; a leaf's data is one contiguous run.
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
// Nothing is allocated per ray; traversal uses a fixed stack of 256
// entries. The binary tree is at most 63 levels deep: the top level over
// coplanar runs (planes.go) is at most 8 + 13 levels (SAH, then halving at
// most 4,097 pieces), below it SAH runs to level 32 and median splits then
// halve the count of at most 2³¹ triangles; a node built over Morton
// clusters (cluster.go) starts above level 24 and ends by level 61 (see
// buildClustered). A wide node is at least one
// binary level below its parent and a step pushes at most three children:
// 3·63 + 2 entries (two written above the top) < 256.
package bvh
