// Package prefetch asks the processor to start loading memory that a
// later step will read, so that several cache misses overlap instead of
// each stalling in turn. It is a hint: it changes no value, and where no
// prefetch instruction is wired in (outside amd64) it does nothing.
package prefetch
