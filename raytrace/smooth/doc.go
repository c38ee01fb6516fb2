// Package smooth makes a Monte Carlo view-factor matrix physically
// consistent: reciprocity A_i·F_ij = A_j·F_ji and summation Σ_j F_ij = 1
// (the ambient column included), with F ≥ 0.
//
// # Method
//
// The counts of each emitter's rays are multinomial with probabilities
// F_ij. Smooth finds the constrained maximum-likelihood estimate (Daun,
// Morton & Howell, "Smoothing Monte Carlo exchange factors through
// constrained maximum likelihood estimation", J. Heat Transfer 127(10),
// 2005):
//
//	maximise Σ_ij k_ij ln F_ij  subject to  A_i F_ij = A_j F_ji,  Σ_j F_ij = 1.
//
// With exchange areas s_ij = A_i F_ij and pooled counts c_ij = k_ij + k_ji,
// stationarity gives s_ij = c_ij/(λ_i + λ_j), s_ii = k_ii/λ_i and
// s_i,amb = k_i,amb/λ_i, where λ minimises the convex dual
//
//	D(λ) = Σ λ_i A_i − Σ_{i<j} c_ij ln(λ_i + λ_j) − Σ_i (k_ii + k_i,amb) ln λ_i,
//
// whose gradient is the summation residual A_i − Σ_j s_ij − s_i,amb, over
// the domain where every logarithm is defined: λ_i > 0 only for nodes with
// self or ambient counts, λ_i + λ_j > 0 for every pair seen (a large node
// whose rays land on small ones has its optimum at λ_i < 0). Smooth
// minimises D by Newton's method with a backtracking line search, solving
// each Newton system by conjugate gradients on the sparse Hessian, so that
// facet-level matrices are within reach. Pairs with no hits stay exactly
// zero and every factor stays non-negative. The start λ_i = N_i/A_i makes
// s_ij the pooled estimate (k_ij + k_ji)/(N_i/A_i + N_j/A_j).
//
// The package takes plain slices and imports neither the tracer nor the mesh.
package smooth
