package main

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
)

// writeAtomic writes a file through a temporary file in the same folder and
// a rename, so that a killed run never leaves a truncated result.
func writeAtomic(path string, write func(w io.Writer) error) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name())
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		tmp.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		tmp.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// num formats a number with the fewest digits that read back exactly.
func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// writeCSV writes rows with encoding/csv (quoting names that need it).
func writeCSV(path string, rows func(emit func(...string)) error) error {
	return writeAtomic(path, func(w io.Writer) error {
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
	return writeAtomic(path, func(w io.Writer) error {
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
