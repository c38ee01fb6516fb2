package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"io"
	"strconv"
	"strings"

	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// num formats a number with the fewest digits that read back exactly.
func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// writeCSV writes rows with encoding/csv (quoting names that need it).
func writeCSV(path string, rows func(emit func(...string)) error) error {
	return atomicfile.Write(path, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		var werr error
		err := rows(func(rec ...string) {
			if werr == nil {
				werr = cw.Write(rec)
			}
		})
		if err != nil {
			return err
		}
		if werr != nil {
			return werr
		}
		cw.Flush()
		return cw.Error()
	})
}

// writeJSON writes v indented.
func writeJSON(path string, v any) error {
	return atomicfile.Write(path, func(w io.Writer) error {
		var b bytes.Buffer
		enc := json.NewEncoder(&b)
		enc.SetIndent("", "  ")
		if err := enc.Encode(v); err != nil {
			return err
		}
		_, err := w.Write(b.Bytes())
		return err
	})
}

// lineWriter writes CSV rows of names and numbers without a string per
// field: the pairs files of facet-level models have millions of rows.
// Names are quoted once, by the rules of encoding/csv.
type lineWriter struct {
	w      io.Writer
	buf    []byte
	quoted map[string]string
}

func newLineWriter(w io.Writer) *lineWriter {
	return &lineWriter{w: w, quoted: map[string]string{}}
}

func (l *lineWriter) sep() {
	if len(l.buf) > 0 && l.buf[len(l.buf)-1] != '\n' {
		l.buf = append(l.buf, ',')
	}
}

// name appends a text field.
func (l *lineWriter) name(s string) {
	q, ok := l.quoted[s]
	if !ok {
		var b bytes.Buffer
		cw := csv.NewWriter(&b)
		cw.Write([]string{s})
		cw.Flush()
		q = strings.TrimSuffix(b.String(), "\n")
		l.quoted[s] = q
	}
	l.sep()
	l.buf = append(l.buf, q...)
}

// float appends x with the shortest text that reads back exactly.
func (l *lineWriter) float(x float64) {
	l.sep()
	l.buf = strconv.AppendFloat(l.buf, x, 'g', -1, 64)
}

func (l *lineWriter) int(n int64) {
	l.sep()
	l.buf = strconv.AppendInt(l.buf, n, 10)
}

// end finishes the row, flushing the buffer now and then.
func (l *lineWriter) end() error {
	l.buf = append(l.buf, '\n')
	if len(l.buf) < 1<<16 {
		return nil
	}
	return l.flush()
}

func (l *lineWriter) flush() error {
	_, err := l.w.Write(l.buf)
	l.buf = l.buf[:0]
	return err
}

// WriteFile writes path atomically (a temporary file, then a rename), so a
// killed run never leaves a truncated file.
func WriteFile(path string, write func(w io.Writer) error) error {
	return atomicfile.Write(path, write)
}
