// Package analysis is hemiray's thermal case and the analysis of a model:
// from a case (mesh files, ray settings, emissivities and boundary
// conditions) to view factors, a smoothed matrix, an exchange solution
// with intervals, and exchange areas for conductances.
//
// # The pipeline
//
//	Case ──Open──► Input ──Trace──► Traced ──Analyse──► Result
//	                 │                 ▲
//	                 └──FromTallies────┘   (saved or merged tallies)
//
// Open validates a case and loads its meshes; errors about a value are
// *KeyError naming the key's path (e.g. surfaces.board.emissivity), which
// the command turns into a file and line. Input.Trace runs the estimator
// with checkpoints, resume, shards and a time limit, writing the tally
// file tallies.bin with a Record of what was traced (files, settings,
// input hash). Input.Analyse smooths the tallies (constrained maximum
// likelihood, package smooth), maps the case's conditions onto the nodes
// and solves the gray-enclosure exchange (package exchange).
//
// # Conditions on nodes
//
// A surface's condition holds for every node made from it. A temperature
// or a flux is the same on every part; a heat flow is spread over the
// nodes in proportion to their area (facet nodes). The two sides of a
// two-sided sheet share one temperature and form one group whose
// condition is the sheet's: a heat_flux is per unit of the sheet's area,
// so the group carries flux·A.
//
// # Intervals on temperatures and heat flows
//
// The rays of each node are dealt round-robin into R replicates (ray r to
// replicate r mod R), independent sub-samples of the same size. Each is
// smoothed and solved on its own; the half-width of the interval on the
// pooled T or Q is t·s/√R, s the sample standard deviation over the
// replicates and t Student's quantile with R−1 degrees of freedom: the
// t interval for a mean of independent, identically distributed batches
// (e.g. Law, "Simulation Modeling and Analysis", 5th ed., McGraw-Hill 2015,
// the chapter on output data analysis; from memory). Taylor & Luck, NASA
// TM (NTRS 19950020932, 1995), propagate view-factor uncertainty into heat
// flows by repeated solves in the same spirit.
package analysis
