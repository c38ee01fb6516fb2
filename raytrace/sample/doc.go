// Package sample holds hemiray's random numbers and the pure warps that turn
// uniform numbers into emission points and directions.
//
// # Streams
//
// A Stream is counter-based: its k-th number is a fixed function of its key
// and k, and the key is a hash of (run seed, emitter, batch). Work can thus
// be cut into units, scheduled on any thread and summed in any order, and
// the result depends on the case and the seed only.
//
// # Warps
//
// Warps take uniform numbers u in [0, 1) and never a stream (the style of
// Pharr, Jakob & Humphreys, Physically Based Rendering, 4th ed., sampling
// chapter): UniformTriangle, CosineHemisphere with its PDF and inverse, and
// an Alias table for picking facets in proportion to area in O(1).
package sample
