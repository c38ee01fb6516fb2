package mesh

import "fmt"

// ParseError is a problem at a place in an input file. Line is a line number
// for text formats; for binary STL, Facet is the 1-based facet number.
type ParseError struct {
	Path  string
	Line  int
	Facet int
	Err   error
}

func (e *ParseError) Error() string {
	switch {
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %v", e.Path, e.Line, e.Err)
	case e.Facet > 0:
		return fmt.Sprintf("%s: facet %d: %v", e.Path, e.Facet, e.Err)
	}
	return fmt.Sprintf("%s: %v", e.Path, e.Err)
}

func (e *ParseError) Unwrap() error { return e.Err }
