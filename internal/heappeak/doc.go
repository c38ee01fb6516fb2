// Package heappeak measures the largest Go heap a piece of work holds
// above what was held before it, by sampling runtime.MemStats while the
// work runs: the memory figure the benchmarks report and the memory tests
// hold against hemiray's own estimates.
package heappeak
