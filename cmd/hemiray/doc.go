// Command hemiray computes radiation view factors between the surfaces of
// CAD triangle meshes by Monte Carlo ray tracing, each with a confidence
// interval, for thermal analysts.
//
// Usage:
//
//	hemiray <command> [flags] [arguments]
//
// The commands:
//
//	inspect   report the surfaces of mesh files and check them for defects
//
// Run "hemiray help <command>" for a command's flags. The command line only
// parses flags, calls the library packages and writes files; the work is
// done in mesh, geometry and raytrace.
package main
