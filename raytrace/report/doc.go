// Package report writes hemiray's results: the view-factor matrices (square
// CSV and pairs with intervals), the smoothed matrix, surfaces.csv with
// temperatures and heat flows, conductances.csv for network codes,
// tallies.csv, summary.json, the pictures (PNG) and model.vtp, and the text
// tables the command prints.
//
// Numbers are written with the fewest digits that read back exactly
// (strconv 'g', −1), files atomically (a temporary file, then a rename) with
// the process's umask, and square matrices only up to SquareLimit nodes
// (the pairs files carry every non-zero entry at any size). Which columns a
// matrix file has depends on the model: an ambient column when the model
// is open.
package report
