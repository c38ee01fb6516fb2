// Package exchange solves radiative exchange in an enclosure of gray,
// diffuse, opaque surfaces: the net-radiation (radiosity) method with mixed
// boundary conditions, an ambient that is a blackbody at its temperature,
// and the total exchange factors and radiative conductances that lumped
// thermal network codes take.
//
// # Equations
//
// Each node k has radiosity J_k = ε_k σT_k⁴ + ρ_k G_k with irradiation
// G_k = Σ_j F_kj J_j + F_k,amb σT_amb⁴, and net outgoing flux q_k = J_k − G_k
// (Howell, Mengüç, Daun & Siegel, Thermal Radiation Heat Transfer, 7th ed.,
// 2021, the enclosure chapters; Oppenheim, Trans. ASME 78, 1956). Rows:
//
//	T given:   (A_k/ρ_k) J_k − A_k Σ_j F_kj J_j = (A_k ε_k/ρ_k) σT_k⁴ + A_k F_k,amb σT_amb⁴
//	Q given:    A_k J_k      − A_k Σ_j F_kj J_j = Q_k + A_k F_k,amb σT_amb⁴
//
// (adiabatic: Q_k = 0; a black node with T given has J_k = σT_k⁴ known).
// Scaling the rows by A_k/ρ_k and A_k makes the matrix symmetric when
// A_k F_kj = A_j F_jk, which smoothing guarantees, and diagonally dominant.
// Nodes in a Group share one temperature (the two sides of a thin
// conductive sheet): their E = σT⁴ is one more unknown, with the row
// Σ_k Q_k = Q_group, which keeps the matrix symmetric.
//
// Up to DenseLimit unknowns the system is solved by LU factorisation
// (gonum); beyond, by preconditioned conjugate gradients (Gauss–Seidel if
// the matrix is not symmetric), so facet-level models solve. The iterative
// methods apply the view-factor terms from F's own rows: no copy of F, which
// at 10⁴ nodes can hold 10⁸ entries, is made for a solve.
//
// # Exchange factors
//
// The Gebhart factor B_ij is the fraction of the power emitted by i that j
// absorbs after any number of diffuse reflections, B = (I − F R)⁻¹ F E with
// R = diag(ρ), E = diag(ε) (Gebhart, Int. J. Heat Mass Transfer 3, 1961).
// The total exchange area is A_i·ℱ_ij = ε_i A_i B_ij, symmetric, and the
// radiative conductance is σ·A_i·ℱ_ij in W/K⁴ (Hottel & Sarofim, Radiative
// Transfer, 1967). TotalExchange computes them for any node count: by one
// dense LU factorisation for small, well-connected models, otherwise column
// by column with conjugate gradients on the equivalent symmetric series
// A·ℱ = E(K + KWK + KWKWK + …)E, K = AF, W = RA⁻¹ (the emission absorbed
// after 0, 1, 2, … reflections), optionally dropping conductors negligible
// to both of their nodes.
package exchange
