// Package raytrace estimates diffuse view factors between the radiation
// nodes of a mesh by Monte Carlo ray tracing, with a confidence interval on
// every factor.
//
// # Nodes
//
// By default each surface is one radiation node; a two-sided surface is two,
// NAME (its front) and NAME.back; with FacetNodes every facet is its own
// node (NAME#k, NAME#k.back). Rays that leave the model count toward the
// ambient, whose column every result has (zero when no ray escaped), so
// that the layout of the outputs never depends on the random draw. Names
// that would be ambiguous ("ambient", a surface X.back beside a two-sided
// X) are refused.
//
// # Settings
//
// Settings are everything that fixes the tallies (how the mesh was read,
// the nodes, the rays); Options add how one process runs (threads, its
// shard, checkpoints, progress). Settings.Hash and Settings.Diff make a run
// reproducible and a mismatch explainable field by field.
//
// # The estimator
//
// A ray from node i starts at a point uniformly distributed over the node's
// area (a facet picked in proportion to its area, then a uniform point on
// it) and leaves in a cosine-weighted direction about the facet's geometric
// normal, the direction law of a diffuse emitter. The probability that it
// first meets node j is the view factor F_ij, so with N_i rays and k_ij hits
//
//	F̂_ij = k_ij / N_i.
//
// With independent numbers per ray (Settings.Sampling "mc", plain Monte
// Carlo) it is unbiased with the binomial variance, standard error
// √(F̂(1−F̂)/N_i) (Howell, "The Monte Carlo method in radiative heat
// transfer", J. Heat Transfer 120(3), 1998), and the interval is Wilson's
// score interval (Wilson, J. Amer. Statist. Assoc. 22, 1927), which keeps
// its coverage for small counts, including k = 0.
//
// By default ("rqmc", randomized quasi-Monte Carlo) the rays are split into
// R replicates, ray r into replicate r mod R, and each replicate takes its
// numbers from its own scrambled Sobol' sequence (sample.Sobol), which
// covers the node and the hemisphere far more evenly. Each replicate's
// estimate is unbiased and the replicates are independent, so the interval
// is Student's t over them, t_{R−1}·s/√R; an entry no replicate hit keeps
// Wilson's interval.
//
// # Determinism
//
// A ray's numbers depend only on the seed, its node and its index: with
// "mc", ray r of node i draws from the counter-based stream (seed, i,
// r / BatchSize) at offset (r mod BatchSize)·numbersPerRay; with "rqmc" it
// is point r / R of the randomization (seed, i, r mod R). A result
// therefore depends on the mesh, the nodes, the seed and the number of rays
// per node only — never on the number of threads, the order in which work
// is done, or how it is split.
//
// # Self-hits and back faces
//
// The emitting facet is excluded from its own rays, and origins are moved
// off its plane by more than their rounding error (geometry.OffsetOrigin).
// A ray that meets the back of a one-sided surface is not a view factor: it
// is counted as a back-face hit for that emitter and target surface, and
// reported, because it means flipped normals, a missing second side or a
// leak in the model.
package raytrace
