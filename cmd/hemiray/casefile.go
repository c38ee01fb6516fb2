package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

// caseDoc is a case file's text, for finding the line of a key.
type caseDoc struct {
	path string
	doc  []byte
}

// caseError is a problem at a line of a case file.
func caseError(path string, line int, msg string) error {
	if line > 0 {
		return fmt.Errorf("%s:%d: %s", path, line, msg)
	}
	return fmt.Errorf("%s: %s", path, msg)
}

// readCase decodes a case file; errors name the file and line.
func readCase(path string) (*analysis.Case, *caseDoc, error) {
	doc, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	doc = bytes.TrimPrefix(doc, []byte("\xef\xbb\xbf")) // a UTF-8 byte-order mark
	cd := &caseDoc{path: path, doc: doc}
	c := &analysis.Case{Path: path, Dir: filepath.Dir(path)}
	dec := toml.NewDecoder(bytes.NewReader(doc))
	dec.DisallowUnknownFields()
	if err := dec.Decode(c); err != nil {
		var strict *toml.StrictMissingError
		var de *toml.DecodeError
		switch {
		case errors.As(err, &strict) && len(strict.Errors) > 0:
			e := strict.Errors[0]
			line, _ := e.Position()
			return nil, nil, caseError(path, line, fmt.Sprintf("unknown key %q (README.md lists the keys)", strings.Join(e.Key(), ".")))
		case errors.As(err, &de):
			line, _ := de.Position()
			return nil, nil, caseError(path, line, typeMessage(strings.TrimPrefix(de.Error(), "toml: "), doc, line))
		}
		return nil, nil, caseError(path, 0, err.Error())
	}
	return c, cd, nil
}

// typeMessage turns the TOML library's "cannot decode TOML string into
// struct field analysis.RaySpec.PerNode of type int64" into words about the
// key on that line: "per_node: expected a whole number, found a string".
func typeMessage(msg string, doc []byte, line int) string {
	var found, field, goType string
	if n, _ := fmt.Sscanf(msg, "cannot decode TOML %s into struct field %s of type %s", &found, &field, &goType); n != 3 {
		return msg
	}
	want := map[string]string{"int64": "a whole number", "int": "a whole number", "uint64": "a whole number",
		"float64": "a number", "*float64": "a number", "bool": "true or false", "*bool": "true or false",
		"string": "a string in quotes", "[]string": `a list of strings, like ["a.obj", "b.stl"]`}[goType]
	if want == "" {
		return msg
	}
	key := field
	if lines := strings.Split(string(doc), "\n"); line > 0 && line <= len(lines) {
		if k, _, ok := strings.Cut(lines[line-1], "="); ok {
			key = strings.Trim(strings.TrimSpace(k), `"`)
		}
	}
	return fmt.Sprintf("%s: expected %s, found a TOML %s", key, want, found)
}

// openCase reads a case file and opens its model.
func openCase(path string) (*analysis.Input, error) {
	c, cd, err := readCase(path)
	if err != nil {
		return nil, err
	}
	in, err := analysis.Open(c)
	return in, cd.locate(err)
}

// locate turns a key error into one naming the case file's line.
func (cd *caseDoc) locate(err error) error {
	var ke *analysis.KeyError
	if !errors.As(err, &ke) {
		return err
	}
	k := ke.Key
	line := cd.line(k, "") // a table's header
	if line == 0 && len(k) > 1 {
		line = cd.line(k[:len(k)-1], k[len(k)-1]) // a key, else its table's header
	}
	return caseError(cd.path, line, ke.Msg)
}

// line finds the line of key in table (of the table header when key is
// ""), or 0. The TOML library reports positions of syntax errors only, so
// checks of values look their keys up here.
func (cd *caseDoc) line(table []string, key string) int {
	cur := []string{}
	header := 0
	arrays := map[string]int{} // [[NAME]] tables seen so far: the k-th is NAME.k
	for i, raw := range strings.Split(string(cd.doc), "\n") {
		l := strings.TrimSpace(raw)
		if strings.HasPrefix(l, "[") {
			if strings.HasPrefix(l, "[[") {
				name := strings.Trim(l[:strings.Index(l+"]]", "]]")], "[ ")
				arrays[name]++
				cur = append(splitKey(name), strconv.Itoa(arrays[name]))
			} else {
				cur = splitKey(strings.Trim(l[:strings.Index(l+"]", "]")], "[ "))
			}
			if equalKeys(cur, table) {
				header = i + 1
				if key == "" {
					return header
				}
			}
			continue
		}
		if key != "" && equalKeys(cur, table) {
			if k, _, ok := strings.Cut(l, "="); ok && strings.Trim(strings.TrimSpace(k), `"`) == key {
				return i + 1
			}
		}
	}
	return header
}

// splitKey splits a dotted TOML key, keeping quoted parts whole.
func splitKey(s string) []string {
	var parts []string
	var b strings.Builder
	quoted := false
	for _, r := range s {
		switch {
		case r == '"':
			quoted = !quoted
		case r == '.' && !quoted:
			parts = append(parts, strings.TrimSpace(b.String()))
			b.Reset()
		default:
			b.WriteRune(r)
		}
	}
	return append(parts, strings.TrimSpace(b.String()))
}

func equalKeys(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
